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


def _levine_schwinger_end_correction(ka):
    """delta/a of an unflanged pipe from Levine & Schwinger's exact integrals (Phys. Rev. 73(4)
    383, 1948), evaluated numerically: an independent model of the end-correction curve.

    delta/a = (1/pi) int_0^ka ln[pi J1(x) sqrt(J1^2 + Y1^2)] / (x sqrt(k^2a^2 - x^2)) dx
            + (1/pi) int_0^inf ln[1 / (2 I1(x) K1(x))] / (x sqrt(x^2 + k^2a^2)) dx
    """
    import numpy as np
    from scipy import integrate
    from scipy import special as sp

    def first(theta):  # x = ka sin(theta) removes the inverse-square-root end point
        x = ka * np.sin(theta)
        if x < 1e-9:
            return 0.0
        return np.log(np.pi * sp.j1(x) * np.hypot(sp.j1(x), sp.y1(x))) / x

    def second(x):
        return np.log(1 / (2 * sp.ive(1, x) * sp.kve(1, x))) / (x * np.sqrt(x * x + ka * ka))

    cuts = np.geomspace(1e-5, 1e3, 17)  # below 1e-5 (round-off there) adds under 3e-5 to delta/a
    tail = sum(integrate.quad(second, a, b, limit=200)[0] for a, b in zip(cuts, cuts[1:], strict=False))
    tail += (np.log(1e3) + 1) / 1e3  # int_X^inf ln(x) / x^2 dx, the integrand's large-x form
    head = integrate.quad(first, 0, np.pi / 2, limit=200)[0] if ka > 0 else 0.0
    return (head + tail) / np.pi


def test_end_correction_curve_follows_levine_schwinger():
    # Levine & Schwinger 1948, exact integrals (evaluated above) against the Dalmont, Nederveen &
    # Joly 2001 (J. Sound Vib. 244, 505) fit, as ratios to the low-frequency limit: the fit is
    # normalised to L & S's printed 0.6133, while the integrals evaluate to 0.6127 here, so the
    # shape is compared (within 0.3 % for ka <= 1.5, the fit's stated range)
    zero = _levine_schwinger_end_correction(0.0)
    assert zero == pytest.approx(0.6133, abs=1e-3)
    for ka in (0.1, 0.3, 0.5, 1.0, 1.5):
        exact = _levine_schwinger_end_correction(ka) / zero
        fit = ac.end_correction_dalmont_nederveen_2001(ka) / ac.END_CORRECTION_UNFLANGED
        assert fit == pytest.approx(exact, abs=3e-3)
    # the figure: about 2 % smaller at ka = 0.3 (Levine & Schwinger's curve)
    assert _levine_schwinger_end_correction(0.3) / zero == pytest.approx(0.979, abs=2e-3)


def test_flanged_end_correction_curve_starts_at_norris_sheng_and_falls():
    # Norris & Sheng 1989, J. Sound Vib. 135, 85: 0.8216 a at low frequency; the fit (Dalmont et
    # al. 2001) falls with ka like the unflanged curve, faster (more radiation mass is lost)
    assert ac.end_correction_norris_sheng_1989(0.0) == pytest.approx(0.8216)
    values = [ac.end_correction_norris_sheng_1989(x) for x in (0.1, 0.5, 1.0, 2.0)]
    assert values == sorted(values, reverse=True)
    assert ac.end_correction(1.0, 0.7, ka=1.0) == 0.7  # a fixed (measured) factor stays fixed
