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

__all__ = ["bracketed_roots", "bracketed_roots_each"]


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
    if lo.size == 1 and not done[0]:
        x[0] = _one_root(fun, float(lo[0]), float(hi[0]), float(f_lo[0]), float(f_hi[0]), float(x[0]), rtol, max_iter)
        return x.reshape(shape)
    # the unfinished brackets only, in order (``act`` their places): each step works on them alone
    act = np.nonzero(~done)[0]
    a, b, fa, fb, last = lo[act], hi[act], f_lo[act], f_hi[act], x[act]
    side = np.zeros(act.size, dtype=int)  # which end was kept last: -1 lo, +1 hi
    for _ in range(max_iter):
        if act.size == 0:
            break
        denom = fb - fa
        mid = 0.5 * (a + b)
        xn = np.where(denom != 0, (a * fb - b * fa) / np.where(denom != 0, denom, 1.0), mid)
        # keep strictly inside the bracket (rounding can land on an end)
        bad = ~((xn > np.minimum(a, b)) & (xn < np.maximum(a, b)))
        xn = np.where(bad, mid, xn)
        fx = fun(xn, act)
        step = np.abs(xn - last)
        same_as_lo = np.sign(fx) == np.sign(fa)
        # replace the end whose sign fx shares; halve the other end's value if it was kept twice
        new_lo = np.where(same_as_lo, xn, a)
        new_hi = np.where(same_as_lo, b, xn)
        fa = np.where(same_as_lo, fx, np.where(side == -1, 0.5 * fa, fa))
        fb = np.where(same_as_lo, np.where(side == 1, 0.5 * fb, fb), fx)
        side = np.where(same_as_lo, 1, -1)
        a, b, last = new_lo, new_hi, xn
        scale = np.abs(xn) + 1e-300
        finished = (fx == 0) | (np.abs(new_hi - new_lo) <= rtol * scale) | (step <= rtol * scale)
        if finished.any():
            x[act[finished]] = xn[finished]
            going = ~finished
            act, a, b, fa, fb, last, side = act[going], a[going], b[going], fa[going], fb[going], last[going], side[going]
    x[act] = last
    return x.reshape(shape)


def _same_sign(p, q):
    """``np.sign(p) == np.sign(q)`` for two floats (False when either is NaN)."""
    return (p > 0 and q > 0) or (p < 0 and q < 0) or (p == 0 and q == 0)


def _one_root(fun, a, b, fa, fb, x, rtol, max_iter):
    """:func:`bracketed_roots` of a single bracket, in plain floats: the same steps and the same
    arithmetic (each operation rounds as numpy's does), without the array overhead per step."""
    act = np.zeros(1, dtype=np.intp)

    def at(xn):
        return float(np.asarray(fun(np.array([xn]), act), dtype=float).reshape(-1)[0])

    return _illinois(at, a, b, fa, fb, x, rtol, max_iter)


def _illinois(at, a, b, fa, fb, x, rtol, max_iter):
    """The Illinois steps of :func:`bracketed_roots` on one bracket [a, b] of ``at`` (a float
    function), from the last point ``x``; the root."""
    side = 0
    for _ in range(max_iter):
        denom = fb - fa
        mid = 0.5 * (a + b)
        xn = (a * fb - b * fa) / denom if denom != 0 else mid
        if not ((a < b and a < xn < b) or (b < a and b < xn < a)):
            xn = mid
        fx = at(xn)
        step, x = abs(xn - x), xn
        same_as_lo = _same_sign(fx, fa)
        new_lo, new_hi = (xn, b) if same_as_lo else (a, xn)
        if same_as_lo:
            fa, fb = fx, (0.5 * fb if side == 1 else fb)
        else:
            fa, fb = (0.5 * fa if side == -1 else fa), fx
        side = 1 if same_as_lo else -1
        a, b = new_lo, new_hi
        scale = abs(xn) + 1e-300
        if fx == 0 or abs(new_hi - new_lo) <= rtol * scale or step <= rtol * scale:
            break
    return x


def bracketed_roots_each(fun, lo, hi, f_lo=None, f_hi=None, rtol=4e-16, max_iter=200):
    """:func:`bracketed_roots` for a ``fun(x, k)`` of one float ``x`` and one bracket's place
    ``k`` (returning a float): the same steps on each bracket in turn, in plain floats, so the
    same roots bit for bit when ``fun`` rounds as the array function does; for a few brackets it
    is many times faster (no array overhead per step).

    Examples
    --------
    >>> r = bracketed_roots_each(lambda x, k: x * x - (2.0, 3.0)[k], np.ones(2), 2 * np.ones(2))
    >>> [round(float(v), 12) for v in r]
    [1.414213562373, 1.732050807569]
    """
    lo = np.array(lo, dtype=float, copy=True)
    shape = lo.shape
    lo_list = lo.ravel().tolist()
    hi_list = np.array(hi, dtype=float).ravel().tolist()
    f_lo_list = None if f_lo is None else np.array(f_lo, dtype=float).ravel().tolist()
    f_hi_list = None if f_hi is None else np.array(f_hi, dtype=float).ravel().tolist()
    out = []
    for k, (a, b) in enumerate(zip(lo_list, hi_list, strict=True)):
        fa = fun(a, k) if f_lo_list is None else f_lo_list[k]
        fb = fun(b, k) if f_hi_list is None else f_hi_list[k]
        if fa == 0 or fb == 0:
            out.append(a if fa == 0 else b)
            continue
        out.append(_illinois(lambda v, k=k: fun(v, k), a, b, fa, fb, b, rtol, max_iter))
    return np.array(out, dtype=float).reshape(shape)
