"""Frequency models: f(L) of the mode each kind of piece is tuned by, and the constants they
need. One module, used by the planner, ``calibrate`` and ``trim``, so the three never differ."""

from __future__ import annotations

import numpy as np

from cutplan import pitch
from cutplan.design.notices import STUBBY, Notice
from cutplan.physics import air_column, beam, beam_fe, timoshenko, undercut, uniform
from cutplan.physics.undercut2d import PlaneConstants, trimmed_profile
from cutplan.physics.width_terms import WidthConstants
from cutplan.planning import air_calibrated, grain

__all__ = [
    "STRIKE_NOTE_MODE", "STUBBY_RATIO", "stubby_bar_warnings", "partial_notes", "cents_per_mm", "beam_constants", "beam_frequency_function",
    "air_frequency_function", "plane_constants", "undercut_frequency_function", "profile_frequency_function",
    "piece_frequency_function"
]


STRIKE_NOTE_MODE = 4
"""Mode whose half sets the strike note of a tubular bell: the strike pitch is about an octave
below mode 4 (Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed. 1998, ch. 19, via
the Wikipedia "Tubular bells" article; Rossing, Science of Percussion Instruments, 2000)."""


STUBBY_RATIO = 8.0
"""Length-to-depth ratio under which a bar's model is flagged as approximate [-] (common practice)."""


def stubby_bar_warnings(length, thickness, key=None):
    """The warning for a bar shorter than :data:`STUBBY_RATIO` x its thickness, keyed by the
    design key ``key`` of its section (a list: empty or one :class:`Notice`)."""
    if length / thickness >= STUBBY_RATIO:
        return []
    return [Notice(STUBBY, key, f"stubby bar: length is {length / thickness:.1f} x its thickness; cut a test bar and "
                   "calibrate")]


def partial_notes(freqs, a4):
    return tuple(pitch.nearest_note(float(f), a4) for f in freqs)


def cents_per_mm(frequency_at, length):
    """Cents the pitch rises per millimetre removed (central difference over +/- 0.5 mm)."""
    step = 0.5e-3
    hi, lo = frequency_at(length - step), frequency_at(length + step)
    return pitch.cents(hi, lo)


def beam_constants(mat, sec, model):
    """(EI [N m^2], mu [kg/m], kappa G A [N], rho I [kg m]) of a material and section for a model."""
    e = mat.modulus_for(model)
    g = mat.shear_modulus_for(model)
    ei = e * sec.second_moment
    mu = mat.density * sec.area
    kga = sec.shear_coefficient(mat.poisson) * g * sec.area
    rho_i = mat.density * sec.second_moment
    return ei, mu, kga, rho_i


def beam_frequency_function(material, section, model, strike=False):
    """f(L) [Hz] of the mode a chime or bar is tuned by (mode 1, or half of mode 4 for the strike
    note), for this material, section and model."""
    ei, mu, kga, rho_i = beam_constants(material, section, model)
    n = STRIKE_NOTE_MODE if strike else 1
    scale = 0.5 if strike else 1.0

    # vectorised over L (a float in, a float out); .lengths_for solves the inverse in closed form
    def f_at(x):
        lengths = np.atleast_1d(np.asarray(x, dtype=float))
        if model == "slender":
            f = beam.free_free_frequency(n, lengths, ei, mu)
        elif n == 1:
            f = timoshenko.fundamental_frequencies(lengths, ei, mu, kga, rho_i)
        else:
            g, s2 = timoshenko.uniform_parameters(lengths, ei, mu, kga, rho_i)
            f = uniform.omegas(g, s2, n)[:, n - 1] / (2 * np.pi * lengths**2) * np.sqrt(ei / mu)
        f = scale * np.asarray(f, dtype=float)
        return float(f[0]) if np.ndim(x) == 0 else f.reshape(np.shape(x))

    def lengths_for(hz):
        hz = np.atleast_1d(np.asarray(hz, dtype=float)) / scale
        if model == "slender":
            return np.atleast_1d(beam.free_free_length(hz, ei, mu, mode=n))
        if n == 1:
            return timoshenko.fundamental_lengths(hz, ei, mu, kga, rho_i)
        return uniform.mode_lengths(hz, n, ei, mu, kga, rho_i)

    f_at.lengths_for = lengths_for
    return f_at


def air_frequency_function(spec):
    """f(L) [Hz] of an air-column or resonator set's fundamental at its temperature."""
    model = air_calibrated.column_model(spec)
    return lambda x: float(air_column.column_frequency(x, **model))


