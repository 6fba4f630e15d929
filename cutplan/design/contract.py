"""The design contract in SI: frozen types, limits, and the one-line error types.

:class:`DesignError` is a bad input value (file, key path, value, what is allowed);
:class:`cutplan.units.UnitError` is text that does not parse as a quantity. Validators turn the
second into the first, so a caller only ever sees DesignErrors.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from cutplan import pitch, units
from cutplan.design.notices import INVALID, Notice
from cutplan.design.text import shown
from cutplan.limits import MAX_FILE_BYTES
from cutplan.physics.sections import Section
from cutplan.units import INCH_DENOMINATOR

if TYPE_CHECKING:  # for annotations only: both modules import this one
    from cutplan.design.hanging import HangingSpec
    from cutplan.materials import Material

__all__ = [
    "KINDS", "MAX_PIECES_PER_SET", "MAX_PIECES", "MAX_FILE_BYTES", "DEFAULT_TEMPERATURE",
    "DEFAULT_SHARP_RISK", "DEFAULT_RESONATOR_MAX_LENGTH", "STOCK_LENGTH_RANGE", "KERF_RANGE",
    "END_TRIM_RANGE", "MAX_STOCK_COUNT", "DesignError", "DesignErrors", "show", "StockLength", "StockSpec",
    "Undercut", "SetSpec", "Design", "is_number", "Collector"
]

KINDS = ("chime", "bar", "air-column", "resonator")
MAX_PIECES_PER_SET = 128
"""Largest set cutplan plans [-] (a 10-octave chromatic set is 120; more is a typing error)."""
MAX_PIECES = 400
"""Largest design [-]."""
DEFAULT_TEMPERATURE = units.ROOM_TEMPERATURE
"""Air temperature assumed when a design gives none [K] (20 C, the usual reference)."""
DEFAULT_SHARP_RISK = 0.05
"""Chance of a piece coming out sharp that the default cut allowance accepts [-]."""
DEFAULT_RESONATOR_MAX_LENGTH = 1.2
"""Longest resonator accepted without a warning [m] (common practice for a floor-standing frame)."""

STOCK_LENGTH_RANGE = (0.01, 25.0)
"""Stock stick lengths accepted [m] (common practice: sticks are sold up to 24 ft / 6 m; 25 m
leaves room for coil stock and still stops a unit slip such as "1e9 m")."""
KERF_RANGE = (0.0, 0.01)
"""Saw kerf accepted [m]: 0 to 10 mm (common practice: hand and band saws 0.5-3 mm)."""
END_TRIM_RANGE = (0.0, 0.1)
"""Squaring cut at a stick's factory end accepted [m]: 0 to 100 mm (common practice)."""
MAX_STOCK_COUNT = 1000
"""Most sticks of one length on hand [-]."""


class DesignError(ValueError):
    """One bad input value: file, key path, bad value, what is allowed. Prints as one line."""

    def __init__(self, path, key, value, allowed, code=INVALID):
        self.path, self.key, self.value, self.allowed, self.code = str(path), key, value, allowed, code
        text = "" if value is None else f"{show(value)} "
        head = f"{self.path}: " if self.path else ""
        super().__init__(shown(f"{head}{key}: {text}{allowed}"))

    def record(self):
        """This error as a :class:`~cutplan.design.notices.Notice`: code, key and the line
        without the file's name (as the page shows it beside the field)."""
        head = f"{self.path}: " if self.path else ""
        line = str(self)
        return Notice(self.code, self.key, line[len(head):] if line.startswith(head) else line)


class DesignErrors(ValueError):
    """All the problems found in one design file."""

    def __init__(self, errors):
        self.errors = list(errors)
        super().__init__("\n".join(str(e) for e in self.errors))


