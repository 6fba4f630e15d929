r"""Pure physics of a hung chime: where a striker excites the tubes, and the wind on a sail.

SI floats in, SI floats out; no I/O.  Two closed forms:

- the free-free mode shape (Blevins 1979, Table 8-1), so the striker meets every tube away from
  the nodes of the modes that make the heard note;
- the drag on a flat plate square to the wind, :math:`F = \tfrac12 \rho C_d A v^2`, against the
  push that swings the striker out to the tubes (a pendulum in steady deflection).
"""

from __future__ import annotations

import math

import numpy as np

from cutplan.physics import beam

__all__ = [
    "AIR_DENSITY", "FLAT_PLATE_DRAG", "GRAVITY", "best_strike_height", "plate_drag",
    "contact_push", "sail_area", "breeze_for"
]

AIR_DENSITY = 1.225
"""Density of air at sea level, 15 C [kg/m^3]. ISO 2533:1975, Standard Atmosphere (from memory)."""
FLAT_PLATE_DRAG = 1.17
"""Drag coefficient of a square flat plate square to the flow [-]. Hoerner, S. F., Fluid-Dynamic
Drag, 1965, ch. 3 (from memory); confirmed as "squared flat plate at 90 deg: 1.17" in Matthews,
C., Aeronautical Engineer's Data Book, 2002, Fig. 5.13(b)."""
GRAVITY = 9.80665
"""Standard acceleration of gravity [m/s^2]. CGPM 1901 (the conventional value)."""


def best_strike_height(lengths, modes, low, high, step=1e-3):
    """The height below the (level) tube tops where a striker excites every tube best [m].

    Heights from ``low`` to ``high`` [m] on a ``step`` grid are tried; at each, every tube of
    ``lengths`` [m] is struck at height / L, and the score is the weakest tube's excitation of
    the weakest of ``modes``: mode n's amplitude is proportional to the mode shape phi_n(x / L)
    (modal participation of a point force), taken as |phi_n| / 2 so that a free end gives 1
    (Blevins 1979, Table 8-1: end amplitude 2).  The height with the best score wins (the highest
    one on a tie).  Returns (height [m], score [-], per-tube x / L [-]).

    >>> h, score, xs = best_strike_height([0.5], (1,), 0.15, 0.48)
    >>> round(h, 3), round(score, 3)
    (0.48, 0.814)
    """
    lengths = np.asarray(lengths, dtype=float)
    if high < low:
        low = high = float(min(lengths)) / 2
    count = int(math.floor((high - low) / step + 1e-9)) + 1
    heights = low + step * np.arange(count)
    xi = np.clip(heights[:, None] / lengths[None, :], 0.0, 1.0)
    amp = np.min([np.abs(beam.mode_shape(n, xi)) / 2.0 for n in modes], axis=0)
    scores = amp.min(axis=1)
    best = int(np.argmax(scores > scores.max() - 1e-12))
    return float(heights[best]), float(scores[best]), tuple(float(x) for x in xi[best])


def plate_drag(area, speed, drag_coefficient=FLAT_PLATE_DRAG, air_density=AIR_DENSITY):
    r"""Drag on a flat plate square to the wind, :math:`F = \tfrac12 \rho C_d A v^2` [N].

    Parameters: area A [m^2], speed v [m/s], drag_coefficient C_d [-], air_density rho [kg/m^3].

    >>> round(plate_drag(0.01, 3.0), 4)   # 100 cm^2 in a 3 m/s breeze
    0.0645
    """
    return 0.5 * air_density * drag_coefficient * area * speed**2


def contact_push(mass, clearance, line_length):
    """Steady sideways push that swings a hung mass out by ``clearance`` [N].

    A mass m [kg] on a line of length l [m] from a fixed point deflects by l sin(theta) under a
    steady sideways force F with tan(theta) = F / (m g) (statics of a pendulum).  Returns
    m g tan(asin(clearance / l)); a clearance as long as the line needs an unbounded push.

    >>> round(contact_push(0.1, 0.01, 0.4), 5)
    0.02453
    """
    s = clearance / line_length
    if s >= 1.0:
        return math.inf
    return mass * GRAVITY * s / math.sqrt(1.0 - s * s)


def sail_area(striker_mass, sheet_mass_per_area, clearance, line_length, speed, margin,
              drag_coefficient=FLAT_PLATE_DRAG, air_density=AIR_DENSITY):
    r"""Sail area whose drag at ``speed`` is ``margin`` times the push that swings striker and sail
    out to the tubes [m^2], or None when no sail of that sheet can (too light a breeze).

    Solves :math:`\tfrac12 \rho C_d v^2 A = k (m_s + \sigma A)` for A, with
    :math:`k = \mathrm{margin}\; g \tan(\arcsin(c / l))` (see :func:`contact_push`): the sail's
    own weight ``sheet_mass_per_area`` sigma [kg/m^2] hangs on the same line as the striker mass
    m_s [kg].  clearance c and line_length l [m], speed v [m/s], margin [-].
    """
    k = margin * contact_push(1.0, clearance, line_length)
    q = 0.5 * air_density * drag_coefficient * speed**2
    if not math.isfinite(k) or q <= k * sheet_mass_per_area:
        return None
    return k * striker_mass / (q - k * sheet_mass_per_area)


def breeze_for(push, area, drag_coefficient=FLAT_PLATE_DRAG, air_density=AIR_DENSITY):
    """The wind speed whose drag on ``area`` [m^2] equals ``push`` [N] [m/s] (inverse of plate_drag).

    >>> round(breeze_for(plate_drag(0.01, 3.0), 0.01), 6)
    3.0
    """
    return math.sqrt(2.0 * push / (air_density * drag_coefficient * area))
