"""Cut-list optimisation: lay the pieces out on stock sticks with the fewest sticks (or least cost).

Kerf accounting.  A stick of length S loses ``end_trim`` at each end (squaring both factory
ends, the cut included: a piece never ends at a raw far end).  Each piece takes its cut length
plus one kerf, except that the last piece needs no separating cut when it ends exactly where
the far end is squared.  So pieces l_1..l_n fit on a stick when

    sum(l_i) + kerf * (n - 1) <= S - 2 * end_trim,

which is ordinary bin packing with item sizes ``l_i + kerf`` and capacity
``S - 2 * end_trim + kerf``.  Marks are measured from the stick's factory end: piece i starts at
``end_trim + sum_{j<i} (l_j + kerf)``.  The offcut is what is left after the last piece and its
separating cut (the far end's squaring included).

Method.  A first-fit-decreasing heuristic with an improvement pass gives a layout at once; the
Martello-Toth L2 bound says how good it is.  When they differ, the Gilmore-Gomory linear
relaxation is solved by column generation (HiGHS for the master LP, a 0/1 knapsack for pricing);
its rounded-up value is a lower bound, and a diving heuristic on the generated patterns usually
meets it.  With prices, every mix of sticks cheaper than the best layout is tried cheapest first:
a mix whose relaxation cannot hold the pieces is ruled out, so the first mix that packs is the
optimum.

The exact part lives in :mod:`cutplan.layout.columns`.  Effort is bounded by work, never by
the clock: at most ``effort`` master LP solves per layout (and MAX_MIXES stick mixes).  Everything is ordered deterministically, so the same design gives
the same layout on any machine and under any load; when the work runs out the best layout is
reported with its bound, not proven.  An optional wall-clock ``time_limit`` only stops a run,
with a StockError that says so; it never changes a printed result.

References
----------
.. [1] Martello, S. and Toth, P., Knapsack Problems: Algorithms and Computer Implementations,
   Wiley, 1990, ch. 8 (bin packing; lower bound L2).
.. [2] Gilmore, P. C. and Gomory, R. E., "A linear programming approach to the cutting-stock
   problem", Operations Research 9 (1961) 849-859 (from memory).
.. [3] Farley, A. A., "A note on bounding a class of linear programming problems, including
   cutting stock problems", Operations Research 38 (1990) 922-923 (the early-stop bound; from
   memory).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

from cutplan.layout.kits import natural_key
from cutplan.units import format_length

__all__ = [
    "FIT_TOLERANCE", "DEFAULT_TIME_LIMIT", "DEFAULT_EFFORT", "DEFAULT_OPS", "LP_FIXED_OPS", "StockError",
    "StockTimeout", "OutOfWork", "Item", "StockType", "Stick", "Layout", "lower_bound_l2", "usable_length",
    "stick_capacity", "piece_fits", "heuristic_layout", "sticks_from_assignment", "layout_cost", "layout"
]

FIT_TOLERANCE = 1e-9
"""Slack allowed when checking that pieces fit [m] (a nanometre: float rounding only)."""
DEFAULT_TIME_LIMIT = None
"""No wall-clock limit by default: effort is bounded by work (see DEFAULT_EFFORT)."""
DEFAULT_EFFORT = 4000
"""Most master LP solves one layout may take [-] (every seeded bench instance up to 80 pieces
needs under 600)."""
DEFAULT_OPS = 36_000_000
"""Most operations one layout may take [-] (see _Work; 13-20 CPU s on one core of the two-core
machine bench/bench_stock_scaling.py was measured on; 400 pieces on one 8 ft length need
3.2e7 to be proven, every bench instance up to 80 pieces under 4e6)."""
LP_FIXED_OPS = 5_000
"""Fixed operations charged per master LP solve (setting up the solver) [-]."""


class StockError(ValueError):
    """The stock on hand cannot hold the pieces (names what is missing)."""


class StockTimeout(StockError):
    """The optional wall-clock limit passed before the search finished (nothing is printed)."""


class OutOfWork(Exception):
    """The work budget ran out: the search stops where it is, the same way on every machine."""


class _Work:
    """Counts the search's work against a budget; checks the optional wall-clock limit.

    Two counts, both independent of the machine: master LP solves (``effort``) and operations
    (``ops``), an estimate of the arithmetic each step does (an LP over n pieces and m patterns
    costs about n * (m + n) plus a fixed part, a knapsack over n pieces and c grid cells n * c /
    200), so that a search over many pieces stops after about the same CPU time as a small one
    may take, not after the same number of ever larger solves."""

    def __init__(self, effort, time_limit, ops=None):
        self.left = effort
        self.used = 0
        self.ops_left = DEFAULT_OPS if ops is None else ops
        self.out = False
        self._clock = time.perf_counter
        self.deadline = None if time_limit is None else self._clock() + time_limit
        self.time_limit = time_limit

    def spend(self, ops=0):
        """One master LP solve of about ``ops`` operations."""
        if self.deadline is not None and self._clock() > self.deadline:
            raise StockTimeout(f"the cut-list search passed its time limit of {self.time_limit:g} s before it "
                               "finished; run it without a time limit (the result does not depend on it)")
        if self.left <= 0:
            self.out = True
            raise OutOfWork
        self.left -= 1
        self.used += 1
        self.charge(LP_FIXED_OPS + ops)

    def charge(self, ops):
        """Count ``ops`` operations; stop the search when the budget is spent."""
        self.ops_left -= ops
        if self.ops_left < 0:
            self.out = True
            raise OutOfWork


@dataclass(frozen=True)
class Item:
    """A piece to cut: label, cut length [m]."""

    label: str
    length: float


@dataclass(frozen=True)
class StockType:
    """Sticks of one length [m]; ``count`` None means as many as needed; optional price."""

    length: float
    count: int | None = None
    price: float | None = None


@dataclass(frozen=True)
class Stick:
    """One stick of stock with its cuts ((label, start [m], length [m]), ...) and offcut [m]."""

    stock_length: float
    cuts: tuple[tuple[str, float, float], ...]
    offcut: float
    price: float | None = None


@dataclass(frozen=True)
class Layout:
    """A cut list for one group of pieces of the same section."""

    sticks: tuple[Stick, ...]
    lower_bound: int
    proven_optimal: bool
    method: str
    cost: float | None = None
    cost_lower_bound: float | None = None
    lp_solves: int = 0

    @property
    def gap(self):
        """Sticks above the lower bound."""
        return len(self.sticks) - self.lower_bound


def lower_bound_l2(sizes, capacity):
    """Martello-Toth L2 lower bound on the number of bins of ``capacity`` for ``sizes``.

    Examples
    --------
    Three items just over half a bin need three bins, although their total fits in two:

    >>> lower_bound_l2([0.6, 0.6, 0.6], 1.0)
    3
    """
    sizes = sorted((float(s) for s in sizes), reverse=True)
    if not sizes:
        return 0
    half = capacity / 2
    best = 0
    for k in [0.0] + sorted({s for s in sizes if s <= half + FIT_TOLERANCE}):
        j1 = [s for s in sizes if s > capacity - k + FIT_TOLERANCE]
        j2 = [s for s in sizes if capacity - k + FIT_TOLERANCE >= s > half + FIT_TOLERANCE]
        j3 = [s for s in sizes if half + FIT_TOLERANCE >= s >= k - FIT_TOLERANCE]
        spare = len(j2) * capacity - sum(j2)
        extra = max(0, math.ceil((sum(j3) - spare) / capacity - 1e-9))
        best = max(best, len(j1) + len(j2) + extra)
    return best


def usable_length(stock_length, end_trim):
    """Length of a stick that pieces may use [m]: both factory ends squared (common practice)."""
    return stock_length - 2 * end_trim


def stick_capacity(stock_length, kerf, end_trim):
    return usable_length(stock_length, end_trim) + kerf


def piece_fits(load, size, capacity):
    return load + size <= capacity + FIT_TOLERANCE


def _ordered(items):
    return sorted(range(len(items)), key=lambda i: (-items[i].length, natural_key(items[i].label)))


def heuristic_layout(items, types, kerf, end_trim, by_cost):
    """First fit decreasing, then downsize each stick and try to empty the emptiest ones.

    Returns a list of (type index, [item indices]) or None when the stock on hand runs out.
    """
    sizes = [it.length + kerf for it in items]
    caps = [stick_capacity(t.length, kerf, end_trim) for t in types]
    left = [t.count if t.count is not None else math.inf for t in types]

    def open_order():
        if by_cost:
            return sorted(range(len(types)), key=lambda t: ((types[t].price or 0) / caps[t], -caps[t]))
        return sorted(range(len(types)), key=lambda t: -caps[t])

    bins = []  # [type, [items], load]
    for i in _ordered(items):
        for b in bins:
            if piece_fits(b[2], sizes[i], caps[b[0]]):
                b[1].append(i)
                b[2] += sizes[i]
                break
        else:
            for t in open_order():
                if left[t] > 0 and piece_fits(0.0, sizes[i], caps[t]):
                    left[t] -= 1
                    bins.append([t, [i], sizes[i]])
                    break
            else:
                return None
    # improvement: try to empty the least-loaded stick into the others, repeatedly
    improved = True
    while improved and len(bins) > 1:
        improved = False
        bins.sort(key=lambda b: -b[2])
        last = bins[-1]
        trial = [[b[0], list(b[1]), b[2]] for b in bins[:-1]]
        ok = True
        for i in sorted(last[1], key=lambda i: -sizes[i]):
            for b in sorted(trial, key=lambda b: caps[b[0]] - b[2]):  # best fit
                if piece_fits(b[2], sizes[i], caps[b[0]]):
                    b[1].append(i)
                    b[2] += sizes[i]
                    break
            else:
                ok = False
                break
        if ok:
            left[last[0]] += 1
            bins = trial
            improved = True
    # downsize: move each stick to the cheapest (or shortest) type that still holds its load
    for b in sorted(bins, key=lambda b: -b[2]):
        left[b[0]] += 1
        choices = [t for t in range(len(types)) if left[t] > 0 and piece_fits(0.0, b[2], caps[t])]
        key = (lambda t: (types[t].price or 0, caps[t])) if by_cost else (lambda t: caps[t])
        b[0] = min(choices, key=key)
        left[b[0]] -= 1
    return [(b[0], sorted(b[1], key=lambda i: (-items[i].length, natural_key(items[i].label)))) for b in bins]


def _achievable_cost_bound(lp_value, prices, upper):
    """Smallest cost a whole number of sticks can have that is at least ``lp_value``.

    Every layout costs sum(n_t * price_t) for whole n_t, so the LP bound can be raised to the
    next such sum (up to ``upper``, the best layout's cost). Gives up (returns the LP value) when
    there are too many combinations.
    """
    prices = sorted({round(p, 6) for p in prices if p > 0})
    if not prices:
        return lp_value
    sums = {0.0}
    for p in prices:
        limit = int(upper / p + 1e-9)
        if limit * len(sums) > 200_000:
            return lp_value
        sums = {round(a + k * p, 6) for a in sums for k in range(limit + 1) if a + k * p <= upper + 1e-6}
    above = [v for v in sums if v >= lp_value - 1e-6]
    return min(above) if above else lp_value


def sticks_from_assignment(items, types, kerf, end_trim, assignment):
    sticks = []
    for t, members in assignment:
        st = types[t]
        pos = end_trim
        cuts = []
        for i in members:
            cuts.append((items[i].label, pos, items[i].length))
            pos += items[i].length + kerf
        used = pos - kerf  # end of the last piece
        rest = st.length - used
        offcut = max(0.0, rest - kerf) if rest > FIT_TOLERANCE else 0.0
        sticks.append(Stick(st.length, tuple(cuts), offcut, st.price))
    # fullest sticks first; the emptiest (longest offcut) last
    sticks.sort(key=lambda s: (s.offcut, -s.stock_length, s.cuts[0][0] if s.cuts else ""))
    return tuple(sticks)


def layout_cost(sticks):
    if any(s.price is None for s in sticks):
        return None
    return float(sum(s.price for s in sticks))


def layout(items, types, kerf=0.0, end_trim=0.0, time_limit=DEFAULT_TIME_LIMIT, effort=DEFAULT_EFFORT, ops=None):
    """Lay ``items`` out on ``types`` of stock. Raises StockError when they cannot all be cut.

    ``effort`` bounds the work (master LP solves), so the result never depends on the machine or
    its load; so does ``ops`` (operations, see :class:`_Work`; DEFAULT_OPS when None).
    ``time_limit`` [s], if given, only stops a run that is still going at that time,
    with :class:`StockTimeout`; it never changes a result.  Stock too short in total (or too
    few sticks for the pieces longer than half a stick) is refused before any search.

    Examples
    --------
    Pieces of 600, 500, 400 and 300 mm on 1 m sticks with a 3 mm kerf: two sticks, proven.

    >>> out = layout([Item("a", .6), Item("b", .5), Item("c", .4), Item("d", .3)],
    ...              [StockType(1.0)], kerf=0.003)
    >>> len(out.sticks), out.lower_bound, out.proven_optimal
    (2, 2, True)
    """
    items = list(items)
    types = list(types)
    if not items:
        return Layout((), 0, True, "none")
    if not types:
        raise StockError("no stock lengths given")
    longest = max(types, key=lambda t: t.length)
    for it in items:
        if not piece_fits(0.0, it.length + kerf, stick_capacity(longest.length, kerf, end_trim)):
            raise StockError(
                f"{it.label} ({it.length * 1000:.0f} mm) is longer than the longest stock "
                f"({longest.length * 1000:.0f} mm) after {end_trim * 1000:.0f} mm end trim at each end")
    from cutplan.layout.columns import cheaper_mixes, column_generation  # here: columns imports this module

    work = _Work(effort, time_limit, ops)
    by_cost = all(t.price is not None for t in types) and any(t.price for t in types)
    sizes = [it.length + kerf for it in items]
    bound = lower_bound_l2(sizes, stick_capacity(longest.length, kerf, end_trim))
    if all(t.count is not None for t in types) and (
            sum(sizes) > sum(t.count * stick_capacity(t.length, kerf, end_trim) for t in types) + FIT_TOLERANCE
            or bound > sum(t.count for t in types)):
        raise StockError(_shortage(items, types, kerf, end_trim))  # the total-length bound: no search
    heur = heuristic_layout(items, types, kerf, end_trim, by_cost)
    if heur is not None and not by_cost and len(heur) == bound:
        return Layout(sticks_from_assignment(items, types, kerf, end_trim, heur), bound, True, "first fit decreasing (meets the bound)",
                      layout_cost(sticks_from_assignment(items, types, kerf, end_trim, heur)))
    if by_cost and heur is not None:
        # priced: start from first fit decreasing and rule out every cheaper mix of sticks
        first = sticks_from_assignment(items, types, kerf, end_trim, heur)
        better, proven, cost_bound = cheaper_mixes(items, types, kerf, end_trim, layout_cost(first), work)
        sticks = better if better is not None else first
        method = "stick mixes + column generation" if better is not None else "first fit decreasing"
        cost = layout_cost(sticks)
        if not proven:  # a whole number of sticks costs a sum of whole prices
            cost_bound = min(_achievable_cost_bound(max(cost_bound, 0.0), [t.price for t in types], cost), cost)
            proven = cost <= cost_bound + 1e-6  # no sum of prices lies between the bound and the cost
        return Layout(sticks, bound, proven, method, cost, max(cost_bound, 0.0), lp_solves=work.used)
    seeds = heur or []
    try:
        exact, proven, dual = column_generation(items, types, kerf, end_trim, by_cost, seeds, work)
    except OutOfWork:
        exact, proven, dual = None, False, 0.0
    candidates = []
    if heur is not None:
        candidates.append(("first fit decreasing", sticks_from_assignment(items, types, kerf, end_trim, heur)))
    if exact is not None:
        candidates.append(("column generation + HiGHS", sticks_from_assignment(items, types, kerf, end_trim, exact)))
    if not candidates and work.out:
        raise StockError(
            f"the optimiser found no layout of all {len(items)} pieces on the stock on hand within its "
            "work limit (none was ruled out either); add a stick, or split the pieces into smaller groups")
    if not candidates:
        raise StockError(_shortage(items, types, kerf, end_trim))

    def score(entry):
        sticks = entry[1]
        primary = layout_cost(sticks) if by_cost else len(sticks)
        return (primary, -max((s.offcut for s in sticks), default=0.0), entry[0] != "column generation + HiGHS")

    method, sticks = min(candidates, key=score)
    # the exact model, when it finished, proves the primary objective of whatever is no worse
    proven_primary = proven and exact is not None and score((method, sticks))[0] <= score(candidates[-1])[0]
    cost = layout_cost(sticks)
    if by_cost:
        cost_bound = cost if proven_primary else _achievable_cost_bound(
            max(dual, 0.0), [t.price for t in types], cost)
        return Layout(sticks, bound, cost <= cost_bound + 1e-6, method, cost, cost_bound, lp_solves=work.used)
    bound = max(bound, math.ceil(dual - 1e-6)) if dual else bound
    if proven_primary:
        bound = len(sticks)
    return Layout(sticks, bound, len(sticks) == bound, method, cost, lp_solves=work.used)


def _shortage(items, types, kerf, end_trim):
    unlimited = [StockType(t.length, None, t.price) for t in types]
    need = heuristic_layout(items, unlimited, kerf, end_trim, False)
    have = sum(t.count or 0 for t in types)
    longest = max(t.length for t in types)
    extra = max(1, len(need) - have) if need else 1
    more = "1 more stick of {} is" if extra == 1 else f"{extra} more sticks of {{}} are"
    return (f"the stock on hand ({have} stick{'s' if have != 1 else ''}) cannot hold all {len(items)} "
            f"pieces; about {more.format(format_length(longest))} needed")