def show(value):
    """A value as an error line quotes it: short, with control characters escaped."""
    if isinstance(value, str):
        text = f'"{value}"'
    elif isinstance(value, int) and not isinstance(value, bool) and abs(value) > 10**30:
        text = f"a {len(str(abs(value)))}-digit number"
    else:
        try:
            text = repr(value)
        except (ValueError, RecursionError):
            text = f"a {type(value).__name__}"
    text = shown(text)
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

    lengths: tuple[StockLength, ...] = ()
    kerf: float = 1.6e-3
    end_trim: float = 0.0
    allowance: float = 0.0
    allowance_length: float = 0.0
    allowance_risk: float | None = DEFAULT_SHARP_RISK


@dataclass(frozen=True)
class Undercut:
    """An arched bar set's tuning: overtone ratios to mode 1, arch width (fraction of the
    length) and the thinnest the centre may be left [m]."""

    ratios: tuple[float, ...]
    arch_width: float = 0.5
    min_thickness: float = 0.004


@dataclass(frozen=True)
class SetSpec:
    """One [[set]] of a design, validated and in SI."""

    index: int
    name: str
    kind: str
    targets: tuple[pitch.Target, ...]
    section: Section
    material: Material | None = None
    model: str = "timoshenko"
    target_mode: str = "fundamental"
    ends: str = "open-open"
    end_correction: str | float = "unflanged"
    temperature: float = DEFAULT_TEMPERATURE
    humidity: float | None = None
    serves: str = ""
    max_length: float = DEFAULT_RESONATOR_MAX_LENGTH
    stock: StockSpec | None = None
    outer_tolerance: float = 0.0
    wall_tolerance: float = 0.0
    undercut: Undercut | None = None
    temperature_range: tuple[float, float] | None = None
    hanging: HangingSpec | None = None  # cutplan.design.hanging.HangingSpec, or None for the defaults
    grain: str = "unknown"  # a bar's sawing: "flat", "quarter" or "unknown" (cutplan.planning.grain)
    mode_clearance: float | None = None  # window for flagging other modes near a tuned partial [cents]
    pitch_key: str = ""  # the key the pitches were given by: "notes", "scale", "range", ... ("" for resonators)


@dataclass(frozen=True)
class Design:
    """A validated design: everything the planner needs, SI units."""

    path: str
    title: str
    units: str = "mm"
    inch_denominator: int = INCH_DENOMINATOR  # inches shown to the nearest 1/N (8, 16, 32 or 64)
    paper: str = "letter"
    a4: float = pitch.A4_FREQUENCY
    temperament: str = "equal"
    sets: tuple[SetSpec, ...] = ()
    stock: StockSpec | None = None
    material_dirs: tuple[str, ...] = field(default=())
    classroom: bool = False  # a design for a classroom: supervision notes in the cautions
    copies: int = 1  # identical kits planned together


def is_number(value):
    """True for an int or float (not a bool)."""
    return isinstance(value, (int, float)) and not isinstance(value, bool)


class Collector:
    """Gathers DesignErrors while validation goes on."""

    def __init__(self, path):
        self.path = path
        self.errors = []

    def add(self, key, value, allowed, code=INVALID):
        self.errors.append(DesignError(self.path, key, value, allowed, code))

    def unknown(self, table, allowed, prefix):
        for key in table:
            if key not in allowed:
                where = f"{prefix}.{key}" if prefix else key
                self.add(where, None, f"is not a known key; use one of: {', '.join(sorted(allowed))}")

    def parse(self, key, value, parser, positive=True):
        """``parser(value)``, or None after noting why it cannot be used."""
        try:
            result = parser(value)
        except units.UnitError as exc:
            self.add(key, value, f"is not {exc.accepted}")
            return None
        if positive and not result > 0:
            self.add(key, value, "must be positive")
            return None
        return result

    def ranged(self, key, value, parser, low, high, allowed):
        """``parser(value)`` when it lies in [low, high], else None after noting ``allowed``."""
        result = self.parse(key, value, parser, positive=False)
        if result is not None and not low <= result <= high:
            self.add(key, value, allowed)
            return None
        return result

    def text(self, key, value, default):
        """A string value, or ``default`` after noting that text was expected."""
        if isinstance(value, str):
            return value
        self.add(key, value, "must be text in quotes")
        return default
