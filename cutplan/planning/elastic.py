"""Bar sets planned on the 2-D elastic body (``model = "elastic-2d"``), the width resolved.

Arched bars are designed on it (:mod:`cutplan.physics.undercut2d`); uniform bars get the length
whose 2-D mode 1 sounds the target (found on plane stress, then corrected on the width-resolved
body).  Partials and nodes come from the width-resolved solve of the printed profile; the trim
rate is taken with the arch left where it is (a builder trims the ends, not the arch), its slope
on plane stress (see :func:`_trim_rate`).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from cutplan import pitch
from cutplan.design.notices import set_key
from cutplan.physics import beam, beam_fe
from cutplan.physics.undercut import UndercutError
from cutplan.physics.undercut2d import WIDTH_TOLERANCE_CENTS, design_undercut_2d
from cutplan.planning import uncertainty
from cutplan.planning.allowance import allowances, risk_warning
from cutplan.planning.frequency import (
    beam_frequency_function,
    partial_notes,
    plane_constants,
    profile_frequency_function,
    stubby_bar_warnings,
)
from cutplan.planning.other_modes import CLEARANCE_CENTS, tuned_partials
from cutplan.planning.records import PARTIAL_COUNT, Arch, Piece
from cutplan.planning.width_modes import width_mode_warnings

__all__ = [
    "LENGTH_TOLERANCE_CENTS", "TRIM_STEP", "plan_undercut_set_2d",
    "plan_uniform_set_2d", "plan_set", "elastic_constants"
]

LENGTH_TOLERANCE_CENTS = 0.01
"""A uniform bar's 2-D length search stops this close to the target [cents]."""
TRIM_STEP = 0.5e-3
"""Half the central-difference step of the trim rate [m] (as :func:`cutplan.planning.frequency.cents_per_mm`)."""


def _trim_rate(f_at, length):
    """Cents the pitch rises per millimetre taken off (central difference, +/- 0.5 mm).

    The plan takes the slope on plane stress (``f_at`` of the plane-stress body): resolving the
    width shifts the pitch by a nearly constant amount, so the slope moves by under 0.05 %
    (measured on the music-room marimba's C4 and C5 bars: 7.026 against 7.024 and 10.583
    against 10.580 cents per mm) at a sixth of the cost."""
    return pitch.cents(f_at(length - TRIM_STEP), f_at(length + TRIM_STEP))


def _power_law(f0, length, per_mm):
    """f(x) = f0 (length / x)^k near the solved length; k from the trim rate (saves 2-D solves)."""
    k = per_mm * length * 1000 * math.log(2) / 1200
    return lambda x: f0 * (length / x) ** k


def _volume(stations, width):
    xs = np.array([x for x, _ in stations])
    hs = np.array([h for _, h in stations])
    return width * float(np.sum((hs[1:] + hs[:-1]) / 2 * np.diff(xs)))


