"""Lay a plan's pieces on the stock on hand: the plan's cut list, in SI.

Pieces are grouped by data: the material id, the section (its stock id and sizes) and the stock
table (the design's, or a set's own ``[set.stock]``), never by display text; a group is named
in the design's units for the builder.  Each group is laid out by the pure optimiser in
:mod:`cutplan.layout.optimiser`.
The cut lengths are the pieces' own ``cut_length`` floats, so every renderer formats the same
number the plan table shows.
"""

from __future__ import annotations

from dataclasses import dataclass

from cutplan.layout import optimiser

STATUS_WORDS = {True: "proven optimal", False: "best found, not proven optimal"}
"""How every output words whether a layout is proven optimal."""

__all__ = ["Cut", "PlacedStick", "CutGroup", "CutList", "stock_groups", "lay_out"]



@dataclass(frozen=True)
class Cut:
    """One cut on a stick: the piece's label, start from the stick's factory end [m], length [m]."""

    label: str
    start: float
    length: float


@dataclass(frozen=True)
class PlacedStick:
    """A stick of stock with its cuts in order from the factory end, and what is left [m]."""

    stock_length: float
    cuts: tuple[Cut, ...]
    offcut: float
    group: str = ""
    price: float | None = None


@dataclass(frozen=True)
class CutGroup:
    """The layout of one group of pieces that share a section and a stock table."""

    group: str
    sticks: tuple[PlacedStick, ...]
    lower_bound: int
    proven_optimal: bool
    method: str
    cost: float | None = None
    kerf: float = 0.0
    end_trim: float = 0.0
    cost_lower_bound: float | None = None
    """Least any layout of the group can cost (priced stock), so the gap of a layout not proven
    optimal is stated."""
    material: str = ""
    """The material id every piece of the group is cut from (the shopping list names it)."""
    sets: tuple = ()
    """Names of the sets whose pieces the group holds."""


@dataclass(frozen=True)
class CutList:
    """Every stick of every group; totals over the groups."""

    groups: tuple[CutGroup, ...]

    def __str__(self):
        """The layout in a few lines (mm), for a quick look from Python."""
        lines = []
        for g in self.groups:
            lines.append(f"{g.group}: {len(g.sticks)} stick(s), {STATUS_WORDS[g.proven_optimal]}")
            for i, s in enumerate(g.sticks, start=1):
                cuts = ", ".join(f"{c.label} {c.length * 1000:.1f} at {c.start * 1000:.1f}" for c in s.cuts)
                lines.append(f"  stick {i} ({s.stock_length * 1000:.1f} mm): {cuts}; offcut {s.offcut * 1000:.1f}")
        return "\n".join(lines)

    @property
    def sticks(self):
        """All sticks, group by group."""
        return tuple(s for g in self.groups for s in g.sticks)

    @property
    def lower_bound(self):
        """Fewest sticks any layout can use [-] (sum of the groups' bounds)."""
        return sum(g.lower_bound for g in self.groups)

    @property
    def proven_optimal(self):
        """Whether every group's layout is proven optimal."""
        return all(g.proven_optimal for g in self.groups)

    @property
    def cost(self):
        """Total price of the sticks, or None when any group has no prices."""
        costs = [g.cost for g in self.groups]
        return None if any(c is None for c in costs) else float(sum(costs))

    @property
    def cost_lower_bound(self):
        """Least any layout can cost in total, or None when any group has no prices or no bound."""
        bounds = [g.cost_lower_bound for g in self.groups]
        return None if any(b is None for b in bounds) else float(sum(bounds))

    @property
    def utilisation(self):
        """Fraction of the stock length that ends up in pieces [-]."""
        total = sum(s.stock_length for s in self.sticks)
        used = sum(c.length for s in self.sticks for c in s.cuts)
        return used / total if total else 0.0

    @property
    def sticks_by_length(self):
        """((stock length [m], count), ...) in order of length."""
        counts = {}
        for s in self.sticks:
            counts[s.stock_length] = counts.get(s.stock_length, 0) + 1
        return tuple(sorted(counts.items()))


def section_key(section):
    """The data a cut-list group is keyed on for a section: its stock id, shape and sizes [m]."""
    return (section.name, section.shape, section.outer, section.inner, section.width, section.thickness)


def stock_groups(sets, specs, design_stock, override=None, units="mm"):
    """{group name: (StockSpec, [pieces], material, (set names))} for the sets whose stock lists
    lengths.  Sets share a group when they share the material, the section and the stock table;
    the name is the section in ``units``, with the material or the owning set added only where
    two groups would read the same."""
    groups = {}
    labels = {}
    for s in sets:
        spec = specs[s.name]
        stock = override or spec.stock or design_stock
        if stock is None or not stock.lengths:
            continue
        own = spec.stock is not None and override is None
        key = (s.material, section_key(s.section), s.name if own else "")
        labels.setdefault(key, s.section_label(units))
        entry = groups.setdefault(key, (stock, [], []))
        entry[1].extend(s.pieces)
        entry[2].append(s.name)
    out = {}
    for key, (stock, pieces, names) in groups.items():
        material, _, owner = key
        same = [k for k in groups if labels[k] == labels[key]]
        extra = []
        if len({k[0] for k in same}) > 1:
            extra.append(material)
        if len({k[2] for k in same}) > 1:
            extra.append(owner or "shared stock")
        name = labels[key] + (f" ({', '.join(extra)})" if extra else "")
        out[name] = (stock, pieces, material, tuple(names))
    return out


def lay_out(sets, specs, design_stock, override=None, time_limit=optimiser.DEFAULT_TIME_LIMIT, units="mm"):
    """The CutList of planned sets, or None when no set has stock lengths.

    Raises :class:`cutplan.layout.optimiser.StockError` naming the group when stock runs out.
    """
    groups = stock_groups(sets, specs, design_stock, override, units)
    if not groups:
        return None
    out = []
    for name, (stock, pieces, material, names) in groups.items():
        items = [optimiser.Item(p.label, p.cut_length) for p in pieces]
        types = [optimiser.StockType(x.length, x.count, x.price) for x in stock.lengths]
        try:
            result = optimiser.layout(items, types, stock.kerf, stock.end_trim, time_limit)
        except optimiser.StockError as exc:
            raise optimiser.StockError(f"{name}: {exc}") from None
        sticks = tuple(
            PlacedStick(s.stock_length, tuple(Cut(lab, start, length) for lab, start, length in s.cuts),
                        s.offcut, name, s.price)
            for s in result.sticks)
        out.append(CutGroup(name, sticks, result.lower_bound, bool(result.proven_optimal), result.method,
                            result.cost, stock.kerf, stock.end_trim, result.cost_lower_bound, material, names))
    return CutList(tuple(out))
