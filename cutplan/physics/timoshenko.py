r"""Free-free flexural vibration with shear deformation and rotary inertia (Timoshenko beam).

The equations of motion, for harmonic motion at angular frequency omega,

.. math::
    w' = \psi + V / (\kappa G A), \quad \psi' = M / (E I), \quad
    M' = -V - \omega^2 \rho I \psi, \quad V' = -\omega^2 \mu w,

are written for the state ``(w, psi, M, V)`` and made dimensionless with the length L:
``xi = x / L``, ``Omega = omega L^2 sqrt(mu / EI)`` (so that Euler-Bernoulli gives
``Omega_n = (beta_n L)^2``), a shear parameter ``g = EI / (kappa G A L^2)`` and a rotary
inertia parameter ``s2 = rho I / (mu L^2)`` (the squared slenderness ``(r_g / L)^2`` for a
homogeneous section).  A uniform segment then has the transfer matrix ``expm(A(Omega))``,
which is exact: no mesh.  Free ends (M = V = 0 at both ends) give the frequency equation
``det T[2:4, 0:2] = 0``.  Piecewise-uniform pieces chain segment matrices.

This module is the exact reference for the finite-element solver in :mod:`beam_fe`, and the
default model for planning chimes and bars.  Uniform pieces go through the closed-form,
vectorised determinant of :mod:`uniform` (no matrix exponentials, every mode kept in order);
the general segment chain here serves piecewise-uniform pieces.

References
----------
.. [1] Timoshenko, S. P., "On the correction for shear of the differential equation for
   transverse vibrations of prismatic bars", Philosophical Magazine 41 (1921) 744-746.
.. [2] Cowper, G. R., "The shear coefficient in Timoshenko's beam theory", J. Appl. Mech. 33
   (1966) 335-340 (the shear coefficient kappa used with it).
"""

from __future__ import annotations

# scipy.linalg is imported where used: a chime plan (0.72 s CPU) never needs it; at the top it adds 0.18 s (measured)
import numpy as np

from cutplan.physics import uniform
from cutplan.physics.beam import free_free_root
from cutplan.physics.roots import bracketed_roots

__all__ = [
    "system_matrix", "expm4", "transfer_matrix", "frequency_determinant", "dimensionless_frequencies",
    "uniform_parameters", "frequencies", "fundamental_frequencies", "fundamental_lengths",
    "fundamental_length", "mode_shape", "node_positions", "mode_shape_function"
]


def system_matrix(omega, g, s2):
    """Dimensionless state matrix A for ``(w, psi, M, V)``; broadcasts over ``omega``."""
    omega = np.asarray(omega, dtype=float)
    g = np.broadcast_to(np.asarray(g, dtype=float), omega.shape)
    s2 = np.broadcast_to(np.asarray(s2, dtype=float), omega.shape)
    a = np.zeros(omega.shape + (4, 4))
    a[..., 0, 1] = 1.0
    a[..., 0, 3] = g
    a[..., 1, 2] = 1.0
    a[..., 2, 1] = -(omega**2) * s2
    a[..., 2, 3] = -1.0
    a[..., 3, 0] = -(omega**2)
    return a


def _even_odd(z):
    """cosh(sqrt z) and sinh(sqrt z)/sqrt z, continued to z < 0 as cos and sin."""
    r = np.sqrt(np.abs(z))
    safe = np.where(r == 0, 1.0, r)
    even = np.where(z >= 0, np.cosh(r), np.cos(r))
    odd = np.where(r == 0, 1.0, np.where(z >= 0, np.sinh(r), np.sin(r)) / safe)
    return even, odd


def expm4(a):
    """Matrix exponential of a batch of 4x4 beam state matrices.

    The state matrix has an even characteristic polynomial z^2 + P z + Q (z = lambda^2), with
    P = -tr(A^2)/2 and Q = det A, so that expm(A) = c0 I + c1 A + c2 A^2 + c3 A^3 with
    coefficients from cosh/cos and sinh/sin of the roots (Sylvester's formula).  This is exact
    and about a hundred times faster than a general expm on many small matrices; where the two
    roots coincide it falls back on scipy.linalg.expm.
    """
    a = np.asarray(a, dtype=float)
    a2 = a @ a
    p = -0.5 * np.trace(a2, axis1=-2, axis2=-1)
    q = np.linalg.det(a)
    disc = np.sqrt(np.maximum(p * p - 4.0 * q, 0.0))
    z1, z2 = (-p + disc) / 2.0, (-p - disc) / 2.0
    spread = z1 - z2
    if np.any(spread <= 1e-9 * (np.abs(z1) + np.abs(z2) + 1e-300)):
        from scipy.linalg import expm  # only here: keeps scipy off the common plan path

        return expm(a)
    e1, o1 = _even_odd(z1)
    e2, o2 = _even_odd(z2)
    c0 = (e2 * z1 - e1 * z2) / spread
    c1 = (o2 * z1 - o1 * z2) / spread
    c2 = (e1 - e2) / spread
    c3 = (o1 - o2) / spread

    def col(c):
        return np.asarray(c)[..., None, None]

    return col(c0) * np.eye(4) + col(c1) * a + col(c2) * a2 + col(c3) * (a2 @ a)


