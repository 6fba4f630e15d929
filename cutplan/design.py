"""Read and validate a design file (TOML, contract version 1 in shared/DESIGN.md) into SI.

Every problem is collected, not just the first: :class:`DesignErrors` carries a list of
:class:`DesignError`, each of which prints as one line::

    porch.toml: set[1].section.wall: "-1 mm" must be positive

Sets are numbered from 1 in messages, in the order they appear in the file.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from cutplan import pitch, units
from cutplan.materials import MaterialError, material_from_table
from cutplan.sections import Section, bar, rod, tube

KINDS = ("chime", "bar", "air-column", "resonator")
MAX_PIECES_PER_SET = 128
"""Largest set cutplan plans [-] (a 10-octave chromatic set is 120; more is a typing error)."""
MAX_PIECES = 400
"""Largest design [-]."""
MAX_FILE_BYTES = 1_000_000
"""Largest design file read [bytes]; a design is a few kB."""
DEFAULT_TEMPERATURE = 293.15
"""Air temperature assumed when a design gives none [K] (20 C, the usual reference)."""
DEFAULT_SHARP_RISK = 0.05
"""Chance of a piece coming out sharp that the default cut allowance accepts [-] (issue 6)."""
DEFAULT_RESONATOR_MAX_LENGTH = 1.2
"""Longest resonator accepted without a warning [m] (common practice for a floor-standing frame)."""

_TOP_KEYS = {"title", "units", "paper", "tuning", "set", "stock", "material_dirs"}
_TUNING_KEYS = {"a4", "temperament"}
_SET_KEYS = {
    "name", "kind", "notes", "scale", "root", "count", "frequencies", "cents", "ratios", "range",
    "material", "section", "model", "target", "ends", "end_correction", "temperature",
    "humidity", "serves", "max_length", "stock", "undercut", "temperature_range",
}
_UNDERCUT_KEYS = {"ratios", "arch_width", "min_thickness"}
_SECTION_KEYS = {"shape", "outer", "wall", "inner", "diameter", "width", "thickness", "stock"}
_STOCK_KEYS = {"lengths", "kerf", "end_trim", "allowance"}


class DesignError(ValueError):
    """One problem in a design file: file, key path, bad value, what is allowed."""

    def __init__(self, path, key, value, allowed):
        self.path, self.key, self.value, self.allowed = str(path), key, value, allowed
        shown = "" if value is None else f"{_show(value)} "
        super().__init__(f"{self.path}: {key}: {shown}{allowed}")


class DesignErrors(ValueError):
    """All the problems found in one design file."""

    def __init__(self, errors):
        self.errors = list(errors)
        super().__init__("\n".join(str(e) for e in self.errors))


def _show(value):
    text = f'"{value}"' if isinstance(value, str) else repr(value)
    return text if len(text) <= 60 else text[:57] + '..."'


@dataclass(frozen=True)
class StockLength:
    """Stock of one length on hand: length [m], count (None: as many as needed), price."""

    length: float
    count: int | None = None
    price: float | None = None


@dataclass(frozen=True)
class StockSpec:
    """The design's [stock] table in SI.

    The rough-cut allowance is one of: ``allowance_risk`` (the chance a piece comes out sharp,
    from the material and stock spreads; the default, 5 %), ``allowance`` (a fraction of the
    length) or ``allowance_length`` (a fixed length added to each piece [m]).
    """

    lengths: tuple = ()
    kerf: float = 1.6e-3
    end_trim: float = 0.0
    allowance: float = 0.0
    allowance_length: float = 0.0
    allowance_risk: float | None = DEFAULT_SHARP_RISK


@dataclass(frozen=True)
class Undercut:
    """An arched bar set's tuning: overtone ratios to mode 1, arch width (fraction of the
    length) and the thinnest the centre may be left [m]."""

    ratios: tuple
    arch_width: float = 0.5
    min_thickness: float = 0.004


@dataclass(frozen=True)
class SetSpec:
    """One [[set]] of a design, validated and in SI."""

    index: int
    name: str
    kind: str
    targets: tuple
    section: Section | None
    material: object = None
    model: str = "timoshenko"
    target_mode: str = "fundamental"
    ends: str = "open-open"
    end_correction: object = "unflanged"
    temperature: float = DEFAULT_TEMPERATURE
    humidity: float | None = None
    serves: str = ""
    max_length: float = DEFAULT_RESONATOR_MAX_LENGTH
    stock: StockSpec | None = None
    outer_tolerance: float = 0.0
    wall_tolerance: float = 0.0
    undercut: Undercut | None = None
    temperature_range: tuple | None = None


@dataclass(frozen=True)
class Design:
    """A validated design: everything the planner needs, SI units."""

    path: str
    title: str
    units: str = "mm"
    paper: str = "letter"
    a4: float = pitch.A4_FREQUENCY
    temperament: str = "equal"
    sets: tuple = ()
    stock: StockSpec | None = None
    material_dirs: tuple = field(default=())


class _Collector:
    """Gathers DesignErrors while validation goes on."""

    def __init__(self, path):
        self.path = path
        self.errors = []

    def add(self, key, value, allowed):
        self.errors.append(DesignError(self.path, key, value, allowed))

    def unknown(self, table, allowed, prefix):
        for key in table:
            if key not in allowed:
                where = f"{prefix}.{key}" if prefix else key
                self.add(where, None, f"is not a known key; use one of: {', '.join(sorted(allowed))}")

    def parse(self, key, value, parser, positive=True):
        try:
            result = parser(value)
        except units.UnitError as exc:
            self.add(key, value, f"is not {exc.accepted}")
            return None
        if positive and not result > 0:
            self.add(key, value, "must be positive")
            return None
        return result


def read_design_file(path):
    """Raw TOML of a design file, or DesignErrors with one line that says what is wrong."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise DesignErrors([DesignError(path, "(file)", None, "does not exist")]) from None
    except IsADirectoryError:
        raise DesignErrors([DesignError(path, "(file)", None, "is a folder, not a design file")]) from None
    except OSError as exc:
        raise DesignErrors([DesignError(path, "(file)", None, f"cannot be read ({exc.strerror})")]) from None
    if len(raw) > MAX_FILE_BYTES:
        raise DesignErrors([DesignError(path, "(file)", None, f"is over {MAX_FILE_BYTES} bytes; a design is a few kB")])
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise DesignErrors([DesignError(path, "(file)", None, "is not UTF-8 text (is it a design file?)")]) from None
    if not text.strip():
        raise DesignErrors([DesignError(path, "(file)", None, "is empty; `cutplan new chime` writes a starter design")])
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise DesignErrors([DesignError(path, "(file)", None, f"is not valid TOML ({exc})")]) from None


