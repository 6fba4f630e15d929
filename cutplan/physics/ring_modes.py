r"""Ring (ovalling) modes of a thin-walled tube: the wall bends around the circumference.

A tube is a cylindrical shell.  Besides bending as a beam it can flex its cross-section into an
oval (n = 2 lobes), a three-lobed shape (n = 3), and so on, the same all along a free tube.  For
a thin wall these inextensional modes are those of a ring whose wall bends as a plate:

.. math:: f_n = \frac{1}{2\pi}\,\frac{n (n^2 - 1)}{\sqrt{n^2 + 1}}
          \sqrt{\frac{D}{\rho h R^4}}, \qquad D = \frac{E h^3}{12 (1 - \nu^2)}

with R the mean radius and h the wall [m].  They do not depend on the tube's length, so a
long chime's low partials climb towards them: for 2 in conduit the n = 2 mode lies near 1.5 kHz.

References
----------
.. [1] Blevins, R. D., Formulas for Natural Frequency and Mode Shape, Van Nostrand Reinhold,
   1979, ch. 12, circumferential (ring) modes of a cylindrical shell (table number from memory).
.. [2] Soedel, W., Vibrations of Shells and Plates, 3rd ed., Marcel Dekker, 2004, ch. 4 and 5
   (the ring equations; the inextensional limit; from memory).
"""

from __future__ import annotations

import numpy as np

__all__ = ["ring_frequencies"]


def ring_frequencies(outer, inner, modulus, density, poisson, modes=4):
    r"""Frequencies [Hz] of the ring modes n = 2, 3, ... of a thin-walled tube.

    Parameters
    ----------
    outer : float
        Outside diameter [m].
    inner : float
        Inside diameter [m] (must be > 0: a solid rod has no ring modes).
    modulus : float
        Young's modulus E [Pa].
    density : float
        Density rho [kg/m^3].
    poisson : float
        Poisson's ratio nu [-].
    modes : int
        How many ring modes, from n = 2 [-].

    Returns
    -------
    numpy array of f_n [Hz], n = 2 .. modes + 1.

    Notes
    -----
    Thin-wall theory: good to about a percent while h / R < 0.1 (the ring's own extension and
    the wall's shear add a little stiffness and inertia beyond that).

    Examples
    --------
    Steel EMT, 2 in trade size (ANSI C80.3: OD 2.197 in, wall 0.065 in), E = 200 GPa,
    rho = 7850 kg/m^3, nu = 0.3:

    >>> f = ring_frequencies(2.197 * 0.0254, 2.067 * 0.0254, 200e9, 7850.0, 0.3, modes=2)
    >>> [round(float(x)) for x in f]
    [1469, 4155]
    """
    if not 0 < inner < outer:
        raise ValueError("ring modes need a tube: 0 < inner < outer")
    h = (outer - inner) / 2
    radius = (outer + inner) / 4
    n = np.arange(2, modes + 2, dtype=float)
    plate = modulus * h**3 / (12 * (1 - poisson**2))
    return n * (n * n - 1) / np.sqrt(n * n + 1) * np.sqrt(plate / (density * h * radius**4)) / (2 * np.pi)
