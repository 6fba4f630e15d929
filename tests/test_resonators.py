"""Resonators over a temperature range: stopper depths follow the speed of sound."""

import math

import pytest

from cutplan.design import load_design
from cutplan.materials import load_library
from cutplan.physics import air_column, wall_losses
from cutplan.planner import plan

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


def test_stopper_depth_follows_the_speed_of_sound(res_piece):
    # closed column L = v / (4 f) - delta at each temperature of the table, a = 22 mm
    f = res_piece.target_hz
    for kelvin, depth in res_piece.stopper:
        quarter, delta = _quarter_wave(kelvin, f)
        assert depth == pytest.approx(quarter - delta, rel=1e-9)


def test_stopper_travel_for_twenty_degrees(res_piece):
    # c ~ sqrt(T) in dry air (ISO 9613-1:1993, Formula A.5): lambda/4 at 30 C over lambda/4 at
    # 10 C would be sqrt(303.15 / 283.15) = 1.03472.  At a constant 50 % RH the warm air holds more
    # water, which adds 0.21 % (Cramer 1993, Table III; computed); the wall losses barely move it
    depths = dict(res_piece.stopper)
    f = res_piece.target_hz
    quarter_10 = depths[283.15] + _quarter_wave(283.15, f)[1]
    quarter_30 = depths[303.15] + _quarter_wave(303.15, f)[1]
    assert quarter_30 / quarter_10 == pytest.approx(_quarter_wave(303.15, f)[0] / _quarter_wave(283.15, f)[0],
                                                    rel=1e-9)
    assert quarter_30 / quarter_10 / math.sqrt(303.15 / 283.15) == pytest.approx(1.0021, abs=2e-4)
    # about 3.7 % of the quarter wavelength: ~7.2 mm for A4
    assert (depths[303.15] - depths[283.15]) * 1000 == pytest.approx(7.2, abs=0.3)


def test_tube_is_cut_for_the_warmest_setting(res_piece):
    assert res_piece.cut_length >= max(d for _, d in res_piece.stopper) + 0.010 - 1e-12


def test_about_three_cents_per_degree(res_piece):
    # the "3 cents per degree C" rule (common practice; computed 2.95 cents/C at 20 C from
    # c ~ sqrt(T), ISO 9613-1:1993, Formula A.5)
    c1, c2 = air_column.speed_of_sound(292.65), air_column.speed_of_sound(293.65)
    assert 1200 * math.log2(c2 / c1) == pytest.approx(2.95, abs=0.01)
