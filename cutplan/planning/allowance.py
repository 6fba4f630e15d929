"""The cut allowance of each piece: the rule the design gives (a risk of a sharp piece, a
percentage or a length), the allowance it adds and that piece's own chance of coming out sharp."""

from __future__ import annotations

import numpy as np

from cutplan.design import DEFAULT_SHARP_RISK
from cutplan.design.notices import SHARP_RISK, Notice, allowance_key
from cutplan.planning import uncertainty
from cutplan.units import INCH_DENOMINATOR, format_length

__all__ = ["allowances", "SHARP_RISK_WARNING", "risk_warning", "allowance_rule"]


def allowances(spec, stock, frequency_at, length, target, ratios_uncal, ratios_cal):
    """(cut length, uncalibrated allowance, calibrated allowance, risk of coming out sharp)."""
    risk = stock.allowance_risk if stock is not None and stock.allowance_risk else DEFAULT_SHARP_RISK
    # a set solved in closed form (frequency_at.lengths_for) gets every piece's allowance at once
    solve = getattr(frequency_at, "lengths_for", None)

    def cut_for(ratios):
        if solve is None:
            return uncertainty.cut_length_for_risk(frequency_at, length, target, ratios, risk)
        q = uncertainty.risk_quantile(ratios, risk)
        return solve(np.asarray(target, dtype=float) / q) if q > 1.0 else np.asarray(length, dtype=float)

    uncal, cal = cut_for(ratios_uncal), cut_for(ratios_cal)
    if stock is not None and stock.allowance_risk is None:
        cut = length * (1 + stock.allowance) + stock.allowance_length
    else:
        cut = uncal
    if solve is None:
        return cut, uncal - length, cal - length, uncertainty.sharp_risk(frequency_at, cut, target, ratios_uncal)
    return cut, uncal - length, cal - length, uncertainty.sharp_risks(frequency_at(cut), target, ratios_uncal)


SHARP_RISK_WARNING = 0.10
"""Chance of coming out sharp above which a fixed allowance gets a warning [-]."""


def risk_warning(risk, spec):
    """[Notice] when a fixed allowance leaves more than SHARP_RISK_WARNING chance of a sharp
    piece (keyed by the allowance the set ``spec`` is cut with); [] otherwise."""
    if risk > SHARP_RISK_WARNING:
        return [Notice(SHARP_RISK, allowance_key(spec), f"the fixed allowance leaves a {risk * 100:.0f} % chance of cutting this piece too short; "
                'allowance = "risk 5 %" sizes it from the material spreads')]
    return []


def allowance_rule(stock, units="mm", den=INCH_DENOMINATOR):
    """The design's allowance rule as the builder wrote it: "risk 5 %", "0.5 %" or a length."""
    if stock is None or stock.allowance_risk is not None:
        risk = stock.allowance_risk if stock is not None else DEFAULT_SHARP_RISK
        return f"risk {risk * 100:g} %"
    if stock.allowance_length:
        return format_length(stock.allowance_length, units, den)
    return f"{stock.allowance * 100:g} %"
