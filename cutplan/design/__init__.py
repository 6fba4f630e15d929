"""Read and validate a design file (TOML, contract version 1; see DEVELOPERS.md) into SI.

Every problem is collected, not just the first: :class:`DesignErrors` carries a list of
:class:`DesignError`, each of which prints as one line::

    porch.toml: set[1].section.wall: "-1 mm" must be positive

Sets are numbered from 1 in messages, in the order they appear in the file. The work is split:
:mod:`.contract` (types and limits), :mod:`.reader` (file checks), :mod:`.sets` (one set),
:mod:`.beams` (chime/bar), :mod:`.air` (air-column/resonator), :mod:`.stocktable`,
:mod:`.targets`, :mod:`.section`, :mod:`.text` (names and titles).
"""

from __future__ import annotations

from pathlib import Path

from cutplan import pitch, units
from cutplan.design.contract import (
    DEFAULT_RESONATOR_MAX_LENGTH,
    DEFAULT_SHARP_RISK,
    DEFAULT_TEMPERATURE,
    END_TRIM_RANGE,
    KERF_RANGE,
    KINDS,
    MAX_FILE_BYTES,
    MAX_PIECES,
    MAX_PIECES_PER_SET,
    STOCK_LENGTH_RANGE,
    Collector,
    Design,
    DesignError,
    DesignErrors,
    SetSpec,
    StockLength,
    StockSpec,
    Undercut,
)
from cutplan.design.reader import read_design_file
from cutplan.design.sets import check_names, one_set
from cutplan.design.stocktable import stock_from_options, stock_table
from cutplan.design.text import unprintable
from cutplan.limits import A4_ALLOWED, A4_RANGE
from cutplan.materials import MaterialError

__all__ = [
    "DEFAULT_RESONATOR_MAX_LENGTH", "DEFAULT_SHARP_RISK", "DEFAULT_TEMPERATURE", "END_TRIM_RANGE", "KERF_RANGE",
    "KINDS", "MAX_FILE_BYTES", "MAX_PIECES", "MAX_PIECES_PER_SET", "STOCK_LENGTH_RANGE", "Design", "DesignError",
    "DesignErrors", "SetSpec", "StockLength", "StockSpec", "Undercut", "design_from_mapping", "load_design",
    "read_design_file", "stock_from_options",
]

TOP_KEYS = {"title", "units", "inch_denominator", "paper", "tuning", "set", "stock", "material_dirs", "classroom",
            "copies"}
MAX_COPIES = 100
"""Most identical kits planned at once [-] (a large class; more is a typing error)."""
TUNING_KEYS = {"a4", "temperament", "spelling"}
MAX_TITLE = 120


def load_design(path, library_loader):
    """Read, validate and convert a design file.

    ``library_loader(extra_dirs)`` returns a :class:`~cutplan.materials.Library`; it is called
    once, with the design's ``material_dirs`` resolved against the design file's folder.
    """
    return design_from_mapping(read_design_file(path), library_loader, path)


def _title(data, path, col):
    fallback = Path(str(path)).stem or "design"
    title = data.get("title", fallback)
    if not isinstance(title, str) or not title.strip() or len(title) > MAX_TITLE:
        col.add("title", title, f"must be text of 1 to {MAX_TITLE} characters")
        return fallback
    bad = unprintable(title)
    if bad:
        col.add("title", title, f"must not hold control or format characters (found {bad})")
        return fallback
    return title.strip()


def _choice(data, key, choices, col):
    value = data.get(key, choices[0])
    if value not in choices:
        col.add(key, value, "must be " + " or ".join(f'"{c}"' for c in choices))
        return choices[0]
    return value


def _inch_denominator(data, col):
    """``inch_denominator = 16``: the fraction of an inch every output rounds inches to."""
    value = data.get("inch_denominator", units.INCH_DENOMINATOR)
    if isinstance(value, bool) or value not in units.INCH_DENOMINATORS:
        allowed = ", ".join(str(d) for d in units.INCH_DENOMINATORS[:-1]) + f" or {units.INCH_DENOMINATORS[-1]}"
        col.add("inch_denominator", value, f"must be {allowed} (inches shown to the nearest 1/N)")
        return units.INCH_DENOMINATOR
    return int(value)


