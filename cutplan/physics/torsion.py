r"""Twisting (torsional) vibration of free-free bars, rods and tubes (Saint-Venant torsion).

A piece twisting about its axis obeys the wave equation

.. math:: \frac{\partial}{\partial x}\left(G J \frac{\partial \theta}{\partial x}\right)
          = \rho I_p \frac{\partial^2 \theta}{\partial t^2},

with G J the torsional rigidity [N m^2] (J the Saint-Venant torsion constant of the section) and
rho I_p the polar mass moment of inertia per length [kg m] (I_p the polar second moment of area
about the centroid).  With both ends free (no torque, theta' = 0) a uniform piece twists at

.. math:: f_n = \frac{n}{2 L} \sqrt{\frac{G J}{\rho I_p}}, \qquad n = 1, 2, 3, \ldots

For a round rod or tube J = I_p, so f_n = (n / 2L) sqrt(G / rho) whatever the diameter.  For a
rectangle J < I_p: the section warps, and a thin flat bar twists far lower than its shear wave
speed alone would suggest.

Warping restraint (a term E Gamma theta'''' that stiffens short, wide bars a little) is left
out: it is exact for circular sections and small for rectangles longer than a few widths.

References
----------
.. [1] Timoshenko, S. P. and Goodier, J. N., Theory of Elasticity, 3rd ed., McGraw-Hill, 1970,
   ch. 10, torsion of a rectangular bar (the series for J and the table of
   k1 = J / (a b^3); from memory for the section number).
.. [2] Young, W. C. and Budynas, R. G., Roark's Formulas for Stress and Strain, 7th ed.,
   McGraw-Hill, 2002, Table 10.1 (torsion constant K of solid and hollow sections; case 4 for
   the solid rectangle).
.. [3] Blevins, R. D., Formulas for Natural Frequency and Mode Shape, Van Nostrand Reinhold,
   1979, ch. 8 (torsional vibration of uniform shafts: f_n = (n / 2L) sqrt(G J / (rho I_p)) for
   free ends; from memory for the table number).
"""

from __future__ import annotations

import math

# scipy.linalg is imported where used: a chime plan (0.72 s CPU) never needs it; at the top it adds 0.18 s (measured)
import numpy as np

from cutplan.physics.blas import single_thread

__all__ = [
    "torsion_constant_rectangle", "orthotropic_rectangle_rigidity", "torsion_constant_rectangle_roark",
    "torsion_constant_tube", "polar_moment_rectangle", "polar_moment_tube", "free_free_twisting_frequency",
    "twisting_frequencies"
]


def torsion_constant_rectangle(width, thickness, terms=50):
    r"""Saint-Venant torsion constant J of a solid rectangle [m^4], from the exact series.

    With a the longer side and b the shorter,

    .. math:: J = \frac{a b^3}{3}\left[1 - \frac{192}{\pi^5}\frac{b}{a}
              \sum_{n = 1, 3, 5, \ldots} \frac{1}{n^5}\tanh\frac{n \pi a}{2 b}\right]

    Parameters
    ----------
    width, thickness : float or array
        The two sides of the rectangle [m] (either order; arrays broadcast).
    terms : int
        Odd terms of the series summed [-]; 50 gives J to machine precision.

    Examples
    --------
    A square of side 1 has J = 0.1406 (Timoshenko & Goodier's k1 = 0.141 for a / b = 1):

    >>> round(torsion_constant_rectangle(1.0, 1.0), 4)
    0.1406

    References
    ----------
    .. [1] Timoshenko, S. P. and Goodier, J. N., Theory of Elasticity, 3rd ed., 1970, ch. 10.
    """
    a, b = np.maximum(width, thickness), np.minimum(width, thickness)
    n = np.arange(1, 2 * terms, 2, dtype=float).reshape((-1,) + (1,) * np.ndim(a))
    series = np.sum(np.tanh(n * math.pi * a / (2 * b)) / n**5, axis=0)
    out = a * b**3 / 3 * (1 - 192 / math.pi**5 * (b / a) * series)
    return float(out) if np.ndim(out) == 0 else out


