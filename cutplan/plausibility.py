"""Plausible ranges of stiffness and density by class of material, to catch unit slips.

A material table names its class (``class = "metal"``, "wood", "plastic" or "glass"); one
without a class is held to the union of the ranges. A real material outside its range (a
foam, a composite, a sintered metal) is accepted when its table says ``unusual = true``.

A modulus typed as "68.9 MPa" instead of GPa, or a density of "2700 g/cm3", still parses; these
ranges turn such slips into a clear error. They are deliberately wide (common practice, checked
against the handbook values in ``materials/``): every tabled material sits well inside its class.
"""

from __future__ import annotations

__all__ = [
    "CLASS_RANGES", "ANY_RANGE", "SHEAR_RATIO_RANGES", "ANY_SHEAR_RATIO", "FIT_RESIDUAL_LIMIT_CENTS",
    "PHYSICAL_RANGE", "modulus_range", "density_range", "shear_ratio_range", "problems",
    "physical_problems", "material_problems"
]

CLASS_RANGES = {
    # class: ((E low, E high) [Pa], (density low, high) [kg/m^3])
    "metal": ((10e9, 450e9), (1500.0, 22000.0)),
    "wood": ((1e9, 35e9), (150.0, 1400.0)),
    "plastic": ((0.1e9, 12e9), (800.0, 2300.0)),
    "glass": ((40e9, 130e9), (2000.0, 6500.0)),
}
"""Ranges per class of material (common practice; wide enough for every tabled material)."""

ANY_RANGE = ((0.1e9, 450e9), (150.0, 22000.0))
"""Range for a material of unknown class: the union of the classes."""

SHEAR_RATIO_RANGES = {
    # class: (E / G low, high) [-]
    "metal": (2.0, 3.2),
    "wood": (5.0, 40.0),
    "plastic": (2.0, 3.2),
    "glass": (2.0, 3.2),
}
"""Plausible E / G by class.  Isotropic solids have E / G = 2 (1 + nu), 2.4 to 2.9 for Poisson's
ratios 0.2 to 0.45 (Timoshenko & Goodier, Theory of Elasticity, 3rd ed., 1970, ch. 1, from
memory), with room either side; along the grain of wood G_LR / E_L is 0.05 to 0.11, E / G of 9 to 20
(USDA FPL Wood Handbook, FPL-GTR-190, 2010, Table 5-1), with room for boards and species outside
it (common practice)."""

ANY_SHEAR_RATIO = (2.0, 40.0)
"""E / G plausible for a material of unknown class: the union of the classes."""

FIT_RESIDUAL_LIMIT_CENTS = 15.0
"""Largest miss of any partial in the fit a calibrated material came from [cents].  A uniform
piece read with a tuner or from a clean recording fits to a few cents with the shear-corrected
model; a miss beyond this means the piece was not uniform (undercut), a partial was misread, or
the length or section was wrong, and the material would mis-cut every piece (common practice)."""

PHYSICAL_RANGE = ((0.1e6, 1.2e12), (1.0, 23000.0))
"""What any solid can be, ``unusual`` or not: modulus from a soft foam (0.1 MPa) to diamond
(about 1.05-1.2 TPa, from memory); density from an aerogel (about 1 kg/m3, from memory) to
osmium (22,590 kg/m3; Haynes, W. M. (ed.), CRC Handbook of Chemistry and Physics, 95th ed.,
2014, sec. 4).  Outside it the lengths computed would be absurd (a chime longer than the
Earth), so such values are refused even with ``unusual = true``."""


def modulus_range(material_class=None):
    """(low, high) Young's modulus [Pa] plausible for a class ("metal", "wood", ...) or any.

    >>> modulus_range("wood")
    (1000000000.0, 35000000000.0)
    """
    return CLASS_RANGES.get(material_class, ANY_RANGE)[0]


def density_range(material_class=None):
    """(low, high) density [kg/m^3] plausible for a class, or for any material."""
    return CLASS_RANGES.get(material_class, ANY_RANGE)[1]


def shear_ratio_range(material_class=None):
    """(low, high) E / G [-] plausible for a class, or for any material.

    >>> shear_ratio_range("wood")
    (5.0, 40.0)
    """
    return SHEAR_RATIO_RANGES.get(material_class, ANY_SHEAR_RATIO)


def problems(modulus, density, material_class=None, shear_modulus=None):
    """Lines saying which of ``modulus`` [Pa] and ``density`` [kg/m^3] is implausible (empty: fine).

    >>> problems(68.9e6, 2700.0, "metal")
    ['modulus 0.0689 GPa is outside 10-450 GPa, plausible for metal (a unit slip? GPa, not MPa)']
    """
    out = []
    what = material_class or "any material"
    lo, hi = modulus_range(material_class)
    if not lo <= modulus <= hi:
        slip = "GPa, not MPa" if modulus < lo else "MPa or GPa, not kPa or psi mixed up"
        out.append(f"modulus {modulus / 1e9:.3g} GPa is outside {lo / 1e9:g}-{hi / 1e9:g} GPa, plausible for "
                   f"{what} (a unit slip? {slip})")
    lo, hi = density_range(material_class)
    if not lo <= density <= hi:
        slip = "kg/m3, not g/cm3" if density > hi else "g/cm3, not kg/m3"
        out.append(f"density {density:.4g} kg/m3 is outside {lo:g}-{hi:g} kg/m3, plausible for {what} "
                   f"(a unit slip? {slip})")
    if shear_modulus:
        lo, hi = shear_ratio_range(material_class)
        if not lo <= modulus / shear_modulus <= hi:
            out.append(f"E/G {modulus / shear_modulus:.3g} (shear modulus {shear_modulus / 1e9:.3g} GPa) is outside "
                       f"{lo:g}-{hi:g}, plausible for {what}")
    return out


def physical_problems(modulus, density):
    """Lines saying which of ``modulus`` [Pa] and ``density`` [kg/m^3] no solid can have (empty: fine).

    >>> physical_problems(3.7e78, 2700.0)
    ['modulus 3.7e+69 GPa is outside 0.0001-1200 GPa, possible for any solid (unusual = true does not cover it)']
    """
    out = []
    (e_lo, e_hi), (d_lo, d_hi) = PHYSICAL_RANGE
    if not e_lo <= modulus <= e_hi:
        out.append(f"modulus {modulus / 1e9:.3g} GPa is outside {e_lo / 1e9:g}-{e_hi / 1e9:g} GPa, possible for "
                   "any solid (unusual = true does not cover it)")
    if not d_lo <= density <= d_hi:
        out.append(f"density {density:.4g} kg/m3 is outside {d_lo:g}-{d_hi:g} kg/m3, possible for any solid "
                   "(unusual = true does not cover it)")
    return out


def material_problems(material):
    """:func:`problems` for a Material, honouring its class and ``unusual`` flag (empty: fine);
    an ``unusual`` material is still held to :data:`PHYSICAL_RANGE`."""
    if getattr(material, "unusual", False):
        return physical_problems(material.modulus, material.density)
    shear = material.shear_modulus or (material.shear_ratio and material.shear_ratio * material.modulus) or None
    out = problems(material.modulus, material.density, getattr(material, "material_class", None), shear)
    residual = getattr(material, "fit_residual_cents", None)
    if residual is not None and residual > FIT_RESIDUAL_LIMIT_CENTS:
        out.append(f"fit_residual_cents {residual:g}: it was calibrated from partials that miss its fit by more than "
                   f"{FIT_RESIDUAL_LIMIT_CENTS:g} cents (not a uniform test piece, or a misread partial); calibrate "
                   "again from a uniform blank")
    return out