def load_design(path, library_loader):
    """Read, validate and convert a design file.

    ``library_loader(extra_dirs)`` returns a :class:`~cutplan.materials.Library`; it is called
    once, with the design's ``material_dirs`` resolved against the design file's folder.
    """
    return design_from_mapping(read_design_file(path), library_loader, path)


def design_from_mapping(data, library_loader, path="(design)", base_dir=None):
    """Validate and convert a design given as a mapping with the design file's keys.

    ``path`` names the design in error lines; ``material_dirs`` are resolved against
    ``base_dir`` (default: the folder of ``path``). Returns ``(Design, Library)`` or raises
    :class:`DesignErrors`, exactly as :func:`load_design` does for a file.
    """
    if not isinstance(data, dict):
        raise DesignErrors([DesignError(path, "(design)", None, "must be a table of design keys")])
    col = _Collector(path)
    col.unknown(data, _TOP_KEYS, "")
    title = data.get("title", Path(str(path)).stem)
    if not isinstance(title, str) or not title.strip() or len(title) > 120:
        col.add("title", title, "must be text of 1 to 120 characters")
        title = Path(str(path)).stem
    shown_units = data.get("units", "mm")
    if shown_units not in ("mm", "in"):
        col.add("units", shown_units, 'must be "mm" or "in"')
        shown_units = "mm"
    paper = data.get("paper", "letter")
    if paper not in ("letter", "a4"):
        col.add("paper", paper, 'must be "letter" or "a4"')
        paper = "letter"

    a4, temperament = _tuning(data.get("tuning", {}), col)
    base = Path(base_dir) if base_dir is not None else Path(path).parent
    dirs = _material_dirs(data.get("material_dirs", []), base, col)
    library = None
    if not col.errors:
        try:
            library = library_loader(dirs)
        except MaterialError as exc:
            col.add("material_dirs", exc.value, f"could not be read: {exc}")
    stock = _stock(data.get("stock"), "stock", col) if "stock" in data else None

    raw_sets = data.get("set")
    sets = []
    if raw_sets is None:
        col.add("set", None, "is missing; add at least one [[set]] table")
    elif not isinstance(raw_sets, list) or not all(isinstance(s, dict) for s in raw_sets):
        col.add("set", None, "must be written as [[set]] tables")
    elif not raw_sets:
        col.add("set", None, "is empty; add at least one [[set]] table")
    else:
        for i, raw in enumerate(raw_sets, start=1):
            spec = _set(raw, i, a4, temperament, library, col)
            if spec is not None:
                sets.append(spec)
        _check_names(sets, col)
        total = sum(len(s.targets) for s in sets)
        if total > MAX_PIECES:
            col.add("set", total, f"pieces in all; cutplan plans at most {MAX_PIECES} per design")
    if col.errors:
        raise DesignErrors(col.errors)
    return Design(
        path=str(path), title=title.strip(), units=shown_units, paper=paper, a4=a4,
        temperament=temperament, sets=tuple(sets), stock=stock, material_dirs=tuple(dirs),
    ), library


