"""One length, one text: a piece's lengths read the same in the terminal, the CSV files, the PDF,
the SVG templates and the page, in the design's units first and to its ``inch_denominator``.

The expected text is worked out here, independently of cutplan's formatter, from the length in
metres: 1 in = 25.4 mm exactly (international yard and pound agreement, 1959; NIST SP 811,
2008, appendix B.8), rounded to the nearest 1/N in and to 0.1 mm.
"""

import csv
import io
import math
import re
import tomllib
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.render.svg import svg_files
from cutplan.render.table import render_cutlist_csv
from cutplan.web.app import create_app
from cutplan.web.form import form_from_mapping
from tests.pdf_text import page_texts
from tests.test_one_truth import _toml

ROOT = Path(__file__).resolve().parents[2]
INCH_MM = 25.4  # exact (1959 agreement; NIST SP 811 B.8)


def _inches(metres, den):
    """Nearest 1/den in as a builder writes it: "20-5/16", "3/4", "7" (independent of cutplan)."""
    n = round(metres * 1000 / INCH_MM * den)
    whole, rest = divmod(n, den)
    if rest == 0:
        return f"{whole}"
    g = math.gcd(rest, den)
    frac = f"{rest // g}/{den // g}"
    return frac if whole == 0 else f"{whole}-{frac}"


def _texts(metres, units, den):
    """(first, second, inch, mm) of a length shown in ``units`` first."""
    inch, mm = _inches(metres, den), f"{metres * 1000:.1f}"
    first, second = (f"{inch} in", f"{mm} mm") if units == "in" else (f"{mm} mm", f"{inch} in")
    return first, second, inch, mm


def _design(tmp_path, example, **top):
    data = tomllib.loads((ROOT / "examples" / example).read_text(encoding="utf-8"))
    data.update(top)
    path = tmp_path / example
    path.write_text(_toml(data), encoding="utf-8")
    return path, data


def _piece_with_own_sixteenth(plan, den):
    """A piece whose cut length rounds differently to 1/den in and to 1/32 in (so the check can
    tell the design's fraction from the default), or the first piece for 1/32."""
    for p in plan.pieces:
        if den == 32 or _inches(p.cut_length, den) != _inches(p.cut_length, 32):
            return p
    raise AssertionError("no piece tells 1/16 from 1/32")


CASES = [("porch-chimes.toml", {"units": "in", "inch_denominator": 16}),
         ("classroom-pipes.toml", {"units": "mm"})]


@pytest.mark.parametrize("example,top", CASES, ids=["inch-sixteenths", "mm"])
def test_one_pieces_lengths_read_the_same_in_every_output(example, top, tmp_path):
    path, data = _design(tmp_path, example, **top)
    plan = cutplan.plan(cutplan.load_design(path))
    units, den = plan.units, plan.inch_denominator
    assert (units, den) == (top["units"], top.get("inch_denominator", 32))
    p = _piece_with_own_sixteenth(plan, den)
    first, second, inch, mm = _texts(p.cut_length, units, den)
    l_first, l_second, l_inch, l_mm = _texts(p.length, units, den)

    # terminal: the table cell, the design's unit first
    runner = CliRunner()
    table = runner.invoke(cli, ["plan", str(path)])
    assert table.exit_code == 0, table.output
    row = next(x for x in table.output.splitlines() if x.startswith(p.label + " "))
    assert (f"{inch} ({mm})" if units == "in" else f"{mm} ({inch})") in row, row
    assert (f"{l_inch} ({l_mm})" if units == "in" else f"{l_mm} ({l_inch})") in row, row

    # CSV: plan.csv and cutlist.csv
    out = tmp_path / "packet"
    written = runner.invoke(cli, ["plan", str(path), "-o", str(out)])
    assert written.exit_code == 0, written.output
    rows = {r["label"]: r for r in csv.DictReader(io.StringIO((out / "plan.csv").read_text(encoding="utf-8")))}
    assert (rows[p.label]["cut_length_mm"], rows[p.label]["cut_length_in"]) == (mm, f"{inch} in")
    assert (rows[p.label]["length_mm"], rows[p.label]["length_in"]) == (l_mm, f"{l_inch} in")
    cuts = {r["label"]: r for r in csv.DictReader(io.StringIO((out / "cutlist.csv").read_text(encoding="utf-8")))}
    assert (cuts[p.label]["length_mm"], cuts[p.label]["length_in"]) == (mm, f"{inch} in")

    # PDF: the cut-list table cell, the design's unit on top
    pages = page_texts(out / "packet.pdf")
    cut_pages = "\n".join(t for t in pages if "Cut list: " in t)
    assert f"{first}\n{second}" in cut_pages
    assert f"{l_first}\n{l_second}" in cut_pages

    # SVG: the piece's marking strip labels its rough cut and its far end
    svg = ET.parse(out / "templates" / f"{p.label}.svg").getroot()
    labels = [t.text for t in svg.iter("{http://www.w3.org/2000/svg}text")]
    assert f"rough cut {first} ({second})" in labels, labels
    assert any(t.endswith(f"END {l_first} ({l_second})") for t in labels), labels

    # the page (Flask test client): the piece's row keeps each unit on one line
    html = create_app().test_client().post("/", data=form_from_mapping(data)).get_data(as_text=True)
    row = re.search(rf'<tr data-label="{re.escape(p.label)}">(.*?)</tr>', html, re.S).group(1)
    assert f'<td class="num cut"><span class="nw">{first}</span> <span class="nw">({second})</span>' in row
    assert f'<td class="num length"><span class="nw">{l_first}</span> <span class="nw">({l_second})</span>' in row


