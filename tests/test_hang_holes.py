"""Chime hang holes on the plan: the split of the bending planes, its beat, the warning and the drill."""

import math
from pathlib import Path

import pytest

import cutplan
from cutplan.physics.hang_hole import hang_hole_shifts
from cutplan.planning import hang_holes
from cutplan.planning.hang_holes import hang_hole_for
from cutplan.planning.shopping import hang_holes as shop_rows
from cutplan.render.table import plan_dict

ROOT = Path(__file__).resolve().parent.parent


def _chime(outer, wall, note):
    design = cutplan.design_from_mapping({"set": [{
        "name": "c", "kind": "chime", "notes": [note], "material": "aluminum-6063-t5",
        "section": {"shape": "tube", "outer": outer, "wall": wall}}]})
    return cutplan.plan(design)


def test_each_chime_states_its_hang_hole_split_and_beat():
    # the shop table's drill for the tube size, at the planned hang point; the beat is the
    # fundamental times the difference of the two relative shifts (beam estimate, checked against
    # a finite-element beam in tests/physics)
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    rows = shop_rows()
    for p in plan.pieces:
        h = p.hang_hole
        assert h.drill == hang_hole_for(0.0254, rows).drill
        in_plane, across = hang_hole_shifts(p.length, 0.0254, 0.0254 - 2 * 0.065 * 0.0254, h.drill,
                                            p.nodes[0] / p.length)
        assert h.beat_hz == pytest.approx(p.partials_hz[0] * (across - in_plane), rel=1e-12)
        assert h.in_plane_cents == pytest.approx(1200 * math.log2(1 + in_plane), rel=1e-12)
        assert h.in_plane_cents < h.across_cents < 0  # bending in the hole's plane drops most
    js = plan_dict(plan)["pieces"][0]["hang_hole"]
    assert set(js) == {"drill_mm", "mode", "in_plane_cents", "across_cents", "beat_hz", "largest_drill_mm"}


def test_a_fast_beat_warns_and_the_shopping_list_takes_a_smaller_drill():
    # 2 in x 0.035 in tube at C8 with the table's 3/16 in drill (common-practice table): the
    # beat passes the 1.5 Hz limit, so the warning names a smaller drill and the shopping list
    # buys that one
    plan = _chime("2 in", "0.035 in", "C8")
    (p,) = plan.pieces
    assert p.hang_hole.beat_hz > hang_holes.BEAT_LIMIT_HZ
    assert 0 < p.hang_hole.largest_drill < p.hang_hole.drill
    assert any(w.startswith("hang hole") and "beats at" in w for w in (n.message for n in p.warnings))
    (drill,) = [i for i in plan.shopping if "drill bit" in i.what]
    assert drill.each == pytest.approx(p.hang_hole.largest_drill)


def test_largest_drill_keeps_the_beat_under_the_limit():
    plan = _chime("2 in", "0.035 in", "C8")
    (p,) = plan.pieces
    h = p.hang_hole
    inner = (2 - 0.07) * 0.0254
    for d, under in [(h.largest_drill, True), (h.largest_drill + hang_holes.DRILL_STEP, False)]:
        a, b = hang_hole_shifts(p.length, 2 * 0.0254, inner, d, p.nodes[0] / p.length)
        assert (p.partials_hz[0] * (b - a) <= hang_holes.BEAT_LIMIT_HZ) == under
