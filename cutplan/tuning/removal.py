r"""Where and how deep to remove wood from a bar's underside to bring its tuned partials to target.

The bar is a profile: stations x [m] from end A and the thickness h(x) [m] left at each (flat
top, cut from the underside, piecewise linear).  Removal is described by symmetric station
pairs x_j and L - x_j, j = 1..N from the end to the centre (the centre station is single): a cut
of depth d_j there lowers h by d_j at the station, fading linearly to nothing at the neighbouring
stations.  Trimming both ends by e is one more unknown.

Each partial's sensitivity to each of these cuts, S_ij [cents per mm], is found by finite
differences on the model of the current profile (:func:`profile_model.profile_modes`): nothing
is assumed about where a cut lowers or raises which partial.  The model is the plan's, the width
resolved; the finite differences take its plane-stress body (a sixth of the cost, and resolving
the width shifts the partials by a nearly constant amount), while the base and every predicted
profile are solved with the width resolved, so the chord steps below land on that model's answer.  The cuts are the bounded least-
squares solution of

.. math:: \min_{0 \le d \le d_{max},\; e \ge 0} \| S\,[d; e] - \Delta c \|^2
          + \mu \left(\textstyle\sum d + e\right)^2 + \nu \| [d; e] \|^2,

with Delta c_i = 1200 log2(target_i / measured_i) for each tuned partial, d_max leaving the
bar's minimum thickness, and small mu, nu that pick the fewest, shallowest cuts among many
equivalent answers (the total removal is least where each millimetre does most).  A
few chord steps (the same S, the model re-solved with the cuts made) take up the nonlinearity.
The measured partials are carried through the model as ratios, f_i,after = f_i,measured x
f_i,model(after) / f_i,model(now), so a bar whose wood differs from the table is still advised
correctly to first order; the builder records again after each round and the next round starts
from the profile the cuts left.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

# scipy.optimize is imported where used: a chime plan (0.72 s CPU) never needs it; at the top it adds 0.57 s (measured)
import numpy as np

from cutplan.physics.width_terms import WidthConstants
from cutplan.tuning.profile_model import profile_modes

__all__ = [
    "STATIONS", "FD_DEPTH", "FD_END", "REGULARISATION", "SMOOTHING", "CHORD_STEPS", "REACH_CENTS",
    "BarData", "model_grid", "station_positions", "hats", "trimmed", "apply_removal", "cents",
    "RemovalAdvice", "sensitivities", "advise_removal", "SMALLEST_CUT"
]

STATIONS = 12
"""Station pairs from the end to the centre [-] (cuts about L/24 apart)."""
FD_DEPTH = 0.05e-3
"""Depth of the trial cut for the finite differences [m]."""
FD_END = 0.5e-3
"""Length of the trial end trim for the finite differences [m]."""
REGULARISATION = 1e-2
"""mu, the penalty on the total removal, (sum of depths)^2 [cents^2 per mm^2]: negligible against
a cent of miss, enough to prefer the fewest, shallowest cuts where they work best."""
SMOOTHING = 1e-4
"""A smaller penalty on each depth squared [cents^2 per mm^2], so that the answer is unique."""
CHORD_STEPS = 4
"""Most chord steps after the first linear answer [-]."""
REACH_CENTS = 1.0
"""A tuned partial the cuts leave further than this from its target is reported as not
reachable by removal alone [cents]."""


@dataclass(frozen=True)
class BarData:
    """What the model needs besides the profile: width [m], moduli [Pa], Poisson's ratio [-],
    density [kg/m^3], the least thickness the builder will leave [m] and the width axis's
    constants (given, the width is resolved, as the plan designs; else plane stress)."""

    width: float
    modulus_along: float
    modulus_across: float
    shear_modulus: float
    poisson: float
    density: float
    min_thickness: float
    width_constants: WidthConstants | None = None

    def modes(self, xs, hs, modes=4):
        """The model's solve of the profile (xs, hs): ``.frequencies`` [Hz] and, in 2-D, ``.nodes``."""
        return profile_modes(xs, hs, self.width, self.modulus_along, self.modulus_across, self.shear_modulus,
                             self.poisson, self.density, modes=modes, width_constants=self.width_constants)

    def frequencies(self, xs, hs, modes=4):
        """Model frequencies [Hz] of the profile (xs, hs)."""
        return np.asarray(self.modes(xs, hs, modes).frequencies, dtype=float)[:modes]

    def plane_stress(self):
        """The same bar without the width axis: the fast plane-stress body."""
        return replace(self, width_constants=None)


