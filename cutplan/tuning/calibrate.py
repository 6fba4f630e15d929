"""Calibration from measured test pieces, and trim advice for a piece already cut.

Beams.  With the geometry and E/G fixed, every free-free frequency scales as sqrt(E / rho), so a
test piece of known length that sounds ``f_meas`` where the table predicts ``f_pred`` implies an
effective modulus E (f_meas / f_pred)^2 at the tabled density.  Several pieces are combined by
least squares on log E (equal weight in cents); each piece's residual is reported in cents.

Air columns.  1 / f_n = (2 / (n c)) (L + k delta) is linear in L (k = 2 open ends, or 1 and 4/(2n-1)
for a closed column), so two or more resonances at known lengths give both the speed of sound
and the end correction by a straight-line fit; one resonance gives either, given the other.

Trim.  A piece of length L_now sounding f_meas where the plan's model says f_model(L_now) runs
at the ratio r = f_meas / f_model(L_now); the length that sounds the target is the one with
r f_model(L) = target.  This keeps the advice consistent with the cut sheet's model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cutplan.limits import AIR_SPEED_RANGE, IN_TUNE_CENTS, MEASURED_HZ
from cutplan.numeric import LENGTH_RANGE
from cutplan.physics.air_column import end_correction
from cutplan.physics.roots import bracketed_roots
from cutplan.render.phrases import TRIM_RAISES
from cutplan.units import INCH_DENOMINATOR, format_length

__all__ = [
    "CalibrationError", "BeamFit", "fit_beam", "AirFit", "fit_air_column",
    "fit_air_column_choice", "AIR_SPEED_RANGE", "END_FACTOR_RANGE", "MAX_RESIDUAL_CENTS", "TrimAdvice",
    "FAR_OFF_CENTS", "trim_advice"
]


class CalibrationError(ValueError):
    """Measurements that cannot be fitted (one line saying why)."""


@dataclass(frozen=True)
class BeamFit:
    """Fitted multiplier of the table modulus (at the tabled density), each piece's residual
    [cents] and the table model's prediction for each piece [Hz]."""

    scale: float
    residuals_cents: tuple[float, ...]
    predicted_hz: tuple[float, ...]

    @property
    def change_percent(self):
        """Fitted against table modulus [%]."""
        return 100 * (self.scale - 1)

    @property
    def spread(self):
        """Relative spread of E left after the fit [-]: from the residuals, at least 0.2 %."""
        if len(self.residuals_cents) < 2:
            return 0.005
        rms = math.sqrt(sum(r * r for r in self.residuals_cents) / (len(self.residuals_cents) - 1))
        # 1 cent in f is 2 x 0.0578 % in E
        return max(0.002, 2 * (2 ** (rms / 1200) - 1))


def fit_beam(pieces, frequency_at_table):
    """Fit E from test pieces.

    Parameters
    ----------
    pieces : sequence of (length [m], measured frequency [Hz])
    frequency_at_table : callable
        f(L) [Hz] predicted with the table material (the same model the plan uses).

    Returns a BeamFit whose ``scale`` multiplies the table modulus.

    Examples
    --------
    A piece that sounds 1 % sharp of the table prediction implies a modulus 2.01 % higher:

    >>> fit = fit_beam([(0.5, 101.0)], lambda length: 100.0)
    >>> round(fit.change_percent, 2)
    2.01
    """
    if not pieces:
        raise CalibrationError("give at least one test piece")
    logs, predicted = [], []
    for length, measured in pieces:
        if not (length > 0 and measured > 0):
            raise CalibrationError(f"test piece {length} m at {measured} Hz: both must be positive")
        f_pred = frequency_at_table(length)
        predicted.append(f_pred)
        logs.append(2 * math.log(measured / f_pred))
    scale = math.exp(sum(logs) / len(logs))
    residuals = tuple(1200 * math.log2(m / (p * math.sqrt(scale))) for (_, m), p in zip(pieces, predicted, strict=True))
    return BeamFit(scale=scale, residuals_cents=residuals, predicted_hz=tuple(predicted))


@dataclass(frozen=True)
class AirFit:
    """Fitted speed of sound [m/s] and end correction per open end [m], residuals [cents]."""

    speed: float
    end_correction: float
    residuals_cents: tuple[float, ...]


