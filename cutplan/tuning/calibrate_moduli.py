"""Fitting E and G separately from several partials of test pieces (shear-corrected model).

Bending overtones of a deep piece depend on the shear modulus G as well as on E: shear lowers
each mode more than the one below it, by an amount that grows as (depth / length)^2 and as
E / G.  So the partials of one recording, or pieces of different lengths, can measure both.
For a slender piece the overtones barely feel G; then G is not determined and E is fitted alone
(a measured G is held; a table G moves with E, as a one-partial calibration does).

The fit is least squares in cents over every partial, on ln E and ln G.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

# scipy.optimize is imported where used: a chime plan (0.72 s CPU) never needs it; at the top it adds 0.57 s (measured)
import numpy as np

from cutplan import plausibility
from cutplan.physics import beam, timoshenko
from cutplan.planning.uncertainty import SEVERAL_BLANKS, wood_blank_spreads
from cutplan.tuning.calibrate import BeamFit, CalibrationError
from cutplan.tuning.calibrate_elastic import partial_frequencies_2d

__all__ = [
    "SHEAR_DETERMINED", "NOMINAL_READING_CENTS", "SHEAR_RATIO_RANGE", "PARTIAL_HINT_CENTS",
    "RESIDUAL_LIMIT_CENTS", "FREE_FREE_RATIO_2", "ModuliFit", "partial_frequencies", "partial_hint",
    "fit_moduli", "recorded_modes", "partials_from_peaks", "calibrated_moduli_toml"
]

SHEAR_DETERMINED = 0.10
"""Largest standard error of a fitted shear modulus, as a fraction, for G to count as determined
[-], reckoned with 1 cent of reading error per partial (a good tuner or a clean recording; common
practice).  Above it the partials cannot tell G from E and E is fitted alone."""
NOMINAL_READING_CENTS = 1.0
"""Reading error per partial assumed when judging whether G is determined [cents] (common practice)."""
SHEAR_RATIO_RANGE = (2.0, 40.0)
"""Plausible E / G [-]: 2 (nu = 0) to 2(1 + nu) ~ 2.7 for metals, about 10 to 20 along the grain of
wood (USDA FPL Wood Handbook, FPL-GTR-190, 2010, Table 5-1 gives G_LR / E_L of 0.05 to 0.11),
with room either side (common practice)."""
PARTIAL_HINT_CENTS = 120.0
"""A single frequency this close to a predicted overtone is called that overtone [cents]."""
RESIDUAL_LIMIT_CENTS = 15.0
"""Largest miss of any partial after the fit [cents]: the limit
:data:`cutplan.plausibility.FIT_RESIDUAL_LIMIT_CENTS`, which ``plan`` applies to calibrated
materials read from ``--materials`` folders (common practice; see there)."""
FREE_FREE_RATIO_2 = 2.7565
"""f2 / f1 of a slender uniform free-free bar, (4.7300 / 7.8532)^-2 (Blevins, Formulas for Natural
Frequency and Mode Shape, 1979, Table 8-1); shear only lowers it, so no uniform bar exceeds it."""


@dataclass(frozen=True)
class ModuliFit:
    """E and G fitted from the partials of test pieces (shear-corrected model).

    ``shear`` says how G was found: "fitted" (from the partials), "held" (a measured G kept as it
    is), "scaled" (moved with E by the same factor, as a one-partial calibration always did).
    ``measurements`` are ((length [m], mode, measured [Hz]), ...); ``table_hz`` the table
    material's prediction and ``residuals_cents`` the fit's miss for each.
    """

    modulus: float
    shear_modulus: float
    table_modulus: float
    table_shear_modulus: float
    shear: str
    measurements: tuple[tuple[float, int, float], ...]
    table_hz: tuple[float, ...]
    residuals_cents: tuple[float, ...]
    shear_error: float = math.nan
    notes: tuple[str, ...] = ()

    @property
    def scale(self):
        """Fitted E over table E [-]."""
        return self.modulus / self.table_modulus

    @property
    def spread(self):
        """Relative spread of E left after the fit [-] (as :attr:`BeamFit.spread`)."""
        return BeamFit(self.scale, self.residuals_cents, self.table_hz).spread


def _cents(a, b):
    return 1200 * math.log2(a / b)


def partial_frequencies(material, section, model, modulus, shear_modulus, length, modes):
    """Modes 1..``modes`` [Hz] of a uniform piece with the given E and G."""
    if model == "elastic-2d":
        return partial_frequencies_2d(material, section, modulus, shear_modulus, length, modes)
    ei, mu = modulus * section.second_moment, material.density * section.area
    if model == "slender":
        return [float(beam.free_free_frequency(n, length, ei, mu)) for n in range(1, modes + 1)]
    kga = section.shear_coefficient(material.poisson) * shear_modulus * section.area
    return [float(f) for f in timoshenko.frequencies(length, ei, mu, kga, material.density * section.second_moment,
                                                      modes=modes)]


def _model_hz(material, section, model, measurements, modulus, shear_modulus):
    by_length = {}
    for length, mode, _ in measurements:
        by_length[length] = max(by_length.get(length, 0), mode)
    freqs = {length: partial_frequencies(material, section, model, modulus, shear_modulus, length, top)
             for length, top in by_length.items()}
    return [freqs[length][mode - 1] for length, mode, _ in measurements]


def _plausible_moduli(material):
    """(low, high) E [Pa]: the union of the plausibility classes the table material belongs to."""
    ranges = [e for e, d in plausibility.CLASS_RANGES.values()
              if e[0] <= material.modulus <= e[1] and d[0] <= material.density <= d[1]]
    ranges = ranges or [plausibility.ANY_RANGE[0]]
    return min(r[0] for r in ranges), max(r[1] for r in ranges)


def _shear_ratio_range(material):
    """(low, high) E / G [-] plausible for the material's class, or :data:`SHEAR_RATIO_RANGE`."""
    cls = getattr(material, "material_class", None)
    return plausibility.shear_ratio_range(cls) if cls else SHEAR_RATIO_RANGE


