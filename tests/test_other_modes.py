"""Sideways and twisting modes on the plan: JSON, terminal, and the warnings that name them."""

import json
import math
from pathlib import Path

import pytest

import cutplan
from cutplan.render.table import plan_dict
from cutplan.render.terminal import render_table

ROOT = Path(__file__).resolve().parent.parent


def _plan(sets):
    return cutplan.plan(cutplan.design_from_mapping({"title": "test", "set": sets}))


def test_workshop_example_reports_sideways_and_twisting_modes_of_every_bar():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "workshop-marimba.toml"))
    bars = [p for p in plan_dict(plan)["pieces"] if p["kind"] == "bar"]
    for p in bars:
        kinds = {m["kind"] for m in p["other_modes"]}
        assert kinds == {"sideways", "twisting"}
        assert all(m["hz"] > 0 and m["mode"] >= 1 for m in p["other_modes"])
    tubes = [p for p in plan_dict(plan)["pieces"] if p["kind"] == "resonator"]
    assert all("other_modes" not in p for p in tubes)
    text = render_table(plan)
    assert "bars-1: other modes sideways" in text and "twisting" in text


def test_music_room_example_pins_the_modes_of_its_arched_bars():
    # the golden plan is checked against a fresh plan by test_examples; here, that it has them
    data = json.loads((ROOT / "tests" / "data" / "expected" / "music-room-marimba.json").read_text())
    for p in data["pieces"]:
        if p["kind"] == "bar":
            assert {m["kind"] for m in p["other_modes"]} == {"sideways", "twisting"}


def test_bar_thicker_than_wide_warns_that_sideways_mode_1_is_below_the_fundamental():
    plan = _plan([{"name": "tall", "kind": "bar", "notes": ["C5"], "material": "aluminum-6061-t6",
                   "section": {"shape": "bar", "width": "20 mm", "thickness": "30 mm"}}])
    (piece,) = plan.pieces
    side1 = next(f for kind, n, f in piece.other_modes if kind == "sideways" and n == 1)
    assert side1 < piece.fundamental_hz
    assert any(w.startswith("sideways mode 1") and "below the fundamental" in w for w in (n.message for n in piece.warnings))


def test_twisting_mode_near_partial_2_is_named_in_a_warning():
    # quarter-sawn maple 46 x 22 mm tuned to F4: the first twist lands about 26 cents above mode 2
    # (Saint-Venant twisting of the orthotropic rectangle, G_LR in the face and G_LT through the
    # thickness; Wood Handbook 2010 Table 5-1). With one G for every plane the 50 mm bar did this.
    plan = _plan([{"name": "b", "kind": "bar", "notes": ["F4"], "material": "maple-sugar", "grain": "quarter",
                   "section": {"shape": "bar", "width": "46 mm", "thickness": "22 mm"}}])
    (piece,) = plan.pieces
    assert any(w.startswith("twisting mode 1") and "partial 2" in w for w in (n.message for n in piece.warnings))


def test_chime_tubes_report_twisting_and_ring_modes_never_sideways():
    # a round tube bends alike in every plane (no separate sideways mode); it twists, and its wall
    # ovals (ring modes n = 2, 3, ...; Blevins 1979, ch. 12), listed from the first of each
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    for p in plan.pieces:
        assert p.other_modes and {kind for kind, _, _ in p.other_modes} == {"twisting", "ring"}
        assert min(n for kind, n, _ in p.other_modes if kind == "ring") == 2


def test_ring_mode_near_the_strike_partial_of_a_big_thin_tube_is_named():
    # 3-1/4 in x 0.100 in aluminium (6063-T5, E 68.9 GPa; ASM/MatWeb typical), whose ovalling mode
    # lies near 1.05 kHz (thin-ring formula, Blevins 1979, ch. 12, checked in tests/physics);
    # tuned to C5 by its strike note (half of mode 4), mode 4 is near 1046.5 Hz, a few cents
    # from the ring mode: the warning must name it
    from cutplan.physics.ring_modes import ring_frequencies

    ring = ring_frequencies(3.25 * 0.0254, 3.05 * 0.0254, 68.9e9, 2700.0, 0.33, modes=1)[0]
    plan = _plan([{"name": "big", "kind": "chime", "notes": ["C5"], "material": "aluminum-6063-t5",
                   "section": {"shape": "tube", "outer": "3.25 in", "wall": "0.100 in"},
                   "target": "strike-note"}])
    (piece,) = plan.pieces
    (f_ring,) = [f for kind, n, f in piece.other_modes if kind == "ring" and n == 2]
    assert f_ring == pytest.approx(ring, rel=1e-9)
    mode4 = piece.partials_hz[3]
    assert abs(1200 * math.log2(f_ring / mode4)) <= 30
    assert any(w.startswith("ring mode 2") and "partial 4" in w and "ring modes do not change" in w
               for w in (n.message for n in piece.warnings))


def test_air_columns_have_no_other_modes():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "classroom-pipes.toml"))
    assert all(p.other_modes == () for p in plan.pieces)


def test_wide_short_plate_warns_that_twisting_is_below_the_fundamental():
    # twisting f ~ (t / w) / L while bending f ~ t / L^2: a bar much wider than long twists low
    plan = _plan([{"name": "plate", "kind": "bar", "notes": ["C8"], "material": "steel-1018",
                   "section": {"shape": "bar", "width": "120 mm", "thickness": "6 mm"}}])
    (piece,) = plan.pieces
    assert any(w.startswith("twisting mode 1") and "below the fundamental" in w and "narrower" in w
               for w in (n.message for n in piece.warnings))


def test_the_clearance_can_be_chosen():
    from cutplan.planning.other_modes import with_other_modes

    design = cutplan.design_from_mapping({"title": "t", "set": [
        {"name": "b", "kind": "bar", "notes": ["F4"], "material": "maple-sugar", "grain": "quarter",
         "section": {"shape": "bar", "width": "46 mm", "thickness": "22 mm"}}]})
    plan = cutplan.plan(design)
    bare = [p.__class__(**{**p.__dict__, "warnings": (), "other_modes": ()}) for p in plan.pieces]
    tight = with_other_modes(design.sets[0], bare, clearance_cents=5.0)[0]
    assert not any("twisting mode 1" in w for w in (n.message for n in tight.warnings))  # it is 26 cents away
    loose = with_other_modes(design.sets[0], bare, clearance_cents=30.0)[0]
    assert any("twisting mode 1" in w for w in (n.message for n in loose.warnings))