def _tuning(tuning, col):
    a4, temperament = pitch.A4_FREQUENCY, "equal"
    if not isinstance(tuning, dict):
        col.add("tuning", None, "must be a [tuning] table")
        return a4, temperament
    col.unknown(tuning, _TUNING_KEYS, "tuning")
    if "a4" in tuning:
        value = col.parse("tuning.a4", tuning["a4"], units.parse_frequency)
        if value is not None and not 400 <= value <= 480:
            col.add("tuning.a4", tuning["a4"], "must be between 400 and 480 Hz")
        elif value is not None:
            a4 = value
    if "temperament" in tuning:
        try:
            pitch.parse_temperament(tuning["temperament"])
            temperament = tuning["temperament"]
        except pitch.PitchError as exc:
            col.add("tuning.temperament", tuning["temperament"], f"must be {exc.accepted}")
    return a4, temperament


def _material_dirs(value, base, col):
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        col.add("material_dirs", value, "must be a list of folder names")
        return []
    out = []
    for v in value:
        folder = (base / v).resolve()
        if not folder.is_dir():
            col.add("material_dirs", v, f"is not a folder (looked for {folder})")
        out.append(folder)
    return out


def _stock(raw, prefix, col):
    if not isinstance(raw, dict):
        col.add(prefix, None, "must be a table with lengths, kerf, end_trim, allowance")
        return None
    col.unknown(raw, _STOCK_KEYS, prefix)
    lengths = []
    items = raw.get("lengths", [])
    if not isinstance(items, list):
        col.add(f"{prefix}.lengths", None, 'must be a list such as [{ length = "8 ft", count = 2 }]')
        items = []
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
        length = col.parse(f"{key}.length", item["length"], units.parse_length)
        count = item.get("count")
        if count is not None and (isinstance(count, bool) or not isinstance(count, int) or not 0 < count <= 1000):
            col.add(f"{key}.count", count, "must be a whole number from 1 to 1000 (leave it out for unlimited)")
            count = None
        price = item.get("price")
        if price is not None and (isinstance(price, bool) or not isinstance(price, (int, float)) or price < 0):
            col.add(f"{key}.price", price, "must be a number of money units per stick, 0 or more")
            price = None
        if length is not None:
            lengths.append(StockLength(length, count, None if price is None else float(price)))
    kerf = col.parse(f"{prefix}.kerf", raw.get("kerf", "1.6 mm"), units.parse_length, positive=False)
    if kerf is not None and not 0 <= kerf <= 0.01:
        col.add(f"{prefix}.kerf", raw.get("kerf"), "must be between 0 and 10 mm")
    end_trim = col.parse(f"{prefix}.end_trim", raw.get("end_trim", "0 mm"), units.parse_length, positive=False)
    if end_trim is not None and not 0 <= end_trim <= 0.1:
        col.add(f"{prefix}.end_trim", raw.get("end_trim"), "must be between 0 and 100 mm")
    allowance, allowance_length, risk = 0.0, 0.0, DEFAULT_SHARP_RISK
    if "allowance" in raw:
        value = raw["allowance"]
        forms = 'must be "risk 5 %" (chance of coming out sharp), a percentage such as "0.5 %" or a length up to 100 mm'
        text = value.strip().lower() if isinstance(value, str) else ""
        if text.startswith("risk"):
            frac = col.parse(f"{prefix}.allowance", text[4:].strip(), units.parse_percent, positive=False)
            if frac is not None and not 0.001 <= frac <= 0.5:
                col.add(f"{prefix}.allowance", value, "risk must be between 0.1 % and 50 %")
            elif frac is not None:
                risk = frac
        elif text.endswith("%"):
            frac = col.parse(f"{prefix}.allowance", value, units.parse_percent, positive=False)
            if frac is not None and not 0 <= frac <= 0.1:
                col.add(f"{prefix}.allowance", value, "must be between 0 % and 10 %")
            elif frac is not None:
                allowance, risk = frac, None
        else:
            try:
                extra = units.parse_length(value)
            except units.UnitError:
                col.add(f"{prefix}.allowance", value, forms)
                extra = None
            if extra is not None and not 0 <= extra <= 0.1:
                col.add(f"{prefix}.allowance", value, forms)
            elif extra is not None:
                allowance_length, risk = extra, None
    return StockSpec(tuple(lengths), kerf or 0.0, end_trim or 0.0, allowance, allowance_length, risk)


