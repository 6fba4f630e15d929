r"""Air columns: speed of sound, end corrections, and resonance lengths of open and closed tubes.

A tube open at both ends resonates at :math:`f_n = n c / (2 (L + 2 \delta))`; a tube closed at
one end at :math:`f_n = (2n - 1) c / (4 (L + \delta))`, n = 1, 2, ... (odd harmonics only),
where :math:`\delta` is the end correction of each open end [m] and c the speed of sound [m/s].

Temperatures are in kelvin, pressures in Pa, humidity as relative humidity in percent.
"""

from __future__ import annotations

import math

import numpy as np

from cutplan.physics import wall_losses
from cutplan.physics.remember import remembered
from cutplan.units import ROOM_TEMPERATURE, STANDARD_PRESSURE, ZERO_CELSIUS

__all__ = [
    "SPEED_OF_SOUND_20C", "STANDARD_PRESSURE", "CO2_MOLE_FRACTION", "DEFAULT_HUMIDITY",
    "END_CORRECTION_UNFLANGED", "END_CORRECTION_FLANGED", "speed_of_sound_iso9613",
    "saturation_vapour_pressure_davis_1992", "water_mole_fraction", "speed_of_sound_cramer_1993",
    "speed_of_sound", "end_correction_dalmont_nederveen_2001", "end_correction_norris_sheng_1989",
    "end_correction", "column_length", "column_frequency", "open_open_length", "closed_open_length",
    "open_open_frequency", "closed_open_frequency", "two_resonance", "speed_from_resonance"
]

SPEED_OF_SOUND_20C = 343.2
"""Speed of sound in dry air at 20 C and 101.325 kPa [m/s]. ISO 9613-1:1993, Formula A.5."""

CO2_MOLE_FRACTION = 400e-6
"""CO2 mole fraction of outdoor air assumed by default [-] (about 400 ppm; common practice)."""

DEFAULT_HUMIDITY = 50.0
"""Relative humidity assumed when a design gives none [%]: the standard conditioning atmosphere
23 C / 50 % RH of ISO 554:1976 (from memory), a typical indoor value.  Against dry air it puts
pipes about 3 cents sharp (Cramer 1993 at 20 C: 343.99 against 343.36 m/s)."""

END_CORRECTION_UNFLANGED = 0.6133
"""Low-frequency end correction of an unflanged thin-walled circular pipe, per unit inner radius
[-]. Levine, H. and Schwinger, J., "On the radiation of sound from an unflanged circular pipe",
Phys. Rev. 73(4) 383-406, 1948."""

END_CORRECTION_FLANGED = 0.8216
"""Low-frequency end correction of a circular pipe in an infinite flange, per unit inner radius
[-]. Norris, A. N. and Sheng, I. C., "Acoustic radiation from a circular pipe with an infinite
flange", J. Sound Vib. 135, 85-93, 1989."""

_CRAMER_1993 = (
    331.5024, 0.603055, -0.000528, 51.471935, 0.1495874, -0.000782,
    -1.82e-7, 3.73e-8, -2.93e-10, -85.20931, -0.228525, 5.91e-5,
    -2.835149, -2.15e-13, 29.179762, 0.000486,
)
"""Coefficients a0..a15 of Cramer, O., "The variation of the specific heat ratio and the speed
of sound in air with temperature, pressure, humidity, and CO2 concentration", J. Acoust. Soc.
Am. 93(5) 2510-2516, 1993, Eq. 15 and Table III (t in C, p in Pa, mole fractions)."""


def _plain(out):
    """A float for a scalar result, the array otherwise."""
    out = np.asarray(out)
    return float(out) if out.ndim == 0 else out


def speed_of_sound_iso9613(temperature):
    r"""Speed of sound in dry air [m/s]: :math:`c = 343.2 \sqrt{T / T_{20}}` (T_20: 20 C in kelvin).

    Parameters
    ----------
    temperature : float or array
        Air temperature T [K].

    Examples
    --------
    >>> round(speed_of_sound_iso9613(293.15), 2)
    343.2

    References
    ----------
    .. [1] ISO 9613-1:1993, Acoustics - Attenuation of sound during propagation outdoors -
       Part 1, Formula A.5.
    """
    return _plain(SPEED_OF_SOUND_20C * np.sqrt(np.asarray(temperature, dtype=float) / ROOM_TEMPERATURE))


