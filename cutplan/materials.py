"""Material and stock-size tables: ``materials/*.toml`` (shipped) plus any folders a user adds.

A material file holds one table per material; each property is
``{ value = "68.9 GPa", source = "<key>", where = "<table>", kind = "handbook", spread = "2 %" }``.
A stock file holds a ``[table]`` header (standard, source, shape, default material, bore rule)
and ``[sizes."<name>"]`` rows.  ``sources.toml`` maps source keys to full citations.

Nothing is read at import time; :func:`load_library` is given the folders to read.
"""

from __future__ import annotations

import functools
import math
import threading
import tomllib
from dataclasses import dataclass, field, replace
from pathlib import Path

from cutplan import units
from cutplan.folder import FileRefused, read_checked
from cutplan.limits import AIR_SPEED_RANGE, MAX_FILE_BYTES
from cutplan.physics.sections import Section, tube
from cutplan.planning.air_calibrated import AirCalibration
from cutplan.plausibility import CLASS_RANGES

__all__ = [
    "SOURCE_KINDS", "WOOD_BENDING_TO_TRUE_MODULUS", "GRAIN_KEYS", "MaterialError", "Provenance", "Material",
    "StockSize", "Library", "packaged_dir", "material_from_table", "load_library"
]

SOURCE_KINDS = (
    "handbook", "standard", "paper", "datasheet", "measured", "derived", "common practice",
    "from memory",
)

WOOD_BENDING_TO_TRUE_MODULUS = 1.10
"""Factor from a static-bending MOE (which includes shear deflection) to the true along-grain
modulus E_L [-]. USDA FPL Wood Handbook, FPL-GTR-190, 2010, Table 5-3a footnote (from memory:
"increase by about 10 %")."""

_MATERIAL_KEYS = {"description", "modulus", "density", "poisson", "shear_modulus", "shear_ratio", "class", "unusual",
                  "radial_ratio", "tangential_ratio", "shear_ratio_lt", "shear_ratio_rt", "poisson_lt", "poisson_rt",
                  "fit_residual_cents"}
GRAIN_KEYS = ("radial_ratio", "tangential_ratio", "shear_ratio_lt", "shear_ratio_rt", "poisson_lt", "poisson_rt")
"""A wood's constants across the grain, as ratios to E_L (USDA FPL Wood Handbook, FPL-GTR-190, 2010,
Table 5-1: E_R/E_L, E_T/E_L, G_LT/E_L, G_RT/E_L) and Poisson ratios (Table 5-2: nu_LT, nu_RT); the
along-grain pair is ``shear_ratio`` (G_LR/E_L) and ``poisson`` (nu_LR). See :mod:`cutplan.planning.grain`."""
_VALUE_KEYS = {"value", "source", "where", "kind", "spread", "basis"}
_STOCK_HEADER_KEYS = {"standard", "source", "where", "kind", "shape", "material", "bore", "wall_factor"}
_STOCK_KEYS = {"description", "outer", "wall", "inner", "outer_tolerance", "wall_tolerance", "material",
               "speed_of_sound", "measured_at", "end_correction", "calibration_note", "measured_frequency"}
_AIR_KEYS = ("speed_of_sound", "measured_at", "end_correction")


class MaterialError(ValueError):
    """A table could not be read: names the file, the key, the value and what is allowed."""

    def __init__(self, path, key, value, allowed):
        self.path, self.key, self.value, self.allowed = str(path), key, value, allowed
        super().__init__(f"{path}: {key}: {value!r} {allowed}")


@dataclass(frozen=True)
class Provenance:
    """Where a value comes from: a source key, the table or page, and the kind of source."""

    source: str
    where: str
    kind: str


