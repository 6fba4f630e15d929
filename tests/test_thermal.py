"""Warm bars and tubes: the pitch drift of a bending mode with temperature."""

import math

import pytest

import cutplan
from cutplan.planning import thermal
from cutplan.physics import beam


def test_drift_formula_matches_the_beam_formula_with_warmed_dimensions():
    # f1 = (beta1 L)^2 / (2 pi L^2) sqrt(EI / mu) (Thomson & Dahleh, Theory of Vibration, App. D):
    # warm a rectangular bar by 1 K (every length x (1 + alpha), density / (1 + alpha)^3, E x (1 + e))
    # and compare with (e + alpha) / 2
    e, alpha = -5.0e-4, 23e-6
    drift = thermal.Drift(e, alpha, "test")

    def f1(scale, modulus, density):
        w, t, length = 0.04 * scale, 0.01 * scale, 0.3 * scale
        return beam.free_free_frequency(1, length, modulus * w * t**3 / 12, density * w * t)

    cold = f1(1.0, 69e9, 2700.0)
    warm = f1(1 + alpha, 69e9 * (1 + e), 2700.0 / (1 + alpha) ** 3)
    assert math.log(warm / cold) == pytest.approx(drift.per_kelvin, rel=1e-3)


def test_metals_drift_flat_by_a_fraction_of_a_cent_per_kelvin():
    # metal bars drift the other way from air columns and much less (-0.2 to -0.5 cents/K;
    # values from memory, low confidence): the sign and the order of size only
    from cutplan.materials import load_library

    lib = load_library()
    for name in ("aluminum-6063-t5", "copper-c12200", "brass-c26000", "steel-1018"):
        cents = thermal.drift_for(lib.materials[name]).cents_per_kelvin
        assert -0.5 < cents < -0.15
    assert thermal.drift_for(lib.materials["maple-sugar"]).cents_per_kelvin < -1.0  # wood: much more
    assert thermal.drift_for(lib.materials["pvc-rigid"]).cents_per_kelvin < -1.0


def test_the_drift_is_stated_with_the_set():
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent
    plan = cutplan.plan(cutplan.load_design(root / "examples" / "porch-chimes.toml"))
    assert any(a.startswith("pitch drifts -0.4") and "cents per kelvin" in a for a in plan.sets[0].assumptions)
