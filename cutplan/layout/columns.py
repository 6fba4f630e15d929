"""Column generation for the cut-list optimiser in :mod:`cutplan.layout.optimiser` (its exact part).

The Gilmore-Gomory relaxation is solved by column generation: the master LP (HiGHS, through
scipy) over the patterns found so far, and a 0/1 knapsack over a 0.5 mm grid to price new ones.
Farley's bound stops the generation once the whole number of sticks it proves can no longer
change.  The root LP is rounded (the patterns it uses whole, first fit decreasing for the rest)
and, failing that, dived on in the same LP: a pattern is fixed by its column bounds, so each
step re-solves from the last basis, new patterns are priced only when those at hand miss the
bound, and a fix that leaves the LP above the bound is undone (a few times at most).  With
prices, stick mixes are tried cheapest first.  All work is counted against the caller's
budget (master LP solves), never against the clock.

References
----------
.. [1] Gilmore, P. C. and Gomory, R. E., "A linear programming approach to the cutting-stock
   problem", Operations Research 9 (1961) 849-859 (from memory).
.. [2] Farley, A. A., "A note on bounding a class of linear programming problems, including
   cutting stock problems", Operations Research 38 (1990) 922-923 (from memory).
"""

from __future__ import annotations

import math

# scipy.optimize and scipy.sparse are imported where used: a chime plan (0.72 s CPU) never needs them; at the top they add 0.6 s (measured)
import numpy as np

from cutplan.layout.kits import natural_key
from cutplan.layout.master import Master
from cutplan.layout.optimiser import (
    FIT_TOLERANCE,
    OutOfWork,
    StockType,
    heuristic_layout,
    layout_cost,
    lower_bound_l2,
    piece_fits,
    stick_capacity,
    sticks_from_assignment,
)

__all__ = [
    "MAX_ROUNDS", "GRID", "PATTERNS_PER_ROUND", "column_generation", "MAX_MIXES", "MAX_MIX_NODES",
    "cheaper_mixes"
]

MAX_ROUNDS = 400
"""Most pricing rounds of one column generation [-]."""


GRID = 5e-4
"""Resolution of the knapsack pricing grid [m] (0.5 mm). Sizes are rounded down on it, so the
LP bound stays valid; while diving they are rounded up, so every pattern used fits (and is
re-checked with the true sizes)."""


PATTERNS_PER_ROUND = 10
"""Disjoint improving patterns priced per column-generation round [-]."""


SIMPLEX_OPS = 0.25
"""Operations charged per simplex iteration and per LP column or row [-]: measured, one
iteration over m + n of them takes about 0.27 us of CPU, a quarter of what one operation of the
budget stands for (the pricing knapsack's n x c / 200 takes 0.8 us each; bench_stock_scaling)."""


MAX_BACKTRACKS = 30
"""Most fixes one dive may undo (a fix that left the LP above the bound) [-]."""


SMOOTHING = 0.5
"""Weight of the best-bound duals in the prices of a round (Wentges' dual smoothing) [-].

.. [3] Wentges, P., "Weighted Dantzig-Wolfe decomposition for linear mixed-integer programming",
   International Transactions in Operational Research 4 (1997) 151-162 (from memory)."""


def _knapsack(values, weights, capacity):
    """0/1 knapsack by dynamic programming over an integer capacity: (best value, chosen items)."""
    n = len(values)
    best = np.zeros(capacity + 1)
    take = np.zeros((n, capacity + 1), dtype=bool)
    for i in range(n):
        w, v = int(weights[i]), values[i]
        if v <= 0 or w > capacity:
            continue
        cand = best[: capacity + 1 - w] + v  # a copy: item i is taken at most once
        better = cand > best[w:] + 1e-12
        take[i, w:] = better
        np.copyto(best[w:], cand, where=better)
    chosen, c = [], capacity
    for i in range(n - 1, -1, -1):
        if take[i, c]:
            chosen.append(i)
            c -= int(weights[i])
    return float(best[capacity]), sorted(chosen)


