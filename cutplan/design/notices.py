"""Warnings and errors as records: a code, the design key they concern and the message.

A :class:`Notice` is what a plan warning or a design error is, whatever shows it: the terminal
and the packet print its ``message``; the page puts it beside the form field of its ``key``
(routing by key and code, never by the words of the message); the JSON states all three.  The
``code`` names the kind of problem and stays the same when the wording changes.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Notice", "allowance_key", "set_key", "stock_key"]

# warnings a plan may carry (Piece.warnings)
STUBBY = "stubby"
SLENDER_MODEL = "slender-model"
SHARP_RISK = "sharp-risk"
LONGER_THAN_COMMON_STOCK = "longer-than-common-stock"
SHORT_COLUMN = "short-column"
WIDE_BORE = "wide-bore"
HANG_HOLE_BEAT = "hang-hole-beat"
MODE_BELOW_FUNDAMENTAL = "mode-below-fundamental"
MODE_NEAR_PARTIAL = "mode-near-partial"
PARTIAL_SPLIT = "partial-split"

# design errors (DesignError.code); any other error is INVALID
INVALID = "invalid"
PITCH_CHOICE = "pitch-choice"
LONGER_THAN_STOCK = "longer-than-stock"
UNREACHABLE = "unreachable"
CANNOT_PLAN = "cannot-plan"


@dataclass(frozen=True)
class Notice:
    """One warning or error: ``code`` (what kind), ``key`` (the design key it concerns, e.g.
    ``"set[2].section"``, or None for the design as a whole) and ``message`` (one line)."""

    code: str
    key: str | None
    message: str

    def __str__(self):
        return self.message

    def as_dict(self):
        """The JSON record: ``{"code", "key", "message"}``."""
        return {"code": self.code, "key": self.key, "message": self.message}


def set_key(spec, field=""):
    """The design key of a set's field: ``set_key(spec, "section")`` -> ``"set[2].section"``."""
    return f"set[{spec.index}]" + (f".{field}" if field else "")


def stock_key(spec, field):
    """The key of a field of the stock a set is cut from: its own ``[set.stock]`` or the design's
    (``stock_key(spec, "lengths")`` -> ``"set[2].stock.lengths"`` or ``"stock.lengths"``)."""
    return set_key(spec, f"stock.{field}") if getattr(spec, "stock", None) is not None else f"stock.{field}"


def allowance_key(spec):
    """The key of the allowance a set is cut with: its own ``[set.stock]`` or the design's."""
    return stock_key(spec, "allowance")
