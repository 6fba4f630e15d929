"""The column generation's master LP, kept in one HiGHS model across pricing rounds.

Each round adds the new patterns as columns and re-solves from the last optimal basis (a warm
start: the basis stays primal feasible, so the primal simplex needs only the few iterations the
new columns call for), instead of building and solving the whole LP from scratch.  The diving
heuristic keeps the same model: it fixes a pattern by its column bounds (at one) and frees the
rows of the pieces it cuts, then restores them; the primal simplex restarts from the last basis
after those changes too (the dual simplex took twice its CPU time on 500 pieces, measured).
The model is HiGHS's own, as bundled with scipy (the solver
``scipy.optimize.linprog(method="highs")`` runs); where that interface is missing the LP is
solved from scratch with ``linprog`` each round.

The work is counted from the solver's own deterministic iteration count, so the budget stays a
count of work (the same on every machine and under any load), never a time.
"""

from __future__ import annotations

import numpy as np


def _highs_interface():
    """scipy's bundled HiGHS interface, or None. Imported only when a layout needs an LP: most
    plans never do, and scipy.optimize costs start-up time the plain plan path does not pay."""
    try:
        from scipy.optimize._highspy import _core
    except ImportError:  # pragma: no cover - a scipy without it: solve from scratch
        return None
    return _core

__all__ = ["Master"]

SIMPLEX_PRIMAL = 4
"""HiGHS's ``simplex_strategy`` for the primal simplex: new columns leave the last basis primal
feasible, so it restarts from there (the dual simplex took 10 times the iterations)."""


class Master:
    """The covering LP over the patterns found so far: each item covered at least once, each
    limited stick type used at most its count, an artificial column per item at cost ``big`` so
    that it is always feasible.  :meth:`add` patterns, then :meth:`solve`."""

    def __init__(self, n_items, types, cost, limited, big):
        self.n = n_items
        self.types, self.cost, self.limited, self.big = types, cost, list(limited), big
        self.row_of_limit = {t: n_items + k for k, t in enumerate(self.limited)}
        self.keys = []
        self.col_bounds = []  # (lower, upper) of each pattern column
        self.row_lower = np.ones(n_items)  # 1: the piece must be cut; 0: already cut (a dive)
        self._model = None
        self._highs = _highs = _highs_interface()
        if _highs is not None:
            h = _highs._Highs()
            for name, value in (("output_flag", False), ("threads", 1), ("parallel", "off"),
                                ("presolve", "off"), ("random_seed", 0),
                                ("simplex_strategy", SIMPLEX_PRIMAL)):
                h.setOptionValue(name, value)
            inf = _highs.kHighsInf
            lower = np.concatenate([np.ones(n_items), np.full(len(self.limited), -inf)])
            upper = np.concatenate([np.full(n_items, inf), [float(types[t].count) for t in self.limited]])
            h.addRows(len(lower), lower, upper, 0, np.zeros(len(lower) + 1, dtype=np.int32),
                      np.array([], dtype=np.int32), np.array([]))
            # the artificial columns, one per item
            h.addCols(n_items, np.full(n_items, float(big)), np.zeros(n_items), np.full(n_items, inf), n_items,
                      np.arange(n_items, dtype=np.int32), np.arange(n_items, dtype=np.int32), np.ones(n_items))
            self._model = h

    @property
    def warm(self):
        """True when the LP is kept between rounds (the HiGHS interface is there)."""
        return self._model is not None

    def add(self, keys):
        """Add patterns ``(type, local item indices)`` as columns."""
        keys = list(keys)
        if not keys:
            return
        self.keys.extend(keys)
        self.col_bounds.extend((0.0, np.inf) for _ in keys)
        if self._model is None:
            return
        starts, index = [], []
        for t, members in keys:
            starts.append(len(index))
            index.extend(members)
            if t in self.row_of_limit:
                index.append(self.row_of_limit[t])
        inf = self._highs.kHighsInf
        self._model.addCols(len(keys), np.array([float(self.cost[t]) for t, _ in keys]), np.zeros(len(keys)),
                            np.full(len(keys), inf), len(index), np.array(starts, dtype=np.int32),
                            np.array(index, dtype=np.int32), np.ones(len(index)))

    def bound_columns(self, cols, lower, upper):
        """Set the bounds of pattern columns ``cols`` (indices into :attr:`keys`)."""
        cols = [int(j) for j in cols]
        if not cols:
            return
        for j in cols:
            self.col_bounds[j] = (lower, upper)
        if self._model is not None:
            hi = self._highs.kHighsInf if upper == np.inf else upper
            self._model.changeColsBounds(len(cols), np.array([self.n + j for j in cols], dtype=np.int32),
                                         np.full(len(cols), float(lower)), np.full(len(cols), float(hi)))

    def cover(self, items, lower):
        """Set how often pieces ``items`` must still be covered: 1 (to cut) or 0 (already cut)."""
        items = [int(i) for i in items]
        if not items:
            return
        self.row_lower[items] = lower
        if self._model is not None:
            inf = self._highs.kHighsInf
            for i in items:
                self._model.changeRowBounds(i, float(lower), inf)

    def solve(self):
        """(value, x of the patterns, item duals, stick-limit duals, artificial total, simplex
        iterations), or None when the solver fails."""
        if self._model is None:
            return self._from_scratch()
        h = self._model
        h.run()
        if h.getModelStatus() != self._highs.HighsModelStatus.kOptimal:
            return None
        info, sol = h.getInfo(), h.getSolution()
        iterations = max(0, int(info.simplex_iteration_count))  # this run's own count
        col = np.asarray(sol.col_value)
        dual = np.asarray(sol.row_dual)
        art, x = col[: self.n], col[self.n:]
        return (float(info.objective_function_value), x, np.clip(dual[: self.n], 0.0, None),
                {t: max(0.0, -float(dual[self.row_of_limit[t]])) for t in self.limited}, float(art.sum()),
                iterations)

    def _from_scratch(self):
        from scipy.optimize import linprog
        from scipy.sparse import csr_matrix, hstack, identity, vstack

        n, keys = self.n, self.keys
        rows, cols = [], []
        for j, (_t, members) in enumerate(keys):
            rows += list(members)
            cols += [j] * len(members)
        cover = csr_matrix((np.ones(len(rows)), (rows, cols)), shape=(n, len(keys)))
        a_ub = [-hstack([cover, identity(n, format="csr")])]
        b_ub = [-self.row_lower]
        for t in self.limited:
            a_ub.append(csr_matrix(np.array([[1.0 if k[0] == t else 0.0 for k in keys] + [0.0] * n])))
            b_ub.append(np.array([float(self.types[t].count)]))
        c = np.array([self.cost[k[0]] for k in keys] + [self.big] * n)
        bounds = [(lo, None if hi == np.inf else hi) for lo, hi in self.col_bounds] + [(0, None)] * n
        res = linprog(c, A_ub=vstack(a_ub).tocsr(), b_ub=np.concatenate(b_ub), bounds=bounds, method="highs")
        if res.status != 0:
            return None
        duals = -res.ineqlin.marginals
        m = len(keys)
        return (res.fun, res.x[:m], np.clip(duals[:n], 0.0, None),
                {t: max(0.0, float(-res.ineqlin.marginals[n + k])) for k, t in enumerate(self.limited)},
                float(res.x[m:].sum()), int(getattr(res, "nit", 0) or n))