class _Generation:
    """Column generation over one master LP of all the items, kept from the root through the dive.

    :meth:`run` prices new patterns until none improves the LP (or Farley's bound says more
    cannot change the whole number of sticks).  The root runs with sizes rounded down on the
    grid (a valid bound); the dive with sizes rounded up (every pattern priced fits), the root's
    patterns that do not truly fit held at zero.  The dive :meth:`fix`-es a pattern at one by its
    column bounds and frees its pieces' rows, so each step re-solves from the last basis;
    :meth:`restore` undoes all of that.  Raises OutOfWork when the budget runs out (the LP
    value is then no bound).
    """

    def __init__(self, sizes, caps, types, cost, limited, columns, work):
        self.sizes, self.caps, self.types, self.cost, self.limited = sizes, caps, types, cost, limited
        self.columns, self.work = columns, work
        self.n = len(sizes)
        self.master = Master(self.n, types, cost, limited, 1000.0 * (max(cost) + 1.0))
        self.seen = 0  # columns of the pool already looked at
        self.grid_caps = [int(np.floor(c / GRID + 1e-9)) for c in caps]
        self.fixed = {}  # column index -> the pieces it cut (the dive)
        self.fixed_cost = 0.0
        self.held = []  # the root's patterns held at zero while diving
        self.rounding = "floor"
        self.grid = np.floor(sizes / GRID + 1e-9).astype(int)

    @property
    def keys(self):
        """The patterns in the LP, (type, item indices), in column order."""
        return self.master.keys

    def fits(self, key):
        """Whether a pattern fits its stick with the true sizes."""
        return self.sizes[list(key[1])].sum() <= self.caps[key[0]] + FIT_TOLERANCE

    def dive_sizes(self):
        """From now on price with sizes rounded up, and hold the patterns that do not fit at zero."""
        self.rounding = "ceil"
        self.grid = np.ceil(self.sizes / GRID - 1e-9).astype(int)
        self.held = [j for j, k in enumerate(self.keys) if not self.fits(k)]
        self.master.bound_columns(self.held, 0.0, 0.0)

    def fix(self, j, pieces):
        """Fix pattern ``j`` at one stick; ``pieces`` (its pieces not cut yet) need no more cover."""
        self.fixed[j] = list(pieces)
        self.fixed_cost += self.cost[self.keys[j][0]]
        self.master.bound_columns([j], 1.0, 1.0)
        self.master.cover(pieces, 0.0)

    def unfix(self, j):
        """Undo :meth:`fix` of pattern ``j``; returns the pieces it had cut."""
        pieces = self.fixed.pop(j)
        self.fixed_cost -= self.cost[self.keys[j][0]]
        self.master.bound_columns([j], 0.0, np.inf)
        self.master.cover(pieces, 1.0)
        return pieces

    def hold(self, j):
        """Hold pattern ``j`` at zero (a dive's fix undone) until :meth:`restore`."""
        self.held.append(j)
        self.master.bound_columns([j], 0.0, 0.0)

    def restore(self):
        """Undo every fix and hold: the LP as the root left it (its columns kept)."""
        self.master.bound_columns(list(self.fixed) + self.held, 0.0, np.inf)
        self.master.cover([i for pieces in self.fixed.values() for i in pieces], 1.0)
        self.fixed, self.fixed_cost, self.held = {}, 0.0, []

    def run(self, target=None):
        """(LP value, x, artificial total); an artificial total above zero at the end means even
        the relaxation cannot cover the pieces with the sticks allowed.  With a ``target`` (a
        whole number of sticks, the dive's aim) no new patterns are priced while the LP over
        the patterns at hand covers the pieces within it."""
        work, n, cost, columns = self.work, self.n, self.cost, self.columns
        farley = not self.limited and all(c == 1.0 for c in cost)
        # Wentges' smoothing, where Farley's bound holds (unit costs, floor sizes): price at a mix
        # of the duals with the best bound so far and the LP's own, which tails off far less
        smooth = farley and self.rounding == "floor" and not self.fixed
        center, center_bound = None, -math.inf
        if smooth:
            # start at the prices of the continuous bound, each piece's share of the longest
            # stick on the grid: no pattern is worth more than one stick at them, so their sum is
            # a bound (Farley's, with a largest pattern value of at most one)
            center = self.grid / max(self.grid_caps)
            center_bound = float(center.sum())
        for _round in range(MAX_ROUNDS):
            # only the columns added since the last round need checking
            pool = list(columns)
            new = [k for k in pool[self.seen:] if self.rounding == "floor" or self.fits(k)]
            self.seen = len(pool)
            # an LP solve: adding the new columns, then each simplex iteration prices every column
            # and updates the basis (SIMPLEX_OPS x (m + n) operations; the iteration count is HiGHS's own)
            work.spend(n * len(new))
            self.master.add(new)
            solved = self.master.solve()
            if solved is None:
                return None, None, math.inf
            value, x, pi, mu, art, iterations = solved
            work.charge(int(SIMPLEX_OPS * iterations * (len(self.keys) + n)))
            if target is not None and art < 1e-9 and math.ceil(value - 1e-6) <= target:
                return value, x, art
            price_at = pi if center is None else SMOOTHING * center + (1 - SMOOTHING) * pi
            while True:
                added, top = 0, 0.0
                for t in range(len(self.types)):
                    # several disjoint improving patterns per round: fewer LP solves
                    prices = price_at.copy()
                    for k in range(PATTERNS_PER_ROUND):
                        live = np.flatnonzero(prices > 0)  # the knapsack skips the others anyway
                        work.charge(len(live) * self.grid_caps[t] // 200)
                        best, chosen = _knapsack(prices[live], self.grid[live], self.grid_caps[t])
                        chosen = [int(live[c]) for c in chosen]
                        if k == 0:
                            top = max(top, best / cost[t] if cost[t] > 0 else math.inf)
                        # improving for the LP as it stands: its own duals price the pattern above its cost
                        if not chosen or pi[chosen].sum() <= cost[t] + mu.get(t, 0.0) + 1e-9:
                            break
                        key = (t, tuple(chosen))
                        if key not in columns:
                            columns[key] = True
                            added += 1
                        prices[chosen] = 0.0
                if smooth and top > 0.0 and price_at.sum() / top > center_bound:
                    # Farley's bound of these duals, sum(prices) / max(pattern value): valid for
                    # any prices >= 0 (scaled by 1 / top they are dual feasible); the best is the centre
                    center, center_bound = price_at.copy(), price_at.sum() / top
                if added or price_at is pi:
                    break
                price_at = pi  # the smoothed prices found nothing the LP can use: price at its own duals
            if not added:
                return value, x, art
            # the pieces still to cut: the LP less the fixed patterns (they cover only cut pieces)
            rest = value - self.fixed_cost
            lower = center_bound if smooth else (rest / top if 1.0 < top < math.inf else -math.inf)
            if farley and art < 1e-9 and math.ceil(lower - 1e-6) >= math.ceil(rest - 1e-6):
                # Farley's bound <= LP optimum <= value: both round up to the same whole number of
                # sticks, so more columns cannot change the bound
                return value, x, art
        raise OutOfWork


def column_generation(items, types, kerf, end_trim, by_cost, seed_patterns, work, feasible_only=False):
    """Gilmore-Gomory LP bound by column generation, then a diving heuristic on the columns.

    Returns (assignment or None, proven optimal, lower bound on the objective); raises
    OutOfWork when the work budget runs out.  ``feasible_only``: any layout within the stick
    counts will do (a priced mix), so the rounded root LP is taken whenever it fits.
    """
    n = len(items)
    sizes = np.array([it.length + kerf for it in items])
    caps = [stick_capacity(t.length, kerf, end_trim) for t in types]
    cost = [(t.price or 0.0) if by_cost else 1.0 for t in types]
    limited = [t for t, st in enumerate(types) if st.count is not None]
    columns = {}
    for t, members in seed_patterns:
        columns[(t, tuple(sorted(members)))] = True
    for i in range(n):  # singletons: a start for every master
        fitting = [t for t in range(len(types)) if piece_fits(0.0, sizes[i], caps[t])]
        columns[(min(fitting, key=lambda t: (cost[t], caps[t])), (i,))] = True
    gen = _Generation(sizes, caps, types, cost, limited, columns, work)
    lp_value, x_root, art = gen.run()
    if lp_value is None:
        return None, False, 0.0
    if art > 1e-6:
        return None, True, 0.0  # even the relaxation is infeasible: the stock allowed is too small
    keys_root = list(gen.keys)
    bound = math.ceil(lp_value - 1e-6) if not by_cost else lp_value
    if feasible_only:
        rounded = _round_and_fill(items, types, kerf, end_trim, sizes, caps, x_root, keys_root)
        if rounded is not None:
            return rounded, False, bound
    elif not by_cost:
        # most instances round: the columns the LP uses whole, first fit decreasing for the rest
        rounded = _round_and_fill(items, types, kerf, end_trim, sizes, caps, x_root, keys_root)
        if rounded is not None and len(rounded) <= bound:
            return rounded, True, bound
    gen.dive_sizes()
    try:
        # unit costs: price only when the patterns at hand cannot meet the bound (or any layout
        # will do); with prices, every step is priced to its optimum
        chosen = _dive(items, types, gen, None if by_cost else bound)
    finally:
        gen.restore()
    if chosen is None:
        return None, False, bound
    value = sum(cost[t] for t, _ in chosen)
    proven = value <= (bound if not by_cost else lp_value) + 1e-6
    return chosen, proven, bound


def _dive(items, types, gen, target):
    """Fix the patterns the LP uses whole (or else its most used one), re-price (see
    :meth:`_Generation.run` for ``target``), repeat, in the one LP: each step warm-starts from
    the last.  When a fix leaves the LP above ``target`` (or unable to cover the pieces), it is
    undone and that pattern held at zero instead, at most MAX_BACKTRACKS times.  The chosen
    (type, pieces), or None."""
    left = set(range(len(items)))
    steps = []  # the pattern indices fixed at each step, whether that step was a fractional one
    backtracks = 0
    while left:
        value, x, art = gen.run(target)
        if value is None:
            return None
        doomed = art > 1e-6 or (target is not None and math.ceil(value - 1e-6) > target)
        if doomed and backtracks < MAX_BACKTRACKS and any(frac for _js, frac in steps):
            # undo the steps back to the last fractional fix, and hold that pattern at zero
            backtracks += 1
            while True:
                js, frac = steps.pop()
                for j in js:
                    left.update(gen.unfix(j))
                if frac:
                    gen.hold(js[0])
                    break
            continue
        if art > 1e-6:
            return None
        used = [gen.keys[j][0] for j in gen.fixed]
        counts = {t: types[t].count - used.count(t) for t in gen.limited}
        # a pattern that also holds pieces already cut stands for its pieces still to cut
        feasible = [(j, (t, [i for i in m if i in left])) for j, (t, m) in enumerate(gen.keys)
                    if j not in gen.fixed and x[j] > 1e-9 and gen.fits((t, m)) and not left.isdisjoint(m)]
        if not feasible:
            return None
        ranked = sorted(feasible, key=lambda jk: (-x[jk[0]], -len(jk[1][1]), jk[0]))
        fixed = [jk for jk in ranked if x[jk[0]] > 1 - 1e-6] or ranked[:1]
        taken, js = set(), []
        for j, (t, members) in fixed:
            take = [i for i in members if i not in taken]
            if not take or (t in counts and counts[t] <= 0):
                continue
            taken.update(take)
            gen.fix(j, take)
            js.append(j)
            if t in counts:
                counts[t] -= 1
        if not taken:
            return None
        steps.append((js, x[js[0]] <= 1 - 1e-6))
        left -= taken
    return [(gen.keys[j][0], sorted(pieces, key=lambda i: (-items[i].length, natural_key(items[i].label))))
            for j, pieces in gen.fixed.items()]


def _round_and_fill(items, types, kerf, end_trim, sizes, caps, x, keys):
    """Fix the feasible columns the root LP uses whole (x = 1), lay the other pieces out first fit
    decreasing on the sticks left; None when the stock on hand runs out."""
    counts = [t.count for t in types]
    taken, chosen = set(), []
    for j, (t, members) in sorted(enumerate(keys), key=lambda jk: (-x[jk[0]], jk[0])):
        if x[j] < 1 - 1e-6:
            break
        if (sizes[list(members)].sum() > caps[t] + FIT_TOLERANCE or taken.intersection(members)
                or (counts[t] is not None and counts[t] <= 0)):
            continue
        taken.update(members)
        chosen.append((t, sorted(members, key=lambda i: (-items[i].length, natural_key(items[i].label)))))
        if counts[t] is not None:
            counts[t] -= 1
    rest = [i for i in range(len(items)) if i not in taken]
    if not rest:
        return chosen
    left_types = [StockType(st.length, counts[t], st.price) for t, st in enumerate(types)]
    filled = heuristic_layout([items[i] for i in rest], left_types, kerf, end_trim, False)
    if filled is None:
        return None
    return chosen + [(t, [rest[k] for k in members]) for t, members in filled]


MAX_MIXES = 2000
"""Most stick mixes examined for a priced layout [-]."""
MAX_MIX_NODES = 200_000
"""Most partial mixes the enumeration visits [-] (it grows as a power of the number of stock
lengths; past this the list is incomplete and the layout is not claimed optimal)."""


def _mixes(types, sizes_total, caps, below, pieces=None):
    """Whole numbers of sticks of each type costing less than ``below`` and long enough in total,
    cheapest first. Returns (mixes, complete): complete is False when there were too many.

    Free sticks (price 0) are always all taken: more of them never costs more.  Of a free
    length with no count, ``pieces`` sticks (one per piece, as many as any layout can use); when
    ``pieces`` is not given, none, and the list is not complete."""
    out = []
    complete = True
    visited = 0

    def walk(t, counts, cost, room):
        nonlocal complete, visited
        visited += 1
        if len(out) >= MAX_MIXES or visited > MAX_MIX_NODES:
            complete = False
            return
        if t == len(types):
            if room >= sizes_total - FIT_TOLERANCE and cost < below - 1e-9:
                out.append((cost, tuple(counts)))
            return
        price = types[t].price or 0.0
        most = types[t].count if types[t].count is not None else 10_000
        least = 0
        if price > 0:
            most = min(most, int((below - cost) / price + 1e-9))
        elif types[t].count is None and not pieces:
            complete = False
            most = 0
        else:
            most = least = pieces if types[t].count is None else most
        for k in range(least, most + 1):
            walk(t + 1, counts + [k], cost + k * price, room + k * caps[t])

    walk(0, [], 0.0, 0.0)
    return sorted(out), complete


def cheaper_mixes(items, types, kerf, end_trim, best_cost, work):
    """Look for a cheaper layout, one mix of sticks at a time, cheapest first.

    A mix whose relaxed (fractional) packing cannot hold the pieces is ruled out; the first mix
    that yields a layout is then the optimum, if every cheaper one was ruled out.
    Returns (better sticks or None, proven optimal, lower bound on the cost).
    """
    sizes_total = sum(it.length + kerf for it in items)
    caps = [stick_capacity(t.length, kerf, end_trim) for t in types]
    longest_piece = max(it.length + kerf for it in items)
    mixes, complete = _mixes(types, sizes_total, caps, best_cost, len(items))
    # with the list of mixes incomplete, a cheaper mix may be missing from it: then only the
    # continuous bound holds
    floor = _continuous_cost(types, caps, sizes_total)
    bound = None
    all_sizes = [it.length + kerf for it in items]
    l2 = {}  # the L2 bound depends only on the longest stick of a mix
    for mix_cost, counts in mixes:
        sub = [StockType(types[t].length, k, types[t].price) for t, k in enumerate(counts) if k > 0]
        if not sub or max(stick_capacity(st.length, kerf, end_trim) for st in sub) < longest_piece - FIT_TOLERANCE:
            continue
        most = sum(st.count for st in sub)
        longest_cap = max(stick_capacity(st.length, kerf, end_trim) for st in sub)
        if longest_cap not in l2:
            l2[longest_cap] = lower_bound_l2(all_sizes, longest_cap)
        if l2[longest_cap] > most:
            continue  # ruled out at once: not even that many of the longest sticks would do
        try:
            work.charge(len(items) * len(sub) * 20)  # the first fit tried on this mix
            if len(sub) == 1:
                assignment, infeasible = _one_length(items, sub[0], kerf, end_trim, work)
            elif (quick := heuristic_layout(items, sub, kerf, end_trim, False)) is not None:
                assignment, infeasible = quick, False  # first fit decreasing already packs this mix
            else:
                assignment, infeasible, _ = column_generation(items, sub, kerf, end_trim, False, [], work,
                                                               feasible_only=True)
        except OutOfWork:
            return None, False, (mix_cost if bound is None else bound) if complete else floor
        if assignment is not None:
            sticks = sticks_from_assignment(items, sub, kerf, end_trim, assignment)
            if not complete:
                return sticks, False, floor
            return sticks, bound is None, layout_cost(sticks) if bound is None else bound
        if not infeasible and bound is None:
            bound = mix_cost  # not ruled out: the optimum may cost this much
    if not complete:
        return None, False, floor
    if bound is None:
        return None, True, best_cost
    return None, False, bound


def _continuous_cost(types, caps, sizes_total):
    """Least any layout can cost if pieces could be cut across sticks: the free sticks' length
    first, the rest at the lowest price per metre."""
    free = sum(math.inf if t.count is None else t.count * caps[k] for k, t in enumerate(types) if not t.price)
    paid = [(t.price or 0.0) / caps[k] for k, t in enumerate(types) if t.price]
    if free >= sizes_total or not paid:
        return 0.0
    return (sizes_total - free) * min(paid)


def _one_length(items, stick, kerf, end_trim, work):
    """Whether the pieces fit on ``stick.count`` sticks of one length: plain bin packing (first fit
    decreasing, then column generation with Farley's early stop).  Returns (assignment or None,
    ruled out)."""
    unlimited = [StockType(stick.length, None, stick.price)]
    heur = heuristic_layout(items, unlimited, kerf, end_trim, False)
    if heur is not None and len(heur) <= stick.count:
        return heur, False
    assignment, _, bound = column_generation(items, unlimited, kerf, end_trim, False, heur or [], work)
    if assignment is not None and len(assignment) <= stick.count:
        return assignment, False
    return None, bound > stick.count