def plan_undercut_set_2d(spec, design, stock, progress=None):
    """Arched bars designed on the 2-D model, lowest note first (each starts from its neighbour)."""
    mat, sec, cut = spec.material, spec.section, spec.undercut
    plane = plane_constants(mat, spec.grain)
    kappa = sec.shear_coefficient(mat.poisson)
    ratios_uncal = uncertainty.beam_ratios(mat, sec, spec.outer_tolerance, spec.wall_tolerance)
    ratios_cal = uncertainty.beam_ratios(mat, sec, calibrated=True)
    guess = jacobian = offset = None
    solved, offsets = {}, []
    for i in sorted(range(len(spec.targets)), key=lambda i: spec.targets[i].frequency):
        target = spec.targets[i].frequency
        try:
            r = design_undercut_2d(target, cut.ratios, sec.width, sec.thickness, plane, kappa,
                                   cut.min_thickness, cut.arch_width, guess=guess, jacobian=jacobian, offset=offset,
                                   width_offset=_next_offset(offsets, target))
        except UndercutError as exc:  # the refusal names the bar that cannot be tuned
            raise exc.named(f"{spec.targets[i].name} ({target:.1f} Hz): ") from None
        guess, jacobian, offset = (r.length, r.depth, r.exponent), r.jacobian, r.offset_cents
        offsets.append((target, r.width_offset_cents))
        # the design's own solve of the profile it printed (remembered by the solver): its other modes
        solved[i] = (r, plane.modes(*(np.array(v) for v in zip(*r.outline(), strict=True)), sec.width,
                                    modes=PARTIAL_COUNT))
        if progress is not None:
            progress(1)
    pieces = []
    for i, t in enumerate(spec.targets):
        r, modes = solved[i]
        stations = r.outline()
        half = [(x, h) for x, h in stations if x <= r.length / 2 + 1e-12]
        picks = np.linspace(0, len(half) - 1, 11).round().astype(int)
        arch = Arch(thickness=sec.thickness, depth=r.depth, arch_width=r.arch_fraction, exponent=r.exponent,
                    stations=tuple(half[k] for k in picks), ratios=cut.ratios,
                    ratio_residuals_cents=r.ratio_residuals_cents, outline=stations)
        f0 = float(r.frequencies[0])
        per_mm = _trim_rate(profile_frequency_function(spec, stations, resolved=False), r.length)
        cut_length, a_uncal, a_cal, risk = allowances(spec, stock, _power_law(f0, r.length, per_mm), r.length,
                                                      t.frequency, ratios_uncal, ratios_cal)
        ei, mu = plane.modulus_along * sec.width * sec.thickness**3 / 12, mat.density * sec.width * sec.thickness
        partials = r.frequencies[:PARTIAL_COUNT]
        pieces.append(Piece(
            set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name, target_hz=t.frequency,
            predicted_hz=f0, length=r.length, cut_length=cut_length, nodes=tuple(r.nodes),
            mass=mat.density * _volume(stations, sec.width), partials_hz=tuple(partials),
            partial_notes=partial_notes(partials, design.a4), cents_per_mm=per_mm, model="elastic-2d",
            shear_correction_cents=_against_slender(f0, r.length, sec, plane, ei, mu, stations),
            warnings=tuple(risk_warning(risk, spec) + stubby_bar_warnings(r.length, sec.thickness, set_key(spec, "section"))), fundamental_hz=f0, allowance_uncalibrated=a_uncal,
            allowance_calibrated=a_cal, sharp_risk=risk, arch=arch))
        pieces[-1] = _with_width_warnings(spec, design, pieces[-1], modes)
    return pieces


def _with_width_warnings(spec, design, piece, modes):
    """The piece with the warnings of its 2-D solve ``modes`` added (:mod:`cutplan.planning.width_modes`)."""
    clearance = getattr(spec, "mode_clearance", None) or CLEARANCE_CENTS
    extra = width_mode_warnings(piece, modes, spec.section.width, tuned_partials(spec, piece), clearance,
                                set_key(spec, "section"), design.units, design.inch_denominator)
    return dataclasses.replace(piece, warnings=tuple(piece.warnings) + tuple(extra)) if extra else piece


def _next_offset(offsets, target):
    """The width-resolved minus plane-stress residuals [cents] expected at ``target`` [Hz]: the
    last two bars' (by frequency) carried on in log f, the last one's alone, or None."""
    if not offsets:
        return None
    f1, o1 = offsets[-1]
    if len(offsets) < 2 or offsets[-2][0] == f1 or len(offsets[-2][1]) != len(o1):
        return o1
    f0, o0 = offsets[-2]
    slope = math.log(target / f1) / math.log(f1 / f0)
    return tuple(b + (b - a) * slope for a, b in zip(o0, o1, strict=True))


def _against_slender(f0, length, sec, plane, ei, mu, stations=None):
    """Cents between the 2-D mode 1 and the slender beam of the same profile and modulus."""
    if stations is None:
        return float(pitch.cents(f0, float(beam.free_free_frequency(1, length, ei, mu))))
    xs = np.array([x for x, _ in stations])
    hs = np.array([h for _, h in stations])

    def h(x):
        return np.interp(x, xs, hs)

    w, e, rho = sec.width, plane.modulus_along, plane.density
    slender = beam_fe.free_free_modes(length, lambda x: e * w * h(x) ** 3 / 12, lambda x: 1e3 * e * w * h(x),
                                      lambda x: rho * w * h(x), lambda x: 1e-3 * rho * w * h(x) ** 3 / 12,
                                      modes=1, order=3, breaks=np.linspace(0.0, length, 33), symmetric=True)
    return float(pitch.cents(f0, float(slender.frequencies[0])))