def test_an_inch_designs_shopping_list_names_the_material_and_its_svg_labels_put_inches_first(tmp_path):
    path, _ = _design(tmp_path, "porch-chimes.toml", units="in")
    plan = cutplan.plan(cutplan.load_design(path))
    material = plan.sets[0].material
    stock = [i for i in plan.shopping if i.group == "stock"]
    assert stock and all(i.what.startswith(f"{material}: ") for i in stock), [i.what for i in stock]
    files = svg_files(plan)
    plate = ET.fromstring(files[f"templates/{plan.sets[0].name}-plate.svg"])
    texts = " ".join(t.text for t in plate.iter("{http://www.w3.org/2000/svg}text"))
    # every length on the plate is stated inches first: "6 in (152.4 mm)", never "152.4 mm" alone
    pair = r"(\S+ (?:in|mm)) \((\S+ (?:in|mm))\)"
    lengths = re.findall(pair, texts)
    assert len(lengths) >= 2 and all(a.endswith(" in") and b.endswith(" mm") for a, b in lengths), texts
    rest = re.sub(pair, "", texts).replace("100 mm: check", "")  # the metric ruler is named for what it is
    assert not re.search(r"\d mm", rest), rest


@pytest.mark.parametrize("bad", [10, 0, "16", 16.5, True, -32, 128])
def test_inch_denominator_other_than_8_16_32_64_is_one_line_naming_file_key_value_and_choices(bad, tmp_path):
    path, _ = _design(tmp_path, "porch-chimes.toml", inch_denominator=bad)
    result = CliRunner().invoke(cli, ["plan", str(path)])
    assert result.exit_code == 2
    lines = [x for x in result.output.splitlines() if "inch_denominator" in x]
    assert len(lines) == 1 and "Traceback" not in result.output, result.output
    line = lines[0]
    assert str(path.name) in line and "8, 16, 32 or 64" in line
    assert (f'"{bad}"' if isinstance(bad, str) else repr(bad)) in line, line


@pytest.mark.parametrize("den", [8, 64])
def test_inch_denominator_reaches_the_cut_list_csv(den, tmp_path):
    path, _ = _design(tmp_path, "porch-chimes.toml", inch_denominator=den)
    plan = cutplan.plan(cutplan.load_design(path))
    rows = [r for r in csv.DictReader(io.StringIO(render_cutlist_csv(plan.cut_list, plan.inch_denominator)))
            if r["label"]]
    cut = {c.label: c for s in plan.cut_list.sticks for c in s.cuts}
    for r in rows:
        assert r["length_in"] == f"{_inches(cut[r['label']].length, den)} in"


def test_cut_list_groups_and_the_shopping_list_key_on_material_and_section_not_on_text(tmp_path):
    # two sets of the same tube in two alloys: the same section text, but a 6061 piece cannot be
    # cut from a 6063 stick, so they are two groups, and each stock line names its own alloy
    path, data = _design(tmp_path, "porch-chimes.toml", units="in")
    second = dict(data["set"][0], name="porch-b", material="aluminum-6061-t6", notes=["D6", "E6"])
    data["set"].append(second)
    path.write_text(_toml(data), encoding="utf-8")
    plan = cutplan.plan(cutplan.load_design(path))
    material_of = {p.label: s.material for s in plan.sets for p in s.pieces}
    groups = plan.cut_list.groups
    assert sorted(g.material for g in groups) == ["aluminum-6061-t6", "aluminum-6063-t5"]
    for g in groups:
        assert {material_of[c.label] for st in g.sticks for c in st.cuts} == {g.material}
        assert g.material in g.group  # two groups that would read the same are told apart
    stock = [i.what for i in plan.shopping if i.group == "stock"]
    assert {w.split(":")[0] for w in stock} == {"aluminum-6061-t6", "aluminum-6063-t5"}, stock


def _denominators(text):
    """Every denominator of a fraction of an inch written in ``text`` ("20-3/8 in", "under 1/8 in")."""
    return {int(d) for d in re.findall(r"(?<![\d/])\d+/(\d+) in\b", text)}


