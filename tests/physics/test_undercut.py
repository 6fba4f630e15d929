"""Non-uniform beams and undercut bars: FE against the exact stepped-beam solution; tuned ratios."""

import math
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.physics import beam_fe, timoshenko, undercut
from cutplan.physics.sections import shear_coefficient_cowper_rectangle

ROOT = Path(__file__).resolve().parents[2]
# Sugar maple along the grain (USDA Wood Handbook FPL-GTR-190, 2010, key wood-handbook-2010:
# Table 5-3a MOE 12.6 GPa x 1.10 (the shear allowance of its footnote, from memory), Table 5-1
# G_LR/E_L = 0.111, SG 0.63 -> 706 kg/m3 as 1000 x SG x 1.12 (from memory for the SG basis))
E, G, RHO, NU = 13.86e9, 0.111 * 13.86e9, 706.0, 0.424
KAPPA = shear_coefficient_cowper_rectangle(NU)
B, T = 0.05, 0.022


def cents(a, b):
    return 1200 * math.log2(a / b)


def test_uniform_bar_matches_the_uniform_solver_within_0_05_cent():
    fe = undercut.bar_modes(0.45, B, T, 0.0, 0.5, E, G, RHO, KAPPA, modes=3).frequencies
    exact = timoshenko.frequencies(0.45, E * B * T**3 / 12, RHO * B * T, KAPPA * G * B * T, RHO * B * T**3 / 12, 3)
    for a, b in zip(fe, exact, strict=True):
        assert abs(cents(a, b)) < 0.05


@pytest.mark.parametrize("thin", [0.75, 0.5])
def test_stepped_bar_finite_elements_match_the_exact_transfer_matrix(thin):
    # Independently derived reference: a free-free bar whose middle half is thinner (a step, not
    # an arch), solved exactly by chaining transfer matrices of the three uniform segments
    # (cutplan.physics.timoshenko.transfer_matrix), against the finite elements with a breakpoint
    # at each step. The two methods share only the beam equations.
    length = 0.4
    ei0, mu0 = E * B * T**3 / 12, RHO * B * T
    h2 = thin * T

    def seg(fraction, h):
        ei, area = E * B * h**3 / 12, B * h
        return (fraction, ei / ei0, (RHO * area) / mu0, ei0 / (KAPPA * G * area * length**2),
                RHO * B * h**3 / 12 / (mu0 * length**2))

    segments = [seg(0.25, T), seg(0.5, h2), seg(0.25, T)]
    omegas = timoshenko.dimensionless_frequencies(0.0, 0.0, 3, segments=segments)
    exact = omegas / (2 * np.pi * length**2) * np.sqrt(ei0 / mu0)

    def h(x):
        return np.where((x > 0.1) & (x < 0.3), h2, T)

    breaks = np.concatenate([np.linspace(0, 0.1, 7), np.linspace(0.1, 0.3, 13)[1:], np.linspace(0.3, 0.4, 7)[1:]])
    fe = beam_fe.free_free_modes(length, lambda x: E * B * h(x) ** 3 / 12, lambda x: KAPPA * G * B * h(x),
                                 lambda x: RHO * B * h(x), lambda x: RHO * B * h(x) ** 3 / 12, modes=3, order=4,
                                 breaks=breaks)
    for a, b in zip(fe.frequencies, exact, strict=True):
        assert abs(cents(a, b)) < 0.01


@pytest.mark.parametrize(("ratios", "note_hz"), [((4.0,), 261.63), ((4.0,), 523.25), ((3.0,), 349.23),
                                                 ((4.0, 10.0), 261.63)])
def test_undercut_reaches_the_asked_ratios(ratios, note_hz):
    # Marimba 1:4 and triple 1:4:10, xylophone 1:3 (Fletcher & Rossing, The Physics of Musical
    # Instruments, 2nd ed. 1998, ch. 19, from memory for 1:4:10; HyperPhysics "Xylophone/Marimba"
    # for 1:4 and 1:3, whose "minor third ... 10th harmonic" contradicts itself, so 1:4:10 is used)
    r = undercut.design_undercut(note_hz, ratios, B, T, E, G, RHO, KAPPA, 0.004)
    f = undercut.bar_modes(r.length, B, T, r.depth, r.arch_fraction, E, G, RHO, KAPPA, r.exponent, modes=3).frequencies
    assert abs(cents(f[0], note_hz)) < 0.5
    for k, ratio in enumerate(ratios, start=1):
        assert abs(cents(f[k] / f[0], ratio)) < 5.0
    assert T - r.depth >= 0.004 - 1e-9