def plan_uniform_set_2d(spec, design, stock):
    """Uniform bars whose 2-D mode 1 sounds each target (a secant search from the Timoshenko length)."""
    mat, sec = spec.material, spec.section
    plane = plane_constants(mat, spec.grain)
    ratios_uncal = uncertainty.beam_ratios(mat, sec, spec.outer_tolerance, spec.wall_tolerance)
    ratios_cal = uncertainty.beam_ratios(mat, sec, calibrated=True)
    start = beam_frequency_function(mat, sec, "timoshenko").lengths_for(np.array([t.frequency for t in spec.targets]))
    ei, mu = plane.modulus_along * sec.second_moment, mat.density * sec.area
    pieces = []
    for i, t in enumerate(spec.targets):
        # plane stress finds the length, the width-resolved body corrects it (one or two solves)
        length, _, slope = _uniform_length(t.frequency, float(start[i]), sec, plane.plane_stress())
        length, modes, _ = _uniform_length(t.frequency, length, sec, plane, slope, WIDTH_TOLERANCE_CENTS)
        f0 = float(modes.frequencies[0])

        def f_at(x):  # the slope on plane stress, as for arched bars (see _trim_rate)
            return float(plane.plane_stress().modes([0.0, x], [sec.thickness] * 2, sec.width,
                                                    modes=1).frequencies[0])

        per_mm = _trim_rate(f_at, length)
        cut_length, a_uncal, a_cal, risk = allowances(spec, stock, _power_law(f0, length, per_mm), length,
                                                      t.frequency, ratios_uncal, ratios_cal)
        partials = modes.frequencies[:PARTIAL_COUNT]
        pieces.append(Piece(
            set=spec.name, kind=spec.kind, label=f"{spec.name}-{i + 1}", note=t.name, target_hz=t.frequency,
            predicted_hz=f0, length=length, cut_length=cut_length, nodes=tuple(modes.nodes[0]),
            mass=mat.density * sec.area * length, partials_hz=tuple(partials),
            partial_notes=partial_notes(partials, design.a4), cents_per_mm=per_mm, model="elastic-2d",
            shear_correction_cents=_against_slender(f0, length, sec, plane, ei, mu), warnings=tuple(risk_warning(risk, spec) + stubby_bar_warnings(length, sec.thickness, set_key(spec, "section"))),
            fundamental_hz=f0, allowance_uncalibrated=a_uncal, allowance_calibrated=a_cal, sharp_risk=risk))
        pieces[-1] = _with_width_warnings(spec, design, pieces[-1], modes)
    return pieces


def _uniform_length(target, length, sec, plane, slope=-2.0, tolerance=LENGTH_TOLERANCE_CENTS):
    """(L [m], ProfileModes, d log f / d log L) of the uniform bar whose 2-D mode 1 sounds
    ``target`` within ``tolerance`` [cents]: secant on log f against log L, starting from the
    slope given (f ~ L^-2)."""
    def solve(x):
        return plane.modes([0.0, x], [sec.thickness] * 2, sec.width, modes=PARTIAL_COUNT)

    modes = solve(length)
    previous = None
    for _ in range(12):
        miss = math.log(modes.frequencies[0] / target)
        if abs(miss) * 1200 / math.log(2) < tolerance:
            break
        if previous is not None and previous[0] != length:
            slope = (math.log(modes.frequencies[0]) - previous[1]) / (math.log(length) - math.log(previous[0]))
        previous = (length, math.log(modes.frequencies[0]))
        length = length * math.exp(-miss / slope)
        modes = solve(length)
    return length, modes, slope


def plan_set(spec, design, stock, progress=None):
    """The pieces of a bar set with ``model = "elastic-2d"``, arched or uniform."""
    if spec.undercut is not None:
        return plan_undercut_set_2d(spec, design, stock, progress)
    return plan_uniform_set_2d(spec, design, stock)


def elastic_constants(spec):
    """((name, value), ...) of the elastic constants a chime or bar set is planned with [SI]:
    modulus (along), shear modulus, density, Poisson ratio; the 2-D model adds E across the
    thickness and the width axis's constants (E across the width, G of the length-width and
    width-thickness planes, their Poisson's ratios)."""
    mat, model = spec.material, spec.model
    if spec.model == "elastic-2d":
        p = plane_constants(mat, spec.grain)
        w = p.width
        return (("modulus_along", p.modulus_along), ("modulus_across", p.modulus_across),
                ("shear_modulus", p.shear_modulus), ("poisson", p.poisson), ("density", p.density),
                ("modulus_width", w.modulus_width), ("shear_modulus_length_width", w.shear_length_width),
                ("shear_modulus_width_thickness", w.shear_width_thickness),
                ("poisson_length_width", w.poisson_length_width),
                ("poisson_width_thickness", w.poisson_width_thickness))
    model = "timoshenko" if spec.undercut is not None else model  # the 1-D arch search is shear-corrected
    return (("modulus_along", mat.modulus_for(model)), ("shear_modulus", mat.shear_modulus_for(model)),
            ("poisson", mat.poisson), ("density", mat.density))