def test_inch_denominator_8_reaches_terminal_csv_pdf_svg_and_page(tmp_path):
    path, data = _design(tmp_path, "porch-chimes.toml", units="in", inch_denominator=8)
    runner = CliRunner()
    out = tmp_path / "packet"
    assert runner.invoke(cli, ["plan", str(path), "-o", str(out)]).exit_code == 0
    table = runner.invoke(cli, ["plan", str(path)]).output
    cells = set(re.findall(r"(?<![\d/])\d+/(\d+) \(", table))  # table cells: "20-1/8 (511.8)"
    texts = {
        "terminal": table, "plan.csv": (out / "plan.csv").read_text(encoding="utf-8"),
        "cutlist.csv": (out / "cutlist.csv").read_text(encoding="utf-8"),
        "pdf": "\n".join(page_texts(out / "packet.pdf")),
        "svg": "\n".join(t.text or "" for f in (out / "templates").glob("*.svg")
                         for t in ET.parse(f).getroot().iter("{http://www.w3.org/2000/svg}text")),
    }
    html = create_app().test_client().post("/", data=form_from_mapping(data)).get_data(as_text=True)
    texts["page"] = html[html.index('<section class="set-plan"'):]  # the preview, not the form's choices
    for where, text in texts.items():
        found = _denominators(text)
        assert found and found <= {2, 4, 8}, (where, found)
    assert cells and {int(d) for d in cells} <= {2, 4, 8}, cells


def test_the_cut_list_on_stock_is_worded_once_in_terminal_pdf_and_page(example_plan, example_packet):
    # the porch example as it stands, from the run's shared fixtures (tests/conftest.py): its plan,
    # and what `plan EXAMPLE -o` printed (the very table `plan EXAMPLE` prints) and wrote
    data = tomllib.loads((ROOT / "examples" / "porch-chimes.toml").read_text(encoding="utf-8"))
    table, _, pages = example_packet("porch-chimes")
    plan = example_plan("porch-chimes")
    status = "proven optimal" if plan.cut_list.proven_optimal else "best found, not proven optimal"
    heading = f"Cut list on stock ({status}; marks measured from the stick's factory end"
    bound = f"fewest possible {plan.cut_list.lower_bound};"
    pdf = " ".join(" ".join(page.split()) for page in pages)
    html = create_app().test_client().post("/", data=form_from_mapping(data)).get_data(as_text=True)
    outputs = {"terminal": table, "pdf": pdf,
               "page": html.replace("&#39;", "'")}
    for where, text in outputs.items():
        assert heading in text and bound in text.replace("Fewest", "fewest"), where
        assert "lower bound" not in text and "(not proven optimal)" not in text, where


def test_planning_and_trim_text_keep_the_designs_inch_fraction(tmp_path):
    # text made while planning (the allowance rule as written) and at the bench (the trim advice)
    # rounds inches to the design's 1/8, not to the default 1/32; the expected text comes from this
    # file's own formatter (1 in = 25.4 mm exactly, NIST SP 811, 2008, B.8)
    path, data = _design(tmp_path, "porch-chimes.toml", units="in", inch_denominator=8)
    data["stock"]["allowance"] = "5 mm"
    path.write_text(_toml(data), encoding="utf-8")
    plan = cutplan.plan(cutplan.load_design(path))
    first, second, _, _ = _texts(0.005, "in", 8)
    assert plan.sets[0].allowance_rule == f"{first} ({second})"
    p = plan.pieces[0]
    result = CliRunner().invoke(cli, ["trim", str(path), p.label, "--measured", f"{p.target_hz * 0.97:.2f}"])
    assert result.exit_code == 0, result.output
    fractions = re.findall(r"(\d+)/(\d+) in", result.output)
    assert fractions and all(8 % int(d) == 0 for _n, d in fractions), fractions


def test_an_undercut_bars_removal_lines_keep_the_designs_inch_fraction(tmp_path, example_plan):
    # the trim answer of an arched bar (trim from each end, cut stations, blend, supports) rounds
    # inches to the design's 1/8, not to the default 1/32 (1 in = 25.4 mm exactly, NIST SP 811,
    # 2008, B.8); a first bar read 3 % flat with its second partial 10 cents flat of 1:4
    example_plan("music-room-marimba")  # its 2-D solves (shared per run): the same bars in inches find them
    path, _ = _design(tmp_path, "music-room-marimba.toml", units="in", inch_denominator=8)
    plan = cutplan.plan(cutplan.load_design(path))
    p = next(piece for piece in plan.pieces if piece.arch is not None)
    f1 = p.target_hz * 0.97
    f2 = f1 * 4.0 * 2 ** (-10 / 1200)
    result = CliRunner().invoke(cli, ["trim", str(path), p.label, "--measured", f"{f1:.2f}, {f2:.2f}"])
    assert result.exit_code == 0, result.output
    fractions = re.findall(r"(\d+)/(\d+) in", result.output)
    assert fractions and all(8 % int(d) == 0 for _n, d in fractions), fractions
