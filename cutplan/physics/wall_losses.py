r"""Viscous and thermal losses at the wall of a pipe: the slower phase speed of sound in a tube.

Near a rigid wall the air sticks (viscous boundary layer) and keeps the wall's temperature
(thermal boundary layer).  In a pipe whose radius is many boundary-layer thicknesses (the
wide-pipe limit, true of every musical pipe), Kirchhoff's solution gives the propagation constant

.. math:: \Gamma = \frac{\omega}{c}\left[\frac{\beta}{\sqrt{2}\, r_v}
          + j\left(1 + \frac{\beta}{\sqrt{2}\, r_v}\right)\right],
   \qquad \beta = 1 + \frac{\gamma - 1}{\sqrt{\mathrm{Pr}}},
   \qquad r_v = a\sqrt{\rho\omega/\mu}

so sound travels at :math:`v = c / (1 + \beta / (\sqrt{2} r_v))`, slower than in free air by the
fraction

.. math:: \frac{\Delta c}{c} \approx \frac{\beta}{\sqrt{2}\, r_v}
          = \frac{\beta}{a} \sqrt{\frac{\mu}{4 \pi \rho f}}.

Derivation: the boundary-layer solution of the linearised Navier-Stokes and heat equations
(Kirchhoff 1868) gives a viscous shear layer of thickness :math:`\delta_v = \sqrt{2\mu/(\rho\omega)}`
and a thermal layer :math:`\delta_t = \delta_v / \sqrt{\mathrm{Pr}}`; the first adds mass
reactance and the second compliance to a unit length of pipe, each in proportion to
(wall perimeter x layer thickness) / area = :math:`2\delta/a`, with the thermal part weighted
by :math:`(\gamma - 1)`.  To first order in :math:`\delta_v / a` the wavenumber grows by
:math:`(1 - j)(\delta_v + (\gamma - 1)\delta_t)/(2a)`, which is the formula above.  The exact
Zwikker-Kosten propagation constant (Bessel functions of the complex Stokes number) is kept in
:func:`propagation_constant_zwikker_kosten` as an independent check.

With air at 300 K (:math:`\rho` = 1.1769 kg/m^3, :math:`\mu` = 1.846e-5 Pa s, :math:`\gamma`
= 1.4, Pr = 0.708), :math:`\beta/\sqrt{2}` = 1.045 and the fraction is 1.65e-3 / (a sqrt(f)) with
a in m and f in Hz, the figure quoted by Fletcher & Rossing (1998, ch. 8, from Keefe 1984).

References
----------
.. [1] Keefe, D. H., "Acoustical wave propagation in cylindrical ducts: Transmission line
   parameter approximations for isothermal and nonisothermal boundary conditions",
   J. Acoust. Soc. Am. 75(1) 58-62, 1984 (the large-r_v series; 1.045 / r_v for air).
.. [2] Fletcher, N. H. and Rossing, T. D., The Physics of Musical Instruments, 2nd ed.,
   Springer, 1998, ch. 8 (v = c [1 - 1.65e-3 / (a f^1/2)], from memory).
.. [3] Zwikker, C. and Kosten, C. W., Sound Absorbing Materials, Elsevier, 1949 (low reduced
   frequency model).
"""

from __future__ import annotations

# scipy.special is imported where used: a chime plan (0.72 s CPU) never needs it; at the top it adds 0.24 s (measured)
import numpy as np

from cutplan.units import ROOM_TEMPERATURE, STANDARD_PRESSURE, ZERO_CELSIUS

__all__ = [
    "GAMMA", "PRANDTL", "SUTHERLAND_MU0", "SUTHERLAND_T0", "SUTHERLAND_S", "AIR_GAS_CONSTANT",
    "viscosity_sutherland", "air_density", "wall_loss_fraction", "phase_speed",
    "propagation_constant_zwikker_kosten"
]


GAMMA = 1.4
"""Ratio of specific heats of air [-] (dry air near room temperature; handbook value)."""

PRANDTL = 0.71
"""Prandtl number of air [-] (0.707 at 300 K in handbook tables of air properties, e.g.
Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table A.4; 0.71 from memory)."""

SUTHERLAND_MU0 = 1.716e-5
"""Viscosity of air at 0 C [Pa s] (White, Viscous Fluid Flow, 1991, Table 1-2, Sutherland law)."""

SUTHERLAND_T0 = ZERO_CELSIUS
"""Reference temperature of the Sutherland law [K] (White 1991, Table 1-2)."""

SUTHERLAND_S = 110.4
"""Sutherland constant of air [K] (White 1991, Table 1-2)."""

AIR_GAS_CONSTANT = 287.05
"""Specific gas constant of dry air R / M [J/(kg K)] (M = 28.965 g/mol; ISO 2533:1975)."""