def fit_air_column(pieces, ends, speed=None, end_correction=None):
    """Fit speed of sound and/or end correction from resonances of air columns.

    Parameters
    ----------
    pieces : sequence of (length [m], frequency [Hz], harmonic number n)
    ends : "open-open" or "closed-open"
    speed : float, optional
        Known speed of sound [m/s] (fit only the end correction).
    end_correction : float, optional
        Known end correction per open end [m] (fit only the speed).

    Examples
    --------
    A classroom pipe of our own, 185 mm deep, resonating at 463.8 Hz with no end correction:
    c = 4 L f = 4 x 0.185 x 463.8 = 343.2 m/s.

    >>> fit = fit_air_column([(0.185, 463.8, 1)], "closed-open", end_correction=0.0)
    >>> round(fit.speed, 1)
    343.2
    """
    open_ends = 2 if ends == "open-open" else 1
    xs, ys = [], []
    for length, f, n in pieces:
        mult = n if ends == "open-open" else 2 * n - 1
        per = 2.0 if ends == "open-open" else 4.0
        # 1/f = per (L + k delta) / (mult c)  ->  mult / (per f) = (L + k delta) / c
        xs.append(length)
        ys.append(mult / (per * f))
    xs, ys = np.array(xs), np.array(ys)
    if speed is None and end_correction is None:
        if len(xs) < 2 or np.ptp(xs) <= 0:
            raise CalibrationError("fitting both speed and end correction needs two or more different lengths")
        slope, intercept = np.polyfit(xs, ys, 1)
        speed = 1 / slope
        end_correction = intercept * speed / open_ends
    elif speed is None:
        speed = float(np.mean((xs + open_ends * end_correction) / ys))
    elif end_correction is None:
        end_correction = float(np.mean(ys * speed - xs) / open_ends)
    residuals = []
    for (length, _f, _n), y in zip(pieces, ys, strict=True):
        model = (length + open_ends * end_correction) / speed
        residuals.append(1200 * math.log2(model / y))
    return AirFit(float(speed), float(end_correction), tuple(residuals))


def fit_air_column_choice(pieces, ends, what, speed, radius=None):
    """Fit what the user asked for: "both", "speed", "end-correction" or "auto" (both when the
    pieces have two or more different lengths, else the end correction at the known ``speed``).

    With "speed" the end correction is taken as the unflanged value for ``radius`` [m], or 0.
    """
    if what == "auto":
        what = "both" if len({length for length, _, _ in pieces}) >= 2 else "end-correction"
    if what == "both":
        fit = fit_air_column(pieces, ends)
    elif what == "speed":
        fit = fit_air_column(pieces, ends, end_correction=0.0 if radius is None else end_correction(radius))
    else:
        fit = fit_air_column(pieces, ends, speed=speed)
    _check_air_fit(fit, radius)
    return fit


def measurement_problem(length, frequencies):
    """Why a test piece's ``length`` [m] and measured ``frequencies`` [Hz] cannot be calibrated
    from (text), or None: each must be a finite number within the lengths a planned piece may
    have (:data:`cutplan.numeric.LENGTH_RANGE`) and :data:`cutplan.limits.MEASURED_HZ`.  Checked before any fit,
    so no solver meets an infinite, absurd or vanishing value."""
    lo, hi = LENGTH_RANGE
    if not (math.isfinite(length) and lo <= length <= hi):
        return f"the length must be from {lo * 1000:g} mm to {hi:g} m"
    lo, hi = MEASURED_HZ
    for f in frequencies:
        if not (math.isfinite(f) and lo <= f <= hi):
            return f"{f:g} Hz is not a measured frequency: give {lo:g} Hz to {hi:g} Hz"
    return None


END_FACTOR_RANGE = (0.0, 1.5)
"""End corrections a fit may give, as a factor of the inner radius [-]: unflanged 0.6133 and
flanged 0.8216 (Levine, H. and Schwinger, J., Phys. Rev. 73 (1948) 383; from memory), with room
for a measurement; the range a design accepts."""
MAX_RESIDUAL_CENTS = 25.0
"""Largest miss of one measured resonance against the fitted line [cents]: more means the
measurements disagree (a wrong length, a harmonic miscounted)."""


