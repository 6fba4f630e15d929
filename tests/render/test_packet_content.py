"""What the shop packet says: a shopping list up front, cautions that fit the materials, the
plan's units first on every page, one allowance per piece with its chance of a sharp piece, and
stoppered tubes cut to length and tuned with the stopper.  Every check reads the PDF text."""

import re
import tomllib
from dataclasses import replace
from pathlib import Path

import pytest

import cutplan
from cutplan.render.pdf import render_pdf
from cutplan.units import format_length
from tests.pdf_text import page_texts

ROOT = Path(__file__).resolve().parents[2]
TRIM = "cut long, then trim to pitch (trimming raises the pitch)"
STOPPER = "cut the tube to its cut length, tune with the stopper"


def pages(plan, paper=None):
    return page_texts(render_pdf(plan, paper))


def flat(text):
    return " ".join(text.split())


def with_allowance(tmp_path, allowance):
    text = (ROOT / "examples" / "porch-chimes.toml").read_text(encoding="utf-8")
    text = re.sub(r'^allowance = .*$', f'allowance = "{allowance}"', text, flags=re.M)
    path = tmp_path / "porch.toml"
    path.write_text(text, encoding="utf-8")
    return cutplan.plan(cutplan.load_design(path))


def test_the_shopping_list_comes_right_after_the_cover(example_plan, example_pdf_text):
    plan = example_plan("porch-chimes")
    text = example_pdf_text("porch-chimes")
    assert "Shopping list" in text[1]
    shop = flat(text[1])
    n_sticks = len(plan.cut_list.sticks)
    assert f"{n_sticks} x {format_length(plan.cut_list.sticks[0].stock_length, 'in')}" in shop
    for word in ("hanging line", "drill bit", "hanging plate", "striker", "wind sail", "SUGGESTION"):
        assert word in shop


def test_bars_and_resonators_get_supports_mallets_and_stoppers(example_pdf_text):
    shop = flat(next(text for text in example_pdf_text("music-room-marimba") if "Shopping list" in text))
    for word in ("felt or foam strip", "pins or cord", "mallets", "sliding stoppers"):
        assert word in shop


def test_cautions_fit_the_materials(example_pdf_text):
    porch = flat(example_pdf_text("porch-chimes")[0])
    wood = flat(example_pdf_text("workshop-marimba")[0])
    assert "PVC" not in porch and "Wood dust" not in porch
    assert "Deburr" in porch and "overhead" in porch
    assert "PVC" in wood and "Wood dust" in wood
    for text in (porch, wood):
        assert "local building codes" in text or "local codes" in text


def test_every_caution_source_resolves(example_plan):
    with open(ROOT / "materials" / "sources.toml", "rb") as fh:
        sources = tomllib.load(fh)
    for name in ("porch-chimes", "music-room-marimba", "workshop-marimba", "classroom-pipes"):
        for caution in example_plan(name).cautions:
            assert caution.source == "" or caution.source in sources
            assert caution.kind in ("handbook", "standard", "paper", "datasheet", "measured", "derived",
                                    "common practice", "from memory")


def test_the_plan_units_come_first_on_every_page(example_plan, example_pdf_text):
    plan = example_plan("porch-chimes")  # units = "in"
    assert plan.units == "in"
    inch_text = flat(" ".join(example_pdf_text("porch-chimes")))
    # the same design planned with units = "mm" (as `plan --units mm` does: the design's choice,
    # so facts worded at planning time, such as shopping-list notes, follow it too)
    design = cutplan.load_design(ROOT / "examples" / "porch-chimes.toml")
    mm_text = flat(" ".join(pages(cutplan.plan(replace(design, units="mm")))))
    for p in plan.pieces:
        assert format_length(p.length, "in") in inch_text
        assert format_length(p.length, "mm") in mm_text
    mm_first = re.compile(r"\d\.\d mm \(\d")
    inch_first = re.compile(r"\d in \(\d+\.\d mm\)")
    assert not mm_first.search(inch_text)
    assert not inch_first.search(mm_text)


def test_a_fixed_allowance_states_its_chance_and_warns_on_the_tuning_sheet(tmp_path):
    plan = with_allowance(tmp_path, "0.5 %")
    sheet = flat(" ".join(t for t in pages(plan) if "Tuning sheet" in t))
    assert "0.5 %" in sheet
    for p in plan.pieces:
        assert f"chance sharp {p.sharp_risk * 100:.0f} %" in sheet
        assert format_length(p.allowance, "in").split(" (")[0] in sheet
    risky = [p for p in plan.pieces if p.sharp_risk > 0.10]
    assert risky
    assert "WARNINGS" in sheet and "chance of cutting this piece too short" in sheet


def test_a_risk_allowance_is_stated_as_written(tmp_path):
    plan = with_allowance(tmp_path, "risk 20 %")
    sheet = flat(" ".join(t for t in pages(plan) if "Tuning sheet" in t))
    assert "risk 20 %" in sheet
    assert "chance sharp 20 %" in sheet
    assert "chance sharp 5 %" not in sheet and "to 5 %" not in sheet


def test_stoppered_tubes_are_cut_to_length_and_tuned_with_the_stopper(example_plan, example_pdf_text):
    plan = example_plan("music-room-marimba")
    text = example_pdf_text("music-room-marimba", "a4")
    for title in ("Cut list: resonators", "Tuning sheet: resonators", "Resonator stopper settings"):
        page = flat(next(t for t in text if title in t))
        assert STOPPER in page.lower() or STOPPER.capitalize() in page, title
    strips = flat(" ".join(t for t in text if "Marking strips" in t))
    assert "OPEN END 0" in strips and "tune with the stopper" in strips
    for p in (p for p in plan.pieces if p.stopper):
        for _t, depth in p.stopper:
            assert format_length(depth, plan.units) in strips


@pytest.mark.parametrize("name", ["porch-chimes", "workshop-marimba", "classroom-pipes"])
def test_trimming_is_worded_the_musicians_way(example_pdf_text, name):
    text = flat(" ".join(example_pdf_text(name)))
    assert TRIM in text
    assert "tune down" not in text.lower()