def viscosity_sutherland(temperature):
    r"""Dynamic viscosity of air [Pa s]: :math:`\mu_0 (T/T_0)^{3/2} (T_0 + S)/(T + S)`.

    Parameters
    ----------
    temperature : float
        T [K].

    Examples
    --------
    >>> round(viscosity_sutherland(300.0) * 1e5, 3)
    1.846

    References
    ----------
    .. [1] White, F. M., Viscous Fluid Flow, 2nd ed., McGraw-Hill, 1991, Eq. 1-36, Table 1-2.
    """
    t = np.asarray(temperature, dtype=float)
    out = SUTHERLAND_MU0 * (t / SUTHERLAND_T0) ** 1.5 * (SUTHERLAND_T0 + SUTHERLAND_S) / (t + SUTHERLAND_S)
    return float(out) if out.ndim == 0 else out


def air_density(temperature, pressure=STANDARD_PRESSURE):
    """Density of dry air [kg/m^3] from the ideal-gas law, rho = p / (R T).

    >>> round(air_density(300.0), 4)
    1.1766
    """
    out = pressure / (AIR_GAS_CONSTANT * np.asarray(temperature, dtype=float))
    return float(out) if np.ndim(out) == 0 else out


def wall_loss_fraction(frequency, radius, temperature=ROOM_TEMPERATURE, pressure=STANDARD_PRESSURE):
    r"""Fraction by which wall losses slow sound in a pipe, :math:`\Delta c / c` [-].

    .. math:: \frac{\Delta c}{c} = \frac{1 + (\gamma - 1)/\sqrt{\mathrm{Pr}}}{a}
              \sqrt{\frac{\mu}{4\pi\rho f}}

    Parameters
    ----------
    frequency : float or array
        f [Hz].
    radius : float
        Inner radius a [m].
    temperature : float
        Air temperature T [K].
    pressure : float
        Atmospheric pressure [Pa].

    Examples
    --------
    A 1-1/4 in schedule 40 bore (a = 17.5 mm) at C4 (261.63 Hz), 20 C: 0.6 %, about 10 cents.

    >>> round(wall_loss_fraction(261.63, 0.0175) * 1e3, 3)
    5.703

    References
    ----------
    .. [1] Keefe 1984, J. Acoust. Soc. Am. 75(1) 58-62 (see the module notes).
    """
    f = np.asarray(frequency, dtype=float)
    mu = viscosity_sutherland(temperature)
    rho = air_density(temperature, pressure)
    beta = 1.0 + (GAMMA - 1.0) / np.sqrt(PRANDTL)
    out = beta / radius * np.sqrt(mu / (4.0 * np.pi * rho * f))
    return float(out) if np.ndim(out) == 0 else out


def phase_speed(speed, frequency, radius, temperature=ROOM_TEMPERATURE, pressure=STANDARD_PRESSURE):
    """Phase speed of sound in a pipe [m/s]: the free-air ``speed`` slowed by wall losses.

    >>> round(phase_speed(343.36, 261.63, 0.0175), 2)
    341.4
    """
    return speed * (1.0 - wall_loss_fraction(frequency, radius, temperature, pressure))


def propagation_constant_zwikker_kosten(frequency, radius, speed, temperature=ROOM_TEMPERATURE, pressure=STANDARD_PRESSURE):
    r"""Exact (low reduced frequency) complex wavenumber in a rigid circular pipe [1/m].

    .. math:: k = \frac{\omega}{c} \sqrt{\frac{\gamma - (\gamma - 1) F(s\sqrt{\mathrm{Pr}})}{F(s)}},
       \qquad F(s) = 1 - \frac{2 J_1(s\sqrt{-j})}{s\sqrt{-j}\, J_0(s\sqrt{-j})},
       \qquad s = a\sqrt{\rho\omega/\mu}

    (time dependence :math:`e^{j\omega t}`).  The phase speed is :math:`\omega / \mathrm{Re}(k)`.
    Used as the independent check of :func:`wall_loss_fraction`.

    References
    ----------
    .. [1] Zwikker & Kosten 1949; Tijdeman, H., "On the propagation of sound waves in
       cylindrical tubes", J. Sound Vib. 39(1) 1-33, 1975 (low reduced frequency solution).
    """
    from scipy.special import jve

    omega = 2.0 * np.pi * np.asarray(frequency, dtype=float)
    mu = viscosity_sutherland(temperature)
    rho = air_density(temperature, pressure)
    s = radius * np.sqrt(rho * omega / mu)

    def shape(x):
        z = x * np.sqrt(-1j)
        return 1.0 - 2.0 * jve(1, z) / (z * jve(0, z))  # scaled: the ratio is unchanged

    return omega / speed * np.sqrt((GAMMA - (GAMMA - 1.0) * shape(s * np.sqrt(PRANDTL))) / shape(s))
