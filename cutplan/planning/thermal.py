"""Warm bars and tubes: how a piece's pitch drifts with its temperature.

A free-free bar or tube sounds f ~ (r_g / L^2) sqrt(E / rho).  Warming by dT stretches every
length by (1 + alpha dT) and thins the material by (1 - 3 alpha dT), and the modulus changes by
(1 + e dT), e = (1/E) dE/dT.  So

    d ln f / dT = alpha - 2 alpha + (e + 3 alpha) / 2 = (e + alpha) / 2.

Metals soften as they warm (e < 0, much larger than alpha), so their bars go flat, the other way
from an air column (which goes sharp about 3 cents per kelvin); wood and plastics soften much
faster.  Values are per material family; they are stated so a builder knows the size of the
effect and tunes bar and resonator at one temperature.

Sources of the modulus coefficients e (each family's row says which; the tests recompute every
sourced value from the published figures):

.. [1] NIST Cryogenic Technologies Group, "Material Properties: 6061-T6 Aluminum (UNS A96061)",
   cryogenic material properties database (Marquardt, E. D., Le, J. P. and Radebaugh, R.,
   "Cryogenic material properties database", Proc. 11th Int. Cryocooler Conf., 2000): Young's
   modulus fit E = a + bT + cT^2 + dT^3 + eT^4 [GPa], a = 77.71221, b = 1.030646e-2,
   c = -2.924100e-4, d = 8.993600e-7, e = -1.070900e-9 (2-295 K), giving (1/E) dE/dT =
   -5.29e-4 /K at 293.15 K; linear expansion fit (L - L293)/L293 x 1e5 = a + bT + cT^2 + dT^3,
   a = -4.1277e2, b = -3.0389e-1, c = 8.7696e-3, d = -9.9821e-6 (4-300 K), giving
   alpha = 22.6e-6 /K at 293.15 K.
.. [2] ASME B31.1-1995, Power Piping, table of moduli of elasticity of metals at temperature,
   as reproduced in Engineering ToolBox, "Metals and Alloys - Young's Modulus of Elasticity"
   [1e6 psi at -100 / 70 / 200 F]: carbon steel C <= 0.3 % 30.2 / 29.5 / 28.8; austenitic steels
   (TP304, 310, 316, 321, 347) 29.1 / 28.3 / 27.6.  The slope is the central difference over the
   166.7 K between the outer columns, divided by E at 70 F (the table's 0.1e6 psi rounding makes
   a one-sided difference uncertain by some 15 %).
.. [3] Forest Products Laboratory, Wood Handbook: Wood as an Engineering Material, FPL-GTR-190,
   USDA Forest Service, 2010, Table 5-15 (approximate middle-trend immediate effects of
   temperature on clear wood): MOE parallel to the grain at 12 % moisture +17 % at -50 C and -7 %
   at +50 C, relative to 20 C; the central difference is -24 % per 100 K.  The same chapter's
   Table 5-16 (lumber, 12 % moisture, 15-150 F) gives -0.1108 % per F = -0.199 % per K.

Rows still marked "from memory" (copper, brass, titanium, the plastics, glass, and every
expansion coefficient but aluminium's) had no source found for them; they are of low confidence.
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
_ASME = "modulus: ASME B31.1-1995 table; expansion from memory"
DRIFTS = (
    # (name prefix, Drift); first match wins.  Expansion: handbook linear coefficients near room
    # temperature, from memory except aluminium's.  Modulus coefficients: see the module's sources.
    ("aluminum", Drift(-5.29e-4, 22.6e-6, "modulus and expansion: NIST 6061-T6 fits, Marquardt et al. 2000")),  # [1]
    ("copper", Drift(-3.5e-4, 17e-6, _FROM_MEMORY)),
    ("brass", Drift(-4.0e-4, 19e-6, _FROM_MEMORY)),
    # [2] austenitic steels: was -4.0e-4 from memory; the table gives -3.18e-4
    ("stainless", Drift(-3.18e-4, 17e-6, _ASME)),
    # [2] carbon steel C <= 0.3 %: was -3.0e-4 from memory; the table gives -2.85e-4
    ("steel", Drift(-2.85e-4, 12e-6, _ASME)),
    ("titanium", Drift(-5.0e-4, 9e-6, _FROM_MEMORY)),
    ("pvc", Drift(-5.0e-3, 60e-6, _FROM_MEMORY)),
    ("acrylic", Drift(-5.0e-3, 70e-6, _FROM_MEMORY)),
    ("glass", Drift(-1.0e-4, 9e-6, _FROM_MEMORY)),
)
WOOD = Drift(-2.4e-3, 4e-6, "modulus: Wood Handbook 2010, Table 5-15; expansion from memory")
"""Wood and bamboo along the grain at about 12 % moisture: the modulus coefficient is the central
difference of the Wood Handbook's Table 5-15 [3] (was -3.0e-3 from memory); the expansion along
the grain is from memory."""


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
