"""The cut list on stock as one structured source for every front end (terminal, CSV, PDF, page).

:func:`cut_list_view` turns a plan's :class:`~cutplan.layout.cutlist.CutList` into rows of
:class:`~cutplan.units.LengthParts` and the few sentences that go with them, worded once here:
whether the layout is proven optimal, where marks are measured from, the fewest sticks any layout
can use, the utilisation and the cost.  Each front end lays the rows out in its own medium and
takes the sentences as they are.  Formatting only: every number is a field of the cut list.
"""

from __future__ import annotations

from dataclasses import dataclass

from cutplan.layout.cutlist import STATUS_WORDS
from cutplan.units import INCH_DENOMINATOR, LengthParts, length_parts

__all__ = ["MARKS_FROM", "CutRow", "CutListView", "StickRow", "cut_list_view", "stick_lines", "stick_rows"]

MARKS_FROM = "marks measured from the stick's factory end"
"""Where every mark on a stick is measured from."""


@dataclass(frozen=True)
class CutRow:
    """One cut on a stick: its number on the stick, the piece's label, where it starts and ends
    and how long it is (from the stick's factory end)."""

    number: int
    label: str
    start: LengthParts
    end: LengthParts
    length: LengthParts


@dataclass(frozen=True)
class StickRow:
    """One stick: its number in the whole layout, its group, its length, its cuts and the offcut."""

    number: int
    group: str
    length: LengthParts
    cuts: tuple[CutRow, ...]
    offcut: LengthParts


@dataclass(frozen=True)
class CutListView:
    """The cut list as every front end shows it."""

    sticks: tuple[StickRow, ...]
    proven_optimal: bool
    lower_bound: int
    by_length: tuple[tuple[int, LengthParts], ...]
    utilisation_percent: float
    cost: float | None
    cost_lower_bound: float | None

    @property
    def status(self):
        """"proven optimal" or "best found, not proven optimal"."""
        return STATUS_WORDS[self.proven_optimal]

    def heading(self, after=""):
        """"Cut list on stock (proven optimal; marks measured from the stick's factory end)";
        ``after`` is added inside the brackets (the terminal's "in (mm)")."""
        return f"Cut list on stock ({self.status}; {MARKS_FROM}{', ' + after if after else ''})"

    @property
    def sticks_text(self):
        """"2 x 96 in (2438.4 mm), 1 x 72 in (1828.8 mm)"."""
        return ", ".join(f"{n} x {length}" for n, length in self.by_length)

    @property
    def utilisation_text(self):
        return f"{self.utilisation_percent:.1f} %"

    @property
    def cost_text(self):
        """The cost, and when the layout is not proven optimal the least any layout can cost ("" unpriced)."""
        if self.cost is None:
            return ""
        text = f"{self.cost:.2f}"
        if not self.proven_optimal and self.cost_lower_bound is not None:
            text += f" (no layout costs less than {self.cost_lower_bound:.2f})"
        return text

    @property
    def summary(self):
        """"sticks: 2 x 96 in (2438.4 mm); fewest possible 2; utilisation 81.3 %; cost 29.00"."""
        cost = self.cost_text
        return (f"sticks: {self.sticks_text}; fewest possible {self.lower_bound}; "
                f"utilisation {self.utilisation_text}" + (f"; cost {cost}" if cost else ""))


def stick_rows(sticks, units="mm", denominator=INCH_DENOMINATOR):
    """:class:`StickRow` per stick, numbered from 1; ``sticks`` are (stock length [m], ((label,
    start [m], length [m]), ...), offcut [m], group) as the cut list and the from-stock search
    hold them."""

    def q(metres):
        return length_parts(metres, units, denominator)

    return tuple(
        StickRow(i, group, q(stock_length),
                 tuple(CutRow(k, label, q(start), q(start + size), q(size))
                       for k, (label, start, size) in enumerate(cuts, start=1)),
                 q(offcut))
        for i, (stock_length, cuts, offcut, group) in enumerate(sticks, start=1))


def stick_lines(row, show=str, indent="", width=22):
    """One stick as text lines: the stick, each cut from where to where (and its length), the
    offcut; ``show`` turns a length's parts into text (``str`` for both units, or the table cell)."""
    out = [f"{indent}stick {row.number}, {show(row.length)}:"]
    for c in row.cuts:
        out.append(f"{indent}  {c.label:<12} from {show(c.start):>{width}} to {show(c.end):>{width}}  "
                   f"({show(c.length)})")
    out.append(f"{indent}  offcut {show(row.offcut)}")
    return out


def cut_list_view(cut_list, units="mm", denominator=INCH_DENOMINATOR):
    """The :class:`CutListView` of a cut list, lengths in ``units`` first, inches to 1/``denominator``."""
    sticks = stick_rows(((s.stock_length, ((c.label, c.start, c.length) for c in s.cuts), s.offcut, s.group)
                         for s in cut_list.sticks), units, denominator)
    return CutListView(sticks, bool(cut_list.proven_optimal), cut_list.lower_bound,
                       tuple((n, length_parts(length, units, denominator)) for length, n in cut_list.sticks_by_length),
                       100 * cut_list.utilisation, cut_list.cost, cut_list.cost_lower_bound)