def model_grid(length, stations=STATIONS):
    """Model stations [m] from end A: two per removal station spacing, symmetric, 4N + 1 of them."""
    return np.linspace(0.0, length, 4 * stations + 1)


def station_positions(length, stations=STATIONS):
    """x_j [m] of the removal stations j = 1..N from end A to the centre."""
    return np.arange(1, stations + 1) * length / (2 * stations)


def hats(xs, length, stations=STATIONS):
    """(N, len(xs)) shapes of a unit cut at each station pair (1 at x_j and L - x_j)."""
    xs = np.asarray(xs, dtype=float)
    spacing = length / (2 * stations)
    u = np.minimum(xs, length - xs)  # distance from the nearer end
    centres = station_positions(length, stations)
    return np.clip(1.0 - np.abs(u[None, :] - centres[:, None]) / spacing, 0.0, None)


def trimmed(xs, hs, each_end):
    """The profile with ``each_end`` [m] cut off both ends, on a fresh model grid from its end A."""
    xs, hs = np.asarray(xs, dtype=float), np.asarray(hs, dtype=float)
    length = xs[-1] - xs[0] - 2 * each_end
    grid = model_grid(length)
    return grid, np.interp(grid + xs[0] + each_end, xs, hs)


def apply_removal(xs, hs, depths, each_end, min_thickness):
    """The profile after cuts ``depths`` [m] at the station pairs and a trim of ``each_end`` [m]."""
    xs, hs = np.asarray(xs, dtype=float), np.asarray(hs, dtype=float)
    length = xs[-1] - xs[0]
    cut = np.asarray(depths, dtype=float) @ hats(xs - xs[0], length)
    new = np.maximum(hs - cut, np.minimum(hs, min_thickness))
    return trimmed(xs, new, each_end) if each_end > 0 else (xs - xs[0], new)


def cents(a, b):
    """1200 log2(a / b), elementwise [cents]."""
    return 1200.0 * np.log2(np.asarray(a, dtype=float) / np.asarray(b, dtype=float))


@dataclass(frozen=True)
class RemovalAdvice:
    """The cuts for one round and what the model says they do.

    ``removal`` is ((x [m] from end A, depth [m], mode it mostly moves, raises it), ...) in work
    order;
    ``trim_each_end`` [m]; ``predicted_after_hz`` per measured partial; ``unreachable`` the tuned
    modes (1-based) the cuts leave more than REACH_CENTS off; ``sensitivity`` [cents per mm],
    one row per mode, one column per station pair and a last one for the end trim; ``after``
    the profile the cuts leave (xs, hs) [m]; ``solves`` the model solves used.
    """

    removal: tuple[tuple[float, float, int, bool], ...]
    trim_each_end: float
    predicted_after_hz: tuple[float, ...]
    unreachable: tuple[int, ...]
    sensitivity: tuple[tuple[float, ...], ...]
    after: tuple[tuple[float, ...], tuple[float, ...]]
    solves: int


def sensitivities(bar, xs, hs, modes):
    """(base frequencies [Hz], S [cents per mm] of shape (modes, N + 1), solves)."""
    xs, hs = np.asarray(xs, dtype=float), np.asarray(hs, dtype=float)
    length = xs[-1] - xs[0]
    base = bar.frequencies(xs, hs, modes)
    shapes = hats(xs - xs[0], length)
    cols = []
    for shape in shapes:
        cols.append(cents(bar.frequencies(xs, hs - FD_DEPTH * shape, modes), base) / (FD_DEPTH * 1e3))
    tx, th = trimmed(xs, hs, FD_END)
    cols.append(cents(bar.frequencies(tx, th, modes), base) / (FD_END * 1e3))
    return base, np.array(cols).T, shapes.shape[0] + 2


def _bounded_solve(matrix, wanted, lower, upper):
    """Bounded least squares with the small penalties on the unknowns (mm); an unknown whose
    bounds meet (no wood left there) stays at its bound."""
    from scipy.optimize import lsq_linear

    lower, upper = np.asarray(lower, dtype=float), np.asarray(upper, dtype=float)
    x = lower.copy()
    free = upper > lower + 1e-9
    n = int(free.sum())
    if n == 0:
        return x
    a = np.vstack([matrix[:, free], math.sqrt(REGULARISATION) * np.ones((1, n)), math.sqrt(SMOOTHING) * np.eye(n)])
    b = np.concatenate([wanted - matrix[:, ~free] @ lower[~free], np.zeros(n + 1)])
    x[free] = lsq_linear(a, b, bounds=(lower[free], upper[free]), method="bvls").x
    return x


