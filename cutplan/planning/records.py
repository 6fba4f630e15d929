"""The Plan and its parts: frozen records in SI units that every renderer formats and none
recomputes (one plan, one truth)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from cutplan.units import INCH_DENOMINATOR

if TYPE_CHECKING:  # for annotations only: these modules build on the records
    from cutplan.design.notices import Notice
    from cutplan.layout.cutlist import CutList
    from cutplan.physics.sections import Section
    from cutplan.planning.hanging import Hanging
    from cutplan.planning.shopping import Caution, ShoppingItem

__all__ = ["PARTIAL_COUNT", "HangHoleSplit", "Piece", "Arch", "SetPlan", "Plan"]

PARTIAL_COUNT = 4
"""Partials reported per piece [-]."""


@dataclass(frozen=True)
class HangHoleSplit:
    """What a chime's hang hole does to the mode it is tuned by (beam estimate; see hang_holes.py):
    the drill [m], the mode, the pitch change of bending in the hole's plane and across it
    [cents], the beat between the two [Hz], and the largest drill that keeps the beat under the
    limit [m] (0 when none does)."""

    drill: float
    mode: int
    in_plane_cents: float
    across_cents: float
    beat_hz: float
    largest_drill: float


@dataclass(frozen=True)
class Piece:
    """One piece to cut. Lengths in m, frequencies in Hz, mass in kg (SI; renderers convert)."""

    set: str
    kind: str
    label: str
    note: str
    target_hz: float
    predicted_hz: float
    length: float
    cut_length: float
    nodes: tuple[float, ...]
    mass: float | None
    partials_hz: tuple[float, ...]
    partial_notes: tuple[str, ...]
    cents_per_mm: float
    model: str
    shear_correction_cents: float
    warnings: tuple[Notice, ...] = ()
    fundamental_hz: float = 0.0
    bore: float = 0.0
    allowance_uncalibrated: float = 0.0
    allowance_calibrated: float = 0.0
    sharp_risk: float = 0.0
    arch: Arch | None = None
    stopper: tuple[tuple[float, float], ...] = ()
    strike_note_hz: float | None = None
    trim_end: str = ""
    if_sharp: str = ""
    other_modes: tuple[tuple[str, int, float], ...] = ()  # ((kind "sideways" | "twisting" | "ring", mode, hz), ...): see other_modes.py
    hang_hole: HangHoleSplit | None = None  # a chime tube's hang hole and the beat it makes

    @property
    def partial_ratios(self):
        """The planned partials as ratios to the first [-], for reading a recording of this piece."""
        return tuple(f / self.partials_hz[0] for f in self.partials_hz)

    @property
    def trim_per_10_cents(self):
        """Length to remove to raise the pitch by 10 cents [m] (from the trim rate), or None."""
        return 10.0 / self.cents_per_mm * 1e-3 if self.cents_per_mm else None

    @property
    def mark_offset(self):
        """Where the finished piece's end A sits on the rough-cut blank [m]: half the allowance
        for a bar (trimmed half from each end, so the supports stay on the nodes), 0 for pieces
        trimmed from one end.  Strips and cut lists measure from the rough-cut end with it."""
        return self.allowance / 2 if self.kind == "bar" and self.allowance > 0 else 0.0

    @property
    def supports_from_centre(self):
        """Distances of a bar's supports from its centre line [m], one per symmetric pair."""
        return tuple(sorted({round(abs(self.length / 2 - x), 9) for x in self.nodes}))

    @property
    def allowance(self):
        """The allowance this piece is cut with [m]: cut length minus finished length, the one
        number the cut list, tuning sheet, templates and JSON state (for a stoppered resonator,
        the tube beyond the column at the design temperature)."""
        return self.cut_length - self.length


@dataclass(frozen=True)
class Arch:
    """The undercut of a bar: blank thickness, centre depth [m], arch width (fraction of the
    length), shape exponent, remaining thickness at stations ((x, h) [m], end to centre) and the
    residual of each tuned ratio [cents]."""

    thickness: float
    depth: float
    arch_width: float
    exponent: float
    stations: tuple[tuple[float, float], ...]
    ratios: tuple[float, ...]
    ratio_residuals_cents: tuple[float, ...]
    outline: tuple[tuple[float, float], ...] = ()  # (x, h) [m] along the whole bar, for drawing the side profile


@dataclass(frozen=True)
class SetPlan:
    """The pieces of one set with the facts they depend on; ``section`` is the Section itself."""

    name: str
    kind: str
    material: str
    section: Section
    model: str
    pieces: tuple[Piece, ...]
    assumptions: tuple[str, ...] = ()
    allowance_rule: str = ""
    hanging: Hanging | None = None  # cutplan.planning.hanging.Hanging for a chime set
    material_class: str = ""  # "metal", "wood", "plastic", "glass", ... from the material table
    elastic_constants: tuple[tuple[str, float], ...] = ()  # ((name, value in SI), ...) the model used, e.g. ("modulus_along", 2.1e10)

    @property
    def section_text(self):
        """The section as shown to the builder, e.g. "al-1.000x0.065 tube 25.40 x 1.65 mm wall"."""
        return self.section_label("mm")

    def section_label(self, units="mm"):
        """The section's stock name and size, the chosen unit first."""
        sec = self.section
        return (sec.name + " " if sec.name else "") + sec.describe(units)

    @property
    def shape(self):
        """"tube", "rod" or "bar"."""
        return self.section.shape

    @property
    def outer(self):
        """Outside diameter of a tube or rod [m]."""
        return self.section.outer

    @property
    def width(self):
        """Width of a bar [m]."""
        return self.section.width


@dataclass(frozen=True)
class Plan:
    """Everything a renderer needs; plain data, SI units."""

    title: str
    units: str
    paper: str
    a4: float
    temperament: str
    sets: tuple[SetPlan, ...]
    design_path: str = ""
    cut_list: CutList | None = None
    inch_denominator: int = INCH_DENOMINATOR
    shopping: tuple[ShoppingItem, ...] = ()  # cutplan.planning.shopping.ShoppingItem, ...
    cautions: tuple[Caution, ...] = ()  # cutplan.planning.shopping.Caution, ...
    classroom: bool = False  # the design is for a classroom (supervision notes)
    copies: int = 1  # identical kits: the cut list and shopping list hold all of them

    @property
    def pieces(self):
        """All pieces, set by set."""
        return tuple(p for s in self.sets for p in s.pieces)
