"""Shop advice shared by the tuning sheet and ``cutplan trim``, so the two never disagree.

Plain text only; common practice for each kind of piece.
"""

__all__ = ["TRIM_FROM", "SHARP_ACTION", "trim_from", "sharp_action"]

TRIM_FROM = {
    "chime": "the bottom end (away from the hang hole)",
    "bar": "both ends, half from each, to keep the supports at the nodes",
    "open-open": "either end",
    "closed-open": "the open end",
    "resonator": "the open end, or raise the stopper",
    "stoppered": "none: tune with the stopper (moving it toward the open end raises the pitch)",
}
SHARP_ACTION = {
    "chime": "it cannot be lengthened: cut a new tube (keep this one for a higher note), or retune the scale",
    "air-column": "it cannot be lengthened: cut a new pipe, or retune the scale",
    "resonator": "lower the stopper to lengthen the column, or cut a new tube",
    "bar": "flatten it by removing material from the underside at the centre, a little at a time",
    "stoppered": "move the stopper away from the open end: the longer column lowers the pitch",
}


def trim_from(kind, model="", stoppered=False):
    """Which end to trim a flat piece from. ``model`` gives an air column's ends; a tube tuned
    with a sliding stopper is not trimmed at all.

    >>> trim_from("air-column", "closed-open")
    'the open end'
    """
    if stoppered:
        return TRIM_FROM["stoppered"]
    if kind == "air-column":
        return TRIM_FROM.get(model, TRIM_FROM["open-open"])
    return TRIM_FROM[kind]


def sharp_action(kind, stoppered=False):
    """What to do with a piece that is already sharp (too short, or its stopper set too high)."""
    return SHARP_ACTION["stoppered" if stoppered else kind]
