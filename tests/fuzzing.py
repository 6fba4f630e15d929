"""Generators shared by the fuzz test and bench/bench_hardening.py: designs mutated at every key,
written as TOML, and broken WAV files. (Invented values only: they exist to break things.)"""

from __future__ import annotations

import math
import struct

import numpy as np

BASE_SETS = {
    "chime": {"name": "porch", "kind": "chime", "notes": ["D5", "F5"], "section": {"stock": "al-1.000x0.065"}},
    "bar": {"name": "bars", "kind": "bar", "notes": ["C5"], "material": "maple-sugar",
            "section": {"shape": "bar", "width": "40 mm", "thickness": "20 mm"}},
    "air-column": {"name": "pipes", "kind": "air-column", "notes": ["C5", "G5"], "section": {"stock": "pvc-sch40-1"},
                   "ends": "closed-open", "temperature": "20 C"},
    "resonator": {"name": "res", "kind": "resonator", "serves": "bars", "section": {"stock": "pvc-sch40-2"}},
}
TOP = {"title": "garden test", "units": "mm", "paper": "letter", "tuning": {"a4": 440, "temperament": "equal"},
       "stock": {"lengths": [{"length": "8 ft", "count": 4}], "kerf": "1/16 in", "end_trim": "1/8 in",
                 "allowance": "risk 5 %"}}
SET_KEYS = ["name", "kind", "notes", "scale", "root", "count", "frequencies", "cents", "ratios", "range",
            "material", "section", "model", "target", "ends", "end_correction", "temperature", "humidity",
            "serves", "max_length", "stock", "temperature_range", "undercut"]
SECTION_KEYS = ["shape", "outer", "wall", "inner", "diameter", "width", "thickness", "stock"]
MATERIAL_KEYS = ["modulus", "density", "poisson", "class", "unusual", "shear_ratio"]
STOCK_KEYS = ["lengths", "kerf", "end_trim", "allowance"]
PATHS = (
    [("title",), ("units",), ("paper",), ("tuning", "a4"), ("tuning", "temperament"), ("material_dirs",)]
    + [("stock", k) for k in STOCK_KEYS]
    + [("set", k) for k in SET_KEYS]
    + [("set", "section", k) for k in SECTION_KEYS]
    + [("set", "material", k) for k in MATERIAL_KEYS]
    + [("set", "stock", k) for k in STOCK_KEYS]
    + [("set", "undercut", k) for k in ("ratios", "arch_width", "min_thickness")]
)
WORDS = [
    "1 in", "25 mm", "0.065 in", "8 ft", "1e9 m", "-1 mm", "0 mm", "19.84", "1/16", "400 mm", "1e-9 mm", "3 m",
    "C5", "D5", "C-1", "B9", "major", "chromatic", "major-pentatonic", "C4..C6", "C6..C4", "risk 5 %", "0.5 %",
    "~50%", "50 %", "68.9 MPa", "68.9 GPa", "2700 g/cm3", "2700 kg/m3", "1e30 kg/m3", "closed-open", "open-open",
    "unflanged", "=1+1", "\x1b[31mred", "-rf", "a\nb", "\u202etxt", "timoshenko", "slender", "tube", "bar", "rod",
    "al-1.000x0.065", "pvc-sch40-2", "metal", "wood", "glass", "20 C", "-40 C", "5000 K", "3:2", "9/8", "1/0",
    "nan", "inf mm", "", " ", "porch", "bars", "fundamental", "strike-note", "just", "equal-19", "x" * 200,
]


