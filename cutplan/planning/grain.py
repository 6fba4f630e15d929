r"""How a bar was sawn, and the elastic constants each of its planes bends and twists with.

Wood is orthotropic: stiff along the grain (L), soft across it, radially (R, across the growth
rings) and tangentially (T, along them).  A bar's length runs along the grain; its sawing decides
which of R and T lies through its thickness and which across its width:

* ``"flat"`` (flat- or plain-sawn): the growth rings run roughly parallel to the struck face, so
  the thickness is radial and the width tangential;
* ``"quarter"`` (quarter-sawn): the rings stand across the face, so the thickness is tangential
  and the width radial;
* ``"unknown"``: a board of either sawing; the constants are the geometric means of the two (so a
  frequency lies midway, in cents, between the flat- and quarter-sawn ones), and the warnings and
  the allowance widen by half the spread between the two sawings (see :func:`grain_spread_cents`).

(Both conventions are common practice in wood technology: USDA FPL, Wood Handbook, FPL-GTR-190,
2010, ch. 5, names the axes; "flat-sawn" and "quarter-sawn" are the trade's words.)

A bar bends through its thickness (the tuned modes) with E_L and the shear modulus of the
length-thickness plane: G_LR for a flat-sawn bar, G_LT for a quarter-sawn one.  It bends sideways
with G of the length-width plane, and twists mostly with that same G when it is wider than thick
(a thin strip's twisting shear runs in the plane of its face).  Metals and materials without the
across-grain constants are isotropic here, whatever the grain.

A material with an explicit ``shear_modulus`` (an inline value or a calibration) is taken as
giving G of the bar's bending plane; the other planes' G keep their tabled ratios to it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from cutplan.physics import timoshenko
from cutplan.physics.solid3d import Orthotropic
from cutplan.physics.torsion import orthotropic_rectangle_rigidity
from cutplan.planning.uncertainty import shared_draws

__all__ = [
    "GRAINS", "PlaneConstants", "is_orthotropic", "axis_constants", "applied", "bending_plane_constants",
    "bending_shear_modulus", "solid_constants", "grain_spread_cents", "twisting_rigidity",
    "unknown_grain_cents", "unknown_grain_ratios", "assumptions"
]

GRAINS = ("flat", "quarter", "unknown")
"""The sawings a bar set may give (``grain = "..."``)."""


@dataclass(frozen=True)
class PlaneConstants:
    """Elastic constants of one plane of bending [Pa, -]: E along the bar, E across it (in that
    plane), G of that plane and Poisson's ratio nu (strain across / strain along)."""

    modulus_along: float
    modulus_across: float
    shear_modulus: float
    poisson: float


def is_orthotropic(material):
    """True when the material table gives the across-grain constants (woods of the shipped tables)."""
    return bool(material is not None and material.shear_ratio and material.radial_ratio
                and material.tangential_ratio and material.shear_ratio_lt)


def _sawn(material, grain, model, scale=1.0):
    """(E_L, E_width, E_thick, G_L-width, G_L-thick, G_width-thick, nu_L-width, nu_L-thick, nu_width-thick)
    of a flat- or quarter-sawn bar."""
    e_l = material.modulus_for(model)
    e_r, e_t = material.radial_ratio * e_l, material.tangential_ratio * e_l
    g_lr, g_lt = material.shear_ratio * e_l, material.shear_ratio_lt * e_l
    g_rt = (material.shear_ratio_rt or min(material.shear_ratio, material.shear_ratio_lt) / 4) * e_l
    nu_lr, nu_lt = material.poisson, material.poisson_lt or material.poisson
    nu_rt = material.poisson_rt or 0.5
    nu_tr = nu_rt * e_t / e_r
    g_lr, g_lt, g_rt = g_lr * scale, g_lt * scale, g_rt * scale
    if grain == "flat":  # thickness radial, width tangential
        return e_l, e_t, e_r, g_lt, g_lr, g_rt, nu_lt, nu_lr, nu_tr
    return e_l, e_r, e_t, g_lr, g_lt, g_rt, nu_lr, nu_lt, nu_rt


