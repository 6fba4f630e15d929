"""Warm bars and tubes: how a piece's pitch drifts with its temperature.

A free-free bar or tube sounds f ~ (r_g / L^2) sqrt(E / rho).  Warming by dT stretches every
length by (1 + alpha dT) and thins the material by (1 - 3 alpha dT), and the modulus changes by
(1 + e dT), e = (1/E) dE/dT.  So

    d ln f / dT = alpha - 2 alpha + (e + 3 alpha) / 2 = (e + alpha) / 2.

Metals soften as they warm (e < 0, much larger than alpha), so their bars go flat, the other way
from an air column (which goes sharp about 3 cents per kelvin); wood and plastics soften much
faster.  Values are per material family, from memory and of low confidence (the literature
scatters widely, wood with moisture as well); they are stated so a builder knows the size of the
effect and tunes bar and resonator at one temperature.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = ["Drift", "DRIFTS", "WOOD", "drift_for", "assumption"]


@dataclass(frozen=True)
class Drift:
    """Temperature coefficient of the modulus e = (1/E) dE/dT [1/K], linear expansion alpha [1/K],
    and where the numbers come from."""

    modulus: float
    expansion: float
    source: str

    @property
    def per_kelvin(self):
        """d ln f / dT of a bending mode [1/K]: (e + alpha) / 2."""
        return 0.5 * (self.modulus + self.expansion)

    @property
    def cents_per_kelvin(self):
        """Pitch drift [cents/K]."""
        return 1200 / math.log(2) * self.per_kelvin


_FROM_MEMORY = "from memory, low confidence"
DRIFTS = (
    # (name prefix, Drift); first match wins.  Expansion: handbook linear coefficients near room
    # temperature (from memory); modulus coefficients: from memory of E(T) tables, low confidence.
    ("aluminum", Drift(-5.0e-4, 23e-6, _FROM_MEMORY)),
    ("copper", Drift(-3.5e-4, 17e-6, _FROM_MEMORY)),
    ("brass", Drift(-4.0e-4, 19e-6, _FROM_MEMORY)),
    ("stainless", Drift(-4.0e-4, 17e-6, _FROM_MEMORY)),
    ("steel", Drift(-3.0e-4, 12e-6, _FROM_MEMORY)),
    ("titanium", Drift(-5.0e-4, 9e-6, _FROM_MEMORY)),
    ("pvc", Drift(-5.0e-3, 60e-6, _FROM_MEMORY)),
    ("acrylic", Drift(-5.0e-3, 70e-6, _FROM_MEMORY)),
    ("glass", Drift(-1.0e-4, 9e-6, _FROM_MEMORY)),
)
WOOD = Drift(-3.0e-3, 4e-6, _FROM_MEMORY)
"""Wood and bamboo along the grain at about 12 % moisture (from memory, low confidence)."""


def drift_for(material):
    """The Drift of a Material (by its name, then its class), or None when unknown."""
    if material is None:
        return None
    name = material.name.lower()
    for prefix, drift in DRIFTS:
        if name.startswith(prefix):
            return drift
    if getattr(material, "material_class", None) == "wood" or name.startswith("bamboo"):
        return WOOD
    return None


def assumption(material):
    """The assumption line stating a set's pitch drift, or None."""
    d = drift_for(material)
    if d is None:
        return None
    return (f"pitch drifts {d.cents_per_kelvin:+.2f} cents per kelvin as the pieces warm (modulus "
            f"{d.modulus * 100:+.3f} %/K, expansion {d.expansion * 1e6:.0f}e-6/K; {d.source}); tune at the "
            "temperature the set will play in")