def test_undercut_moves_the_nodes_toward_the_ends():
    # An arch moves the mode-1 nodes outward from 0.2242 L (the uniform bar's node, Blevins,
    # Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1, computed); reasoning of our
    # own (heavy end blocks turn about their own centres of mass), checked here
    r = undercut.design_undercut(392.0, (4.0,), B, T, E, G, RHO, KAPPA, 0.004)
    assert r.nodes[0] / r.length < 0.2242
    assert r.nodes[0] + r.nodes[1] == pytest.approx(r.length, rel=1e-3)


def test_impossible_arch_is_refused_with_the_reason():
    with pytest.raises(undercut.UndercutError, match="min"):
        undercut.design_undercut(261.63, (4.0,), B, T, E, G, RHO, KAPPA, 0.018)


def test_undercut_example_meets_the_tuning_targets(example_json):
    data = example_json("music-room-marimba")
    bars = [p for p in data["pieces"] if p["set"] == "bars"]
    assert len(bars) == 8
    for p in bars:
        assert abs(cents(p["predicted_hz"], p["target_hz"])) < 0.5
        assert abs(cents(p["partials_hz"][1] / p["partials_hz"][0], 4.0)) < 5.0
        assert p["undercut"]["centre_thickness_mm"] >= 6.0 - 1e-6


def test_too_thin_a_centre_is_a_design_error(tmp_path):
    text = (ROOT / "examples" / "music-room-marimba.toml").read_text().replace('min_thickness = "6 mm"',
                                                                               'min_thickness = "20 mm"')
    path = tmp_path / "thin.toml"
    path.write_text(text)
    result = CliRunner().invoke(cli, ["plan", str(path)])
    assert result.exit_code == 2
    assert "thin.toml: set[1]" in result.output and "Traceback" not in result.output


def test_progress_is_shown_for_many_bars_on_a_terminal(monkeypatch, example_plan):
    import cutplan.cli.common

    example_plan("music-room-marimba")  # planned once per session: the command line finds its solves remembered

    monkeypatch.setattr(cutplan.cli.common, "_wants_progress", lambda: True)
    result = CliRunner().invoke(cli, ["plan", str(ROOT / "examples" / "music-room-marimba.toml")])
    assert "solving arched bars" in result.output


def test_planner_reports_progress_once_per_arched_bar(example_progress):
    assert example_progress("music-room-marimba") == 8


def test_warm_start_from_the_neighbouring_bar_gives_the_same_arch():
    # Planning solves bars lowest first, each from its neighbour's arch and Jacobian; the result
    # must not depend on where the iteration started (to 0.01 cent), and it takes fewer solves.
    cold = undercut.design_undercut(440.0, (4.0,), B, T, E, G, RHO, KAPPA, 0.004)
    before = undercut.design_undercut(415.3, (4.0,), B, T, E, G, RHO, KAPPA, 0.004)
    warm = undercut.design_undercut(440.0, (4.0,), B, T, E, G, RHO, KAPPA, 0.004,
                                    guess=(before.length, before.depth, before.exponent), jacobian=before.jacobian)
    assert warm.length == pytest.approx(cold.length, rel=1e-7)
    assert warm.depth == pytest.approx(cold.depth, rel=1e-5)
    for a, b in zip(warm.frequencies, cold.frequencies, strict=True):
        assert abs(cents(a, b)) < 0.01
    assert abs(warm.fundamental_residual_cents) < 1e-5 and abs(warm.ratio_residuals_cents[0]) < 1e-5
    assert warm.solves < cold.solves <= undercut.MAX_SOLVES


def test_half_bar_solve_matches_the_whole_mesh():
    # An arched bar is symmetric about its middle, so its modes split into symmetric and
    # antisymmetric families solved on half the mesh; same discretisation, same answers.
    length, depth, alpha = 0.40, 0.013, 0.5

    def h(x):
        return undercut.arch_thickness(x, length, T, depth, alpha)

    args = (length, lambda x: E * B * h(x) ** 3 / 12, lambda x: KAPPA * G * B * h(x), lambda x: RHO * B * h(x),
            lambda x: RHO * B * h(x) ** 3 / 12)
    breaks = undercut._breaks(length, alpha)
    whole = beam_fe.free_free_modes(*args, modes=5, order=3, breaks=breaks)
    half = beam_fe.free_free_modes(*args, modes=5, order=3, breaks=breaks, symmetric=True)
    for a, b in zip(half.frequencies, whole.frequencies, strict=True):
        assert abs(cents(a, b)) < 1e-5
    assert beam_fe.node_positions(half, 1) == pytest.approx(beam_fe.node_positions(whole, 1), abs=1e-9)
