"""The allowance after calibration keeps wood's between-board spread unless several blanks were
calibrated; metal from one stock keeps the small calibrated spread."""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import numpy as np
import pytest

import cutplan
from cutplan.materials import load_library
from cutplan.physics.sections import Section
from cutplan.planning import uncertainty
from cutplan.tuning.calibrate_moduli import (
    calibrated_moduli_toml,
    fit_moduli,
    partial_frequencies,
)

ROOT = Path(__file__).resolve().parents[1]


def _independent_allowance(piece, e_spread, rho_spread, risk=0.05):
    """Allowance [m] by first principles, with its own random stream: f ~ sqrt(E / rho) L^-k
    (k from the piece's own trim rate), so the cut length that is sharp with probability ``risk``
    is L q^(1/k), q the (1 - risk) quantile of sqrt(E / rho)."""
    rng = np.random.default_rng(12345)
    e = 1 + e_spread * rng.standard_normal(400_000)
    rho = 1 + rho_spread * rng.standard_normal(400_000)
    q = float(np.quantile(np.sqrt(np.clip(e, 0.5, None) / np.clip(rho, 0.5, None)), 1 - risk))
    k = piece.cents_per_mm * piece.length * 1000 * math.log(2) / 1200
    return piece.length * (q ** (1 / k) - 1)


def test_wood_after_one_blank_keeps_the_between_board_spread():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "workshop-marimba.toml"))
    maple = load_library().materials["maple-sugar"]
    for piece in (p for p in plan.pieces if p.kind == "bar"):
        # the table's spreads (10 % E, 6 % density), capped by the Wood Handbook's 22 % CV of MOE
        want = _independent_allowance(piece, min(maple.modulus_spread, 0.22), maple.density_spread)
        # 2 % covers the Monte Carlo quantile (20,000 samples in the plan) and the power law's
        # departure from the exact frequency curve over a few percent of length
        assert piece.allowance_calibrated == pytest.approx(want, rel=0.02)
        assert piece.allowance_calibrated > 10e-3  # not the 0.3 mm a one-stick metal would get


def test_metal_after_a_test_piece_keeps_the_small_spread():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    for piece in plan.pieces:
        want = _independent_allowance(piece, uncertainty.CALIBRATED_MODULUS_SPREAD, 0.0)
        assert piece.allowance_calibrated == pytest.approx(want, rel=0.05, abs=0.05e-3)


def _maple_fit(lengths):
    maple = load_library().materials["maple-sugar"]
    section = Section("bar", width=0.050, thickness=0.022)
    e, g = maple.modulus_for("timoshenko") * 1.04, maple.shear_modulus_for("timoshenko") * 1.04
    measured = []
    for length in lengths:
        f = partial_frequencies(maple, section, "timoshenko", e, g, length, 3)
        measured += [(length, mode, float(hz)) for mode, hz in enumerate(f, start=1)]
    return maple, fit_moduli(measured, maple, section, "timoshenko")


def _written_spreads(text):
    entry = next(iter(tomllib.loads(text).values()))
    return entry["modulus"]["spread"], entry["density"]["spread"], entry.get("class")


def test_calibrated_wood_file_from_one_blank_keeps_the_table_spread():
    maple, fit = _maple_fit([0.45])
    e, rho, cls = _written_spreads(calibrated_moduli_toml("maple-cal", maple, "timoshenko", fit, "one blank"))
    assert (e, rho, cls) == ("10.00 %", "6.00 %", "wood")


def test_calibrated_wood_file_from_three_blanks_uses_their_scatter():
    maple, fit = _maple_fit([0.40, 0.45, 0.50])
    e, rho, _ = _written_spreads(calibrated_moduli_toml("maple-cal", maple, "timoshenko", fit, "three blanks"))
    assert e == f"{100 * max(uncertainty.CALIBRATED_MODULUS_SPREAD, fit.spread):.2f} %" and rho == "0.00 %"
