"""A simulated builder follows ``trim``'s removal advice on an undercut bar, round by round.

The bar on the bench is hidden from the tool: it is the rough blank (cut length, the planned
arch centred on it), made of wood whose stiffnesses differ from the table (E +3 %, G -3 %).  The
extra length at the ends pulls the partials apart, so f2 sits about 40 cents off its place
relative to f1.  Each round the builder "records" the bar by solving the model of the bar's
own current profile with the true wood (the oracle), makes the advised cuts exactly as the
report states them (stations from end A, depth, blended linearly to nothing ``blend`` either
side, end trims), and says the round was done.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import cutplan
from cutplan.physics.elastic2d import profile_modes
from cutplan.physics.undercut import arch_thickness
from cutplan.physics.width_terms import WidthConstants
from cutplan.tuning import trim_report
from cutplan.tuning.profile_model import elastic_constants

# a bar tuned 1 : 4 : 10 (Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed., 1998,
# ch. 19: marimba bars, partials two octaves and three octaves and a major third above the first)
DESIGN = {"title": "Garden bar", "units": "mm", "set": [{
    "name": "bars", "kind": "bar", "notes": ["F4"], "material": "rosewood-honduras",
    "section": {"shape": "bar", "width": "55 mm", "thickness": "24 mm"},
    "undercut": {"ratios": [4.0, 10.0], "arch_width": 0.6, "min_thickness": "5 mm"}}]}


def _cents(a, b):
    return 1200 * math.log2(a / b)


class Bench:
    """The real bar: its profile (xs, hs) [m] from end A and the wood it is made of.  It is
    "recorded" with the 2-D model, the width resolved, on a mesh twice as fine along and half
    again through the bar as the tool's, over the bar's own 240-segment profile (the tool models
    48)."""

    def __init__(self, piece, spec, stiffness=1.03, shear=0.97):
        a = piece.arch
        self.xs = np.linspace(0.0, piece.cut_length, 241)
        shift = (piece.cut_length - piece.length) / 2  # the arch centred on the rough blank
        self.hs = arch_thickness(self.xs - shift, piece.length, a.thickness, a.depth, a.arch_width, a.exponent)
        e, across, g, nu, w = elastic_constants(spec.material)
        self.wood = (spec.section.width, e * stiffness, across * stiffness, g * shear, nu, spec.material.density)
        self.width = WidthConstants(w.modulus_width * stiffness, w.shear_length_width * shear,
                                    w.shear_width_thickness * shear, w.poisson_length_width,
                                    w.poisson_width_thickness)

    def record(self):
        """Partials 1-3 of the bar as it is now [Hz] (the oracle)."""
        r = profile_modes(self.xs, self.hs, *self.wood, modes=3, elements_along=120, elements_through=6,
                          width_constants=self.width)
        return tuple(float(f) for f in r.frequencies[:3])

    def follow(self, report):
        """Make the cuts exactly as the report states them, then the end trims."""
        for x, depth, _mode, _raises in report.removal:
            shape = np.clip(1.0 - np.abs(self.xs - x) / report.blend, 0.0, None)
            self.hs = self.hs - depth * shape
        e = report.trim_each_end
        if e > 0:
            keep = (self.xs >= e - 1e-12) & (self.xs <= self.xs[-1] - e + 1e-12)
            new = np.linspace(e, self.xs[-1] - e, 241)
            self.hs = np.interp(new, self.xs, self.hs)
            self.xs = new - e
            assert keep.any()


@pytest.fixture(scope="module")
def planned():
    design = cutplan.design_from_mapping(DESIGN)
    return design, cutplan.plan(design)


@pytest.mark.slow
def test_three_rounds_of_removal_bring_f1_to_f3_within_3_cents(planned):
    design, plan = planned
    piece = plan.pieces[0]
    spec = design.sets[0]
    targets = (piece.target_hz, 4 * piece.target_hz, 10 * piece.target_hz)
    bar = Bench(piece, spec)
    first = bar.record()
    # the rough bar: f2 about 40 cents off its target relative to f1 (the scenario asked for)
    assert 30 < abs(_cents(first[1] / first[0], 4.0)) < 50
    state, done = None, False
    for _ in range(3):
        report = trim_report(design, plan, piece.label, bar.record(), state=state, done=done)
        assert report.action in ("remove", "trim", "in-tune")
        bar.follow(report)
        state, done = report.state, True
    final = bar.record()
    misses = [_cents(f, t) for f, t in zip(final, targets, strict=True)]
    assert max(abs(m) for m in misses) < 3.0, misses


def test_prediction_after_the_first_round_matches_the_bar_within_a_few_cents(planned):
    # the report's predicted_after_hz against the oracle's reading after the cuts: the model's
    # own error (the wood differs from the table) stays a small part of the first step
    design, plan = planned
    piece = plan.pieces[0]
    bar = Bench(piece, design.sets[0])
    before = bar.record()
    report = trim_report(design, plan, piece.label, before)
    bar.follow(report)
    after = bar.record()
    for f_pred, f_real, f_before in zip(report.predicted_after_hz, after, before, strict=True):
        moved = abs(_cents(f_real, f_before))
        assert abs(_cents(f_pred, f_real)) < max(3.0, 0.25 * moved)


def test_json_fields_of_the_removal_advice(planned):
    design, plan = planned
    piece = plan.pieces[0]
    bar = Bench(piece, design.sets[0])
    data = trim_report(design, plan, piece.label, bar.record()).as_dict()
    assert [p["mode"] for p in data["partials"]] == [1, 2, 3]
    for p in data["partials"]:
        assert p["cents"] == pytest.approx(_cents(p["measured_hz"], p["target_hz"]), abs=0.01)
    assert data["removal"] and all(0 <= r["x_mm"] <= piece.cut_length * 1e3 and r["depth_mm"] > 0
                                   for r in data["removal"])
    assert len(data["predicted_after_hz"]) == 3


def test_a_sharp_bar_with_no_wood_left_to_remove_is_reported_unreachable(planned):
    # trimming the ends only raises every partial (a shorter free-free bar is higher: Rayleigh,
    # The Theory of Sound, 1877, vol. 1, sec. 171, f ~ 1/L^2); with the thickness already at the
    # builder's minimum no cut can lower f1, so a sharp f1 cannot be reached by removal alone
    from dataclasses import replace

    from cutplan.tuning import removal
    from cutplan.tuning.arched import bar_data, planned_profile

    design, plan = planned
    piece = plan.pieces[0]
    xs, hs = planned_profile(piece, piece.length)
    bar = replace(bar_data(design.sets[0]), min_thickness=float(max(hs)) + 1e-4)
    advice = removal.advise_removal(bar, xs, hs, [piece.target_hz * 2 ** (20 / 1200)], [piece.target_hz])
    assert advice.removal == () and advice.trim_each_end == 0.0
    assert advice.unreachable == (1,)