def _check_air_fit(fit, radius):
    """Refuse a fit no later command would accept (CalibrationError), so nothing useless is written."""
    lo, hi = AIR_SPEED_RANGE
    if not lo <= fit.speed <= hi:
        raise CalibrationError(f"the measurements give a speed of sound of {fit.speed:.0f} m/s, outside the "
                               f"{lo:.0f}-{hi:.0f} m/s of air; check the lengths, the frequencies and the "
                               "resonance numbers (#N)")
    lo, hi = END_FACTOR_RANGE
    if radius and not lo <= fit.end_correction / radius <= hi:
        raise CalibrationError(f"the measurements give an end correction of {fit.end_correction * 1000:.1f} mm = "
                               f"{fit.end_correction / radius:.2f} x inner radius, outside {lo:g} to {hi:g} x; "
                               "check the lengths, the frequencies and the resonance numbers (#N)")
    worst = max((abs(r) for r in fit.residuals_cents), default=0.0)
    if worst > MAX_RESIDUAL_CENTS:
        raise CalibrationError(f"the measurements disagree: one misses the fitted line by {worst:.0f} cents "
                               f"(more than {MAX_RESIDUAL_CENTS:g}); check each length and frequency")


@dataclass(frozen=True)
class TrimAdvice:
    """What to do with a piece that sounds ``measured_hz`` at ``length_now``."""

    label: str
    target_hz: float
    measured_hz: float
    cents_off: float
    length_now: float
    length_needed: float
    action: str
    caution: str = ""

    @property
    def remove(self):
        """Length to remove [m] (negative: the piece is too short)."""
        return self.length_now - self.length_needed


FAR_OFF_CENTS = 300.0
"""A reading further than this from the target is questioned before any cut [cents] (a minor
third: more than a careful cut long ever leaves; common practice)."""


def _length_for(miss, length_now):
    """The length where ``miss`` (log of model over goal, falling as the piece grows) is zero.

    The bracket widens from [L/1.5, 1.5 L] by factors of 1.5 until it holds the root, so any
    reading within the accepted octave gets an answer for every kind of piece.
    """
    lo, hi = length_now / 1.5, length_now * 1.5
    for _ in range(12):
        if miss(lo) >= 0 >= miss(hi):
            break
        lo, hi = lo / 1.5, hi * 1.5
    else:
        raise CalibrationError("no length of this piece sounds the target; is it the right piece?")
    root = bracketed_roots(lambda x, _k: np.array([miss(float(v)) for v in x]), np.array([lo]), np.array([hi]),
                           rtol=1e-12)
    return float(root[0])


def trim_advice(piece, frequency_at, measured_hz, length_now=None, units="mm", den=INCH_DENOMINATOR):
    """Trim advice for a planned piece measured at ``measured_hz`` while ``length_now`` long.

    ``frequency_at(L)`` is the plan's model for the piece's set; ``length_now`` defaults to the
    cut length on the cut sheet. Which end to trim and what to do when sharp are the piece's
    own plan facts; lengths are written with ``units`` first, inches to the nearest 1/``den``.
    """
    if not measured_hz > 0:
        raise CalibrationError("the measured frequency must be positive")
    length_now = piece.cut_length if length_now is None else length_now
    ratio = measured_hz / frequency_at(length_now)
    if not 0.5 < ratio < 2.0:
        raise CalibrationError(f"{measured_hz:.2f} Hz is more than an octave from what a {format_length(length_now, units, den)} "
                               f"piece should sound ({frequency_at(length_now):.2f} Hz); is it the right piece "
                               "or a different partial?")
    goal = piece.target_hz / ratio

    def miss(x):
        return math.log(frequency_at(x) / goal)

    length_needed = _length_for(miss, length_now)
    cents_off = 1200 * math.log2(measured_hz / piece.target_hz)
    remove = length_now - length_needed
    if abs(cents_off) < IN_TUNE_CENTS:
        action = f"in tune (within {IN_TUNE_CENTS:g} cents): leave it"
    elif remove > 0:
        step = (f"take off about {format_length(remove / 3, units, den)} at a time" if remove >= 1.5e-3
                else "file or sand it off a little at a time")
        action = (f"flat by {-cents_off:.1f} cents: remove {format_length(remove, units, den)} from "
                  f"{piece.trim_end}; {step} and measure again ({TRIM_RAISES})")
    else:
        action = f"sharp by {cents_off:.1f} cents: {format_length(-remove, units, den)} too short; {piece.if_sharp}"
    caution = ""
    if abs(cents_off) > FAR_OFF_CENTS:
        caution = (f"this reading is {abs(cents_off):.0f} cents from the target: before cutting, check that it is "
                   "this piece and its fundamental (not another partial, or the strike note of another piece)")
    return TrimAdvice(piece.label, piece.target_hz, measured_hz, cents_off, length_now, length_needed, action,
                      caution)
