"""Vectorised bracketed root finding: many independent roots at once, no scipy.optimize.

Every element of ``lo``/``hi`` brackets one sign change of ``fun``; all are refined together
by regula falsi with the Illinois modification (the retained end's value is halved when the
same end is kept twice), which converges superlinearly and never leaves the bracket.

References
----------
.. [1] Dowell, M. and Jarratt, P., "A modified regula falsi method for computing the root of
   an equation", BIT 11 (1971) 168-174 (the Illinois algorithm).
"""

from __future__ import annotations

import numpy as np

__all__ = ["bracketed_roots"]


def bracketed_roots(fun, lo, hi, f_lo=None, f_hi=None, rtol=4e-16, max_iter=200):
    """Roots of ``fun`` in each bracket [lo, hi] (arrays of the same shape).

    Parameters
    ----------
    fun : callable
        ``fun(x, active)`` -> values at ``x`` for the elements selected by the boolean or index
        array ``active`` (so that per-element parameters can be indexed the same way).
    lo, hi : array
        Bracket ends; ``fun`` must differ in sign at the two ends.
    f_lo, f_hi : array, optional
        ``fun`` at the ends, if already known.
    rtol : float
        Stop when the bracket (or the last step) is below ``rtol * |x|`` [-].
    max_iter : int
        Iteration limit [-] (a work bound; never reached in practice).

    Examples
    --------
    >>> r = bracketed_roots(lambda x, k: x**2 - np.array([2.0, 3.0])[k], np.ones(2), 2 * np.ones(2))
    >>> [round(float(v), 12) for v in r]
    [1.414213562373, 1.732050807569]
    """
    lo = np.array(lo, dtype=float, copy=True)
    hi = np.array(hi, dtype=float, copy=True)
    shape = lo.shape
    everything = np.arange(lo.size)
    lo, hi = lo.ravel(), hi.ravel()
    f_lo = fun(lo, everything) if f_lo is None else np.array(f_lo, dtype=float).ravel()
    f_hi = fun(hi, everything) if f_hi is None else np.array(f_hi, dtype=float).ravel()
    x = np.where(f_lo == 0, lo, hi)
    done = (f_lo == 0) | (f_hi == 0)
    side = np.zeros(lo.size, dtype=int)  # which end was kept last: -1 lo, +1 hi
    for _ in range(max_iter):
        act = np.nonzero(~done)[0]
        if act.size == 0:
            break
        a, b, fa, fb = lo[act], hi[act], f_lo[act], f_hi[act]
        denom = fb - fa
        xn = np.where(denom != 0, (a * fb - b * fa) / np.where(denom != 0, denom, 1.0), 0.5 * (a + b))
        # keep strictly inside the bracket (rounding can land on an end)
        bad = ~((xn > np.minimum(a, b)) & (xn < np.maximum(a, b)))
        xn = np.where(bad, 0.5 * (a + b), xn)
        fx = fun(xn, act)
        step = np.abs(xn - x[act])
        x[act] = xn
        same_as_lo = np.sign(fx) == np.sign(fa)
        # replace the end whose sign fx shares; halve the other end's value if it was kept twice
        new_lo = np.where(same_as_lo, xn, a)
        new_hi = np.where(same_as_lo, b, xn)
        new_flo = np.where(same_as_lo, fx, np.where(side[act] == -1, 0.5 * fa, fa))
        new_fhi = np.where(same_as_lo, np.where(side[act] == 1, 0.5 * fb, fb), fx)
        side[act] = np.where(same_as_lo, 1, -1)
        lo[act], hi[act], f_lo[act], f_hi[act] = new_lo, new_hi, new_flo, new_fhi
        scale = np.abs(xn) + 1e-300
        finished = (fx == 0) | (np.abs(new_hi - new_lo) <= rtol * scale) | (step <= rtol * scale)
        done[act] = finished
    return x.reshape(shape)