def partial_hint(material, section, model, length, measured_hz, modes=5):
    """"this looks like partial N ..." when one frequency sits near an overtone of the expected
    fundamental rather than near the fundamental itself; "" otherwise."""
    e, g = material.modulus_for(model), material.shear_modulus_for(model)
    table = partial_frequencies(material, section, model, e, g, length, modes)
    offs = [abs(_cents(measured_hz, f)) for f in table]
    n = min(range(modes), key=offs.__getitem__)
    if n == 0 or offs[n] > PARTIAL_HINT_CENTS:
        return ""
    return (f"{measured_hz:.1f} Hz is {measured_hz / table[0]:.2f} x the expected fundamental ({table[0]:.1f} Hz "
            f"for {length * 1000:.1f} mm): this looks like partial {n + 1}, not the fundamental")


def fit_moduli(measurements, material, section, model="timoshenko", shear="auto"):
    """Fit E (and G, when the partials can tell it from E) to measured partials of test pieces.

    Parameters
    ----------
    measurements : sequence of (length [m], mode [-], frequency [Hz])
        Partials of uniform test pieces of ``section``; mode 1 is the fundamental.
    material : Material
        The table material the pieces are made of (its density is kept).
    section : Section
        Their cross-section.
    model : "timoshenko", "slender" or "elastic-2d" (bars)
    shear : "auto" or "scale"
        "auto" fits G when it is determined (see :data:`SHEAR_DETERMINED`) and otherwise holds a
        measured G or scales a table G with E; "scale" always scales G with E.

    Least squares in cents over all partials.  Raises CalibrationError when the fitted modulus is
    outside the range plausible for the material (naming the overtone a lone frequency looks like).

    Examples
    --------
    One partial fits E alone, as a tuner reading always did:

    >>> from cutplan.materials import Material
    >>> from cutplan.physics.sections import bar
    >>> al = Material("al", 69e9, 2700.0)
    >>> f1 = partial_frequencies(al, bar(0.03, 0.01), "timoshenko", 1.02 * 69e9, 1.02 * 69e9 / 2.66, 0.4, 1)[0]
    >>> fit = fit_moduli([(0.4, 1, f1)], al, bar(0.03, 0.01))
    >>> round(fit.scale, 6), fit.shear
    (1.02, 'scaled')
    """
    from scipy.optimize import least_squares  # here: scipy.optimize adds 0.47 s CPU to start-up (measured)

    measurements = tuple((float(length), int(mode), float(f)) for length, mode, f in measurements)
    if not measurements:
        raise CalibrationError("give at least one test piece")
    for length, mode, f in measurements:
        if not (length > 0 and f > 0 and mode >= 1):
            raise CalibrationError(f"test piece {length} m, partial {mode} at {f} Hz: all must be positive")
    e0, g0 = material.modulus_for(model), material.shear_modulus_for(model)
    table = _model_hz(material, section, model, measurements, e0, g0)
    notes = []
    # E and G scaled together: every frequency goes as sqrt(scale), so the fit is a mean of logs
    scale = math.exp(sum(2 * math.log(f / p) for (_, _, f), p in zip(measurements, table, strict=True))
                     / len(measurements))
    e, g, how, g_err = e0 * scale, g0 * scale, "scaled", math.nan
    g_measured = dict(material.provenance).get("shear_modulus")
    held = material.shear_modulus is not None and g_measured is not None and g_measured.kind == "measured"
    if model == "slender":
        if len(measurements) > 1 and shear != "scale":
            notes.append("the slender model has no shear: fitted E alone (use the timoshenko model to fit G)")
    elif shear != "scale":
        def miss(v, g_fixed=None):
            g_v = g_fixed if g_fixed is not None else g0 * math.exp(v[1])
            model_hz = _model_hz(material, section, model, measurements, e0 * math.exp(v[0]), g_v)
            return [_cents(p, f) for p, (_, _, f) in zip(model_hz, measurements, strict=True)]

        g_err = _shear_error(miss, math.log(scale), math.log(scale), len(measurements))
        if g_err <= SHEAR_DETERMINED:
            sol = least_squares(miss, [math.log(scale), math.log(scale)], x_scale=[0.01, 0.05], xtol=1e-12,
                                ftol=1e-12, gtol=1e-12, diff_step=1e-6)
            e_fit, g_fit = e0 * math.exp(sol.x[0]), g0 * math.exp(sol.x[1])
            lo, hi = _shear_ratio_range(material)
            if lo <= e_fit / g_fit <= hi:
                e, g, how = e_fit, g_fit, "fitted"
            else:
                notes.append(f"the fitted G gives E/G = {e_fit / g_fit:.1f}, outside the plausible {lo:g} to {hi:g}: "
                             "G not fitted; check that the partials are listed in mode order")
        else:
            why = ("one partial cannot separate G from E" if len(measurements) == 1 else
                   f"G is not determined: these partials fix it only to +/-{100 * min(g_err, 9.99):.0f} % "
                   "(a slender piece, where shear barely moves the overtones)")
            notes.append(why + ("; fitted E alone, holding the measured G" if held else "; fitted E alone"))
        if how != "fitted" and held:
            sol = least_squares(lambda v: miss(v, g_fixed=g0), [math.log(scale)], x_scale=[0.01], xtol=1e-12,
                                ftol=1e-12, gtol=1e-12, diff_step=1e-6)
            e, g, how = e0 * math.exp(sol.x[0]), g0, "held"
    fitted = _model_hz(material, section, model, measurements, e, g)
    residuals = tuple(_cents(p, f) for p, (_, _, f) in zip(fitted, measurements, strict=True))
    if max(abs(r) for r in residuals) > RESIDUAL_LIMIT_CENTS:
        shown = "/".join(f"{r:+.0f}" for r in residuals)
        raise CalibrationError(f"the partials miss the best fit by {shown} cents (at most {RESIDUAL_LIMIT_CENTS:g} "
                               f"allowed): {_diagnosis(measurements, material, section, model)}")
    lo, hi = _plausible_moduli(material)
    cls = getattr(material, "material_class", None)
    if lo <= e <= hi and cls and not getattr(material, "unusual", False):
        found = plausibility.problems(e, material.density, cls, g)
        if found:
            raise CalibrationError(f"the fit gives {'; '.join(found)}: " + _diagnosis(measurements, material, section,
                                                                                    model))
    if not lo <= e <= hi:
        length, mode, f = measurements[0]
        hint = partial_hint(material, section, model, length, f) if mode == 1 else ""
        raise CalibrationError(f"the fitted modulus {e / 1e9:.3g} GPa is outside {lo / 1e9:g}-{hi / 1e9:g} GPa, "
                               f"plausible for {material.name}" + (f"; {hint}" if hint else
                                                                   "; check the length, the material and the section"))
    if len(measurements) == 1 and measurements[0][1] == 1:
        hint = partial_hint(material, section, model, measurements[0][0], measurements[0][2])
        if hint:
            notes.append(hint)
    return ModuliFit(modulus=e, shear_modulus=g, table_modulus=e0, table_shear_modulus=g0, shear=how,
                     measurements=measurements, table_hz=tuple(table), residuals_cents=residuals,
                     shear_error=g_err, notes=tuple(notes))


