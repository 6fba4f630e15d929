"""Planning air columns and resonators: column lengths at the set's air, allowances, and the
stopper settings of a resonator tuned over a temperature range."""

from __future__ import annotations

import numpy as np

from cutplan.design import Design, DesignError, SetSpec, notices
from cutplan.design.air import MAX_LENGTH_RANGE
from cutplan.design.notices import Notice, set_key
from cutplan.physics import air_column
from cutplan.planning import air_calibrated, uncertainty
from cutplan.planning.allowance import allowances, risk_warning
from cutplan.planning.frequency import air_frequency_function, cents_per_mm, partial_notes
from cutplan.planning.records import PARTIAL_COUNT, Piece
from cutplan.units import format_length

__all__ = ["STOPPER_MARGIN", "STOPPER_STEP", "stopper_settings", "plan_air_set"]

STOPPER_MARGIN = 0.010
"""Tube left beyond the deepest stopper setting [m] (room for the plug itself; common practice)."""


STOPPER_STEP = 5.0
"""Temperature step of the stopper-setting table [K]."""

BAR_OVER_MOUTH = ("resonator lengths are for an open mouth: the bar over it adds to the end correction and "
                  "lowers the resonator a little (not modelled); tune each resonator with its bar in place "
                  "over it, shortening the tube or raising the stopper")
"""The assumption every resonator set states.  A bar a few millimetres above the mouth crowds the
air that moves at the open end, which lengthens the end correction; how much depends on the bar's
width and its height above the mouth.  No published formula or table for that geometry (a strip
across the mouth of an unflanged pipe) was found, so the planner does not guess one: the lengths
carry the open-end correction alone (Levine & Schwinger 1948, through the Dalmont et al. 2001 fit),
and the builder tunes with the bar in place, where the bar can only lower the resonator."""


def stopper_settings(spec, frequency, radius, bar_drift=0.0):
    """((temperature [K], depth from the open end to the stopper face [m]), ...) over the range.

    The closed end of a resonator is a movable stopper; as the air warms the speed of sound rises
    and the column must be longer to stay in tune (c ~ sqrt(T), ISO 9613-1).  The bar it serves
    drifts too, by ``bar_drift`` = d ln f / dT [1/K] (thermal.py), and the column follows the
    bar's pitch at each temperature (bar and resonator at the same temperature).
    """
    lo, hi = spec.temperature_range
    temps = list(np.arange(lo, hi, STOPPER_STEP)) + [hi]
    if spec.temperature not in temps and lo < spec.temperature < hi:
        temps.append(spec.temperature)
    out = []
    for t in sorted(temps):
        model = air_calibrated.column_model(spec, float(t))
        model["ends"] = "closed-open"
        bar_hz = frequency * np.exp(bar_drift * (float(t) - spec.temperature))
        out.append((float(t), air_column.column_length(bar_hz, **model)))
    return tuple(out)


def plan_air_set(spec: SetSpec, design: Design, targets, stock, bar_drift=0.0):
    temperature = spec.temperature
    speed = air_calibrated.speed(spec)
    radius = spec.section.air_radius
    closed = spec.ends == "closed-open"
    model = air_calibrated.column_model(spec)
    pieces, errors = [], []
    for i, t in enumerate(targets, start=1):
        length = air_column.column_length(t.frequency, **model)
        label = f"{spec.name}-{i}"
        if length <= 2 * radius:
            errors.append(DesignError(design.path, f"set[{spec.index}]", t.name,
                                      f"is too high for a {format_length(2 * radius, design.units, design.inch_denominator)} bore: the column would be "
                                      f"{format_length(length, design.units, design.inch_denominator)} long ({label}); use a narrower tube"))
            continue
        # each resonance with its own wall losses and end correction (no longer exact multiples)
        partials = [float(air_column.column_frequency(length, harmonic=n, **model))
                    for n in range(1, PARTIAL_COUNT + 1)]
        f1 = partials[0]
        warnings = []
        if length < 2 * radius * 2:
            warnings.append(Notice(notices.SHORT_COLUMN, set_key(spec, "section"),
                                   "short column: under two bores long, the end correction dominates; cut long and trim"))
        if spec.kind == "resonator" and length > spec.max_length:
            errors.append(_over_max_length(spec, design, label, t.name, length))
            continue
        ka = 2 * np.pi * t.frequency / speed * radius
        if ka > 0.5:
            warnings.append(Notice(notices.WIDE_BORE, set_key(spec, "section"),
                                   f"wide bore for this pitch (ka = {ka:.2f}): the end correction, modelled as falling "
                                   "with ka, is less certain here; cut long and trim to tune"))
        mass = spec.material.density * spec.section.area * length if spec.material is not None else None
        f_at = air_frequency_function(spec)
        factor = air_column.end_correction(1.0, spec.end_correction)
        open_ends = 1 if closed else 2
        cut, a_uncal, a_cal, risk = allowances(
            spec, stock, f_at, length, t.frequency,
            uncertainty.air_ratios(length, radius, factor, open_ends, temperature,
                                   calibrated=air_calibrated.calibration(spec) is not None),
            uncertainty.air_ratios(length, radius, factor, open_ends, temperature, calibrated=True))
        warnings += risk_warning(risk, spec)
        stopper = ()
        if spec.temperature_range is not None:
            stopper = stopper_settings(spec, t.frequency, radius, bar_drift)
            deepest = max(depth for _, depth in stopper)
            cut = max(cut, deepest + STOPPER_MARGIN)
            if spec.kind == "resonator" and cut > spec.max_length:
                errors.append(_over_max_length(spec, design, label, t.name, cut, " with the stopper travel"))
                continue
        pieces.append(
            Piece(
                set=spec.name, kind=spec.kind, label=label, note=t.name, target_hz=t.frequency,
                predicted_hz=f1, length=length, cut_length=cut,
                nodes=(), mass=mass, partials_hz=tuple(partials),
                partial_notes=partial_notes(partials, design.a4),
                cents_per_mm=cents_per_mm(f_at, length),
                model=spec.ends, shear_correction_cents=0.0, warnings=tuple(warnings),
                fundamental_hz=f1, bore=2 * radius, allowance_uncalibrated=a_uncal,
                allowance_calibrated=a_cal, sharp_risk=risk, stopper=stopper,
            )
        )
    return pieces, errors


def _over_max_length(spec, design, label, note, length, why=""):
    """The error for a resonator that cannot reach its pitch within the set's ``max_length``: it
    names the limit, the length the pitch needs and what would allow it."""
    return DesignError(
        design.path, set_key(spec, "max_length"), None,
        f"{format_length(spec.max_length, design.units, design.inch_denominator)} is shorter than resonator {label} ({note}) "
        f"needs{why}: {format_length(length, design.units, design.inch_denominator)}; "
        f"give max_length of at least that (up to {MAX_LENGTH_RANGE[1]:g} m), a wider bore, or a folded tube",
        notices.UNREACHABLE)
