"""Validate a [stock] table (design-wide or per set) into a StockSpec.

The ranges here are the ones the command line's ``--stock``, ``--kerf`` and ``--end-trim`` get
too (:func:`stock_from_options`).
"""

from __future__ import annotations

import re

from cutplan import units
from cutplan.design.contract import (
    DEFAULT_SHARP_RISK,
    END_TRIM_RANGE,
    KERF_RANGE,
    MAX_STOCK_COUNT,
    STOCK_LENGTH_RANGE,
    Collector,
    DesignErrors,
    StockLength,
    StockSpec,
    is_number,
)

__all__ = [
    "STOCK_KEYS", "LENGTH_ALLOWED", "KERF_ALLOWED", "END_TRIM_ALLOWED", "stock_length", "stock_count",
    "stock_price", "stock_table", "stock_from_options"
]

STOCK_KEYS = {"lengths", "kerf", "end_trim", "allowance"}
LENGTH_ALLOWED = f"must be a stock length from {STOCK_LENGTH_RANGE[0] * 1000:g} mm to {STOCK_LENGTH_RANGE[1]:g} m"
KERF_ALLOWED = f"must be between {KERF_RANGE[0] * 1000:g} and {KERF_RANGE[1] * 1000:g} mm"
END_TRIM_ALLOWED = f"must be between {END_TRIM_RANGE[0] * 1000:g} and {END_TRIM_RANGE[1] * 1000:g} mm"
_ALLOWANCE_FORMS = ('must be "risk 5 %" (chance of coming out sharp), a percentage such as "0.5 %" '
                    "or a length up to 100 mm")


def stock_length(col, key, value):
    """A stick length [m] within :data:`STOCK_LENGTH_RANGE`, or None."""
    return col.ranged(key, value, units.parse_length, *STOCK_LENGTH_RANGE, LENGTH_ALLOWED)


def stock_count(col, key, count):
    if count is not None and (not isinstance(count, int) or isinstance(count, bool)
                              or not 0 < count <= MAX_STOCK_COUNT):
        col.add(key, count, f"must be a whole number from 1 to {MAX_STOCK_COUNT} (leave it out for unlimited)")
        return None
    return count


def stock_price(col, key, price):
    if price is not None and (not is_number(price) or not 0 <= price <= 1e6):
        col.add(key, price, "must be a number of money units per stick, 0 to 1000000")
        return None
    return None if price is None else float(price)


def _lengths(items, prefix, col):
    lengths = []
    if not isinstance(items, list):
        col.add(f"{prefix}.lengths", None, 'must be a list such as [{ length = "8 ft", count = 2 }]')
        return lengths
    for j, item in enumerate(items, start=1):
        key = f"{prefix}.lengths[{j}]"
        if isinstance(item, str):
            item = {"length": item}
        if not isinstance(item, dict):
            col.add(key, item, 'must be { length = "8 ft", count = 2 } or a length')
            continue
        col.unknown(item, {"length", "count", "price"}, key)
        if "length" not in item:
            col.add(f"{key}.length", None, "is missing")
            continue
        length = stock_length(col, f"{key}.length", item["length"])
        count = stock_count(col, f"{key}.count", item.get("count"))
        price = stock_price(col, f"{key}.price", item.get("price"))
        if length is not None:
            lengths.append(StockLength(length, count, price))
    return lengths


def _allowance(value, key, col):
    """(fraction, fixed length [m], risk) from the allowance forms."""
    text = value.strip().lower() if isinstance(value, str) else ""
    if text.startswith("risk"):
        frac = col.ranged(key, text[4:].strip(), units.parse_percent, 0.001, 0.5, "risk must be between 0.1 % and 50 %")
        return 0.0, 0.0, DEFAULT_SHARP_RISK if frac is None else frac
    if text.endswith("%"):
        frac = col.ranged(key, value, units.parse_percent, 0.0, 0.1, "must be between 0 % and 10 %")
        return (0.0, 0.0, DEFAULT_SHARP_RISK) if frac is None else (frac, 0.0, None)
    try:
        extra = units.parse_length(value)
    except units.UnitError as exc:
        bare = exc.accepted.startswith("a length with a unit")
        col.add(key, value, f"is not {exc.accepted}" if bare else _ALLOWANCE_FORMS)
        return 0.0, 0.0, DEFAULT_SHARP_RISK
    if not 0 <= extra <= 0.1:
        col.add(key, value, _ALLOWANCE_FORMS)
        return 0.0, 0.0, DEFAULT_SHARP_RISK
    return 0.0, extra, None


def stock_table(raw, prefix, col):
    """StockSpec from a [stock] table, or None after noting why not."""
    if not isinstance(raw, dict):
        col.add(prefix, None, "must be a table with lengths, kerf, end_trim, allowance")
        return None
    col.unknown(raw, STOCK_KEYS, prefix)
    lengths = _lengths(raw.get("lengths", []), prefix, col)
    kerf = col.ranged(f"{prefix}.kerf", raw.get("kerf", "1.6 mm"), units.parse_length, *KERF_RANGE, KERF_ALLOWED)
    end_trim = col.ranged(f"{prefix}.end_trim", raw.get("end_trim", "0 mm"), units.parse_length,
                          *END_TRIM_RANGE, END_TRIM_ALLOWED)
    allowance, allowance_length, risk = 0.0, 0.0, DEFAULT_SHARP_RISK
    if "allowance" in raw:
        allowance, allowance_length, risk = _allowance(raw["allowance"], f"{prefix}.allowance", col)
    return StockSpec(tuple(lengths), kerf or 0.0, end_trim or 0.0, allowance, allowance_length, risk)


_STOCK_OPTION = re.compile(r"\s*(.+?)\s*(?:[x*]\s*(\d{1,6}))?\s*(?:@\s*(\d{1,7}(?:\.\d{1,4})?))?\s*")


def stock_from_options(texts, kerf, end_trim):
    """StockSpec from ``--stock "10 ft x 3 @ 14.50"`` options and ``--kerf``/``--end-trim`` text,
    with the design file's ranges. Raises DesignErrors whose lines name the option."""
    col = Collector("")
    lengths = []
    for text in texts:
        match = _STOCK_OPTION.fullmatch(text)
        if match is None:
            col.add("--stock", text, 'is not "LENGTH [x COUNT] [@ PRICE]", e.g. "10 ft x 3" or "3 m x 2 @ 12.50"')
            continue
        length = stock_length(col, "--stock", match.group(1))
        count = stock_count(col, "--stock", int(match.group(2)) if match.group(2) else None)
        price = stock_price(col, "--stock", float(match.group(3)) if match.group(3) else None)
        if length is not None:
            lengths.append(StockLength(length, count, price))
    kerf_m = col.ranged("--kerf", kerf, units.parse_length, *KERF_RANGE, KERF_ALLOWED)
    trim_m = col.ranged("--end-trim", end_trim, units.parse_length, *END_TRIM_RANGE, END_TRIM_ALLOWED)
    if col.errors:
        raise DesignErrors(col.errors)
    return StockSpec(tuple(lengths), kerf_m, trim_m)