def _diagnosis(measurements, material, section, model):
    """What to do about partials no uniform piece fits: an undercut bar, a misread partial, or else."""
    by_length = {}
    for length, mode, f in measurements:
        by_length.setdefault(length, {})[mode] = f
    for length, modes in by_length.items():
        if 1 in modes and 2 in modes and modes[2] / modes[1] > FREE_FREE_RATIO_2 * 1.03:
            return (f"the {length * 1000:.1f} mm piece has f2/f1 = {modes[2] / modes[1]:.2f}, which no uniform bar gives "
                    f"(at most {FREE_FREE_RATIO_2:.2f}); an undercut or tuned bar gives this: calibrate from a uniform "
                    "blank (a plain bar of the same board, before undercutting)")
    if len(measurements) >= 3:
        for k, (length, mode, f) in enumerate(measurements):
            rest = measurements[:k] + measurements[k + 1:]
            e0, g0 = material.modulus_for(model), material.shear_modulus_for(model)
            table = _model_hz(material, section, model, rest, e0, g0)
            logs = [math.log(m / p) for (_, _, m), p in zip(rest, table, strict=True)]
            mean = sum(logs) / len(logs)
            if max(abs(x - mean) for x in logs) * 1200 / math.log(2) < RESIDUAL_LIMIT_CENTS:
                return (f"partial {mode} of the {length * 1000:.1f} mm piece ({f:.1f} Hz) looks misread (the others "
                        "agree without it): check that the partials are listed in mode order and are bending "
                        "partials (not twisting or sideways ones), or leave it out")
    return ("no uniform piece of this section and length sounds these partials: check the length, the section and "
            "that the partials are in mode order; calibrate from a uniform blank")


