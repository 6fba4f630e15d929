"""The cut-list dive in one LP: patterns fixed by their column bounds and restored, checked
against an LP solved from scratch; the dive's layouts against brute force over every partition
of the pieces; free stock (price 0); the dive's result whatever the clock says.

Oracles: brute force (every partition of up to 8 pieces, each group on its cheapest stick that
holds it), an LP built and solved from scratch by scipy's linprog, and optima known by
construction (pieces that fill their sticks exactly, so the total length is a bound that a
layout meets).  Scenarios and numbers are our own (garden and porch chimes)."""

from __future__ import annotations

import math
import random

import numpy as np
import pytest

import cutplan.layout.columns as columns
from cutplan.layout.master import Master
from cutplan.layout.optimiser import Item, StockType, _Work, layout
from tests.test_stock import partitions


def brute_force(lengths, types, kerf, by_cost):
    """Least cost (or fewest sticks) over every partition, with the stick counts kept: each group
    goes on a stick that holds it, the counts of each length never exceeded.  None when no
    partition fits the stock."""
    best = None
    for p in partitions(len(lengths)):
        need = [sum(lengths[i] for i in g) + kerf * (len(g) - 1) for g in p]
        # assign groups, longest first, trying every stick length (small: at most 8 groups)
        choice = _cheapest_assignment(sorted(need, reverse=True), types, by_cost)
        if choice is not None and (best is None or choice < best - 1e-12):
            best = choice
    return best


def _cheapest_assignment(need, types, by_cost):
    left = [t[2] if t[2] is not None else math.inf for t in types]

    def walk(k):
        if k == len(need):
            return 0.0
        best = None
        for t, (length, price, _count) in enumerate(types):
            if left[t] > 0 and need[k] <= length + 1e-12:
                left[t] -= 1
                rest = walk(k + 1)
                left[t] += 1
                if rest is not None:
                    value = rest + (price if by_cost else 1.0)
                    best = value if best is None else min(best, value)
        return best

    return walk(0)


def _check_layout(out, lengths, kerf):
    placed = sorted(c[0] for s in out.sticks for c in s.cuts)
    assert placed == sorted(f"g{i}" for i in range(len(lengths)))
    for s in out.sticks:
        assert s.cuts[-1][1] + s.cuts[-1][2] <= s.stock_length + 1e-9


def _force_the_dive(monkeypatch):
    """Rounding the root LP off is skipped, so the dive has to find the layout."""
    monkeypatch.setattr(columns, "_round_and_fill", lambda *a, **k: None)


@pytest.mark.parametrize("seed", range(10))
def test_the_dive_alone_finds_the_fewest_sticks(monkeypatch, seed):
    _force_the_dive(monkeypatch)
    rng = random.Random(300 + seed)
    lengths = [round(rng.uniform(0.2, 0.9), 3) for _ in range(rng.randint(5, 8))]
    kerf = 0.003
    its = [Item(f"g{i}", x) for i, x in enumerate(lengths)]
    work = _Work(4000, None)
    assignment, proven, bound = columns.column_generation(its, [StockType(1.2)], kerf, 0.0, False, [], work)
    assert assignment is not None
    best = brute_force(lengths, [(1.2, 1.0, None)], kerf, False)
    # the dive's layout is a layout: it can be no better than the optimum; proven means equal
    assert len(assignment) >= best and bound <= best
    if proven:
        assert len(assignment) == best
    assert sorted(i for _t, m in assignment for i in m) == list(range(len(lengths)))


@pytest.mark.parametrize("seed", range(8))
def test_limited_priced_stock_matches_brute_force(seed):
    # a few sticks of each length on hand, priced: the search meets the brute-force least cost
    rng = random.Random(500 + seed)
    lengths = [round(rng.uniform(0.3, 1.1), 3) for _ in range(rng.randint(4, 7))]
    table = [(1.2, 9.0, 3), (2.4, 14.0, 2), (3.0, 19.5, None)]
    kerf = 0.003
    out = layout([Item(f"g{i}", x) for i, x in enumerate(lengths)],
                 [StockType(length, count, price) for length, price, count in table], kerf=kerf)
    _check_layout(out, lengths, kerf)
    assert out.cost == pytest.approx(brute_force(lengths, table, kerf, True))
    assert out.proven_optimal


@pytest.mark.parametrize("seed", range(6))
def test_free_offcuts_beside_priced_sticks_match_brute_force(seed):
    # offcuts on hand cost nothing (price 0): the least cost counts only the sticks bought
    rng = random.Random(700 + seed)
    lengths = [round(rng.uniform(0.3, 1.6), 3) for _ in range(rng.randint(4, 7))]
    table = [(1.0, 0.0, 2), (2.4, 14.0, None)]
    kerf = 0.003
    out = layout([Item(f"g{i}", x) for i, x in enumerate(lengths)],
                 [StockType(length, count, price) for length, price, count in table], kerf=kerf)
    _check_layout(out, lengths, kerf)
    assert out.cost == pytest.approx(brute_force(lengths, table, kerf, True))
    assert out.proven_optimal and out.cost_lower_bound == pytest.approx(out.cost)