def plane_constants(mat, sawing="unknown"):
    """Constants of the 2-D model that designs, trims and calibrates undercut (and ``elastic-2d``)
    bars: the thickness plane (E along, E across, G, Poisson, rho) and the width axis, resolved
    (:class:`cutplan.physics.width_terms.WidthConstants`: plane stress alone is 5 to 19 cents
    low on a deep arch).

    E along is the material's true modulus. For a wood whose table gives the across-grain
    constants, E across the thickness, G of the length-thickness plane and Poisson's ratio are
    those of the bar's sawing (:func:`cutplan.planning.grain.bending_plane_constants`; a calibrated or
    inline G is taken as that plane's G), and the width axis takes the sawing's E across the width,
    G of the length-width and width-thickness planes and their Poisson's ratios
    (:func:`cutplan.planning.grain.axis_constants`); otherwise the material is isotropic: E across
    is E along, every G the material's shear modulus and every Poisson's ratio its own.
    """
    e = mat.modulus_for("elastic-2d")
    _, e_y, _, g_xy, _, g_yz, nu_xy, _, nu_yz = grain.axis_constants(mat, sawing, "elastic-2d")
    width = WidthConstants(e_y, g_xy, g_yz, nu_xy, nu_yz)
    if grain.is_orthotropic(mat):
        thick = grain.bending_plane_constants(mat, sawing, "elastic-2d")[0]
        shear = mat.shear_modulus_for("elastic-2d") if mat.shear_modulus else thick.shear_modulus
        return PlaneConstants(e, thick.modulus_across, shear, thick.poisson, mat.density, width)
    across = getattr(mat, "modulus_across", None) or e
    return PlaneConstants(e, across, mat.shear_modulus_for("elastic-2d"), mat.poisson, mat.density, width)


def undercut_frequency_function(spec, arch, length=None):
    """f(L) [Hz] of mode 1 of an arched bar (1-D shear-corrected beam).

    With ``length`` (the solved length [m]) the arch stays where it is and L changes by taking the
    same off each end, as a builder trims; without it the arch scales with L (depth and shape
    kept), as in the design search.
    """
    mat, sec = spec.material, spec.section
    e, g = mat.modulus_for("timoshenko"), mat.shear_modulus_for("timoshenko")
    kappa = sec.shear_coefficient(mat.poisson)

    def f(new_length):
        if length is None:
            return float(undercut.bar_modes(new_length, sec.width, sec.thickness, arch.depth, arch.arch_width, e, g,
                                            mat.density, kappa, arch.exponent, modes=1).frequencies[0])
        shift = (length - new_length) / 2

        def h(x):
            return undercut.arch_thickness(x + shift, length, sec.thickness, arch.depth, arch.arch_width,
                                           arch.exponent)

        edge = (1 - arch.arch_width) * length / 2 - shift
        breaks = np.unique(np.concatenate([np.linspace(0.0, new_length, 33), [edge, new_length - edge]]))
        breaks = breaks[(breaks >= 0) & (breaks <= new_length)]
        breaks = breaks[np.concatenate([[True], np.diff(breaks) > 1e-6 * new_length])]
        return float(beam_fe.free_free_modes(
            new_length, lambda x: e * sec.width * h(x) ** 3 / 12, lambda x: kappa * g * sec.width * h(x),
            lambda x: mat.density * sec.width * h(x), lambda x: mat.density * sec.width * h(x) ** 3 / 12,
            modes=1, order=undercut.ORDER, breaks=breaks, symmetric=True).frequencies[0])

    return f


def profile_frequency_function(spec, stations, resolved=True):
    """f(L) [Hz] of mode 1 in the 2-D model of a bar with this profile ((x, h) [m], end to end),
    cut to length L by taking the same off each end: the arch stays where it is.  The designing
    body, the width resolved; ``resolved=False`` gives plane stress (for the slope alone, see
    :func:`cutplan.planning.elastic._trim_rate`)."""
    plane, width = plane_constants(spec.material, spec.grain), spec.section.width
    plane = plane if resolved else plane.plane_stress()

    def f(length):
        xs, hs = trimmed_profile(stations, float(length))
        return float(plane.modes(xs, hs, width, modes=1).frequencies[0])

    return f


def piece_frequency_function(spec, piece):
    """f(L) [Hz] of the mode a planned piece is tuned by, with the plan's own model (for trimming;
    an arch stays where it is)."""
    if piece.model == "elastic-2d":
        stations = piece.arch.outline if piece.arch is not None else ((0.0, spec.section.thickness),
                                                                     (piece.length, spec.section.thickness))
        return profile_frequency_function(spec, stations)
    if piece.arch is not None:
        return undercut_frequency_function(spec, piece.arch, piece.length)
    if spec.kind in ("chime", "bar"):
        return beam_frequency_function(spec.material, spec.section, spec.model, spec.target_mode == "strike-note")
    return air_frequency_function(spec)