def _targets(raw, key, a4, temperament, col):
    """Targets from notes / scale+root+count / range / frequencies / cents+root / ratios+root."""
    given = [k for k in ("notes", "scale", "range", "frequencies", "cents", "ratios") if k in raw]
    if "range" in raw and "scale" in raw:
        given.remove("scale")  # with a range, scale only filters the notes
    if len(given) != 1:
        col.add(key, None, "needs exactly one of: notes, scale (with root and count), range, "
                "frequencies, cents (with root), ratios (with root)")
        return []
    how = given[0]
    value = raw[how]
    try:
        if how == "notes":
            if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
                col.add(f"{key}.notes", value, 'must be a list of note names such as ["D5", "E5"]')
                return []
            if not value:
                col.add(f"{key}.notes", value, "is empty; give at least one note")
                return []
            if len(value) > MAX_PIECES_PER_SET:
                col.add(f"{key}.notes", f"{len(value)} notes", f"is too many; at most {MAX_PIECES_PER_SET} per set")
                return []
            return pitch.note_targets(value, raw.get("root"), temperament, a4)
        if how == "scale":
            root, count = raw.get("root"), raw.get("count")
            if root is None:
                col.add(f"{key}.root", None, 'is missing; a scale needs a root such as "D5"')
                return []
            if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= MAX_PIECES_PER_SET:
                col.add(f"{key}.count", count, f"must be a whole number from 1 to {MAX_PIECES_PER_SET}")
                return []
            return pitch.scale_targets(root, value, count, temperament, a4)
        if how == "range":
            if not isinstance(value, str) or ".." not in value:
                col.add(f"{key}.range", value, 'must be LOW..HIGH such as "C4..C6"')
                return []
            low, _, high = value.partition("..")
            out = pitch.range_targets(low.strip(), high.strip(), raw.get("scale", "chromatic"), temperament, a4)
            if len(out) > MAX_PIECES_PER_SET:
                col.add(f"{key}.range", value, f"has {len(out)} notes; at most {MAX_PIECES_PER_SET} per set")
                return []
            return out
        if not isinstance(value, list) or not value:
            col.add(f"{key}.{how}", value, "must be a non-empty list")
            return []
        if len(value) > MAX_PIECES_PER_SET:
            col.add(f"{key}.{how}", f"{len(value)} values", f"is too many; at most {MAX_PIECES_PER_SET} per set")
            return []
        if how == "frequencies":
            out = []
            for j, v in enumerate(value, start=1):
                f = col.parse(f"{key}.frequencies[{j}]", v, units.parse_frequency)
                if f is not None:
                    name, off = pitch.nearest_note(f, a4)
                    out.append(pitch.Target(f"{name}{off:+.0f}c" if abs(off) >= 0.5 else name, f))
            return out
        root = raw.get("root")
        if root is None:
            col.add(f"{key}.root", None, f"is missing; {how} are measured from a root note")
            return []
        base = pitch.note_frequency(root, a4)
        out = []
        for j, v in enumerate(value, start=1):
            if how == "cents":
                if isinstance(v, bool) or not isinstance(v, (int, float)) or not -4800 <= v <= 9600:
                    col.add(f"{key}.cents[{j}]", v, "must be a number of cents from -4800 to 9600")
                    continue
                f = base * 2 ** (v / 1200)
            else:
                f = base * pitch.parse_ratio(v)
            name, off = pitch.nearest_note(f, a4)
            out.append(pitch.Target(f"{name}{off:+.0f}c" if abs(off) >= 0.5 else name, f))
        return out
    except pitch.PitchError as exc:
        col.add(f"{key}.{how}" if how != "scale" else f"{key}.scale", exc.text, f"is not {exc.accepted}")
        return []