@dataclass(frozen=True)
class Material:
    """An isotropic (or along-grain) material, SI units.

    ``modulus_basis`` is "dynamic" for values that are true elastic moduli, "static-bending"
    for wood MOE from a bending test (see :data:`WOOD_BENDING_TO_TRUE_MODULUS`).
    ``modulus_spread`` and ``density_spread`` are one standard deviation as fractions.
    """

    name: str
    modulus: float
    density: float
    poisson: float = 0.33
    description: str = ""
    shear_modulus: float | None = None
    shear_ratio: float | None = None
    modulus_basis: str = "dynamic"
    modulus_spread: float = 0.03
    density_spread: float = 0.01
    provenance: tuple[Provenance, ...] = field(default=(), compare=False)
    material_class: str | None = None
    unusual: bool = False
    fit_residual_cents: float | None = None
    radial_ratio: float | None = None
    tangential_ratio: float | None = None
    shear_ratio_lt: float | None = None
    shear_ratio_rt: float | None = None
    poisson_lt: float | None = None
    poisson_rt: float | None = None

    def modulus_for(self, model):
        """E [Pa] to use with ``model`` ("timoshenko", "elastic-2d" or "slender"); see the woods.toml
        header (only the slender model keeps a static-bending table value as it is)."""
        if self.modulus_basis == "static-bending" and model != "slender":
            return self.modulus * WOOD_BENDING_TO_TRUE_MODULUS
        return self.modulus

    def shear_modulus_for(self, model):
        """G [Pa]: tabled, or shear_ratio x E, or E / 2(1 + nu) for isotropic materials."""
        if self.shear_modulus:
            return self.shear_modulus
        e = self.modulus_for(model)
        if self.shear_ratio:
            return self.shear_ratio * e
        return e / (2 * (1 + self.poisson))

    @property
    def sound_speed(self):
        """sqrt(E / rho) [m/s], the stiffness-to-density constant that sets bar pitch."""
        return math.sqrt(self.modulus / self.density)


@dataclass(frozen=True)
class StockSize:
    """A named stock section from a published table."""

    name: str
    section: Section
    description: str
    standard: str
    material: str
    outer_tolerance: float
    wall_tolerance: float
    provenance: Provenance


@dataclass(frozen=True)
class Library:
    """Everything loaded from the material folders."""

    materials: dict[str, Material]
    stock: dict[str, Section]
    sources: dict[str, str]
    files: tuple[str, ...] = ()


@functools.cache
def shop_table(name):
    """A packaged shop table, ``materials/shop/NAME`` (e.g. ``"cautions.toml"``), as parsed TOML.

    Read once per process, on first use, so that planning reads no file per call; callers only
    read the mapping."""
    with open(packaged_dir() / "shop" / name, "rb") as fh:
        return tomllib.load(fh)


def packaged_dir():
    """The shipped tables: inside the wheel, or ``materials/`` of a source checkout."""
    here = Path(__file__).resolve().parent
    for candidate in (here / "_materials", here.parent / "materials"):
        if candidate.is_dir():
            return candidate
    raise FileNotFoundError("cutplan's material tables are missing from this installation")


_PARSED_LIMIT = 64
"""Table files whose parse :func:`load_library` keeps, most recent first [-] (the shipped folder
holds eight; a user's folders add a few)."""
_parsed_tables: dict[tuple[bytes, frozenset[str]], tuple[str, tuple]] = {}
"""What a table file's bytes gave: (bytes, the source keys it was checked against) -> what it
adds, so a file is parsed once per process while its bytes stay the same (an edited file has other
bytes and is read afresh).  Only files that loaded are kept: a broken one is parsed, and named in
its error, every time it is loaded."""
_parsed_sources: dict[bytes, dict] = {}
"""The same for ``sources.toml``: its bytes -> its parsed TOML (each load gets its own copy)."""


_parsed_lock = threading.Lock()


def _remember(memo, key, value):
    """Keep ``value`` under ``key``, forgetting the oldest entries past :data:`_PARSED_LIMIT`."""
    with _parsed_lock:
        while len(memo) >= _PARSED_LIMIT:
            del memo[next(iter(memo))]
        memo[key] = value
    return value


def _read_bytes(path):
    """A table file's bytes: a regular file of at most a design file's size (never a pipe, a device,
    a folder or a link loop), or MaterialError naming the file."""
    try:
        return read_checked(path, MAX_FILE_BYTES, "a material or stock table")
    except FileRefused as exc:
        raise MaterialError(path, "(file)", "", exc.allowed) from None


def _parse_toml(path, raw):
    """The TOML of a table file's bytes, or MaterialError naming the file."""
    try:
        return tomllib.loads(raw.decode("utf-8").removeprefix("\ufeff"))
    except tomllib.TOMLDecodeError as exc:
        raise MaterialError(path, "(file)", "", f"is not valid TOML: {exc}") from None
    except UnicodeDecodeError:
        raise MaterialError(path, "(file)", "", "is not UTF-8 text") from None
    except RecursionError:
        raise MaterialError(path, "(file)", "", "is not a table file: its brackets nest too deep") from None


def _read_sources(path):
    """``sources.toml`` as parsed TOML, the caller's own copy (parsed once while its bytes stay the same)."""
    raw = _read_bytes(path)
    parsed = _parsed_sources.get(raw)
    if parsed is None:
        parsed = _remember(_parsed_sources, raw, _parse_toml(path, raw))
    return _fresh(parsed)