def recorded_modes(partials, fundamental, ratios, tolerance=0.06):
    """((mode, frequency [Hz]), ...) of a recording's strong partials, matched to a uniform piece's
    ratios ``ratios`` (f_n / f_1, 1.0 first) on ``fundamental`` [Hz], and the frequencies that
    match no mode.

    Raises CalibrationError when strong partials above the fundamental fit no mode while mode 2
    is missing: the piece is not uniform (an undercut bar), so a fit would drop them silently.
    """
    found, unexplained = {1: float(fundamental)}, []
    for f in sorted(partials):
        if abs(f / fundamental - 1) < 1e-9:
            continue
        n = min(range(len(ratios)), key=lambda k: abs(math.log(f / (fundamental * ratios[k]))))
        if abs(f / (fundamental * ratios[n]) - 1) <= tolerance and n > 0 and n + 1 not in found:
            found[n + 1] = float(f)
        elif f > fundamental:
            unexplained.append(float(f))
    if unexplained and 2 not in found:
        shown = ", ".join(f"{f:.1f} Hz ({f / fundamental:.2f} x f1)" for f in unexplained[:3])
        raise CalibrationError(f"the recording's strong partials {shown} fit no partial of a uniform piece of this "
                               f"section (expected {', '.join(f'{r:.2f}' for r in ratios[1:])} x f1): an undercut or "
                               "tuned bar, or another piece ringing; calibrate from a uniform blank")
    return tuple(sorted(found.items())), tuple(unexplained)