def orthotropic_rectangle_rigidity(width, thickness, g_width, g_thickness):
    r"""Saint-Venant torsional rigidity G J [N m^2] of an orthotropic rectangle.

    With G_xy the shear modulus of the length-width plane and G_xz that of the length-thickness
    plane, scaling the thickness coordinate by s = sqrt(G_xz / G_xy) turns the stress-function
    equation into the isotropic one on a rectangle b x t / s, so

    .. math:: G J = s\, G_{xz}\, J_{iso}(b, t / s)

    A thin strip (b >> t) gives G_xy b t^3 / 3: its twisting shear runs in the plane of its face.

    >>> j = torsion_constant_rectangle(0.05, 0.02)
    >>> bool(abs(orthotropic_rectangle_rigidity(0.05, 0.02, 1e9, 1e9) - 1e9 * j) < 1e-6 * j * 1e9)
    True
    >>> thin = orthotropic_rectangle_rigidity(1.0, 0.001, 2e9, 5e9) / (2e9 * 1.0 * 0.001**3 / 3)
    >>> round(thin, 2)
    1.0

    References
    ----------
    .. [1] Lekhnitskii, S. G., Theory of Elasticity of an Anisotropic Body, Mir, 1981 (torsion
       of an orthotropic bar of rectangular section; the affine change of variables).
    """
    s = np.sqrt(np.asarray(g_thickness, dtype=float) / g_width)
    out = s * g_thickness * torsion_constant_rectangle(width, thickness / s)
    return float(out) if np.ndim(out) == 0 else out


def torsion_constant_rectangle_roark(width, thickness):
    r"""Saint-Venant torsion constant of a solid rectangle [m^4], Roark's closed approximation.

    With 2a the longer and 2b the shorter side,
    :math:`K = a b^3 [16/3 - 3.36 (b/a)(1 - b^4 / (12 a^4))]`.  Within a fraction of a per cent of
    :func:`torsion_constant_rectangle` for every aspect ratio.

    >>> round(torsion_constant_rectangle_roark(1.0, 1.0), 4)
    0.1408

    References
    ----------
    .. [1] Young, W. C. and Budynas, R. G., Roark's Formulas for Stress and Strain, 7th ed.,
       2002, Table 10.1, case 4.
    """
    a, b = max(width, thickness) / 2, min(width, thickness) / 2
    return a * b**3 * (16 / 3 - 3.36 * (b / a) * (1 - b**4 / (12 * a**4)))


def torsion_constant_tube(outer, inner=0.0):
    r"""Torsion constant of a round tube (or a rod, inner = 0) [m^4]: :math:`\pi (D^4 - d^4) / 32`.

    For a circular section the torsion constant equals the polar second moment of area.

    >>> round(torsion_constant_tube(0.02) * 1e9, 3)  # 20 mm rod
    15.708

    References
    ----------
    .. [1] Young, W. C. and Budynas, R. G., Roark's Formulas for Stress and Strain, 7th ed.,
       2002, Table 10.1 (solid and hollow concentric circular sections).
    """
    return math.pi * (outer**4 - inner**4) / 32


def polar_moment_rectangle(width, thickness):
    r"""Polar second moment of area of a rectangle about its centroid [m^4]: b t (b^2 + t^2) / 12.

    >>> round(polar_moment_rectangle(0.05, 0.02) * 1e9, 2)
    241.67
    """
    return width * thickness * (width**2 + thickness**2) / 12


def polar_moment_tube(outer, inner=0.0):
    """Polar second moment of area of a round tube or rod [m^4]: pi (D^4 - d^4) / 32."""
    return math.pi * (outer**4 - inner**4) / 32