GOOD = {
    "title": ["Garden chimes", "Kl\u00e4nge f\u00fcr den Hof", "=SUM(A1)", "x" * 120], "units": ["mm", "in"],
    "paper": ["a4", "letter"], "a4": [432, 442.5, "440 Hz"], "temperament": ["just", "pythagorean", "equal-19"],
    "kerf": ["0 mm", "3 mm", "1/8 in"], "end_trim": ["0 mm", "10 mm", "1 in"],
    "allowance": ["risk 1 %", "1 %", "5 mm", "0 mm"], "lengths": [["6 ft", "10 ft"], [{"length": "2 m", "price": 9.5}]],
    "name": ["porch", "=1+1", "Bells 2", "\u00e9t\u00e9"], "notes": [["C4"], ["A6", "B6"], ["C3", "E3", "G3"]],
    "scale": ["major", "minor-pentatonic"], "root": ["D4", "A5"], "count": [1, 5, 12],
    "frequencies": [[440, "523.3 Hz"], [100.5]], "cents": [[0, 200, 400]], "ratios": [["1", "9/8", "5/4"], [4.0], [4.0, 10.0]],
    "range": ["C5..G5", "A3..A4"], "material": ["aluminum-6061-t6", "copper-c12200", "pvc-rigid", "oak-red",
                                               {"modulus": "200 GPa", "density": "7850 kg/m3", "class": "metal"}],
    "model": ["slender"], "target": ["strike-note"], "ends": ["open-open"], "end_correction": ["flanged", 0.6],
    "temperature": ["5 C", "30 C", "80 F"], "humidity": [0, 80, "40 %"], "max_length": ["2 m", "300 mm"],
    "temperature_range": [["10 C", "30 C"]], "outer": ["3/4 in", "30 mm"], "wall": ["1 mm", "0.049 in"],
    "inner": ["20 mm"], "diameter": ["12 mm", "1/2 in"], "width": ["50 mm"], "thickness": ["25 mm", "15 mm"],
    "modulus": ["70 GPa", "10 Msi"], "density": ["8000 kg/m3", "0.3 lb/in3"], "class": ["metal", "wood"],
    "unusual": [True], "poisson": [0.3], "shear_ratio": [0.4],
    "arch_width": [0.3, 0.6], "min_thickness": ["5 mm", "2 mm"],
}


def plausible(rng, key):
    """A value for ``key`` that may well be accepted (so that plans are made, not only refused)."""
    options = GOOD.get(key)
    return options[rng.integers(0, len(options))] if options else scalar(rng)


def scalar(rng):
    """One random scalar of any TOML type, biased toward values that hurt."""
    pick = rng.integers(0, 9)
    if pick <= 2:
        return WORDS[rng.integers(0, len(WORDS))]
    if pick == 3:
        return int(rng.choice([0, 1, -1, 5, 128, 129, 10**6, 10**400, -(10**30)]))
    if pick == 4:
        return float(rng.choice([0.0, -1.0, 0.5, 19.84, 1e308, math.inf, -math.inf, math.nan, 1e-300]))
    if pick == 5:
        return bool(rng.integers(0, 2))
    if pick == 6:
        return [scalar(rng) for _ in range(rng.integers(0, 3))]
    if pick == 7:
        return {WORDS[rng.integers(0, 20)]: scalar(rng)}
    return "".join(chr(int(c)) for c in rng.integers(0, 0x2100, rng.integers(1, 8)))


def mutated_design(rng, n_mutations=None):
    """A design dict: one or two base sets with 1-4 keys replaced, added or removed."""
    kinds = [["chime"], ["air-column"], ["bar", "resonator"], ["chime", "air-column"]][rng.integers(0, 4)]
    design = {k: (dict(v) if isinstance(v, dict) else v) for k, v in TOP.items()}
    design["stock"] = dict(TOP["stock"])
    design["set"] = [{k: (dict(v) if isinstance(v, dict) else v) for k, v in BASE_SETS[k].items()} for k in kinds]
    for _ in range(n_mutations or int(rng.choice([1, 1, 1, 2, 2, 3, 4]))):
        path = PATHS[rng.integers(0, len(PATHS))]
        table = design
        if path[0] == "set":
            table = design["set"][rng.integers(0, len(design["set"]))]
            path = path[1:]
        for part in path[:-1]:
            if not isinstance(table.get(part), dict):
                table[part] = {}
            table = table[part]
        roll = rng.random()
        if roll < 0.1:
            table.pop(path[-1], None)
        elif roll < 0.6:
            if path[-1] in ("notes", "scale", "range", "frequencies", "cents", "ratios"):
                for other in ("notes", "scale", "range", "frequencies", "cents", "ratios"):
                    table.pop(other, None)
                table.update({"root": "D4", "count": 5} if path[-1] in ("scale", "cents", "ratios") else {})
            table[path[-1]] = plausible(rng, path[-1])
        else:
            table[path[-1]] = scalar(rng)
    return design


