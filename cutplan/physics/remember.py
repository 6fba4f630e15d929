"""Remember what a pure numeric function gave for the same arguments (arrays compared by value).

The closed-form solvers are asked the same question again and again: the page plans a design
anew at every edit with most sets unchanged, and a plan asks for a set's modes from the planner,
the other-modes check and the allowance alike.  A remembered answer is the very array the first
call returned (copied out, so a caller may change its copy), so results are identical with or
without the memo.  Only finite answers are kept; a call that raises is never remembered.

The finite-element solves (2-D profiles, 3-D side modes) keep theirs in a :class:`SharedMemo`
instead: keyed by the caller, and able to hand its answers to another process.
"""

from __future__ import annotations

import dataclasses
import functools
import threading
from collections import OrderedDict

import numpy as np

__all__ = ["remembered", "SharedMemo"]


def _key_part(value):
    """A hashable stand-in for one argument, or None when it has none (the call is then not remembered)."""
    if isinstance(value, np.ndarray):
        if value.dtype.hasobject:
            return None
        return ("array", value.dtype.str, value.shape, value.tobytes())
    if isinstance(value, (float, np.floating)):
        return (type(value), np.asarray(value).tobytes())  # bit for bit: -0.0 is not 0.0
    if isinstance(value, (bool, int, str, np.integer)) or value is None:
        return (type(value), value)
    return None


def _key(args, kwargs):
    """The memo key of a call, or None when an argument has no hashable stand-in."""
    names = tuple(sorted(kwargs))
    parts = []
    for value in (*args, *(kwargs[k] for k in names)):
        part = _key_part(value)
        if part is None:
            return None
        parts.append(part)
    return tuple(parts), names


def _parts(result):
    """The numbers of an answer: a number, an array, or a tuple or dataclass of them."""
    if isinstance(result, tuple):
        return result
    if dataclasses.is_dataclass(result) and not isinstance(result, type):
        return tuple(getattr(result, f.name) for f in dataclasses.fields(result))
    return (result,)


def _finite(result):
    return all(np.all(np.isfinite(p)) for p in _parts(result))


def _fresh(result):
    """A copy of an answer that shares no array with it."""
    if isinstance(result, tuple):
        return tuple(_fresh(p) for p in result)
    if dataclasses.is_dataclass(result) and not isinstance(result, type):
        return dataclasses.replace(result, **{f.name: _fresh(getattr(result, f.name))
                                              for f in dataclasses.fields(result) if f.init})
    return result.copy() if isinstance(result, np.ndarray) else result


def remembered(maxsize):
    """Decorator: keep the last ``maxsize`` answers of a pure function of arrays and numbers.

    >>> calls = []
    >>> @remembered(4)
    ... def twice(x):
    ...     calls.append(1)
    ...     return 2 * x
    >>> a = twice(np.arange(3.0)); a[0] = 99.0; twice(np.arange(3.0)).tolist(), len(calls)
    ([0.0, 2.0, 4.0], 1)
    """
    def decorate(fn):
        memo, lock = {}, threading.Lock()

        @functools.wraps(fn)
        def wrapper(*args, **kwargs):
            key = _key(args, kwargs)
            if key is None:
                return fn(*args, **kwargs)
            hit = memo.get(key)
            if hit is None:
                hit = fn(*args, **kwargs)
                if not _finite(hit):
                    return hit
                with lock:
                    while len(memo) >= maxsize:
                        del memo[next(iter(memo))]
                    memo[key] = _fresh(hit)
            return _fresh(hit)

        return wrapper

    return decorate


class SharedMemo:
    """The last ``size`` answers of an expensive solve, by a key the caller makes, least recently
    used dropped first; the answers can be copied out and handed to another process.

    For the finite-element solves, whose answers are frozen values: a process that plans a design
    hands its solves to another planning the same design (the test workers, a command run after a
    plan), which then gives bit for bit the plan it would have made by solving.

    >>> memo = SharedMemo(2); memo.get("a", lambda: 1), memo.get("a", lambda: 2)
    (1, 1)
    >>> other = SharedMemo(2); other.take(memo.copy()); other.get("a", lambda: 3)
    1
    """

    def __init__(self, size):
        self.size = size
        self._answers: OrderedDict = OrderedDict()
        self._lock = threading.Lock()

    def get(self, key, solve):
        """The answer under ``key``, from ``solve()`` the first time (while it stays among the last ``size``)."""
        with self._lock:
            if key in self._answers:
                self._answers.move_to_end(key)
                return self._answers[key]
        result = solve()
        with self._lock:
            self._answers[key] = result
            self._trim()
        return result

    def clear(self):
        """Forget every answer (as a fresh process has it)."""
        with self._lock:
            self._answers.clear()

    def copy(self):
        """A copy of the answers ({key: answer}) to hand to another process (see :meth:`take`)."""
        with self._lock:
            return dict(self._answers)

    def take(self, answers):
        """Take answers made by another process (from :meth:`copy`); an answer already here is kept."""
        with self._lock:
            for key, value in answers.items():
                self._answers.setdefault(key, value)
            self._trim()

    def __len__(self):
        with self._lock:
            return len(self._answers)

    def _trim(self):
        while len(self._answers) > self.size:
            self._answers.popitem(last=False)
