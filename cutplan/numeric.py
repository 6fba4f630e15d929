"""Keep numeric trouble inside: numpy/scipy warnings never reach the user, and an overflow or
a non-finite result in a solver becomes one clear line instead of a 0.0 mm or NaN piece."""

from __future__ import annotations

import math
import re
import warnings

import numpy as np

__all__ = ["NumericError", "quiet", "LENGTH_RANGE", "plan_problem", "checked_plan"]


class NumericError(ArithmeticError):
    """A computation overflowed or gave a non-finite or non-positive result; str() is one line."""


def quiet(fn, *args, **kwargs):
    """``fn(*args, **kwargs)`` with numpy/scipy floating-point warnings silenced."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with np.errstate(all="ignore"):
            return fn(*args, **kwargs)


NUMERIC_VALUE_ERRORS = re.compile(r"math domain|math range|\bnan\b|\binf(inity)?\b", re.IGNORECASE)
"""Words of a plain ``ValueError`` that the math module or numpy raise for a number out of range."""


def _numeric_value_error(exc):
    """True for a plain ValueError from arithmetic (not a subclass: those carry messages of their own,
    such as a design's errors, each already one line)."""
    return type(exc) is ValueError and NUMERIC_VALUE_ERRORS.search(str(exc)) is not None


def quiet_numbers(fn, *args, **kwargs):
    """``fn(*args, **kwargs)`` run :func:`quiet`ly; an overflow, a division by zero or an
    impossible value inside becomes :class:`NumericError` (one line, for the caller to prefix)."""
    try:
        return quiet(fn, *args, **kwargs)
    except (OverflowError, FloatingPointError, ZeroDivisionError, np.linalg.LinAlgError) as exc:
        raise NumericError(f"the numbers overflowed in the solver ({' '.join(str(exc).split())})") from None
    except ValueError as exc:
        if not _numeric_value_error(exc):
            raise
        raise NumericError(f"the solver met an impossible value ({' '.join(str(exc).split())})") from None


LENGTH_RANGE = (1e-4, 30.0)
"""Lengths a planned piece may have [m]: 0.1 mm to 30 m (common practice: an open pipe for the
lowest audible 16 Hz is about 10 m).  Outside it no shop can cut the piece and a full-scale
template would never end, so the plan is refused with one line."""


def _bad_length(x):
    return x is None or not math.isfinite(x) or x <= 0


def _absurd_length(x):
    return not LENGTH_RANGE[0] <= x <= LENGTH_RANGE[1]


def plan_problem(plan):
    """The first length of ``plan`` that is NaN, infinite, zero or negative, as text; or None."""
    for p in plan.pieces:
        checks = [("length", p.length), ("cut length", p.cut_length)]
        checks += [(f"node {i}", x) for i, x in enumerate(p.nodes, start=1)]
        for what, x in checks:
            if _bad_length(x):
                return f"piece {p.label}: the solver gave a {what} of {x!r}"
        if _absurd_length(p.cut_length) or _absurd_length(p.length):
            lo, hi = LENGTH_RANGE
            return (f"piece {p.label}: its length would be {p.cut_length * 1000:.4g} mm, outside the "
                    f"{lo * 1000:g} mm to {hi:g} m any piece can have")
        if not all(math.isfinite(f) and f > 0 for f in p.partials_hz):
            return f"piece {p.label}: the solver gave a partial that is not a positive finite frequency"
    cut_list = getattr(plan, "cut_list", None)
    if cut_list is not None:
        for stick in cut_list.sticks:
            if _bad_length(stick.stock_length) or not math.isfinite(stick.offcut) or stick.offcut < -1e-9:
                return "the cut list has a stick of impossible length"
    return None


def checked_plan(make, where):
    """``make()`` (a planning call) run quietly; raises :class:`NumericError` naming ``where``
    when it overflows or gives an impossible length."""
    try:
        plan = quiet(make)
    except (OverflowError, FloatingPointError, ZeroDivisionError, np.linalg.LinAlgError) as exc:
        raise NumericError(f"{where}: the numbers overflowed in the solver ({exc}); "
                           "check the material's modulus and density and the section sizes") from None
    except ValueError as exc:
        if not _numeric_value_error(exc):  # a design's own errors (DesignErrors) pass on, one line each
            raise
        raise NumericError(f"{where}: the solver met an impossible value ({exc}); "
                           "check the material's modulus and density and the section sizes") from None
    problem = plan_problem(plan)
    if problem:
        raise NumericError(f"{where}: {problem}; check the material's modulus and density and the section sizes")
    return plan
