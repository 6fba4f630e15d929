"""Resonators over a temperature range: stopper depths follow the speed of sound."""

import math

import pytest

from cutplan.design import load_design
from cutplan.materials import load_library
from cutplan.physics import air_column
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


def test_stopper_depth_follows_the_speed_of_sound(res_piece):
    # ISO 9613-1:1993 Formula A.5: c = 343.2 sqrt(T / 293.15) m/s; closed column
    # L = c / (4 f) - 0.6133 a (Levine & Schwinger 1948), a = 22 mm
    f = res_piece.target_hz
    for kelvin, depth in res_piece.stopper:
        c = 343.2 * math.sqrt(kelvin / 293.15)
        assert depth == pytest.approx(c / (4 * f) - 0.6133 * 0.022, rel=1e-9)


def test_stopper_travel_for_twenty_degrees(res_piece):
    # from c ~ sqrt(T): lambda/4 at 30 C over lambda/4 at 10 C = sqrt(303.15 / 283.15) = 1.03472
    depths = dict(res_piece.stopper)
    quarter_10 = depths[283.15] + 0.6133 * 0.022
    quarter_30 = depths[303.15] + 0.6133 * 0.022
    assert quarter_30 / quarter_10 == pytest.approx(math.sqrt(303.15 / 283.15), rel=1e-9)
    # about 3.5 % of the quarter wavelength: ~6.7 mm for A4
    assert (depths[303.15] - depths[283.15]) * 1000 == pytest.approx(6.8, abs=0.3)


def test_tube_is_cut_for_the_warmest_setting(res_piece):
    assert res_piece.cut_length >= max(d for _, d in res_piece.stopper) + 0.010 - 1e-12


def test_about_three_cents_per_degree(res_piece):
    # the "3 cents per degree C" rule (common practice; computed 2.95 cents/C at 20 C from
    # c ~ sqrt(T), ISO 9613-1:1993, Formula A.5)
    c1, c2 = air_column.speed_of_sound(292.65), air_column.speed_of_sound(293.65)
    assert 1200 * math.log2(c2 / c1) == pytest.approx(2.95, abs=0.01)