def saturation_vapour_pressure_davis_1992(temperature):
    """Saturation vapour pressure of water over a flat surface [Pa].

    Parameters
    ----------
    temperature : float
        T [K].

    References
    ----------
    .. [1] Davis, R. S., "Equation for the determination of the density of moist air
       (1981/91)", Metrologia 29, 67-70, 1992 (CIPM-81/91).
    """
    t = temperature
    return math.exp(1.2378847e-5 * t * t - 1.9121316e-2 * t + 33.93711047 - 6.3431645e3 / t)


def water_mole_fraction(temperature, humidity, pressure=STANDARD_PRESSURE):
    """Mole fraction of water vapour in air [-] from relative humidity [%] (Davis 1992).

    Parameters
    ----------
    temperature : float
        T [K].
    humidity : float
        Relative humidity, 0..100 [%].
    pressure : float
        Atmospheric pressure [Pa].
    """
    t_c = temperature - ZERO_CELSIUS
    enhancement = 1.00062 + 3.14e-8 * pressure + 5.6e-7 * t_c * t_c
    return humidity / 100.0 * enhancement * saturation_vapour_pressure_davis_1992(temperature) / pressure


def speed_of_sound_cramer_1993(temperature, humidity=0.0, pressure=STANDARD_PRESSURE,
                               co2=CO2_MOLE_FRACTION):
    """Speed of sound in humid air [m/s] from Cramer's (1993) interpolating equation.

    Valid for 0..30 C, 75..102 kPa and water mole fraction up to 0.06; stated uncertainty
    under 300 ppm.

    Parameters
    ----------
    temperature : float
        T [K].
    humidity : float
        Relative humidity, 0..100 [%].
    pressure : float
        Atmospheric pressure [Pa].
    co2 : float
        CO2 mole fraction [-].

    Examples
    --------
    >>> round(speed_of_sound_cramer_1993(293.15, 0.0), 3)
    343.359
    >>> round(speed_of_sound_cramer_1993(293.15, 50.0), 3)
    343.987

    References
    ----------
    .. [1] Cramer 1993, Eq. 15 and Table III (see ``_CRAMER_1993``).
    """
    a = _CRAMER_1993
    t = temperature - ZERO_CELSIUS
    p = pressure
    xw = water_mole_fraction(temperature, humidity, pressure)
    xc = co2
    return (
        a[0] + a[1] * t + a[2] * t * t
        + (a[3] + a[4] * t + a[5] * t * t) * xw
        + (a[6] + a[7] * t + a[8] * t * t) * p
        + (a[9] + a[10] * t + a[11] * t * t) * xc
        + a[12] * xw * xw + a[13] * p * p + a[14] * xc * xc + a[15] * xw * p * xc
    )


def speed_of_sound(temperature, humidity=None, pressure=STANDARD_PRESSURE):
    """Speed of sound [m/s]: Cramer 1993 when a humidity is given, else ISO 9613-1 (dry air)."""
    if humidity is None:
        return speed_of_sound_iso9613(temperature)
    return speed_of_sound_cramer_1993(temperature, humidity, pressure)


def end_correction_dalmont_nederveen_2001(ka):
    r"""End correction of an unflanged thin-walled pipe per unit radius, :math:`\delta / a` [-],
    as a function of ka (fit to Levine & Schwinger's exact result, for ka < 1.5).

    .. math:: \frac{\delta}{a} = 0.6133 \left[\frac{1 + 0.044 (ka)^2}{1 + 0.19 (ka)^2}
              - 0.02 \sin^2(2ka)\right]

    Parameters
    ----------
    ka : float or array
        Wavenumber times inner radius [-].

    Examples
    --------
    About 2 % under the low-frequency value at ka = 0.3:

    >>> round(end_correction_dalmont_nederveen_2001(0.3), 4)
    0.6015

    References
    ----------
    .. [1] Dalmont, J.-P., Nederveen, C. J. and Joly, N., "Radiation impedance of tubes with
       different flanges: numerical and experimental investigations", J. Sound Vib. 244(3)
       505-534, 2001 (unflanged fit).
    .. [2] Levine & Schwinger 1948 (the exact curve it fits; see :data:`END_CORRECTION_UNFLANGED`).
    """
    x = np.asarray(ka, dtype=float)
    out = END_CORRECTION_UNFLANGED * ((1 + 0.044 * x * x) / (1 + 0.19 * x * x) - 0.02 * np.sin(2 * x) ** 2)
    return _plain(out)


