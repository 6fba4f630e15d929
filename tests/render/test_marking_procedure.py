"""Follow the packet's marking procedure for every bar of every example, literally, and find the
supports on the finished bar's nodes (within 1 mm).

The procedure as the packet states it: cut the blank at the strip's rough-cut marks; lay the
strip from the rough-cut end and mark the centre line and the supports (the cut list gives them
from the centre line); trim half from each end to pitch.  The nodes are those of an independent
model of the finished bar: the 2-D elastic body on a mesh twice as fine as the planner's, not
the planner's closed form (uniform bars) or its own mesh (arched bars).
"""

from __future__ import annotations

import tomllib
from pathlib import Path

import numpy as np
import pytest

import cutplan
from cutplan.render.marks import piece_marks
from cutplan.tuning import trim_report
from cutplan.tuning.profile_model import elastic_constants

ROOT = Path(__file__).resolve().parents[2]
BAR_EXAMPLES = sorted(p.name for p in (ROOT / "examples").glob("*.toml")
                      if any(s.get("kind") == "bar" for s in tomllib.loads(p.read_text()).get("set", [])))
TOLERANCE = 1.0e-3
"""Supports within 1 mm of the nodes [m] (the issue's requirement; a support pad is wider)."""


def _nodes(piece, spec, length):
    """Mode-1 nodes [m from end A] of the bar at ``length``: the 2-D elastic body on a mesh twice
    as fine as the default (uniform bars: a different method from the planner's closed form)."""
    from cutplan.physics.elastic2d import profile_modes

    e, across, g, nu, _ = elastic_constants(spec.material)
    xs = np.linspace(0.0, length, 401)
    if piece.arch is None:
        hs = np.full(xs.size, spec.section.thickness)
    else:
        from cutplan.physics.undercut import arch_thickness

        a = piece.arch
        hs = arch_thickness(xs - (length - piece.length) / 2, piece.length, a.thickness, a.depth, a.arch_width,
                            a.exponent)
    r = profile_modes(xs, hs, spec.section.width, e, across, g, nu, spec.material.density, modes=1,
                      elements_along=120, elements_through=6)
    return sorted(r.nodes[0])


@pytest.fixture(scope="module", params=BAR_EXAMPLES)
def bars(request, example_plan):
    design = cutplan.load_design(ROOT / "examples" / request.param)
    plan = example_plan(request.param.removesuffix(".toml"))  # planned once per session (tests/conftest.py)
    specs = {s.name: s for s in design.sets}
    return design, plan, [(p, specs[p.set]) for p in plan.pieces if p.kind == "bar"]


def test_there_are_bar_examples():
    assert len(BAR_EXAMPLES) >= 2


def test_supports_marked_on_the_rough_blank_land_on_the_finished_nodes(bars):
    _design, _plan, pieces = bars
    for piece, spec in pieces:
        marks = piece_marks(piece)
        rough = sorted(m.at_mm * 1e-3 for m in marks if m.kind == "rough-cut")
        blank = rough[-1] - rough[0] if len(rough) == 2 else piece.length
        assert blank == pytest.approx(piece.cut_length, abs=1e-6)
        centre = next(m.at_mm * 1e-3 for m in marks if m.kind == "centre")
        on_strip = sorted(m.at_mm * 1e-3 for m in marks if m.kind == "node")
        # the cut list's "supports from centre", measured either side of the centre line
        from_centre = sorted(centre + s * k for s in piece.supports_from_centre for k in (-1, 1))
        trim_each = (blank - piece.length) / 2  # trim half from each end down to the finished length
        nodes = _nodes(piece, spec, piece.length)
        for marked in (on_strip, from_centre):
            finished = [x - trim_each for x in marked]
            assert len(finished) == len(nodes)
            for x, node in zip(finished, nodes, strict=True):
                assert abs(x - node) < TOLERANCE, (piece.label, x, node)


def test_a_bar_finished_at_another_length_gets_its_supports_from_trim(bars):
    # wood 4 % stiffer than the table: the bar sounds about 34 cents sharp of its plan at the cut
    # length and finishes shorter; trim's supports (from the centre line) are on that bar's nodes
    design, plan, pieces = bars
    for piece, spec in pieces[:2]:
        if piece.arch is not None:
            continue
        # f ~ 1/L^2: at the cut length the planned bar sounds target x (L / L_cut)^2; this one 2 % above
        sharp_wood = piece.target_hz * 1.02 * (piece.length / piece.cut_length) ** 2
        report = trim_report(design, plan, piece.label, [sharp_wood])
        assert report.action in ("trim", "in-tune")
        nodes = _nodes(piece, spec, report.length_needed)
        centre = report.length_needed / 2
        for s, node in zip(sorted(report.supports) * 2, sorted(abs(centre - n) for n in nodes), strict=True):
            assert abs(s - node) < TOLERANCE