def axis_constants(material, grain="unknown", model="timoshenko"):
    """The nine constants on the bar's axes x (length), y (width), z (thickness), as
    (E_x, E_y, E_z, G_xy, G_xz, G_yz, nu_xy, nu_xz, nu_yz) [Pa, -].

    Examples
    --------
    Flat-sawn sugar maple twists in its face with G_LT (Wood Handbook 2010, Table 5-1: 0.063 E_L);
    quarter-sawn with G_LR (0.111 E_L):

    >>> from cutplan.materials import load_library
    >>> maple = load_library().materials["maple-sugar"]
    >>> e_l = maple.modulus_for("timoshenko")
    >>> round(axis_constants(maple, "flat")[3] / e_l, 3), round(axis_constants(maple, "quarter")[3] / e_l, 3)
    (0.063, 0.111)
    """
    if grain not in GRAINS:
        raise ValueError(f"grain must be one of {', '.join(GRAINS)}, not {grain!r}")
    if not is_orthotropic(material):
        e, g, nu = material.modulus_for(model), material.shear_modulus_for(model), material.poisson
        return e, e, e, g, g, g, nu, nu, nu
    return _axes(material, grain, model, _shear_scale(material, grain))


def _shear_scale(material, grain):
    """A measured (explicit) G of the bending plane over the tabled one; 1 without one."""
    if not material.shear_modulus:
        return 1.0
    tabled = {"flat": material.shear_ratio, "quarter": material.shear_ratio_lt,
              "unknown": math.sqrt(material.shear_ratio * material.shear_ratio_lt)}[grain]
    return material.shear_modulus / (tabled * material.modulus_for("timoshenko"))


def _axes(material, grain, model, scale):
    if grain != "unknown":
        return _sawn(material, grain, model, scale)
    flat, quarter = _sawn(material, "flat", model, scale), _sawn(material, "quarter", model, scale)
    return tuple(math.sqrt(a * b) for a, b in zip(flat, quarter, strict=True))


def applied(spec):
    """A bar set with its material's G set to that of the bending plane for its sawing (so the beam
    models, the allowance and the 2-D solver bend with the right G); other sets unchanged."""
    mat = spec.material
    if spec.kind not in ("chime", "bar") or spec.section is None or spec.section.shape != "bar" \
            or not is_orthotropic(mat) or mat.shear_modulus:
        return spec
    return replace(spec, material=replace(mat, shear_modulus=bending_shear_modulus(mat, spec.grain)))


def bending_plane_constants(material, grain="unknown", model="timoshenko"):
    """(thickness plane, width plane) PlaneConstants of a bar of this material and sawing.

    The thickness plane is the one the tuned modes bend in (and the 2-D bending solver models);
    the width plane is that of sideways bending.

    >>> from cutplan.materials import load_library
    >>> maple = load_library().materials["maple-sugar"]
    >>> thick, side = bending_plane_constants(maple, "flat")
    >>> round(thick.shear_modulus / thick.modulus_along, 3), round(thick.modulus_across / thick.modulus_along, 3)
    (0.111, 0.132)
    """
    e_x, e_y, e_z, g_xy, g_xz, _, nu_xy, nu_xz, _ = axis_constants(material, grain, model)
    return PlaneConstants(e_x, e_z, g_xz, nu_xz), PlaneConstants(e_x, e_y, g_xy, nu_xy)


def bending_shear_modulus(material, grain="unknown", model="timoshenko"):
    """G [Pa] the tuned (thickness-direction) bending of a bar uses."""
    return bending_plane_constants(material, grain, model)[0].shear_modulus


def solid_constants(material, grain="unknown", model="timoshenko"):
    """The constants as a :class:`cutplan.physics.solid3d.Orthotropic` for the 3-D side-mode model."""
    return Orthotropic(*axis_constants(material, grain, model))


