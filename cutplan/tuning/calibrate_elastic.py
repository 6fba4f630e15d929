"""Partials of a uniform test bar in the 2-D elastic model, for fitting E and G with it.

``cutplan calibrate --model elastic-2d`` fits with the model the plan uses for arched bars: a
deep test bar (depth / length about 0.1) is where the beam models and the 2-D body part ways, so
constants fitted with the beam model would carry its error into the plan.  E across the bar
follows the fitted E unless the material tables its own value.
"""

from __future__ import annotations

from cutplan.physics import elastic2d
from cutplan.tuning.calibrate import CalibrationError

__all__ = ["partial_frequencies_2d"]


def partial_frequencies_2d(material, section, modulus, shear_modulus, length, modes):
    """Bending modes 1..``modes`` [Hz] of a uniform bar of ``section`` in the 2-D model, with E
    along = ``modulus`` [Pa] and G = ``shear_modulus`` [Pa]; length [m]."""
    if section.shape != "bar":
        raise CalibrationError("the elastic-2d model is for bars of rectangular section")
    across = getattr(material, "modulus_across", None) or modulus
    found = elastic2d.profile_modes([0.0, length], [section.thickness, section.thickness], section.width, modulus,
                                    across, shear_modulus, material.poisson, material.density, modes=modes)
    return [float(f) for f in found.frequencies]