def _section(raw, key, kind, library, col):
    """A Section from {shape=...} or {stock=...}; air columns may override the bore with inner."""
    if not isinstance(raw, dict):
        col.add(key, raw, 'must be a table such as { shape = "tube", outer = "1 in", wall = "0.065 in" }')
        return None, ""
    col.unknown(raw, _SECTION_KEYS, key)
    if "stock" in raw:
        name = raw["stock"]
        if library is None:
            return None, ""
        if not isinstance(name, str) or name not in library.stock:
            col.add(f"{key}.stock", name, f"is not a stock size; `cutplan materials` lists them (e.g. {', '.join(list(library.stock)[:3])})")
            return None, ""
        item = library.stock[name]
        section = item.section
        if "inner" in raw:
            inner = col.parse(f"{key}.inner", raw["inner"], units.parse_length)
            if inner is not None and not inner < section.outer:
                col.add(f"{key}.inner", raw["inner"], "must be smaller than the outside diameter")
            elif inner is not None:
                section = Section("tube", outer=section.outer, inner=section.inner, name=name, bore=inner)
        return section, (item.material, item.outer_tolerance, item.wall_tolerance)
    shape = raw.get("shape")
    if shape not in ("tube", "rod", "bar"):
        col.add(f"{key}.shape", shape, 'must be "tube", "rod" or "bar" (or give stock = "<size>")')
        return None, ""
    if kind in ("air-column", "resonator") and shape != "tube":
        col.add(f"{key}.shape", shape, f"must be tube for a {kind} set")
        return None, ""
    if kind == "bar" and shape != "bar":
        col.add(f"{key}.shape", shape, 'must be "bar" for a bar set (use kind = "chime" for tubes and rods)')
        return None, ""
    if kind == "chime" and shape == "bar":
        col.add(f"{key}.shape", shape, 'must be "tube" or "rod" for a chime set (use kind = "bar" for bars)')
        return None, ""
    need = {"tube": ("outer",), "rod": ("diameter",), "bar": ("width", "thickness")}[shape]
    values = {}
    for k in need:
        if k not in raw:
            col.add(f"{key}.{k}", None, f"is missing; a {shape} needs {', '.join(need)}")
            return None, ""
        values[k] = col.parse(f"{key}.{k}", raw[k], units.parse_length)
    if any(v is None for v in values.values()):
        return None, ""
    for k, v in values.items():
        if v > 0.5:
            col.add(f"{key}.{k}", raw[k], "is over 500 mm; check the unit")
            return None, ""
    if shape == "rod":
        return rod(values["diameter"]), ""
    if shape == "bar":
        if values["thickness"] > values["width"] * 3:
            col.add(f"{key}.thickness", raw["thickness"], "is over three times the width; a bar is struck on its face")
            return None, ""
        return bar(values["width"], values["thickness"]), ""
    outer = values["outer"]
    if ("wall" in raw) == ("inner" in raw):
        col.add(key, None, "a tube needs exactly one of wall or inner")
        return None, ""
    if "wall" in raw:
        wall = col.parse(f"{key}.wall", raw["wall"], units.parse_length)
        if wall is None:
            return None, ""
        if wall >= outer / 2:
            col.add(f"{key}.wall", raw["wall"], f"must be less than the radius ({outer / 2 * 1000:.2f} mm)")
            return None, ""
        return tube(outer, wall), ""
    inner = col.parse(f"{key}.inner", raw["inner"], units.parse_length)
    if inner is None:
        return None, ""
    if inner >= outer:
        col.add(f"{key}.inner", raw["inner"], "must be smaller than the outside diameter")
        return None, ""
    return tube(outer, (outer - inner) / 2), ""