def _fresh(value):
    """A copy of parsed TOML that shares no table or list with ``value`` (its other values are immutable)."""
    if isinstance(value, dict):
        return {k: _fresh(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_fresh(v) for v in value]
    return value


def _value(path, key, entry, parse, sources, spread_default=None):
    """Parse one property entry: a table with value/source/where/kind[/spread], or a bare value."""
    if isinstance(entry, dict):
        unknown = set(entry) - _VALUE_KEYS
        if unknown:
            raise MaterialError(path, f"{key}.{sorted(unknown)[0]}", "", f"is not a known key; use {sorted(_VALUE_KEYS)}")
        if "value" not in entry:
            raise MaterialError(path, f"{key}.value", "", "is missing")
        raw = entry["value"]
        kind = entry.get("kind", "from memory")
        if kind not in SOURCE_KINDS:
            raise MaterialError(path, f"{key}.kind", kind, f"must be one of {', '.join(SOURCE_KINDS)}")
        source = entry.get("source", "")
        if sources is not None and source and source not in sources:
            raise MaterialError(path, f"{key}.source", source, "is not a key in sources.toml")
        prov = Provenance(source, entry.get("where", ""), kind)
        spread = spread_default
        if "spread" in entry:
            try:
                spread = units.parse_percent(entry["spread"])
            except units.UnitError as exc:
                raise MaterialError(path, f"{key}.spread", entry["spread"], exc.accepted) from None
    else:
        raw, prov, spread = entry, Provenance("", "", "from memory"), spread_default
    try:
        value = parse(raw)
    except units.UnitError as exc:
        raise MaterialError(path, f"{key}.value", raw, f"is not {exc.accepted}") from None
    if not value > 0:
        raise MaterialError(path, f"{key}.value", raw, "must be positive")
    return value, prov, spread, entry.get("basis") if isinstance(entry, dict) else None


def _plain_number(value):
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise units.UnitError(repr(value), "a plain number")
    return float(value)


def material_from_table(name, table, path="(inline)", sources=None):
    """Build a Material from one TOML table (a file entry or an inline design value)."""
    unknown = set(table) - _MATERIAL_KEYS
    if unknown:
        key = sorted(unknown)[0]
        raise MaterialError(path, f"{name}.{key}", table[key], f"is not a known key; use {', '.join(sorted(_MATERIAL_KEYS))}")
    for required in ("modulus", "density"):
        if required not in table:
            raise MaterialError(path, f"{name}.{required}", "", "is missing")
    modulus, p_mod, s_mod, basis = _value(path, f"{name}.modulus", table["modulus"], units.parse_modulus, sources, 0.03)
    density, p_den, s_den, _ = _value(path, f"{name}.density", table["density"], units.parse_density, sources, 0.01)
    poisson, p_nu = 0.33, Provenance("", "default 0.33", "from memory")
    if "poisson" in table:
        poisson, p_nu, _, _ = _value(path, f"{name}.poisson", table["poisson"], _plain_number, sources)
        if not -1.0 < poisson < 0.5:
            raise MaterialError(path, f"{name}.poisson", poisson, "must be between 0 and 0.5")
    shear, shear_ratio, provs = None, None, [("modulus", p_mod), ("density", p_den), ("poisson", p_nu)]
    if "shear_modulus" in table:
        shear, p_g, _, _ = _value(path, f"{name}.shear_modulus", table["shear_modulus"], units.parse_modulus, sources)
        if not 0.001 * modulus <= shear <= modulus:  # G = E / 2(1 + nu) <= E; G/E about 0.1 for wood
            raise MaterialError(path, f"{name}.shear_modulus", table["shear_modulus"],
                                "must be between 1/1000 of the modulus and the modulus itself")
        provs.append(("shear_modulus", p_g))
    if "shear_ratio" in table:
        shear_ratio, p_r, _, _ = _value(path, f"{name}.shear_ratio", table["shear_ratio"], _plain_number, sources)
        if not 0.001 <= shear_ratio <= 1.0:  # G / E: 1/3 to 1/2 for isotropic solids, about 0.1 for wood
            raise MaterialError(path, f"{name}.shear_ratio", table["shear_ratio"],
                                "must be a ratio G / E from 0.001 to 1 (about 0.38 for metals, 0.1 for wood)")
        provs.append(("shear_ratio", p_r))
    across = {}
    for key in GRAIN_KEYS:
        if key in table:
            across[key], p_k, _, _ = _value(path, f"{name}.{key}", table[key], _plain_number, sources)
            provs.append((key, p_k))
            if key.startswith("poisson") and not across[key] < 1.0:
                raise MaterialError(path, f"{name}.{key}", across[key], "must be between 0 and 1")
    basis = basis or "dynamic"
    if basis not in ("dynamic", "static-bending"):
        raise MaterialError(path, f"{name}.modulus.basis", basis, "must be dynamic or static-bending")
    material_class, unusual = _class_of(path, name, table)
    residual = table.get("fit_residual_cents")
    if residual is not None and (isinstance(residual, bool) or not isinstance(residual, (int, float)) or residual < 0):
        raise MaterialError(path, f"{name}.fit_residual_cents", residual,
                            "must be a number of cents, 0 or more (the largest miss of a calibration's fit)")
    return Material(
        material_class=material_class, unusual=unusual,
        fit_residual_cents=None if residual is None else float(residual),
        name=name, modulus=modulus, density=density, poisson=poisson,
        description=str(table.get("description", "")), shear_modulus=shear, shear_ratio=shear_ratio,
        modulus_basis=basis, modulus_spread=s_mod, density_spread=s_den, provenance=tuple(provs), **across,
    )


def _class_of(path, name, table):
    """(class, unusual) of a material table: ``class = "metal"`` etc. (see cutplan.plausibility),
    ``unusual = true`` when values outside the class's plausible range are meant."""
    cls = table.get("class")
    if cls is not None and cls not in CLASS_RANGES:
        raise MaterialError(path, f"{name}.class", cls, f"must be one of {', '.join(CLASS_RANGES)}")
    unusual = table.get("unusual", False)
    if not isinstance(unusual, bool):
        raise MaterialError(path, f"{name}.unusual", unusual, "must be true or false")
    return cls, unusual


def _stock_file(path, data, sources, stock):
    header = data.get("table", {})
    if not isinstance(header, dict):
        raise MaterialError(path, "table", header, "must be a table ([table]) of the file's common keys")
    unknown = set(header) - _STOCK_HEADER_KEYS
    if unknown:
        raise MaterialError(path, f"table.{sorted(unknown)[0]}", "", f"is not a known key; use {sorted(_STOCK_HEADER_KEYS)}")
    if header.get("shape", "tube") != "tube":
        raise MaterialError(path, "table.shape", header.get("shape"), "must be tube (bars are given by width and thickness)")
    source = header.get("source", "")
    if sources is not None and source and source not in sources:
        raise MaterialError(path, "table.source", source, "is not a key in sources.toml")
    prov = Provenance(source, header.get("where", ""), header.get("kind", "standard"))
    wall_factor = header.get("wall_factor", 1.0)
    if isinstance(wall_factor, bool) or not isinstance(wall_factor, (int, float)) or not 1.0 <= wall_factor <= 1.5:
        raise MaterialError(path, "table.wall_factor", wall_factor, "must be a number from 1.0 to 1.5 (the real "
                            "wall over the minimum wall)")
    sizes = data.get("sizes", {})
    if not isinstance(sizes, dict) or not sizes:
        raise MaterialError(path, "sizes", "", "must hold at least one [sizes.\"name\"] table")
    for name, row in sizes.items():
        if not isinstance(row, dict):
            raise MaterialError(path, f"sizes.{name}", row, "must be a table of outer, wall and the like")
        unknown = set(row) - _STOCK_KEYS
        if unknown:
            raise MaterialError(path, f"sizes.{name}.{sorted(unknown)[0]}", "", f"is not a known key; use {sorted(_STOCK_KEYS)}")
        try:
            outer = units.parse_length(row["outer"])
            wall = units.parse_length(row["wall"])
            outer_tol = units.parse_length(row.get("outer_tolerance", "0 mm"))
            wall_tol = units.parse_percent(row.get("wall_tolerance", "10 %"))
        except KeyError as exc:
            raise MaterialError(path, f"sizes.{name}.{exc.args[0]}", "", "is missing") from None
        except units.UnitError as exc:
            raise MaterialError(path, f"sizes.{name}", exc.text, f"is not {exc.accepted}") from None
        if not (outer > 0 and 0 < wall < outer / 2):
            raise MaterialError(path, f"sizes.{name}.wall", row["wall"], "must be positive and under half the outside diameter")
        bore = outer - 2 * wall * wall_factor
        if "inner" in row:
            try:
                bore = units.parse_length(row["inner"])
            except units.UnitError as exc:
                raise MaterialError(path, f"sizes.{name}.inner", exc.text, f"is not {exc.accepted}") from None
            if not 0 < bore < outer:
                raise MaterialError(path, f"sizes.{name}.inner", row["inner"], "must be positive and less than "
                                    "the outside diameter")
        section = tube(outer, wall, name=name, bore=bore)
        if any(k in row for k in _AIR_KEYS):
            section = replace(section, air_calibration=_air_calibration(path, name, row))
        stock[name] = StockSize(
            name=name, section=section,
            description=str(row.get("description", name)), standard=str(header.get("standard", "")),
            material=str(row.get("material", header.get("material", ""))),
            outer_tolerance=outer_tol, wall_tolerance=abs(wall_tol), provenance=prov,
        )


def _parse_speed(text):
    """Speed of sound "344.1 m/s" (or a bare number of m/s) [m/s]."""
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        return float(text)
    value = str(text).strip().removesuffix("m/s").strip()
    try:
        return float(value)
    except ValueError:
        raise units.UnitError(str(text), 'a speed such as "344.1 m/s"') from None


def _air_calibration(path, name, row):
    """The measured speed of sound and end correction of a stock size (all three keys together)."""
    missing = [k for k in _AIR_KEYS if k not in row]
    if missing:
        raise MaterialError(path, f"sizes.{name}.{missing[0]}", "", "is missing; a calibrated size gives "
                            + ", ".join(_AIR_KEYS))
    parsers = {"speed_of_sound": _parse_speed, "measured_at": units.parse_temperature,
               "end_correction": units.parse_length}
    values = {}
    for key, parse in parsers.items():
        try:
            values[key] = parse(row[key])
        except units.UnitError as exc:
            raise MaterialError(path, f"sizes.{name}.{key}", row[key], f"is not {exc.accepted}") from None
    if not AIR_SPEED_RANGE[0] <= values["speed_of_sound"] <= AIR_SPEED_RANGE[1]:
        raise MaterialError(path, f"sizes.{name}.speed_of_sound", row["speed_of_sound"],
                            f"must be between {AIR_SPEED_RANGE[0]:g} and {AIR_SPEED_RANGE[1]:g} m/s "
                            "(the speed of sound in air)")
    if not 0.0 <= values["end_correction"] < 0.5:
        raise MaterialError(path, f"sizes.{name}.end_correction", row["end_correction"],
                            "must be from 0 to 500 mm per open end")
    frequency = 0.0
    if "measured_frequency" in row:
        try:
            frequency = units.parse_frequency(row["measured_frequency"])
        except units.UnitError as exc:
            raise MaterialError(path, f"sizes.{name}.measured_frequency", row["measured_frequency"],
                                f"is not {exc.accepted}") from None
    return AirCalibration(values["speed_of_sound"], values["measured_at"], values["end_correction"],
                          str(row.get("calibration_note", "")), frequency)


def load_library(extra_dirs=(), include_packaged=True):
    """Read the shipped tables and any user folders; later folders override earlier names."""
    dirs = ([packaged_dir()] if include_packaged else []) + [Path(d) for d in extra_dirs]
    sources, materials, stock, files = {}, {}, {}, []
    for folder in dirs:
        if not folder.is_dir():
            raise MaterialError(folder, "(folder)", str(folder), "is not a folder of .toml tables")
        src = folder / "sources.toml"
        if src.is_file():
            sources.update(_read_sources(src))
    known = frozenset(sources)
    for folder in dirs:
        for path in sorted(folder.glob("*.toml")):
            if path.name == "sources.toml":
                continue
            files.append(path)
            try:
                _read_table_file(path, sources, known, materials, stock)
            except MaterialError:
                raise
            except (TypeError, ValueError, AttributeError, KeyError, OverflowError) as exc:
                detail = " ".join(str(exc).split())[:160]
                raise MaterialError(path, "(file)", "", f"is not a material or stock table as cutplan reads "
                                    f"them ({type(exc).__name__}: {detail})") from None
    return Library(materials=materials, stock=stock, sources=sources, files=tuple(files))


def _read_table_file(path, sources, known, materials, stock):
    """Add one table file's materials or stock sizes (``known``: the source keys, frozen)."""
    raw = _read_bytes(path)
    kind, rows = _parsed_tables.get((raw, known)) or _remember(_parsed_tables, (raw, known),
                                                                _parse_table_file(path, raw, sources))
    (stock if kind == "stock" else materials).update(rows)


def _parse_table_file(path, raw, sources):
    """("stock" or "materials", ((name, StockSize or Material), ...)) of one table file's bytes.
    The rows are frozen, so every load may share them."""
    data = _parse_toml(path, raw)
    rows = {}
    if "sizes" in data or "table" in data:
        _stock_file(path, data, sources, rows)
        return "stock", tuple(rows.items())
    for name, table in data.items():
        if not isinstance(table, dict):
            raise MaterialError(path, name, table, "must be a table of properties")
        rows[name] = material_from_table(name, table, path, sources)
    return "materials", tuple(rows.items())