def _toml_value(v):
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)  # tomllib reads an integer of any size, 400 digits included
    if isinstance(v, float):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf") if math.isinf(v) else repr(v)
    if isinstance(v, str):
        out = []
        for ch in v:
            code = ord(ch)
            if ch in '"\\':
                out.append("\\" + ch)
            elif code < 0x20 or code == 0x7F:
                out.append(f"\\u{code:04x}")
            elif 0xD800 <= code <= 0xDFFF:
                out.append("?")
            else:
                out.append(ch)
        return '"' + "".join(out) + '"'
    if isinstance(v, list):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{_toml_key(k)} = {_toml_value(x)}" for k, x in v.items()) + " }"
    raise TypeError(type(v))


def _toml_key(k):
    return k if k.replace("_", "").replace("-", "").isalnum() and k.isascii() else _toml_value(k)


def to_toml(design):
    """TOML text of a design dict (sets as [[set]] tables, everything else inline)."""
    lines = []
    for k, v in design.items():
        if k != "set":
            lines.append(f"{_toml_key(k)} = {_toml_value(v)}")
    sets = design.get("set")
    if isinstance(sets, list) and all(isinstance(s, dict) for s in sets):
        for s in sets:
            lines.append("[[set]]")
            lines += [f"{_toml_key(k)} = {_toml_value(v)}" for k, v in s.items()]
    elif sets is not None:
        lines.append(f"set = {_toml_value(sets)}")
    return "\n".join(lines) + "\n"


def bad_lengths(plan_json):
    """Every length in a plan's JSON that is NaN, infinite, zero or negative."""
    bad = []
    for p in plan_json["pieces"]:
        for key in ("length_mm", "cut_length_mm"):
            if not (math.isfinite(p[key]) and p[key] > 0):
                bad.append((p["label"], key, p[key]))
        bad += [(p["label"], "node", x) for x in p["nodes_mm"] if not (math.isfinite(x) and x > 0)]
    return bad


def _ring(rate=44100, seconds=0.5, f=587.33):
    t = np.arange(int(rate * seconds)) / rate
    return (0.5 * np.sin(2 * np.pi * f * t) * np.exp(-t * 3) * 32767).astype("<i2").tobytes()


def broken_wav(rng):
    """(name of the damage, bytes) of a WAV file broken in one of the ways recorders break them."""
    data = _ring()
    riff, fmt_len, code, ch, rate, block, bits, dlen = 36 + len(data), 16, 1, 1, 44100, 2, 16, len(data)
    body_cut = None
    damage = ["riff 0", "riff 12", "channels", "block", "rate", "streaming", "data 0", "bits", "code",
              "truncated", "fmt short", "no data", "garbage", "random bytes"][rng.integers(0, 14)]
    if damage == "riff 0":
        riff = 0
    elif damage == "riff 12":
        riff = 12
    elif damage == "channels":
        ch = int(rng.choice([0, 33, 65535, 2]))
    elif damage == "block":
        block = int(rng.choice([0, 1, 3, 7, 65535]))
    elif damage == "rate":
        rate = int(rng.choice([0, 1, 2**32 - 1]))
    elif damage == "streaming":
        dlen = 0xFFFFFFFF
    elif damage == "data 0":
        dlen, riff = 0, int(rng.choice([0, 36]))
    elif damage == "bits":
        bits = int(rng.choice([0, 8, 12, 48, 65535]))
    elif damage == "code":
        code = int(rng.choice([0, 2, 6, 7, 0xFFFE]))
    elif damage == "truncated":
        body_cut = int(rng.integers(0, 60))
    elif damage == "fmt short":
        fmt_len = int(rng.choice([0, 8, 14]))
    head = struct.pack("<4sI4s", b"RIFF", riff & 0xFFFFFFFF, b"WAVE")
    fmt = struct.pack("<HHIIHH", code, ch, rate & 0xFFFFFFFF, (rate * block) & 0xFFFFFFFF, block & 0xFFFF,
                      bits & 0xFFFF)[:max(fmt_len, 0)]
    out = head + struct.pack("<4sI", b"fmt ", fmt_len) + fmt
    if damage != "no data":
        out += struct.pack("<4sI", b"data", dlen) + data
    if damage == "garbage":
        out = out[:12] + bytes(rng.integers(0, 256, 64, dtype=np.uint8)) + out[12:]
    if damage == "random bytes":
        out = bytes(rng.integers(0, 256, int(rng.integers(0, 200)), dtype=np.uint8))
    if body_cut is not None:
        out = out[:body_cut]
    return damage, out