def test_free_stock_without_a_count_costs_nothing_and_says_so():
    # every piece fits the free length, so nothing need be bought: cost 0, and 0 is the least
    # any layout can cost (prices are never negative)
    rng = random.Random(11)
    its = [Item(f"g{i}", round(rng.uniform(0.2, 0.9), 3)) for i in range(30)]
    out = layout(its, [StockType(2.4, price=0.0), StockType(3.0, price=14.0)], kerf=0.003)
    assert out.cost == 0.0 and out.cost_lower_bound == 0.0 and out.proven_optimal


def test_free_lengths_keep_the_stick_mixes_complete():
    # a free length with no count: all of them (one per piece) in every mix, the list complete.
    # By hand: four free 1 m sticks hold 4 m of the 6 m needed, so a mix needs one 2 m stick at
    # 5 or more; under 16 that is one, two or three of them
    types = [StockType(1.0, price=0.0), StockType(2.0, price=5.0)]
    mixes, complete = columns._mixes(types, 6.0, [1.0, 2.0], 16.0, pieces=4)
    assert complete
    assert mixes == [(5.0, (4, 1)), (10.0, (4, 2)), (15.0, (4, 3))]


def _triplets(n_sticks, seed):
    """Pieces in threes that fill a 1 m stick exactly (no kerf): the optimum is n_sticks."""
    rng = random.Random(seed)
    out = []
    for _ in range(n_sticks):
        a = rng.randint(251, 498)
        b = rng.randint(max(251, 501 - a), min(499, 749 - a))
        out += [a, b, 1000 - a - b]
    rng.shuffle(out)
    return [Item(f"t{i}", mm / 1000) for i, mm in enumerate(out)]


def test_one_lp_through_the_dive_on_triplets(monkeypatch):
    # 20 exact triplets: the total length says 20 sticks at least, and the dive must find 20.
    # Each triplet has three pieces of 251-499 mm, so no stick holds four: the bound is exact.
    _force_the_dive(monkeypatch)
    made = []
    real = columns.Master

    def counting(*args, **kwargs):
        made.append(1)
        return real(*args, **kwargs)

    monkeypatch.setattr(columns, "Master", counting)
    its = _triplets(20, 4)
    assignment, proven, bound = columns.column_generation(its, [StockType(1.0)], 0.0, 0.0, False, [],
                                                          _Work(4000, None))
    assert len(made) == 1  # the root and every step of the dive in one LP
    assert bound == 20 and proven and len(assignment) == 20


def test_fixed_and_restored_bounds_match_an_lp_from_scratch():
    # the warm model with a pattern fixed at one and its pieces' rows freed solves the same LP
    # as one built from scratch by linprog; restored, the same LP as before the fix
    rng = np.random.default_rng(3)
    n = 7
    types = [StockType(1.0), StockType(1.5, count=3)]
    keys = [(int(rng.integers(0, 2)),
             tuple(sorted(rng.choice(n, size=int(rng.integers(1, 4)), replace=False).tolist()))) for _ in range(12)]
    keys = list(dict.fromkeys(keys))

    def both(setup):
        out = []
        for warm in (True, False):
            m = Master(n, types, [1.0, 1.3], [1], 1000.0)
            if not warm:
                m._model = None
            m.add(keys)
            m.solve()
            setup(m)
            out.append(m.solve()[0])
        return out

    def fix(m):
        m.bound_columns([2], 1.0, 1.0)
        m.cover(list(keys[2][1]), 0.0)

    def fix_and_restore(m):
        fix(m)
        m.solve()
        m.bound_columns([2], 0.0, np.inf)
        m.cover(list(keys[2][1]), 1.0)

    before = both(lambda m: None)
    fixed = both(fix)
    restored = both(fix_and_restore)
    assert fixed[0] == pytest.approx(fixed[1], abs=1e-9)
    assert restored[0] == pytest.approx(restored[1], abs=1e-9) == pytest.approx(before[0], abs=1e-9)
    assert fixed[0] >= before[0] - 1e-9


@pytest.mark.parametrize("seed", range(6))
def test_an_incomplete_list_of_mixes_never_overstates_the_bound(monkeypatch, seed):
    # the mix enumeration stopped at once: the cost bound stated must still be no more than the
    # brute-force least cost, and "proven" only where the cost is that least cost
    monkeypatch.setattr(columns, "MAX_MIX_NODES", 2)
    rng = random.Random(900 + seed)
    lengths = [round(rng.uniform(0.3, 1.1), 3) for _ in range(rng.randint(5, 7))]
    table = [(1.2, 9.0, None), (2.4, 14.0, None), (3.0, 19.5, None)]
    out = layout([Item(f"g{i}", x) for i, x in enumerate(lengths)],
                 [StockType(length, count, price) for length, price, count in table], kerf=0.003)
    best = brute_force(lengths, table, 0.003, True)
    assert out.cost_lower_bound <= best + 1e-9 <= out.cost + 2e-9
    if out.proven_optimal:
        assert out.cost == pytest.approx(best)
