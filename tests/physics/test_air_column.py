"""Air columns: speed of sound, end corrections and resonance lengths."""

import pytest
from hypothesis import given
from hypothesis import strategies as st

from cutplan.physics import air_column as ac


def test_speed_of_sound_dry_air_20c():
    # ISO 9613-1:1993, Formula A.5: c = 343.2 sqrt(T / 293.15 K), 343.2 m/s at 20 C
    assert ac.speed_of_sound_iso9613(293.15) == pytest.approx(343.2, abs=0.01)


def test_speed_of_sound_textbook_formula_agrees_within_a_cent():
    # Kinsler et al., Fundamentals of Acoustics: c = 331.3 sqrt(1 + T/273.15) (from memory):
    # 343.21 at 20 C, 346.13 at 25 C, 340.28 at 15 C (computed)
    for t_c, c in [(20, 343.21), (25, 346.13), (15, 340.28)]:
        assert ac.speed_of_sound_iso9613(273.15 + t_c) == pytest.approx(c, rel=2e-4)


@pytest.mark.parametrize(
    ("t_c", "rh", "expected"),
    # Cramer 1993, JASA 93(5) 2510, Eq. 15 / Table III, with Davis 1992 (Metrologia 29, 67) water
    # vapour, 101.325 kPa, 400 ppm CO2 (computed from those equations)
    [(20, 0, 343.359), (20, 50, 343.987), (20, 100, 344.614), (0, 0, 331.448), (25, 0, 346.268), (30, 0, 349.148)],
)
def test_cramer_speed_of_sound(t_c, rh, expected):
    assert ac.speed_of_sound_cramer_1993(273.15 + t_c, rh) == pytest.approx(expected, abs=0.002)


def test_end_correction_factors():
    # Levine & Schwinger 1948, Phys. Rev. 73, 383: unflanged 0.6133 a;
    # Norris & Sheng 1989, J. Sound Vib. 135, 85: infinite flange 0.8216 a
    assert ac.end_correction(1.0, "unflanged") == pytest.approx(0.6133)
    assert ac.end_correction(1.0, "flanged") == pytest.approx(0.8216)
    assert ac.end_correction(1.0, "none") == 0.0
    assert ac.end_correction(0.01, 0.5) == pytest.approx(0.005)


def test_open_tube_is_half_wavelength_minus_two_end_corrections():
    # A4 = 440 Hz (ISO 16:1975), c = 343.2 m/s, a = 12.5 mm -> 0.390 - 2 x 0.6133 x 0.0125 m
    assert ac.open_open_length(440.0, 0.0125, 343.2) == pytest.approx(0.390 - 0.0153325, rel=1e-6)


def test_closed_tube_is_quarter_wavelength_minus_one_end_correction():
    assert ac.closed_open_length(440.0, 0.0125, 343.2) == pytest.approx(0.195 - 0.00766625, rel=1e-6)


def test_closed_column_speed_from_one_resonance():
    # A worked example of our own, computed from the closed-open formula f = c / (4 L)
    # (Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed. 1998, ch. 8, chapter from
    # memory):
    # 0.185 m closed column at 463.8 Hz, no end correction -> c = 4 x 463.8 x 0.185 = 343.21 m/s
    assert ac.speed_from_resonance(463.8, 0.185) == pytest.approx(343.21, abs=0.005)


def test_two_resonance_method_recovers_speed_and_end_correction():
    # standard lab method: L1 + delta = lambda/4 and L2 + delta = 3 lambda/4 from the closed-open
    # formula (Fletcher & Rossing 1998, ch. 8, from memory), so L2 - L1 = lambda/2 and
    # delta = (L2 - 3 L1)/2 (computed)
    c, f, delta = 343.2, 500.0, 0.008
    l1 = c / (4 * f) - delta
    l2 = 3 * c / (4 * f) - delta
    speed, corr = ac.two_resonance(f, l1, l2)
    assert speed == pytest.approx(c, rel=1e-12)
    assert corr == pytest.approx(delta, rel=1e-9)


def test_two_resonance_refuses_out_of_order_lengths():
    with pytest.raises(ValueError):
        ac.two_resonance(500.0, 0.5, 0.2)


@given(st.floats(100, 2000), st.floats(0.005, 0.03))
def test_length_and_frequency_round_trip(f, a):
    for length_of, freq_of in [(ac.open_open_length, ac.open_open_frequency),
                               (ac.closed_open_length, ac.closed_open_frequency)]:
        length = length_of(f, a, 343.2)
        if length > 0:
            assert freq_of(length, a, 343.2) == pytest.approx(f, rel=1e-12)


def test_air_column_pitch_drift_is_about_three_cents_per_degree():
    # c ~ sqrt(T) (ISO 9613-1:1993, Formula A.5): d(cents)/dT = 1200/(2 ln2 T) = 2.95 cents/C
    # at 20 C (computed)
    import math

    c1, c2 = ac.speed_of_sound_iso9613(292.65), ac.speed_of_sound_iso9613(293.65)
    assert 1200 * math.log2(c2 / c1) == pytest.approx(2.95, abs=0.01)