def grain_spread_cents(material, grain, width, thickness):
    """Half the spread [cents] between a flat- and a quarter-sawn bar's twisting, for ``"unknown"``
    grain (0 for a known sawing or an isotropic material).

    Saint-Venant twisting of the blank's orthotropic rectangle (:func:`twisting_rigidity`): the
    frequency goes as sqrt(G J), so the spread is 600 log2 of the ratio of the two rigidities.
    The sideways modes move much less (their shear part is small), but the same window is used for
    every mode, a plain and safe rule.

    >>> from cutplan.materials import load_library
    >>> maple = load_library().materials["maple-sugar"]
    >>> round(grain_spread_cents(maple, "unknown", 0.05, 0.02))
    161
    """
    if grain != "unknown" or not is_orthotropic(material):
        return 0.0
    scale = _shear_scale(material, "unknown")
    flat, quarter = (_axes(material, g, "timoshenko", scale) for g in ("flat", "quarter"))
    gj_flat = twisting_rigidity(width, thickness, flat[3], flat[4])
    gj_quarter = twisting_rigidity(width, thickness, quarter[3], quarter[4])
    return abs(600 * math.log2(gj_flat / gj_quarter)) / 2


def twisting_rigidity(width, thickness, g_width, g_thickness):
    """Saint-Venant G J [N m^2] of an orthotropic rectangle; see
    :func:`cutplan.physics.torsion.orthotropic_rectangle_rigidity`."""
    return orthotropic_rectangle_rigidity(width, thickness, g_width, g_thickness)


def unknown_grain_cents(material, grain, section, length):
    """Half the spread [cents] of a bar blank's fundamental between flat- and quarter-sawn (the
    shear modulus of the bending plane is G_LR or G_LT); 0 for a known sawing or an isotropic
    material.  The shear-corrected uniform beam at ``length`` [m]."""
    if grain != "unknown" or section is None or section.shape != "bar" or not is_orthotropic(material):
        return 0.0
    scale = _shear_scale(material, "unknown")
    area, second = section.width * section.thickness, section.width * section.thickness**3 / 12
    rho = material.density
    f = []
    for sawing in ("flat", "quarter"):
        e_x, _, _, _, g_xz, _, _, nu_xz, _ = _axes(material, sawing, "timoshenko", scale)
        kga = section.shear_coefficient(nu_xz) * g_xz * area
        f.append(timoshenko.frequencies(length, e_x * second, rho * area, kga, rho * second, modes=1)[0])
    return abs(600 * math.log2(f[0] / f[1]))


def unknown_grain_ratios(spec, ratios, length):
    """Samples of f_actual / f_planned (``ratios``) widened for a bar of unknown sawing: each
    sample times 2^(u c / 1200), u uniform on [-1, 1] (the seeded draws of
    :mod:`cutplan.planning.uncertainty`, unused by bars otherwise) and c = :func:`unknown_grain_cents`.
    Unchanged for any other set."""
    cents = unknown_grain_cents(spec.material, getattr(spec, "grain", "unknown"), spec.section, length)
    if not cents:
        return ratios
    return ratios * 2.0 ** (shared_draws()[1][0] * cents / 1200)


def assumptions(spec):
    """The plan's assumption lines about a wood bar set's sawing ([] for other sets)."""
    mat, sec = spec.material, spec.section
    if sec is None or sec.shape != "bar" or not is_orthotropic(mat):
        return []
    sawing = getattr(spec, "grain", "unknown")
    thick, side = bending_plane_constants(mat, sawing)
    where = {"flat": "flat-sawn (thickness radial, width tangential)",
             "quarter": "quarter-sawn (thickness tangential, width radial)",
             "unknown": "sawing unknown (constants midway between flat- and quarter-sawn)"}[sawing]
    line = (f"grain: {where}; bends on its face with G = {thick.shear_modulus / 1e9:.2f} GPa, sideways with "
            f"G = {side.shear_modulus / 1e9:.2f} GPa; E across {thick.modulus_across / 1e9:.2f} GPa (thickness), "
            f"{side.modulus_across / 1e9:.2f} GPa (width)")
    if sawing == "unknown":
        line += "; wider side-mode warnings and allowance: give grain = \"flat\" or \"quarter\""
    return [line]
