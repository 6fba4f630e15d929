"""Resonators over a temperature range: stopper depths follow the speed of sound."""

import math

import pytest

from cutplan.design import load_design
from cutplan.materials import load_library
from cutplan.physics import air_column, wall_losses
from cutplan.planning.planner import plan

TEXT = """
[[set]]
name = "bars"
kind = "bar"
notes = ["A4"]
material = "aluminum-6061-t6"
section = { shape = "bar", width = "30 mm", thickness = "8 mm" }

[[set]]
name = "res"
kind = "resonator"
serves = "bars"
section = { shape = "tube", outer = "50 mm", inner = "44 mm" }
temperature = "20 C"
temperature_range = ["10 C", "30 C"]
"""


@pytest.fixture(scope="module")
def res_piece(tmp_path_factory):
    path = tmp_path_factory.mktemp("r") / "d.toml"
    path.write_text(TEXT)
    design, _ = load_design(path, lambda d: load_library(d))
    return [p for p in plan(design).pieces if p.set == "res"][0]


def _quarter_wave(kelvin, f, a=0.022):
    """lambda/4 in the pipe and the end correction: Cramer 1993 (JASA 93(5) 2510, Eq. 15) speed
    at the default 50 % RH, slowed by the wall losses (Keefe 1984, JASA 75(1) 58), and the
    unflanged end correction at ka (Dalmont et al. 2001, J. Sound Vib. 244, 505, fitting
    Levine & Schwinger 1948)."""
    c = air_column.speed_of_sound_cramer_1993(kelvin, 50.0)
    v = wall_losses.phase_speed(c, f, a, kelvin)
    return v / (4 * f), air_column.end_correction_dalmont_nederveen_2001(2 * math.pi * f * a / c) * a


def _bar_hz(kelvin, f):
    """The aluminium bar's pitch at ``kelvin``: d ln f / dT = (e + alpha) / 2 (f ~ (t / L^2)
    sqrt(E / rho), every length growing by alpha dT), e = (1/E) dE/dT (thermal.py's sourced row)."""
    from cutplan.planning.thermal import DRIFTS

    drift = dict(DRIFTS)["aluminum"]
    return f * math.exp(0.5 * (drift.modulus + drift.expansion) * (kelvin - 293.15))


def test_stopper_depth_follows_the_speed_of_sound_and_the_bar(res_piece):
    # closed column L = v / (4 f) - delta at each temperature of the table, a = 22 mm, f the
    # bar's own pitch at that temperature (bar and resonator tuned together)
    f = res_piece.target_hz
    for kelvin, depth in res_piece.stopper:
        quarter, delta = _quarter_wave(kelvin, _bar_hz(kelvin, f))
        assert depth == pytest.approx(quarter - delta, rel=1e-9)
    assert dict(res_piece.stopper)[293.15] == pytest.approx(res_piece.length, rel=1e-12)


def test_stopper_travel_for_twenty_degrees(res_piece):
    # c ~ sqrt(T) in dry air (ISO 9613-1:1993, Formula A.5): lambda/4 at 30 C over lambda/4 at
    # 10 C would be sqrt(303.15 / 283.15) = 1.03472.  At a constant 50 % RH the warm air holds more
    # water, which adds 0.21 % (Cramer 1993, Table III; computed); the wall losses barely move it;
    # the aluminium bar going flat as it warms adds 0.51 % more: (e + alpha) / 2 x 1200 / ln 2 =
    # -0.438 cents/K with e = -5.29e-4 /K and alpha = 22.6e-6 /K at 293 K (NIST 6061-T6 fits,
    # Marquardt, Le & Radebaugh, Cryogenic material properties database, 2000)
    depths = dict(res_piece.stopper)
    f = res_piece.target_hz
    f10, f30 = _bar_hz(283.15, f), _bar_hz(303.15, f)
    quarter_10 = depths[283.15] + _quarter_wave(283.15, f10)[1]
    quarter_30 = depths[303.15] + _quarter_wave(303.15, f30)[1]
    air = _quarter_wave(303.15, f30)[0] / _quarter_wave(283.15, f10)[0]
    assert quarter_30 / quarter_10 == pytest.approx(air, rel=1e-9)
    assert _quarter_wave(303.15, f)[0] / _quarter_wave(283.15, f)[0] / math.sqrt(303.15 / 283.15) == pytest.approx(
        1.0021, abs=2e-4)
    assert f10 / f30 == pytest.approx(2 ** (20 * 0.438 / 1200), abs=2e-4)
    # about 4.2 % of the quarter wavelength: ~8.2 mm for A4
    assert (depths[303.15] - depths[283.15]) * 1000 == pytest.approx(8.2, abs=0.3)


def test_tube_is_cut_for_the_warmest_setting(res_piece):
    assert res_piece.cut_length >= max(d for _, d in res_piece.stopper) + 0.010 - 1e-12


def test_about_three_cents_per_degree(res_piece):
    # the "3 cents per degree C" rule (common practice; computed 2.95 cents/C at 20 C from
    # c ~ sqrt(T), ISO 9613-1:1993, Formula A.5)
    c1, c2 = air_column.speed_of_sound(292.65), air_column.speed_of_sound(293.65)
    assert 1200 * math.log2(c2 / c1) == pytest.approx(2.95, abs=0.01)


def test_the_resonator_says_it_is_tuned_without_its_bar(tmp_path):
    # No published end correction for a bar across the mouth of an unflanged pipe was found, so the
    # lengths carry the open-end correction alone (Levine & Schwinger 1948) and the plan tells the
    # builder to tune with the bar in place; the bar set itself does not carry the line
    from cutplan.render.terminal import render_table

    path = tmp_path / "d.toml"
    path.write_text(TEXT)
    design, _ = load_design(path, lambda d: load_library(d))
    result = plan(design)
    by_name = {s.name: s for s in result.sets}
    assert any("bar in place" in a and "open mouth" in a for a in by_name["res"].assumptions)
    assert not any("bar in place" in a for a in by_name["bars"].assumptions)
    assert "bar in place" in " ".join(render_table(result).split())
