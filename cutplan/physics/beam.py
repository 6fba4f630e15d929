r"""Free-free flexural vibration of a uniform slender beam (Euler-Bernoulli), in closed form.

A tube, rod or bar hung or supported so that both ends are free vibrates at

.. math:: f_n = \frac{(\beta_n L)^2}{2 \pi L^2} \sqrt{\frac{E I}{\mu}}

where :math:`\beta_n L` are the positive roots of :math:`\cos x \cosh x = 1`, ``EI`` is the
flexural rigidity [N m^2] and :math:`\mu` the mass per length [kg/m].  All functions take SI
floats or numpy arrays and broadcast.

References
----------
.. [1] Blevins, R. D., Formulas for Natural Frequency and Mode Shape, Van Nostrand Reinhold,
   1979, Table 8-1 (free-free beam: beta_1 L = 4.73004, nodes of mode 1 at 0.224 L and 0.776 L).
.. [2] Fletcher, N. H. and Rossing, T. D., The Physics of Musical Instruments, 2nd ed.,
   Springer, 1998, sections 2.15-2.16.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from cutplan.physics.roots import bracketed_roots

__all__ = [
    "free_free_root", "free_free_roots", "free_free_frequency", "free_free_length", "partial_ratios",
    "mode_shape", "node_positions"
]


@lru_cache(maxsize=64)
def free_free_root(mode):
    """The ``mode``-th positive root beta_n L of cos x cosh x = 1 [-], computed.

    Parameters
    ----------
    mode : int
        Flexural mode number, 1 for the fundamental [-].

    Returns
    -------
    float
        beta_n L [-].

    Examples
    --------
    >>> round(float(free_free_root(1)), 8), round(float(free_free_root(2)), 8)
    (4.73004074, 7.85320462)
    """
    if mode < 1 or int(mode) != mode:
        raise ValueError("mode must be a whole number >= 1")
    guess = (2 * mode + 1) * math.pi / 2
    # cos x cosh x - 1 = 0, divided by cosh x so that it stays finite for large x
    root = bracketed_roots(lambda x, _k: np.cos(x) - 1.0 / np.cosh(x), [guess - 0.5], [guess + 0.5])
    return float(root[0])


def free_free_roots(count):
    """beta_n L for modes 1..count as an array [-]."""
    return np.array([free_free_root(n) for n in range(1, count + 1)])


def free_free_frequency(mode, length, flexural_rigidity, mass_per_length):
    r"""Bending frequency of a uniform free-free slender beam (Euler-Bernoulli).

    .. math:: f_n = \frac{(\beta_n L)^2}{2 \pi L^2} \sqrt{EI / \mu}

    Parameters
    ----------
    mode : int
        Mode number n, 1 for the fundamental [-].
    length : float or array
        Length L of the piece [m].
    flexural_rigidity : float or array
        EI, Young's modulus times second moment of area [N*m^2].
    mass_per_length : float or array
        mu, mass per unit length [kg/m].

    Returns
    -------
    float or array
        f_n [Hz].

    Examples
    --------
    Aluminium bar 300 x 25 x 10 mm, E = 69 GPa, rho = 2700 kg/m^3:

    >>> round(free_free_frequency(1, 0.300, 69e9 * 0.025 * 0.010**3 / 12,
    ...                           2700 * 0.025 * 0.010), 1)
    577.4

    References
    ----------
    .. [1] Blevins 1979, Table 8-1.
    """
    beta_l = free_free_root(mode)
    length = np.asarray(length, dtype=float)
    out = beta_l**2 / (2 * np.pi * length**2) * np.sqrt(
        np.asarray(flexural_rigidity, dtype=float) / np.asarray(mass_per_length, dtype=float)
    )
    return float(out) if out.ndim == 0 else out


def free_free_length(frequency, flexural_rigidity, mass_per_length, mode=1):
    r"""Length [m] at which mode ``mode`` of a uniform slender free-free beam sounds ``frequency``.

    .. math:: L = \beta_n L \, \left( \frac{EI / \mu}{(2 \pi f)^2} \right)^{1/4}

    Vectorised over ``frequency`` (10,000 targets in one call are cheap).

    Parameters
    ----------
    frequency : float or array
        Target frequency f [Hz].
    flexural_rigidity : float
        EI [N*m^2].
    mass_per_length : float
        mu [kg/m].
    mode : int
        Which mode sounds the target [-].

    Returns
    -------
    float or array
        L [m].

    Examples
    --------
    >>> round(free_free_length(577.4, 69e9 * 0.025 * 0.010**3 / 12, 2700 * 0.025 * 0.010), 4)
    0.3
    """
    f = np.asarray(frequency, dtype=float)
    out = free_free_root(mode) * (
        np.asarray(flexural_rigidity, dtype=float)
        / np.asarray(mass_per_length, dtype=float)
        / (2 * np.pi * f) ** 2
    ) ** 0.25
    return float(out) if out.ndim == 0 else out


def partial_ratios(count=6):
    """Frequency ratios f_n / f_1 of a uniform slender free-free beam [-].

    >>> [round(float(r), 4) for r in partial_ratios(4)]
    [1.0, 2.7565, 5.4039, 8.9330]
    """
    roots = free_free_roots(count)
    return (roots / roots[0]) ** 2


def mode_shape(mode, x_over_length):
    r"""Free-free mode shape :math:`\phi(x) = \cosh\beta x + \cos\beta x - \sigma(\sinh\beta x + \sin\beta x)`.

    Normalised so that the end amplitude is 2 (Blevins 1979, Table 8-1).

    Parameters
    ----------
    mode : int
        Mode number [-].
    x_over_length : float or array
        Position along the piece as a fraction of its length, 0..1 [-].
    """
    b = free_free_root(mode)
    sigma = (math.cosh(b) - math.cos(b)) / (math.sinh(b) - math.sin(b))
    x = b * np.asarray(x_over_length, dtype=float)
    # cosh x - sigma sinh x, written to avoid cancellation of two huge numbers near x = b
    hyper = 0.5 * ((1 - sigma) * np.exp(x) + (1 + sigma) * np.exp(-x))
    return hyper + np.cos(x) - sigma * np.sin(x)


def node_positions(mode):
    """Nodes of a free-free slender beam's mode as fractions of the length, from one end [-].

    Examples
    --------
    >>> [round(float(x), 5) for x in node_positions(1)]
    [0.22416, 0.77584]
    >>> [round(float(x), 5) for x in node_positions(2)]
    [0.13211, 0.5, 0.86789]
    """
    grid = np.linspace(0.0, 1.0, 400 * (mode + 1) + 1)
    values = mode_shape(mode, grid)
    idx = np.nonzero(np.sign(values[:-1]) != np.sign(values[1:]))[0]
    roots = bracketed_roots(lambda x, _k: mode_shape(mode, x), grid[idx], grid[idx + 1], values[idx],
                            values[idx + 1], rtol=1e-15)
    return [float(x) for x in roots]
