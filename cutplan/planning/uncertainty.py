"""How long to cut, given what is uncertain: Monte Carlo spreads of a piece's pitch.

A piece cut at its planned length sounds ``ratio x target``, where ``ratio`` scatters because
the material and stock are only known to a few percent.  For chimes and bars, with E/G fixed,
every free-free frequency scales as sqrt(E / rho) times the radius of gyration at fixed length
(exact for the slender model, and for the shear-corrected one to first order in the small change
of slenderness), so

    ratio = sqrt((E_s / E) / (rho_s / rho)) * (r_g,s / r_g).

For air columns, ratio = (c_s / c) (L + k delta) / (L + k delta_s) from the air temperature and
the end correction.  Samples are drawn with a fixed seed, so plans are repeatable.  The cut
length is chosen so that P(ratio > target / f(L_cut)) equals the accepted risk of coming out
sharp (too short, which cannot be undone).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from cutplan.physics.roots import bracketed_roots

__all__ = [
    "SAMPLES", "SEED", "CALIBRATED_MODULUS_SPREAD", "WOOD_MODULUS_CV", "SEVERAL_BLANKS",
    "TEMPERATURE_SPREAD", "END_CORRECTION_SPREAD", "shared_draws", "beam_ratios", "calibrated_spreads",
    "wood_blank_spreads", "air_ratios", "risk_quantile", "cut_length_for_risk", "sharp_risk", "sharp_risks"
]

SAMPLES = 20_000
"""Monte Carlo samples per set [-]."""
SEED = 20261201
"""Fixed seed: the same design gives the same allowance."""
CALIBRATED_MODULUS_SPREAD = 0.005
"""Spread of E/rho left after a test piece from the same stock is measured [-] (one standard
deviation; covers tuner error and piece-to-piece scatter within a stick; common practice)."""
WOOD_MODULUS_CV = 0.22
"""Coefficient of variation of the modulus of elasticity of wood between pieces of one species
[-]: USDA Forest Products Laboratory, Wood Handbook: Wood as an Engineering Material,
FPL-GTR-190, 2010, ch. 5, Table 5-6 (average coefficients of variation of clear wood), 22 % for
static-bending MOE (from memory: not checked against a stored copy).  A test blank calibrates a
species' mean; the next board still differs by this much, so the spread is not reduced to the
blank's reading error (see :func:`calibrated_spreads`)."""
SEVERAL_BLANKS = 3
"""Blanks (test pieces of different boards) after which their own measured scatter stands for
the between-board spread of wood [-] (three give a first standard deviation; common practice)."""
TEMPERATURE_SPREAD = 2.0
"""Air temperature uncertainty between planning and tuning [K] (common practice)."""
END_CORRECTION_SPREAD = 0.10
"""Relative uncertainty of a tabled end correction [-] (the published values differ by about
this much: flanged 0.8216 a, Norris & Sheng, J. Sound Vib. 135, 85-93, 1989, against 0.85 a in
textbooks; unflanged 0.6133 a, Levine & Schwinger, Phys. Rev. 73(4), 383-406, 1948, against
Rayleigh's rounded 0.6 a)."""


def _rng():
    return np.random.default_rng(SEED)


@lru_cache(maxsize=1)
def shared_draws():
    """The seeded draws every set uses: (standard normals (2, SAMPLES), then uniforms on [-1, 1]
    (2, SAMPLES) from the same stream).  Drawn once per process and shared read-only."""
    rng = _rng()
    z = rng.standard_normal((2, SAMPLES))
    u = rng.uniform(-1, 1, (2, SAMPLES))
    z.flags.writeable = False
    u.flags.writeable = False
    return z, u


def beam_ratios(material, section, outer_tolerance=0.0, wall_tolerance=0.0, calibrated=False):
    """Samples of f_actual / f_planned for a chime or bar cut at its planned length."""
    z, u = shared_draws()
    if calibrated:
        e_spread, rho_spread = calibrated_spreads(material)
        e = 1 + e_spread * z[0]
        rho = 1 + rho_spread * z[1]
        return np.sqrt(np.clip(e, 0.5, None) / np.clip(rho, 0.5, None))
    e = 1 + material.modulus_spread * z[0]
    rho = 1 + material.density_spread * z[1]
    ratio = np.sqrt(np.clip(e, 0.2, None) / np.clip(rho, 0.2, None))
    if section.shape in ("tube", "rod") and (outer_tolerance or wall_tolerance):
        outer = section.outer + outer_tolerance * u[0]
        if section.shape == "tube":
            wall = (section.outer - section.solid_inner) / 2 * (1 + wall_tolerance * u[1])
            inner = np.clip(outer - 2 * wall, 0.0, None)
        else:
            inner = 0.0
        rg = np.sqrt(outer**2 + inner**2)
        ratio = ratio * rg / np.hypot(section.outer, section.solid_inner)
    return ratio