def advise_removal(bar, xs, hs, measured_hz, targets_hz, modes=4):
    """Cuts that bring the tuned partials of a bar with profile (xs, hs) to their targets.

    Parameters
    ----------
    bar : BarData
    xs, hs : sequence of float
        Current profile: stations from end A and thickness left [m].
    measured_hz : sequence of float
        Measured partials 1, 2, ... [Hz] (as many as were read).
    targets_hz : sequence of float or None
        Target of each measured partial [Hz]; None for a partial that is not tuned.
    modes : int
        Modes solved [-] (at least as many as measured).

    Returns
    -------
    RemovalAdvice
    """
    measured = np.asarray(measured_hz, dtype=float)
    k = measured.size
    modes = max(modes, k)
    tuned = [i for i, t in enumerate(targets_hz[:k]) if t]
    wanted = np.array([cents(targets_hz[i], measured[i]) for i in tuned])
    xs, hs = np.asarray(xs, dtype=float), np.asarray(hs, dtype=float)
    base = bar.frequencies(xs, hs, modes)
    _, sens, solves = sensitivities(bar.plane_stress(), xs, hs, modes)
    solves += 1
    length = xs[-1] - xs[0]
    stations = station_positions(length)
    room = np.interp(stations, xs - xs[0], hs) - bar.min_thickness
    upper = np.concatenate([np.clip(room, 0.0, None) * 1e3, [0.1 * length * 1e3]])
    lower = np.zeros(upper.size)
    matrix = sens[tuned]
    u = _bounded_solve(matrix, wanted, lower, upper) if tuned else np.zeros(upper.size)
    after = (xs, hs)
    freqs = base
    for _ in range(CHORD_STEPS + 1):
        after = apply_removal(xs, hs, u[:-1] * 1e-3, u[-1] * 1e-3, bar.min_thickness)
        freqs = bar.frequencies(*after, modes)
        solves += 1
        miss = wanted - cents(freqs, base)[tuned]
        if not tuned or np.max(np.abs(miss)) < 0.02:
            break
        u = np.clip(u + _bounded_solve(matrix, miss, lower - u, upper - u), lower, upper)
    small = u[:-1] * 1e-3 < SMALLEST_CUT
    if np.any(small & (u[:-1] > 0)):  # cuts too shallow to make are left out, and the prediction redone
        u[:-1][small] = 0.0
        after = apply_removal(xs, hs, u[:-1] * 1e-3, u[-1] * 1e-3, bar.min_thickness)
        freqs = bar.frequencies(*after, modes)
        solves += 1
    reached = cents(freqs, base)
    predicted = measured * 2.0 ** (reached[:k] / 1200.0)
    unreachable = tuple(i + 1 for i, w in zip(tuned, wanted, strict=True) if abs(w - reached[i]) > REACH_CENTS)
    removal = _work_order(stations, u[:-1], sens[:, :-1], tuned)
    return RemovalAdvice(removal=removal, trim_each_end=float(u[-1] * 1e-3),
                         predicted_after_hz=tuple(float(f) for f in predicted), unreachable=unreachable,
                         sensitivity=tuple(map(tuple, sens)), after=(tuple(after[0]), tuple(after[1])),
                         solves=solves)


SMALLEST_CUT = 0.05e-3
"""Cuts shallower than this are left out of the advice [m] (about a pass of fine abrasive;
common practice)."""


def _work_order(stations, depths_mm, sens, tuned):
    """((x from end A [m], depth [m], mode it mostly moves, whether it raises that mode), ...) for
    both stations of each pair,
    highest mode first and the centre (mode 1) last: each cut moves its own partial most, so the
    last ones disturb the others least.  The mode a station "mostly" moves is the one for which
    that station's sensitivity is largest against its best station."""
    if not tuned:
        return ()
    rows = np.abs(sens[tuned])
    relative = rows / np.maximum(rows.max(axis=1, keepdims=True), 1e-12)
    items = []
    length = 2 * stations[-1]
    for j, d in enumerate(depths_mm):
        if d * 1e-3 < SMALLEST_CUT:
            continue
        row = int(np.argmax(relative[:, j]))
        mode, raises = tuned[row] + 1, bool(sens[tuned[row], j] > 0)
        for x in sorted({float(stations[j]), float(length - stations[j])}):
            items.append((x, float(d * 1e-3), mode, raises))
    items.sort(key=lambda it: (-it[2], -it[1], it[0]))
    return tuple(items)
