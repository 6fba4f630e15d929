"""Partials of a uniform test bar in the 2-D elastic model, for fitting E and G with it.

``cutplan calibrate --model elastic-2d`` fits with the model the plan designs undercut bars with,
the width resolved (:func:`cutplan.planning.frequency.plane_constants`): a deep test bar (depth /
length about 0.1) is where the beam models and the 2-D body part ways, so constants fitted with
the beam model would carry its error into the plan.  The other constants (E across, the width
axis's) keep their tabled ratios to the fitted E and G.

A fit solves the bar some tens of times, so each solve is the plane-stress body times the share
the width terms add, solved once per test length at the table's constants.  Scaling E and G
together scales every frequency of both bodies alike, so that share is exact when the fit keeps
the table's E / G and moves by under 0.01 cent when the fit moves E / G by a fifth (measured:
the maple test bar of the tests).
"""

from __future__ import annotations

from dataclasses import replace

from cutplan.planning.frequency import plane_constants
from cutplan.tuning.calibrate import CalibrationError

__all__ = ["partial_frequencies_2d"]


def partial_frequencies_2d(material, section, modulus, shear_modulus, length, modes, sawing="unknown"):
    """Bending modes 1..``modes`` [Hz] of a uniform bar of ``section`` in the 2-D model, with E
    along = ``modulus`` [Pa] and G of the bending plane = ``shear_modulus`` [Pa]; length [m]."""
    if section.shape != "bar":
        raise CalibrationError("the elastic-2d model is for bars of rectangular section")
    fitted = replace(material, modulus=modulus, modulus_basis="dynamic", shear_modulus=shear_modulus)
    xs, hs, width = [0.0, length], [section.thickness, section.thickness], section.width
    plane = plane_constants(fitted, sawing).plane_stress().modes(xs, hs, width, modes=modes).frequencies
    table = plane_constants(material, sawing)
    resolved = table.modes(xs, hs, width, modes=modes).frequencies
    share = table.plane_stress().modes(xs, hs, width, modes=modes).frequencies
    return [float(f * r / s) for f, r, s in zip(plane, resolved, share, strict=True)]