def free_free_twisting_frequency(mode, length, torsional_rigidity, polar_inertia):
    r"""Frequency [Hz] of twisting mode n of a uniform free-free piece.

    .. math:: f_n = \frac{n}{2 L}\sqrt{\frac{G J}{\rho I_p}}

    Parameters
    ----------
    mode : int or array
        n = 1, 2, ... [-].
    length : float
        L [m].
    torsional_rigidity : float
        G J [N*m^2].
    polar_inertia : float
        rho I_p, polar mass moment of inertia per length [kg*m].

    Examples
    --------
    A 500 mm aluminium rod (G = 26 GPa, rho = 2700 kg/m^3): sqrt(G / rho) = 3103 m/s, so the
    first twisting mode is at 3103 Hz.

    >>> d = 0.012
    >>> gj = 26e9 * torsion_constant_tube(d)
    >>> round(free_free_twisting_frequency(1, 0.5, gj, 2700 * polar_moment_tube(d)), 0)
    3103.0

    References
    ----------
    .. [1] Blevins, R. D., Formulas for Natural Frequency and Mode Shape, 1979, ch. 8.
    """
    mode = np.asarray(mode, dtype=float)
    out = mode / (2 * length) * np.sqrt(torsional_rigidity / polar_inertia)
    return float(out) if out.ndim == 0 else out


def twisting_frequencies(length, torsional_rigidity, polar_inertia, modes=3, elements=400):
    """Twisting frequencies [Hz] of a free-free piece whose section varies along it (finite elements).

    Linear elements with a consistent mass matrix on an even mesh; the rigid rotation (0 Hz) is
    dropped.  The error of mode n is about (n pi / elements)^2 / 24 of its frequency (0.04 cent
    for mode 3 with 400 elements).

    Parameters
    ----------
    length : float
        L [m].
    torsional_rigidity : callable
        G J(x) [N*m^2], x in m from one end (vectorised).
    polar_inertia : callable
        rho I_p(x) [kg*m].
    modes : int
        How many twisting modes [-].
    elements : int
        Number of elements [-].

    Examples
    --------
    A uniform piece gives back the closed form n / 2L sqrt(GJ / rho Ip):

    >>> f = twisting_frequencies(0.5, lambda x: 0 * x + 1.0, lambda x: 0 * x + 1.0, modes=2)
    >>> [round(float(v), 3) for v in f]
    [1.0, 2.0]
    """
    x = np.linspace(0.0, length, elements + 1)
    mid = (x[:-1] + x[1:]) / 2
    h = np.diff(x)
    # two-point Gauss rule per element for the mass, midpoint for the stiffness (linear elements)
    k_e = np.asarray(torsional_rigidity(mid), dtype=float) / h
    g = h / (2 * math.sqrt(3))
    m_lo = np.asarray(polar_inertia(mid - g), dtype=float)
    m_hi = np.asarray(polar_inertia(mid + g), dtype=float)
    w_lo, w_hi = (1 + 1 / math.sqrt(3)) / 2, (1 - 1 / math.sqrt(3)) / 2  # shape function values
    m11 = h / 2 * (m_lo * w_lo**2 + m_hi * w_hi**2)
    m22 = h / 2 * (m_lo * w_hi**2 + m_hi * w_lo**2)
    m12 = h / 2 * (m_lo + m_hi) * w_lo * w_hi
    size = elements + 1
    stiff = np.zeros((size, size))
    mass = np.zeros((size, size))
    i = np.arange(elements)
    stiff[i, i] += k_e
    stiff[i + 1, i + 1] += k_e
    stiff[i, i + 1] -= k_e
    stiff[i + 1, i] -= k_e
    mass[i, i] += m11
    mass[i + 1, i + 1] += m22
    mass[i, i + 1] += m12
    mass[i + 1, i] += m12
    from scipy.linalg import eigh  # only here: keeps scipy off the plan path of tubes and rods


    with single_thread():  # a second BLAS thread only spins against the first on a problem this small
        values = eigh(stiff, mass, eigvals_only=True, subset_by_index=[0, modes])
    return np.sqrt(np.clip(values[1:], 0.0, None)) / (2 * math.pi)