def end_correction_norris_sheng_1989(ka):
    r"""End correction of a pipe in an infinite flange per unit radius, :math:`\delta / a` [-],
    as a function of ka (fit for ka < 3.5).

    .. math:: \frac{\delta}{a} = 0.8216 \left[1 + \frac{(0.77 ka)^2}{1 + 0.77 ka}\right]^{-1}

    Examples
    --------
    >>> round(end_correction_norris_sheng_1989(0.3), 4)
    0.7875

    References
    ----------
    .. [1] Norris & Sheng 1989, J. Sound Vib. 135, 85-93, as fitted in Dalmont, Nederveen &
       Joly 2001, J. Sound Vib. 244(3) 505-534.
    """
    x = 0.77 * np.asarray(ka, dtype=float)
    return _plain(END_CORRECTION_FLANGED / (1 + x * x / (1 + x)))


def end_correction(radius, kind="unflanged", ka=None):
    """End correction of one open end [m].

    Parameters
    ----------
    radius : float
        Inner radius a [m].
    kind : str or float
        "unflanged" (0.6133 a), "flanged" (0.8216 a), "none" (0), or a factor times a (a fixed
        factor, such as a measured one, does not change with frequency).
    ka : float or array, optional
        Wavenumber times radius [-]; when given, the named corrections follow their curves
        (:func:`end_correction_dalmont_nederveen_2001`, :func:`end_correction_norris_sheng_1989`);
        when omitted, their low-frequency limits.

    Examples
    --------
    >>> round(end_correction(0.0125), 6)
    0.007666
    >>> round(end_correction(0.0125, ka=0.3), 6)
    0.007518
    """
    if isinstance(kind, (int, float)) and not isinstance(kind, bool):
        return float(kind) * radius
    factors = {"unflanged": END_CORRECTION_UNFLANGED, "flanged": END_CORRECTION_FLANGED, "none": 0.0}
    if kind not in factors:
        raise ValueError(f"end correction {kind!r}: use unflanged, flanged, none or a number")
    if ka is None or kind == "none":
        return factors[kind] * radius
    curve = end_correction_dalmont_nederveen_2001 if kind == "unflanged" else end_correction_norris_sheng_1989
    return _plain(curve(ka) * radius)


def column_length(frequency, radius, speed, ends="open-open", harmonic=1, correction="unflanged",
                  temperature=None, pressure=STANDARD_PRESSURE):
    r"""Length [m] of an air column whose n-th resonance is ``frequency``, with wall losses and the
    end correction at the note's ka.

    .. math:: L = \frac{n\, v(f)}{2 f} - 2\delta(ka) \text{ (open-open)},\qquad
              L = \frac{(2n-1)\, v(f)}{4 f} - \delta(ka) \text{ (closed-open)}

    where :math:`v(f)` is the phase speed in the pipe (:func:`wall_losses.phase_speed`) and
    :math:`k = 2\pi f / c`.

    Parameters
    ----------
    frequency : float or array
        f [Hz].
    radius : float
        Inner radius a [m].
    speed : float
        Speed of sound in free air c [m/s].
    ends : str
        "open-open" or "closed-open".
    harmonic : int
        n [-] (the n-th resonance; odd harmonic 2n-1 of a closed column).
    correction : str or float
        End correction of each open end (see :func:`end_correction`).
    temperature : float, optional
        Air temperature [K] for the wall losses; None leaves them out.
    pressure : float
        Atmospheric pressure [Pa].

    Examples
    --------
    A4 in a 25 mm bore, c = 343.2 m/s: 2.4 mm shorter than the lossless, low-frequency 0.37467 m.

    >>> round(column_length(440.0, 0.0125, 343.2, temperature=293.15), 5)
    0.3723
    """
    f = np.asarray(frequency, dtype=float)
    c = speed if temperature is None else wall_losses.phase_speed(speed, f, radius, temperature, pressure)
    delta = end_correction(radius, correction, ka=2 * np.pi * f * radius / speed)
    if ends == "closed-open":
        return _plain((2 * harmonic - 1) * c / (4.0 * f) - delta)
    return _plain(harmonic * c / (2.0 * f) - 2.0 * delta)