def _material(raw, key, default_name, library, col):
    value = raw.get("material", default_name or None)
    if value is None:
        col.add(key, None, "is missing; name one from `cutplan materials` or give { modulus, density }")
        return None
    if isinstance(value, dict):
        try:
            return material_from_table("inline", value, col.path)
        except MaterialError as exc:
            inner = exc.key.replace("inline.", "").replace("inline", "")
            col.add(f"{key}.{inner}" if inner else key, exc.value, exc.allowed)
            return None
    if library is None:
        return None
    if not isinstance(value, str) or value not in library.materials:
        names = ", ".join(sorted(library.materials)[:6])
        col.add(key, value, f"is not a known material; `cutplan materials` lists them ({names}, ...)")
        return None
    return library.materials[value]


def _set(raw, index, a4, temperament, library, col):
    key = f"set[{index}]"
    col.unknown(raw, _SET_KEYS, key)
    kind = raw.get("kind")
    if kind not in KINDS:
        col.add(f"{key}.kind", kind, f"must be one of: {', '.join(KINDS)}")
        return None
    name = raw.get("name", f"{kind}s" if index == 1 else f"set{index}")
    if not isinstance(name, str) or not name.strip() or len(name) > 40 or any(c in name for c in '/\\<>:"|?*'):
        col.add(f"{key}.name", name, "must be 1 to 40 characters, without / \\ < > : \" | ? *")
        name = f"set{index}"
    name = name.strip()
    if "section" not in raw:
        col.add(f"{key}.section", None, 'is missing; e.g. { shape = "tube", outer = "1 in", wall = "0.065 in" }')
        section, stock_material = None, ""
    else:
        section, stock_material = _section(raw["section"], f"{key}.section", kind, library, col)
    tolerances = {}
    if isinstance(stock_material, tuple):
        stock_material, tolerances["outer_tolerance"], tolerances["wall_tolerance"] = stock_material

    fields = {}
    if kind in ("chime", "bar"):
        fields["material"] = _material(raw, f"{key}.material", stock_material, library, col)
        model = raw.get("model", "timoshenko")
        if model not in ("timoshenko", "slender"):
            col.add(f"{key}.model", model, 'must be "timoshenko" (default) or "slender"')
        fields["model"] = model
        target = raw.get("target", "fundamental")
        if target not in ("fundamental", "strike-note"):
            col.add(f"{key}.target", target, 'must be "fundamental" (default) or "strike-note"')
        fields["target_mode"] = target
        for k in ("ends", "end_correction", "temperature", "humidity", "serves", "max_length", "temperature_range"):
            if k in raw:
                col.add(f"{key}.{k}", None, f"applies to air-column and resonator sets, not {kind}")
        if "undercut" in raw:
            if kind != "bar":
                col.add(f"{key}.undercut", None, "applies to bar sets only")
            else:
                fields["undercut"] = _undercut(raw["undercut"], f"{key}.undercut", section, col)
                if fields["undercut"] is not None and target != "fundamental":
                    col.add(f"{key}.target", target, "must be fundamental for an undercut bar set")
    else:
        for k in ("model", "target"):
            if k in raw:
                col.add(f"{key}.{k}", None, f"applies to chime and bar sets, not {kind}")
        if "material" in raw:
            material = _material(raw, f"{key}.material", None, library, col)
        elif stock_material and library is not None and stock_material in library.materials:
            material = library.materials[stock_material]
        else:
            material = None
        fields["material"] = material
        ends = raw.get("ends", "open-open" if kind == "air-column" else "closed-open")
        if kind == "resonator" and ends != "closed-open":
            col.add(f"{key}.ends", ends, 'must be "closed-open" for a resonator')
        elif ends not in ("open-open", "closed-open"):
            col.add(f"{key}.ends", ends, 'must be "open-open" or "closed-open"')
        fields["ends"] = ends
        corr = raw.get("end_correction", "unflanged")
        if isinstance(corr, bool) or not (corr in ("unflanged", "flanged", "none") or (isinstance(corr, (int, float)) and 0 <= corr <= 1.5)):
            col.add(f"{key}.end_correction", corr, 'must be "unflanged", "flanged", "none" or a factor of the inner radius from 0 to 1.5')
        fields["end_correction"] = corr
        if "temperature" in raw:
            t = col.parse(f"{key}.temperature", raw["temperature"], units.parse_temperature)
            if t is not None and not 253.15 <= t <= 323.15:
                col.add(f"{key}.temperature", raw["temperature"], "must be between -20 C and 50 C")
            elif t is not None:
                fields["temperature"] = t
        if "humidity" in raw:
            h = raw["humidity"]
            if isinstance(h, str) and h.strip().endswith("%"):
                h = float(h.strip().rstrip("%"))
            if isinstance(h, bool) or not isinstance(h, (int, float)) or not 0 <= h <= 100:
                col.add(f"{key}.humidity", raw["humidity"], "must be a relative humidity from 0 to 100 (percent)")
            else:
                fields["humidity"] = float(h)
        if "max_length" in raw:
            m = col.parse(f"{key}.max_length", raw["max_length"], units.parse_length)
            if m is not None:
                fields["max_length"] = m
        if "undercut" in raw:
            col.add(f"{key}.undercut", None, "applies to bar sets only")
        if "temperature_range" in raw:
            value = raw["temperature_range"]
            allowed = 'must be two temperatures from -20 C to 50 C, such as ["10 C", "30 C"]'
            if not isinstance(value, list) or len(value) != 2:
                col.add(f"{key}.temperature_range", value, allowed)
            else:
                temps = [col.parse(f"{key}.temperature_range[{j}]", v, units.parse_temperature)
                         for j, v in enumerate(value, start=1)]
                if all(t is not None for t in temps):
                    lo, hi = sorted(temps)
                    if not (253.15 <= lo and hi <= 323.15 and hi - lo >= 1.0):
                        col.add(f"{key}.temperature_range", value, allowed + ", at least 1 C apart")
                    else:
                        fields["temperature_range"] = (lo, hi)
    if kind == "resonator":
        serves = raw.get("serves")
        if not isinstance(serves, str) or not serves:
            col.add(f"{key}.serves", serves, "must name the set whose pieces these resonators sit under")
        fields["serves"] = serves or ""
        for k in ("notes", "scale", "range", "frequencies", "cents", "ratios"):
            if k in raw:
                col.add(f"{key}.{k}", None, "is not used: a resonator takes its pitches from the set it serves")
        targets = []
    else:
        if "serves" in raw and kind != "resonator":
            col.add(f"{key}.serves", None, "applies to resonator sets only")
        targets = _targets(raw, key, a4, temperament, col)
    if "stock" in raw:
        fields["stock"] = _stock(raw["stock"], f"{key}.stock", col)
    if section is None:
        return None
    return SetSpec(index=index, name=name, kind=kind, targets=tuple(targets), section=section, **fields, **tolerances)


