"""Slender (Euler-Bernoulli) free-free beam against published values and an independent library."""

import math

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cutplan.physics import beam


@pytest.mark.parametrize(
    ("mode", "published"),
    # Blevins, Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1 (free-free):
    # beta_n L = 4.73004074, 7.85320462, 10.9956078 (computed to 9 figures from cos x cosh x = 1)
    [(1, 4.73004074), (2, 7.85320462), (3, 10.9956078)],
)
def test_free_free_roots_match_published_table(mode, published):
    assert beam.free_free_root(mode) == pytest.approx(published, abs=5e-8)


@pytest.mark.parametrize("mode", [1, 2, 3, 4, 5, 6])
def test_free_free_roots_match_mpmath_root_finder(mode):
    # independent: mpmath (general-purpose arbitrary-precision library) solving cos x cosh x = 1
    guess = (2 * mode + 1) * mpmath.pi / 2
    with mpmath.workdps(40):
        root = mpmath.findroot(lambda x: mpmath.cos(x) * mpmath.cosh(x) - 1, guess)
    assert beam.free_free_root(mode) == pytest.approx(float(root), rel=1e-13)


def test_mode_one_nodes_at_published_fraction_of_length():
    # Blevins 1979, Table 8-1: nodes of mode 1 at 0.224 L and 0.776 L;
    # 0.22416 / 0.77584 to five places (computed)
    nodes = beam.node_positions(1)
    assert nodes == pytest.approx([0.22416, 0.77584], abs=1e-5)


def test_mode_two_and_three_nodes():
    # Blevins, Formulas for Natural Frequency and Mode Shape, 1979, Table 8-1 (node positions
    # from memory), computed to 5 figures
    assert beam.node_positions(2) == pytest.approx([0.13211, 0.5, 0.86789], abs=1e-5)
    assert beam.node_positions(3) == pytest.approx([0.094443, 0.35580, 0.64420, 0.90556], abs=2e-5)


def test_partial_ratios_are_the_classic_series():
    # Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed. 1998, sec. 2.16 (section
    # from memory): 1 : 2.756 : 5.404 : 8.933;
    # the five-figure ratios are computed from (beta_n L)^2
    assert beam.partial_ratios(6) == pytest.approx([1, 2.75654, 5.40392, 8.93295, 13.3443, 18.6379], rel=2e-5)


def test_rod_frequency_matches_textbook_worked_example():
    # Textbook worked example (Kinsler & Frey, Fundamentals of Acoustics, form
    # f = pi v kappa m^2 / (8 L^2), m = 3.0112; Fletcher & Rossing 1998, sec. 2.16):
    # steel rod L = 1 m, diameter 10 mm, v = sqrt(E/rho) = 3560 m/s
    # gives f1 = 31.69 Hz. Here EI/mu = v^2 r_g^2 with r_g = D/4.
    v, r_g = 3560.0, 0.010 / 4
    rho = 7800.0
    area = math.pi * 0.010**2 / 4
    ei = v**2 * rho * area * r_g**2
    assert beam.free_free_frequency(1, 1.0, ei, rho * area) == pytest.approx(31.69, abs=0.005)


def test_length_for_ten_thousand_targets_in_one_call():
    freqs = np.geomspace(100, 5000, 10_000)
    lengths = beam.free_free_length(freqs, 100.0, 1.0)
    assert lengths.shape == (10_000,)
    back = beam.free_free_frequency(1, lengths, 100.0, 1.0)
    np.testing.assert_allclose(back, freqs, rtol=1e-12)


@settings(max_examples=60, deadline=None)
@given(st.floats(50, 5000), st.floats(1.01, 3.0))
def test_length_is_monotone_in_pitch(f, ratio):
    assert beam.free_free_length(f * ratio, 50.0, 0.5) < beam.free_free_length(f, 50.0, 0.5)


@settings(max_examples=60, deadline=None)
@given(st.floats(50, 5000))
def test_octave_up_divides_slender_length_by_root_two(f):
    # f ~ 1/L^2 (Euler-Bernoulli), so doubling f divides L by sqrt(2) exactly
    ratio = beam.free_free_length(f, 50.0, 0.5) / beam.free_free_length(2 * f, 50.0, 0.5)
    assert ratio == pytest.approx(math.sqrt(2), rel=1e-12)