def _tuning(tuning, col):
    a4, temperament = pitch.A4_FREQUENCY, "equal"
    if not isinstance(tuning, dict):
        col.add("tuning", None, "must be a [tuning] table")
        return a4, temperament
    col.unknown(tuning, TUNING_KEYS, "tuning")
    if "a4" in tuning:
        value = col.ranged("tuning.a4", tuning["a4"], units.parse_frequency, *A4_RANGE, A4_ALLOWED)
        a4 = a4 if value is None else value
    if "temperament" in tuning:
        try:
            pitch.parse_temperament(tuning["temperament"])
            temperament = tuning["temperament"]
        except pitch.PitchError as exc:
            col.add("tuning.temperament", tuning["temperament"], f"must be {exc.accepted}")
    return a4, temperament


def _spelling(tuning, col):
    """How scale notes are spelled: "auto" (from the key: flats in flat keys), "sharps" or "flats"."""
    value = tuning.get("spelling", "auto") if isinstance(tuning, dict) else "auto"
    if value not in pitch.SPELLINGS:
        col.add("tuning.spelling", value, 'must be "auto" (flats in flat keys, the default), "sharps" or "flats"')
        return "auto"
    return value


def _material_dirs(value, base, col):
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) and not unprintable(v) for v in value):
        col.add("material_dirs", value, "must be a list of folder names")
        return []
    out = []
    for v in value:
        folder = (base / v).resolve()
        if not folder.is_dir():
            col.add("material_dirs", v, f"is not a folder (looked for {folder})")
        out.append(folder)
    return out


def _kits(data, col):
    """``classroom = true`` (supervision notes) and ``copies = N`` identical kits."""
    classroom = data.get("classroom", False)
    if not isinstance(classroom, bool):
        col.add("classroom", classroom, "must be true or false")
        classroom = False
    copies = data.get("copies", 1)
    if isinstance(copies, bool) or not isinstance(copies, int) or not 1 <= copies <= MAX_COPIES:
        col.add("copies", copies, f"must be a whole number of kits from 1 to {MAX_COPIES}")
        copies = 1
    return classroom, copies


def _sets(raw_sets, a4, temperament, library, col, spelling="auto"):
    sets = []
    if raw_sets is None:
        col.add("set", None, "is missing; add at least one [[set]] table")
    elif not isinstance(raw_sets, list) or not all(isinstance(s, dict) for s in raw_sets):
        col.add("set", None, "must be written as [[set]] tables")
    elif not raw_sets:
        col.add("set", None, "is empty; add at least one [[set]] table")
    else:
        for i, raw in enumerate(raw_sets, start=1):
            try:
                spec = one_set(raw, i, a4, temperament, library, col, spelling)
            except (TypeError, OverflowError, ArithmeticError, RecursionError) as exc:
                col.add(f"set[{i}]", None, f"could not be read: a value has the wrong type or size ({exc})")
                spec = None
            if spec is not None:
                sets.append(spec)
        check_names(sets, col)
        total = sum(len(s.targets) for s in sets)
        if total > MAX_PIECES:
            col.add("set", total, f"pieces in all; cutplan plans at most {MAX_PIECES} per design")
    return sets


def design_from_mapping(data, library_loader, path="(design)", base_dir=None):
    """Validate and convert a design given as a mapping with the design file's keys.

    ``path`` names the design in error lines; ``material_dirs`` are resolved against
    ``base_dir`` (default: the folder of ``path``). Returns ``(Design, Library)`` or raises
    :class:`DesignErrors`, exactly as :func:`load_design` does for a file.
    """
    if not isinstance(data, dict):
        raise DesignErrors([DesignError(path, "(design)", None, "must be a table of design keys")])
    col = Collector(path)
    col.unknown(data, TOP_KEYS, "")
    title = _title(data, path, col)
    shown_units = _choice(data, "units", ("mm", "in"), col)
    denominator = _inch_denominator(data, col)
    paper = _choice(data, "paper", ("letter", "a4"), col)
    a4, temperament = _tuning(data.get("tuning", {}), col)
    base = Path(base_dir) if base_dir is not None else Path(path).parent
    before = len(col.errors)
    dirs = _material_dirs(data.get("material_dirs", []), base, col)
    library = None
    if len(col.errors) == before:
        try:
            library = library_loader(dirs)
        except MaterialError as exc:
            col.add("material_dirs", exc.value, f"could not be read: {exc}")
    stock = stock_table(data.get("stock"), "stock", col) if "stock" in data else None
    sets = _sets(data.get("set"), a4, temperament, library, col, _spelling(data.get("tuning", {}), col))
    classroom, copies = _kits(data, col)
    if col.errors:
        raise DesignErrors(col.errors)
    return Design(
        path=str(path), title=title, units=shown_units, inch_denominator=denominator, paper=paper, a4=a4,
        temperament=temperament, sets=tuple(sets), stock=stock, material_dirs=tuple(dirs),
        classroom=classroom, copies=copies,
    ), library