def transfer_matrix(omega, segments):
    """Transfer matrix across a piecewise-uniform piece.

    ``segments`` is a sequence of ``(fraction, stiffness, mass, g, s2)``: the segment's share of
    the length, its EI and mu relative to the reference values used to define Omega, and its
    own shear and rotary-inertia parameters (defined with the reference EI, mu and full L).
    """
    omega = np.asarray(omega, dtype=float)
    t = np.broadcast_to(np.eye(4), omega.shape + (4, 4)).copy()
    for fraction, stiffness, mass, g, s2 in segments:
        a = system_matrix(omega, 0.0, 0.0)
        a[..., 0, 3] = g
        a[..., 1, 2] = 1.0 / stiffness
        a[..., 2, 1] = -(omega**2) * s2
        a[..., 3, 0] = -(omega**2) * mass
        t = expm4(a * fraction) @ t
    return t


def _uniform_segments(g, s2):
    return [(1.0, 1.0, 1.0, g, s2)]


def frequency_determinant(omega, g, s2, segments=None):
    """det of the free-end block of the transfer matrix; zero at a free-free natural frequency."""
    segs = segments if segments is not None else _uniform_segments(g, s2)
    t = transfer_matrix(omega, segs)
    return t[..., 2, 0] * t[..., 3, 1] - t[..., 2, 1] * t[..., 3, 0]


def dimensionless_frequencies(g, s2, modes=6, segments=None):
    """Omega_n = omega_n L^2 sqrt(mu/EI) of the first ``modes`` free-free flexural modes [-].

    Parameters
    ----------
    g : float
        Shear parameter EI / (kappa G A L^2) [-]; 0 for no shear deformation.
    s2 : float
        Rotary inertia parameter rho I / (mu L^2) [-]; 0 to neglect rotary inertia.
    modes : int
        How many modes [-].

    Examples
    --------
    With no shear and no rotary inertia the slender roots come back:

    >>> [round(float(x), 6) for x in dimensionless_frequencies(0.0, 0.0, 2)]
    [22.373285, 61.672823]
    """
    if segments is None:
        return uniform.omegas(g, s2, modes)[0]
    top = free_free_root(modes + 1) ** 2 * 1.001
    grid = np.geomspace(1.0, top, int(np.log(top) / 0.01) + 2)
    det = frequency_determinant(grid, g, s2, segments)
    sign = np.sign(det)
    idx = np.nonzero(sign[:-1] * sign[1:] < 0)[0][:modes]
    if len(idx) < modes:
        raise ValueError("could not bracket all requested modes (piece too stubby for the model)")
    return bracketed_roots(lambda w, _k: frequency_determinant(w, g, s2, segments), grid[idx], grid[idx + 1],
                           det[idx], det[idx + 1])


def uniform_parameters(length, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia):
    """(g, s2) for a uniform piece.

    Parameters
    ----------
    length : float or array
        L [m].
    flexural_rigidity : float
        EI [N*m^2].
    mass_per_length : float
        mu [kg/m].
    shear_rigidity : float
        kappa G A [N].
    rotary_inertia : float
        rho I, rotary inertia per length [kg*m].
    """
    length = np.asarray(length, dtype=float)
    g = flexural_rigidity / (shear_rigidity * length**2)
    s2 = rotary_inertia / (mass_per_length * length**2)
    return g, s2


def frequencies(length, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia, modes=6):
    """Frequencies [Hz] of the first ``modes`` free-free modes of a uniform Timoshenko beam.

    Parameters are as for :func:`uniform_parameters`.

    Examples
    --------
    A very stiff-in-shear, slender piece gives the Euler-Bernoulli value (577.4 Hz for the
    300 x 25 x 10 mm aluminium bar of :func:`cutplan.physics.beam.free_free_frequency`):

    >>> EI, mu = 69e9 * 0.025 * 0.010**3 / 12, 2700 * 0.025 * 0.010
    >>> round(float(frequencies(0.3, EI, mu, 1e20, 0.0, modes=1)[0]), 1)
    577.4
    """
    g, s2 = uniform_parameters(length, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia)
    omegas = uniform.omegas(g, s2, modes)[0]
    return omegas / (2 * np.pi * length**2) * np.sqrt(flexural_rigidity / mass_per_length)


