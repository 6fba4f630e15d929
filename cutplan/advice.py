"""Shop advice shared by the tuning sheet and ``cutplan trim``, so the two never disagree.

Plain text only; common practice for each kind of piece.
"""

TRIM_FROM = {
    "chime": "the bottom end (away from the hang hole)",
    "bar": "both ends, half from each, to keep the supports at the nodes",
    "open-open": "either end",
    "closed-open": "the open end",
    "resonator": "the open end, or raise the stopper",
}
SHARP_ACTION = {
    "chime": "it cannot be lengthened: cut a new tube (keep this one for a higher note), or retune the scale",
    "air-column": "it cannot be lengthened: cut a new pipe, or retune the scale",
    "resonator": "lower the stopper to lengthen the column, or cut a new tube",
    "bar": "flatten it by removing material from the underside at the centre, a little at a time",
}


def trim_from(kind, model=""):
    """Which end to trim a flat piece from. ``model`` gives an air column's ends.

    >>> trim_from("air-column", "closed-open")
    'the open end'
    """
    if kind == "air-column":
        return TRIM_FROM.get(model, TRIM_FROM["open-open"])
    return TRIM_FROM[kind]


def sharp_action(kind):
    """What to do with a piece that is already sharp (too short)."""
    return SHARP_ACTION[kind]