@remembered(4096)  # a plan asks again at the same lengths (allowance, checks, the page's re-plans)
def column_frequency(length, radius, speed, ends="open-open", harmonic=1, correction="unflanged",
                     temperature=None, pressure=STANDARD_PRESSURE):
    """Resonance [Hz] of the n-th mode of an air column: the inverse of :func:`column_length`.

    Wall losses and the end correction depend on the frequency, so the resonance is found by
    fixed-point iteration from the lossless value (each step shrinks the error more than
    a hundredfold for musical pipes; ten steps reach machine precision).

    Examples
    --------
    >>> f = column_frequency(column_length(440.0, 0.0125, 343.2, temperature=293.15), 0.0125, 343.2,
    ...                      temperature=293.15)
    >>> round(f, 9)
    440.0
    """
    length = np.asarray(length, dtype=float)
    closed = ends == "closed-open"
    wave = (2 * harmonic - 1) / 4.0 if closed else harmonic / 2.0
    ends_open = 1 if closed else 2
    f = wave * speed / (length + ends_open * end_correction(radius, correction))
    for _ in range(10):
        c = speed if temperature is None else wall_losses.phase_speed(speed, f, radius, temperature, pressure)
        f = wave * c / (length + ends_open * end_correction(radius, correction, ka=2 * np.pi * f * radius / speed))
    return _plain(f)


def open_open_length(frequency, radius, speed, harmonic=1, correction="unflanged"):
    r"""Length [m] of a tube open at both ends whose n-th resonance is ``frequency``.

    .. math:: L = n c / (2 f) - 2 \delta

    Parameters
    ----------
    frequency : float or array
        f [Hz].
    radius : float
        Inner radius a [m].
    speed : float
        Speed of sound c [m/s].
    harmonic : int
        n [-].
    correction : str or float
        End correction of each end (see :func:`end_correction`).

    Examples
    --------
    A4 = 440 Hz, c = 343.2 m/s, a = 12.5 mm: 0.390 m minus two end corrections.

    >>> round(open_open_length(440.0, 0.0125, 343.2), 5)
    0.37467
    """
    f = np.asarray(frequency, dtype=float)
    return _plain(harmonic * speed / (2.0 * f) - 2.0 * end_correction(radius, correction))


def closed_open_length(frequency, radius, speed, harmonic=1, correction="unflanged"):
    r"""Length [m] of a tube closed at one end whose n-th resonance (odd: 2n-1) is ``frequency``.

    .. math:: L = (2n - 1) c / (4 f) - \delta

    Examples
    --------
    >>> round(closed_open_length(440.0, 0.0125, 343.2), 5)
    0.1873
    """
    f = np.asarray(frequency, dtype=float)
    return _plain((2 * harmonic - 1) * speed / (4.0 * f) - end_correction(radius, correction))


def open_open_frequency(length, radius, speed, harmonic=1, correction="unflanged"):
    """Resonance [Hz] of the n-th mode of a tube open at both ends: n c / (2 (L + 2 delta))."""
    length = np.asarray(length, dtype=float)
    return _plain(harmonic * speed / (2.0 * (length + 2.0 * end_correction(radius, correction))))


def closed_open_frequency(length, radius, speed, harmonic=1, correction="unflanged"):
    """Resonance [Hz] of the n-th mode of a tube closed at one end: (2n-1) c / (4 (L + delta))."""
    length = np.asarray(length, dtype=float)
    return _plain((2 * harmonic - 1) * speed / (4.0 * (length + end_correction(radius, correction))))


def two_resonance(frequency, first_length, second_length):
    """Speed of sound [m/s] and end correction [m] from the first two resonance lengths of a
    closed tube sounded at one frequency (the classic resonance-tube method).

    L2 - L1 = lambda / 2, so c = 2 f (L2 - L1); and L1 + delta = lambda / 4, so
    delta = (L2 - 3 L1) / 2.

    Examples
    --------
    >>> c, d = two_resonance(512.0, 0.160, 0.495)
    >>> round(c, 1), round(d * 1000, 1)
    (343.0, 7.5)
    """
    if not 0 < first_length < second_length:
        raise ValueError("need 0 < first resonance length < second resonance length")
    speed = 2.0 * frequency * (second_length - first_length)
    correction = (second_length - 3.0 * first_length) / 2.0
    return speed, correction


def speed_from_resonance(frequency, length, correction=0.0):
    """Speed of sound [m/s] from one closed-tube resonance: c = 4 (L + delta) f.

    Examples
    --------
    >>> round(speed_from_resonance(463.8, 0.185), 1)
    343.2
    """
    return 4.0 * (length + correction) * frequency
