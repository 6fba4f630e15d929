"""The shopping list and cautions computed from a Plan, and the shop tables they read."""

from pathlib import Path

import pytest

import cutplan
from cutplan.planning import shopping
from cutplan.planning.hang_holes import hang_hole_for
from cutplan.units import INCH

ROOT = Path(__file__).resolve().parent.parent


def example(name):
    return cutplan.plan(cutplan.load_design(ROOT / "examples" / f"{name}.toml"))


def test_stock_lines_match_the_stock_layout():
    plan = example("workshop-marimba")
    stock = [i for i in plan.shopping if i.group == "stock"]
    assert sum(i.count for i in stock) == len(plan.cut_list.sticks)
    assert sum(i.total for i in stock) == pytest.approx(sum(s.stock_length for s in plan.cut_list.sticks))
    assert all(not i.suggestion for i in stock)
    assert any("maple-sugar" in i.what for i in stock)


def test_what_the_plan_does_not_compute_is_a_suggestion():
    plan = example("porch-chimes")
    by_what = {i.what.split(" for ")[0].split(":")[0]: i for i in plan.shopping}
    assert by_what["hanging line"].suggestion and by_what["wind sail"].suggestion
    assert not by_what["drill bit"].suggestion
    drill = next(i for i in plan.shopping if i.what.startswith("drill bit"))
    # 1 in OD tube: the 5/32 in row of materials/shop/hang_holes.toml (common practice)
    assert drill.each == pytest.approx(5 / 32 * INCH)
    assert "common practice" in drill.what


def test_hang_hole_rows_are_ordered_and_cover_common_chime_tubes():
    rows = shopping.hang_holes()
    assert [r.max_outer for r in rows] == sorted(r.max_outer for r in rows)
    assert all(r.kind == "common practice" for r in rows)
    assert all(r.drill < r.max_outer / 4 for r in rows)
    # 1/2 in to 2 in tube is the usual range for hand-built chimes (common practice)
    for outer in (0.5 * INCH, 1.0 * INCH, 2.0 * INCH):
        assert hang_hole_for(outer, rows) is not None


def test_no_pvc_caution_without_pvc_and_no_wood_caution_without_wood():
    porch = [c.text for c in example("porch-chimes").cautions]
    pipes = [c.text for c in example("classroom-pipes").cautions]
    assert not any("PVC" in t for t in porch) and any("PVC" in t for t in pipes)
    assert not any("dust" in t.lower() and "wood" in t.lower() for t in porch + pipes)
    assert porch[-1] == shopping.CODES and pipes[-1] == shopping.CODES


def test_the_plate_hangs_by_three_holes_inside_its_edge():
    plan = example("porch-chimes")
    plate = shopping.hanging_plate(plan.sets[0])
    assert len(plate.suspension) == 3
    for x, y in plate.suspension:
        r = (x * x + y * y) ** 0.5
        assert plate.pitch_radius_mm < r < plate.diameter_mm / 2 - plate.hole_mm


def test_suggested_sizes_are_round_in_the_plans_units_and_a_plate_is_not_a_board():
    # 1 in = 25.4 mm exactly (international inch, 1959). A 120 mm plate suggestion in an inch plan
    # is 4.724 in; the nearest quarter inch is 4-3/4 in. "1 x 4-3/4 in" would read as lumber.
    import cutplan
    from cutplan.planning.shopping import round_in_unit, shopping_list
    from cutplan.render.pdf.cover import amount_text

    assert round_in_unit(0.120, "in") == pytest.approx(4.75 * 0.0254)
    assert round_in_unit(0.120, "mm") == pytest.approx(0.120)
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    assert plan.units == "in"
    items = {it.what: it for it in shopping_list(plan)}
    plate = items["hanging plate for porch"]
    assert (plate.each / 0.0254 * 4) == pytest.approx(round(plate.each / 0.0254 * 4))  # whole quarter inches
    assert not amount_text(plan, plate).startswith("1 x")
    line = next(it for w, it in items.items() if w.startswith("hanging line"))
    # the line is bought in whole feet in an inch plan (1 ft = 12 in = 0.3048 m exactly)
    assert line.total / 0.3048 == pytest.approx(round(line.total / 0.3048))