def fundamental_frequencies(lengths, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia):
    """Mode-1 frequency [Hz] for many lengths of one section at once (vectorised).

    Mode 1 is the first root of the closed-form symmetric determinant of :mod:`uniform`,
    bracketed in [0.2, 1] x the slender value (shear and rotary inertia only lower it).
    """
    lengths = np.atleast_1d(np.asarray(lengths, dtype=float))
    g, s2 = uniform_parameters(lengths, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia)
    x = uniform.fundamental_omegas(g, s2).reshape(lengths.shape)
    return x / (2 * np.pi * lengths**2) * np.sqrt(flexural_rigidity / mass_per_length)


def fundamental_lengths(frequency, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia):
    """Lengths [m] whose mode 1 sounds each of many target frequencies [Hz] (vectorised).

    One bracketed root of the closed-form determinant per target (:func:`uniform.fundamental_lengths`);
    the forward model :func:`fundamental_frequencies` gives the targets back to about 1e-11 cent.
    """
    target = np.atleast_1d(np.asarray(frequency, dtype=float))
    return uniform.fundamental_lengths(target, flexural_rigidity, mass_per_length, shear_rigidity,
                                       rotary_inertia).reshape(target.shape)


def fundamental_length(frequency, flexural_rigidity, mass_per_length, shear_rigidity, rotary_inertia):
    """Length [m] of a uniform Timoshenko free-free piece whose mode 1 sounds ``frequency`` [Hz]."""
    return float(fundamental_lengths(frequency, flexural_rigidity, mass_per_length, shear_rigidity,
                                     rotary_inertia)[0])


def mode_shape(omega, g, s2, points=401, segments=None):
    """Deflection w(xi) on ``points`` equally spaced stations for the mode at ``omega`` [-].

    Normalised to +1 at xi = 0.
    """
    segs = segments if segments is not None else _uniform_segments(g, s2)
    w_at = mode_shape_function(omega, segs)
    xi = np.linspace(0.0, 1.0, points)
    w = np.array([w_at(x) for x in xi])
    return xi, w / w[0]


def _partial_transfer(omega, segments, xi):
    t = np.eye(4)
    done = 0.0
    for fraction, stiffness, mass, g, s2 in segments:
        step = min(fraction, max(0.0, xi - done))
        if step > 0:
            a = system_matrix(omega, 0.0, 0.0)
            a[0, 3] = g
            a[1, 2] = 1.0 / stiffness
            a[2, 1] = -(omega**2) * s2
            a[3, 0] = -(omega**2) * mass
            t = expm4(a * step) @ t
        done += fraction
        if done >= xi:
            break
    return t


def node_positions(omega, g, s2, segments=None):
    """Nodes (zeros of w) of the mode at ``omega`` as fractions of the length [-].

    Examples
    --------
    >>> om = dimensionless_frequencies(0.0, 0.0, 1)[0]
    >>> [round(float(x), 5) for x in node_positions(om, 0.0, 0.0)]
    [0.22416, 0.77584]
    """
    segs = segments if segments is not None else _uniform_segments(g, s2)
    y_at = mode_shape_function(omega, segs)
    xi = np.linspace(0.0, 1.0, 201)
    w = np.array([y_at(x) for x in xi])
    idx = np.nonzero(np.sign(w[:-1]) * np.sign(w[1:]) < 0)[0]
    if idx.size == 0:
        return []
    roots = bracketed_roots(lambda x, _k: np.array([y_at(v) for v in x]), xi[idx], xi[idx + 1], w[idx], w[idx + 1],
                            rtol=1e-14)
    return [float(r) for r in roots]


def mode_shape_function(omega, segments):
    """w(xi) as a scalar function, for root finding on node positions."""
    t = transfer_matrix(omega, segments)
    block = t[2:4, 0:2]
    if abs(block[0, 0]) + abs(block[0, 1]) >= abs(block[1, 0]) + abs(block[1, 1]):
        start = np.array([block[0, 1], -block[0, 0]])
    else:
        start = np.array([block[1, 1], -block[1, 0]])
    y0 = np.array([start[0], start[1], 0.0, 0.0])

    def w(xi):
        return float((_partial_transfer(omega, segments, xi) @ y0)[0])

    return w