def _undercut(raw, key, section, col):
    """Undercut from { ratios = [4.0] or [4.0, 10.0], arch_width = 0.5, min_thickness = "4 mm" }."""
    if not isinstance(raw, dict):
        col.add(key, raw, 'must be a table such as { ratios = [4.0], arch_width = 0.5, min_thickness = "4 mm" }')
        return None
    col.unknown(raw, _UNDERCUT_KEYS, key)
    ratios = raw.get("ratios", [4.0])
    ok = (isinstance(ratios, list) and 1 <= len(ratios) <= 2
          and all(isinstance(r, (int, float)) and not isinstance(r, bool) for r in ratios))
    if ok:
        ok = 2.0 <= ratios[0] <= 6.0 and (len(ratios) == 1 or ratios[0] * 1.5 <= ratios[1] <= 20.0)
    if not ok:
        col.add(f"{key}.ratios", ratios, "must be [mode-2 ratio] from 2 to 6 (4.0 marimba, 3.0 xylophone), "
                "optionally with a mode-3 ratio such as [4.0, 10.0]")
        return None
    width = raw.get("arch_width", 0.5)
    if isinstance(width, bool) or not isinstance(width, (int, float)) or not 0.2 <= width <= 0.9:
        col.add(f"{key}.arch_width", width, "must be a fraction of the length from 0.2 to 0.9")
        return None
    min_t = col.parse(f"{key}.min_thickness", raw.get("min_thickness", "4 mm"), units.parse_length)
    if min_t is None:
        return None
    if section is not None and min_t >= section.thickness:
        col.add(f"{key}.min_thickness", raw.get("min_thickness"), "must be less than the bar thickness")
        return None
    return Undercut(tuple(float(r) for r in ratios), float(width), min_t)


def _check_names(sets, col):
    seen = {}
    for s in sets:
        if s.name in seen:
            col.add(f"set[{s.index}].name", s.name, f"is used by set[{seen[s.name]}] too; names must differ")
        seen[s.name] = s.index
    by_name = {s.name: s for s in sets}
    for s in sets:
        if s.kind == "resonator" and s.serves:
            served = by_name.get(s.serves)
            if served is None:
                col.add(f"set[{s.index}].serves", s.serves, f"is not the name of a set ({', '.join(by_name)})")
            elif served.kind not in ("bar", "chime"):
                col.add(f"set[{s.index}].serves", s.serves, "must name a bar or chime set")
