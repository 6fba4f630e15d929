"""Modes of a bar with any underside profile, for tuning at the bench.

One call, :func:`profile_modes`, with the signature of the 2-D elastic model of a bar's profile
(:mod:`cutplan.physics.elastic2d`); this module picks that model when it is there and falls
back to the 1-D shear-corrected finite elements of :mod:`cutplan.physics.beam_fe` otherwise.
Both take stations ``xs`` [m] from end A and the thickness [m] left at each (flat top, cut from
the underside, piecewise linear between stations, symmetric or not).
"""

from __future__ import annotations

import numpy as np

from cutplan.physics import beam_fe
from cutplan.physics.sections import shear_coefficient_cowper_rectangle
from cutplan.planning.frequency import plane_constants


def model_name():
    """Which model :func:`profile_modes` uses: "elastic-2d" or "beam-fe"."""
    try:
        from cutplan.physics import elastic2d  # noqa: F401
    except ImportError:
        return "beam-fe"
    return "elastic-2d"

__all__ = ["elastic_constants", "profile_modes"]



def elastic_constants(material, sawing="unknown"):
    """(E along, E across, G, nu, width constants) [Pa, Pa, Pa, -, WidthConstants] of a material
    sawn ``sawing``, the constants the plan designs its undercut bars with
    (:func:`cutplan.planning.frequency.plane_constants`, the width resolved), so trim and plan agree."""
    c = plane_constants(material, sawing)
    return c.modulus_along, c.modulus_across, c.shear_modulus, c.poisson, c.width


def profile_modes(xs, thickness, width, modulus_along, modulus_across, shear_modulus, poisson, density, modes=4,
                  width_constants=None):
    """Free-free bending modes of a bar whose thickness is ``thickness`` [m] at stations ``xs`` [m].

    Parameters
    ----------
    xs : sequence of float
        Stations from end A [m], rising; the first is end A, the last end B.
    thickness : sequence of float
        Thickness left at each station [m] (piecewise linear between them).
    width : float
        Bar width [m].
    modulus_along, modulus_across : float
        Young's modulus along the bar and through its thickness [Pa].
    shear_modulus : float
        Shear modulus in the bending plane [Pa].
    poisson : float
        Poisson's ratio [-].
    density : float
        [kg/m^3].
    modes : int
        Number of modes [-].
    width_constants : WidthConstants, optional
        The width axis's constants: given, the 2-D model resolves the width (the 1-D fallback
        has no use for them).

    Returns
    -------
    record with ``.frequencies`` [Hz] (rising)
    """
    try:
        from cutplan.physics.elastic2d import profile_modes as modes_2d
    except ImportError:
        return _beam_fe_modes(xs, thickness, width, modulus_along, shear_modulus, poisson, density, modes)
    return modes_2d(xs, thickness, width, modulus_along, modulus_across, shear_modulus, poisson, density,
                    modes=modes, width_constants=width_constants)


def _beam_fe_modes(xs, thickness, width, modulus, shear_modulus, poisson, density, modes):
    """The 1-D fallback: Timoshenko elements with their edges at the stations (Cowper's kappa)."""
    xs = np.asarray(xs, dtype=float)
    hs = np.asarray(thickness, dtype=float)
    x0 = xs - xs[0]
    kappa = shear_coefficient_cowper_rectangle(poisson)

    def h(x):
        return np.interp(x, x0, hs)

    return beam_fe.free_free_modes(
        float(x0[-1]),
        lambda x: modulus * width * h(x) ** 3 / 12,
        lambda x: kappa * shear_modulus * width * h(x),
        lambda x: density * width * h(x),
        lambda x: density * width * h(x) ** 3 / 12,
        modes=modes, order=3, breaks=x0,
    )
