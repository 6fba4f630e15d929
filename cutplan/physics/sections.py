"""Cross-sections of the pieces: round tube, solid rod, rectangular bar.

Every quantity is SI.  The bending plane of a bar is through its thickness (the bar lies flat
on its supports and is struck on its face).

>>> s = tube(0.0254, 0.065 * 0.0254)
>>> round(s.radius_of_gyration * 1000, 4)
8.4168
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = [
    "shear_coefficient_cowper_hollow_circle", "shear_coefficient_cowper_rectangle", "Section", "tube",
    "rod", "bar"
]


def shear_coefficient_cowper_hollow_circle(poisson, diameter_ratio):
    r"""Timoshenko shear coefficient of a hollow circle (Cowper 1966, Table 1).

    .. math:: \kappa = \frac{6 (1+\nu)(1+m^2)^2}{(7+6\nu)(1+m^2)^2 + (20+12\nu) m^2}

    Parameters
    ----------
    poisson : float
        nu [-].
    diameter_ratio : float
        m = inner / outer diameter, 0 for a solid rod [-].

    Examples
    --------
    >>> round(shear_coefficient_cowper_hollow_circle(0.30, 0.0), 4)  # solid: 6(1+nu)/(7+6nu)
    0.8864

    References
    ----------
    .. [1] Cowper, G. R., "The shear coefficient in Timoshenko's beam theory", J. Appl. Mech.
       33 (1966) 335-340, Table 1.
    """
    m2 = diameter_ratio**2
    return 6 * (1 + poisson) * (1 + m2) ** 2 / ((7 + 6 * poisson) * (1 + m2) ** 2 + (20 + 12 * poisson) * m2)


def shear_coefficient_cowper_rectangle(poisson):
    r"""Timoshenko shear coefficient of a rectangle: 10(1+nu)/(12+11nu) (Cowper 1966, Table 1).

    >>> round(shear_coefficient_cowper_rectangle(0.30), 4)
    0.8497
    """
    return 10 * (1 + poisson) / (12 + 11 * poisson)


@dataclass(frozen=True)
class Section:
    """A uniform cross-section.

    shape is "tube", "rod" or "bar"; for a tube or rod ``outer`` is the outside diameter and
    ``inner`` the bore [m] (0 for a rod); for a bar ``width`` and ``thickness`` [m].
    ``name`` is the stock size it came from, if any.
    """

    shape: str
    outer: float = 0.0
    inner: float = 0.0
    width: float = 0.0
    thickness: float = 0.0
    name: str = ""
    bore: float = 0.0  # the bore an air column sees [m]; defaults to ``inner``
    air_calibration: object = None  # a cutplan.planning.air_calibrated.AirCalibration measured on this stock, if any

    @property
    def solid_inner(self):
        """Inner diameter of the material itself [m]: the bore an air column sees when one is set.

        One wall for bending and bore: stock tabled by its minimum wall (ASTM D1785 PVC) has an
        average bore set halfway into the plus-only tolerance, and the chime made of it bends
        with that same average wall, so a piece's stiffness and its column agree.

        >>> pvc = tube(0.840 * 0.0254, 0.109 * 0.0254, bore=(0.840 - 2 * 1.06 * 0.109) * 0.0254)
        >>> round(pvc.solid_inner / 0.0254, 4), round(pvc.wall / 0.0254, 3)
        (0.6089, 0.109)
        """
        return (self.bore or self.inner) if self.shape == "tube" else self.inner

    @property
    def area(self):
        """Cross-section area A [m^2]."""
        if self.shape == "bar":
            return self.width * self.thickness
        return math.pi * (self.outer**2 - self.solid_inner**2) / 4

    @property
    def second_moment(self):
        """Second moment of area about the bending axis I [m^4]."""
        if self.shape == "bar":
            return self.width * self.thickness**3 / 12
        return math.pi * (self.outer**4 - self.solid_inner**4) / 64

    @property
    def radius_of_gyration(self):
        """sqrt(I / A) [m]: sqrt(D^2 + d^2)/4 for a tube, t/sqrt(12) for a bar."""
        return math.sqrt(self.second_moment / self.area)

    @property
    def depth(self):
        """Depth in the bending plane [m] (outside diameter or bar thickness)."""
        return self.thickness if self.shape == "bar" else self.outer

    @property
    def wall(self):
        """Wall thickness of a tube as tabled or given [m] (half the outside diameter for a rod);
        see :attr:`solid_inner` for the wall the physics uses."""
        return (self.outer - self.inner) / 2

    @property
    def air_radius(self):
        """Inner radius an air column sees [m]."""
        return (self.bore or self.inner) / 2

    def shear_coefficient(self, poisson):
        """Cowper's (1966) shear coefficient kappa for this shape [-]."""
        if self.shape == "bar":
            return shear_coefficient_cowper_rectangle(poisson)
        return shear_coefficient_cowper_hollow_circle(poisson, self.solid_inner / self.outer)

    def describe(self, units="mm"):
        """Short description, the chosen unit first; inches as decimals, as stock is sold.

        >>> tube(0.0254, 0.001651).describe("in")
        'tube 1.000 x 0.065 in wall (25.40 x 1.65 mm)'
        """
        inch = 0.0254
        if self.shape == "bar":
            mm = f"{self.width * 1e3:.1f} x {self.thickness * 1e3:.1f} mm"
            other = f"{self.width / inch:.3f} x {self.thickness / inch:.3f} in"
            first, second = (other, mm) if units == "in" else (mm, other)
            return f"bar {first}" + (f" ({second})" if units == "in" else "")
        if self.shape == "rod":
            mm, other = f"{self.outer * 1e3:.2f} mm", f"{self.outer / inch:.3f} in"
            return f"rod {other} ({mm})" if units == "in" else f"rod {mm}"
        mm = f"{self.outer * 1e3:.2f} x {self.wall * 1e3:.2f} mm"
        if units == "in":
            return f"tube {self.outer / inch:.3f} x {self.wall / inch:.3f} in wall ({mm})"
        return f"tube {mm} wall"


def tube(outer, wall, name="", bore=0.0):
    """Round tube from outside diameter and wall thickness [m]."""
    return Section("tube", outer=outer, inner=outer - 2 * wall, name=name, bore=bore)


def rod(diameter, name=""):
    """Solid round rod [m]."""
    return Section("rod", outer=diameter, inner=0.0, name=name)


def bar(width, thickness, name=""):
    """Rectangular bar [m], bending through its thickness."""
    return Section("bar", width=width, thickness=thickness, name=name)