def _shear_error(miss, log_e, log_g, count, step=1e-4):
    """Standard error of ln G at :data:`NOMINAL_READING_CENTS` per partial (inf if not identifiable)."""
    if count < 2:
        return math.inf
    base = np.array(miss([log_e, log_g]))
    jac = np.column_stack([(np.array(miss([log_e + step, log_g])) - base) / step,
                           (np.array(miss([log_e, log_g + step])) - base) / step])
    normal = jac.T @ jac
    if np.linalg.cond(normal) > 1e14:
        return math.inf
    return float(NOMINAL_READING_CENTS * math.sqrt(np.linalg.inv(normal)[1, 1]))


def partials_from_peaks(peaks, fundamental, ratios, tolerance=0.04):
    """((mode, frequency [Hz]), ...) of a recording: the peak nearest each planned ratio.

    ``peaks`` are (frequency, level) pairs; ``ratios`` the planned f_n / f_1 (1.0 first); a mode
    is found when a peak lies within ``tolerance`` (a fraction) of fundamental x ratio.
    """
    out = []
    for n, r in enumerate(ratios, start=1):
        want = fundamental * r
        near = [f for f, _ in peaks if abs(f / want - 1) <= tolerance]
        if n == 1:
            out.append((1, float(fundamental)))
        elif near:
            out.append((n, float(min(near, key=lambda f: abs(math.log(f / want))))))
    return tuple(out)


def calibrated_moduli_toml(name, material, model, fit, source_text):
    """A user material file (TOML text) with the fitted E and, when fitted or held, G.

    Wood keeps a between-board spread unless several blanks were calibrated
    (:func:`cutplan.planning.uncertainty.wood_blank_spreads`); the material's class is carried over."""
    e_spread, rho_spread = fit.spread, 0.0
    wood = getattr(material, "material_class", None) == "wood"
    blanks = len({length for length, _, _ in fit.measurements})
    if wood:
        e_spread, rho_spread = wood_blank_spreads(material, blanks, fit.spread)
    lines = [
        f"# Calibrated by cutplan from {len(fit.measurements)} partial(s) of test pieces of {material.name} "
        f"({source_text}).",
        f"# Model: {model}. Residuals (cents): " + ", ".join(f"{r:+.2f}" for r in fit.residuals_cents),
        f"# Table E {fit.table_modulus / 1e9:.3f} GPa -> {fit.modulus / 1e9:.3f} GPa ({100 * (fit.scale - 1):+.2f} %); "
        f"G {fit.table_shear_modulus / 1e9:.3f} GPa -> {fit.shear_modulus / 1e9:.3f} GPa ({fit.shear}).",
        f'["{name}"]',
        f'description = "{material.name.removesuffix("-calibrated")} calibrated from test pieces"',
        f'modulus = {{ value = "{fit.modulus / 1e9:.6f} GPa", kind = "measured", where = "cutplan calibrate", '
        f'spread = "{100 * e_spread:.2f} %", basis = "dynamic" }}',
        f'density = {{ value = "{material.density:.3f} kg/m3", kind = "derived", where = "table value kept", '
        f'spread = "{100 * rho_spread:.2f} %" }}',
        f"poisson = {material.poisson}",
    ]
    if wood:
        lines.insert(3, f"# Wood from {blanks} blank(s): " + (
            "their scatter is the spread between boards." if blanks >= SEVERAL_BLANKS else
            f"other boards still differ, so the table's between-board spread is kept until {SEVERAL_BLANKS} "
            "or more blanks are calibrated."))
    material_class = getattr(material, "material_class", None) or ("wood" if wood else None)
    if material_class:
        lines.append(f'class = "{material_class}"')
    lines.append(f"fit_residual_cents = {max(abs(r) for r in fit.residuals_cents):.2f}")
    if fit.shear in ("fitted", "held"):
        where = "cutplan calibrate, fitted with E" if fit.shear == "fitted" else "earlier calibration, held"
        lines.append(f'shear_modulus = {{ value = "{fit.shear_modulus / 1e9:.6f} GPa", kind = "measured", '
                     f'where = "{where}" }}')
    elif material.shear_ratio:
        lines.append(f"shear_ratio = {material.shear_ratio}")
    elif material.shear_modulus:
        lines.append(f'shear_modulus = "{fit.shear_modulus / 1e9:.6f} GPa"')
    return "\n".join(lines) + "\n"