def calibrated_spreads(material):
    """(E spread, density spread) [-] left for the other pieces once a test piece is measured.

    Metal from one stock: the reading error and the scatter within a stick
    (CALIBRATED_MODULUS_SPREAD).  Wood: the bars come from other boards, so the material's own
    between-board spreads stay (its table spreads, at most WOOD_MODULUS_CV for E and never less
    than CALIBRATED_MODULUS_SPREAD); a material calibrated from several blanks carries their
    measured scatter as its spread.

    >>> from cutplan.materials import Material
    >>> calibrated_spreads(Material("maple", 12.6e9, 706.0, 0.42, modulus_spread=0.10, density_spread=0.06,
    ...                             material_class="wood"))
    (0.1, 0.06)
    """
    if getattr(material, "material_class", None) == "wood":
        return (min(max(CALIBRATED_MODULUS_SPREAD, material.modulus_spread), WOOD_MODULUS_CV),
                material.density_spread)
    return CALIBRATED_MODULUS_SPREAD, 0.0


def wood_blank_spreads(material, blanks, fitted_spread):
    """(E spread, density spread) [-] to write into a wood calibrated from ``blanks`` blanks:
    the fit's own scatter from SEVERAL_BLANKS on, the table's between-board spreads before."""
    if blanks >= SEVERAL_BLANKS:
        return max(CALIBRATED_MODULUS_SPREAD, fitted_spread), 0.0
    return calibrated_spreads(material)


def air_ratios(length, radius, correction_factor, open_ends, temperature, calibrated=False):
    """Samples of f_actual / f_planned for an air column of ``length`` [m].

    Parameters
    ----------
    length : float
        Planned column length [m].
    radius : float
        Inner radius [m].
    correction_factor : float
        End correction per open end, as a multiple of the radius [-].
    open_ends : int
        1 (closed-open) or 2 (open-open).
    temperature : float
        Planned air temperature [K].
    calibrated : bool
        True after a test pipe has been measured (smaller spreads).
    """
    z = shared_draws()[0]
    t_spread = TEMPERATURE_SPREAD / 2 if calibrated else TEMPERATURE_SPREAD
    d_spread = END_CORRECTION_SPREAD / 5 if calibrated else END_CORRECTION_SPREAD
    speed = np.sqrt((temperature + t_spread * z[0]) / temperature)
    delta = correction_factor * radius
    delta_s = delta * (1 + d_spread * z[1])
    return speed * (length + open_ends * delta) / (length + open_ends * delta_s)


def risk_quantile(ratios, risk):
    """The ratio f_actual / f_planned exceeded with probability ``risk`` [-]."""
    return float(np.quantile(ratios, 1.0 - risk))


def cut_length_for_risk(frequency_at, length, target, ratios, risk):
    """Shortest cut length [m] at which the chance of sounding above ``target`` is ``risk``.

    ``frequency_at(L)`` is the planned model's frequency [Hz] at length L [m].  The cut length
    is where the model sounds ``target / q``, q the (1 - risk) quantile of the ratios; a set
    solved in closed form passes ``target / q`` to its own length solver instead
    (:func:`risk_quantile`).
    """
    q = risk_quantile(ratios, risk)
    if q <= 1.0:
        return length
    goal = target / q

    def miss(x):
        return float(np.log(frequency_at(x) / goal))

    f_lo = miss(length)
    if f_lo <= 0:
        return length
    hi = length * 1.05
    f_hi = miss(hi)
    while f_hi > 0:
        hi *= 1.05
        f_hi = miss(hi)
    root = bracketed_roots(lambda x, _k: np.array([miss(v) for v in x]), [length], [hi], [f_lo], [f_hi],
                           rtol=1e-13)
    return float(root[0])


def sharp_risk(frequency_at, cut_length, target, ratios):
    """Chance [-] that a piece cut at ``cut_length`` sounds above ``target`` before any trimming."""
    return float(np.mean(ratios * frequency_at(cut_length) > target))


def sharp_risks(frequencies_at_cut, targets, ratios):
    """:func:`sharp_risk` for many pieces at once, given each one's model frequency at its cut length."""
    f = np.asarray(frequencies_at_cut, dtype=float)[:, None]
    return np.mean(np.asarray(ratios)[None, :] * f > np.asarray(targets, dtype=float)[:, None], axis=1)
