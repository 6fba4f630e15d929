"""Frequency models: f(L) of the mode each kind of piece is tuned by, and the constants they
need. One module, used by the planner, ``calibrate`` and ``trim``, so the three never differ."""

from __future__ import annotations

import numpy as np

from cutplan import air_stock, pitch
from cutplan.physics import air_column, beam, timoshenko

STRIKE_NOTE_MODE = 4
"""Mode whose half sets the strike note of a tubular bell: the strike pitch is about an octave
below mode 4 (Fletcher & Rossing, The Physics of Musical Instruments, 2nd ed. 1998, ch. 19, via
the Wikipedia "Tubular bells" article; Rossing, Science of Percussion Instruments, 2000)."""


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
    from cutplan.physics import uniform

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
    model = air_stock.column_model(spec)
    return lambda x: float(air_column.column_frequency(x, **model))


def undercut_frequency_function(spec, arch):
    """f(L) [Hz] of mode 1 of an arched bar with this arch (depth and shape kept) at length L."""
    from cutplan.physics import undercut

    mat, sec = spec.material, spec.section
    e, g = mat.modulus_for("timoshenko"), mat.shear_modulus_for("timoshenko")
    kappa = sec.shear_coefficient(mat.poisson)

    def f(length):
        return float(undercut.bar_modes(length, sec.width, sec.thickness, arch.depth, arch.arch_width, e, g,
                                        mat.density, kappa, arch.exponent, modes=1).frequencies[0])

    return f


def piece_frequency_function(spec, piece):
    """f(L) [Hz] of the mode a planned piece is tuned by, with the plan's own model (for trimming)."""
    if piece.arch is not None:
        return undercut_frequency_function(spec, piece.arch)
    if spec.kind in ("chime", "bar"):
        return beam_frequency_function(spec.material, spec.section, spec.model, spec.target_mode == "strike-note")
    return air_frequency_function(spec)


def mode_length(frequency, mode, ei, mu, kga, rho_i):
    """Timoshenko length whose mode ``mode`` sounds ``frequency`` (closed-form determinant)."""
    from cutplan.physics import uniform

    return float(uniform.mode_lengths(frequency, mode, ei, mu, kga, rho_i)[0])
