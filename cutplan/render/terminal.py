"""Plan -> plain-text tables for the terminal. No physics here, only formatting."""

from __future__ import annotations

import textwrap

from cutplan.render.hanging import hanging_lines
from cutplan.render.phrases import TRIM_RULE, caution_lines, other_modes_text
from cutplan.render.stock_layout import cut_list_view, stick_lines
from cutplan.units import INCH, INCH_DENOMINATOR, MM, ZERO_CELSIUS, format_length, length_cell, length_heading

__all__ = [
    "WIDTH", "render_table", "render_stock", "LIST_WIDTH", "render_library",
    "render_library_entry"
]


WIDTH = 100
"""Widest line of a plan table [characters]; secondary columns move to a second table beyond it."""


def _wrapped(text, indent="  "):
    """Lines of free text no wider than WIDTH, broken only at spaces (never inside 12-27/32)."""
    return textwrap.wrap(text, WIDTH, initial_indent=indent, subsequent_indent=indent + "  ",
                         break_on_hyphens=False, break_long_words=False)


def _length(metres, units, denominator=INCH_DENOMINATOR):
    return length_cell(metres, units, denominator)


def _table(headers, rows, left=2):
    """Aligned columns: the first ``left`` left-aligned, the rest right-aligned."""
    widths = [max(len(str(h)), *(len(str(r[i])) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]
    line = "  ".join(str(h).ljust(w) for h, w in zip(headers, widths, strict=True))
    out = [line.rstrip(), "  ".join("-" * w for w in widths)]
    for r in rows:
        out.append("  ".join(str(c).rjust(w) if i >= left else str(c).ljust(w)
                             for i, (c, w) in enumerate(zip(r, widths, strict=True))).rstrip())
    return out


def _fitted(columns, rows, width=WIDTH):
    """One table, or when it would be wider than ``width`` two: the main columns, then the label
    with the secondary ones (``columns`` is ((heading, secondary?), ...)); numbers are never split."""
    headers = [h for h, _ in columns]
    table = _table(headers, rows)
    if max(len(line) for line in table) <= width:
        return table
    main = [i for i, (_, secondary) in enumerate(columns) if not secondary]
    extra = [0] + [i for i, (_, secondary) in enumerate(columns) if secondary]
    pick = lambda idx: ([headers[i] for i in idx], [[r[i] for i in idx] for r in rows])  # noqa: E731
    return _table(*pick(main)) + [""] + _table(*pick(extra), left=1)


def _set_rows(s, units, den=INCH_DENOMINATOR):
    unit_head = length_heading(units)
    node_head = "hang hole" if s.kind == "chime" else "support" if s.kind == "bar" else ""
    columns = [("label", False), ("note", False), ("target Hz", False), (f"length {unit_head}", False),
               (f"cut {unit_head}", False)]
    if node_head:
        columns.append((f"{node_head} {unit_head}", False))
    columns += [("c/mm", False), ("sharp", False), ("partials Hz (2-4)", True)]
    if s.kind in ("chime", "bar"):
        columns.append(("shear c", True))
    rows = []
    for p in s.pieces:
        row = [p.label, p.note, f"{p.target_hz:.2f}", _length(p.length, units, den),
               _length(p.cut_length, units, den)]
        if node_head:
            row.append(_length(p.nodes[0], units, den) if p.nodes else "")
        row += [f"{p.cents_per_mm:.2f}", f"{p.sharp_risk * 100:.0f} %",
                " ".join(f"{f:.0f}" for f in p.partials_hz[1:])]
        if s.kind in ("chime", "bar"):
            row.append(f"{p.shear_correction_cents:+.1f}")
        rows.append(row)
    return columns, rows


def render_table(plan):
    """Readable plan in the plan's units: one block per set, then the cut list."""
    units, den = plan.units, plan.inch_denominator
    out = [plan.title, "=" * len(plan.title), f"A4 = {plan.a4:g} Hz, {plan.temperament} temperament", ""]
    if getattr(plan, "copies", 1) > 1:
        out[-1:] = [f"{plan.copies} identical kits: the tables show one kit; the stock layout holds all of them", ""]
    for item in getattr(plan, "shopping", ()):
        if item.group == "cost":
            out.insert(-1, f"{item.what}: {item.cost:.2f} ({item.note})")
    for s in plan.sets:
        out.append(f"{s.name}: {len(s.pieces)} x {s.kind}, {s.material}, {s.section_label(units)}")
        for a in s.assumptions:
            out.extend(_wrapped(a))
        out.append(f"  allowance {s.allowance_rule}: {TRIM_RULE}")
        out.append("  sharp: the chance a piece comes out sharp (too short) at its cut length")
        out.extend(_fitted(*_set_rows(s, units, den)))
        for p in s.pieces:
            if getattr(p, "other_modes", ()):
                out.extend(_wrapped(f"{p.label}: other modes " + other_modes_text(p.other_modes)))
            if p.arch is not None:
                a = p.arch
                res = ", ".join(f"{r:+.2f}" for r in a.ratio_residuals_cents)
                out.extend(_wrapped(f"{p.label}: arch {format_length(a.depth, units, den)} deep at the centre (leaves "
                           f"{format_length(a.thickness - a.depth, units, den)}), over the middle {a.arch_width:.2f} of "
                           f"the length, shape {a.exponent:.2f}; ratio residuals {res} cents"))
            if p.stopper:
                lo, hi = p.stopper[0], p.stopper[-1]
                out.extend(_wrapped(f"{p.label}: cut the tube {format_length(p.cut_length, units, den)} and tune with the "
                           f"stopper: {format_length(lo[1], units, den)} from the open end at {lo[0] - ZERO_CELSIUS:.0f} C, "
                           f"{format_length(hi[1], units, den)} at {hi[0] - ZERO_CELSIUS:.0f} C"))
        for p in s.pieces:
            for w in p.warnings:
                out.extend(_wrapped(f"! {p.label}: {w.message}"))
        if getattr(s, "hanging", None) is not None:
            out.append("  hanging:")
            for line in hanging_lines(s.hanging, units, den):
                out.extend(_wrapped(line, "    "))
        out.append("")
    if plan.cut_list is not None:
        out.extend(render_stock(plan.cut_list, units, den))
        out.append("")
    out.extend(caution_lines(plan.cautions, WIDTH))
    return "\n".join(out) + "\n"


def render_stock(cut_list, units="mm", denominator=INCH_DENOMINATOR):
    """The cut list on stock: one block per stick with the marks measured from its end."""
    view = cut_list_view(cut_list, units, denominator)
    out = [view.heading(length_heading(units))]
    group = None
    for stick in view.sticks:
        if stick.group != group:
            group = stick.group
            out.append(f"  {group}:")
        out.extend(stick_lines(stick, lambda q: q.cell, "    "))
    out.append(f"  {view.summary}")
    return out


LIST_WIDTH = 100
"""Widest line of the materials listing [characters]."""


def _listed(head, text, indent=None):
    """``head`` + ``text`` in lines of at most :data:`LIST_WIDTH`, continued under the text (or ``indent``)."""
    pad = " " * (len(head) if indent is None else indent)
    if len(pad) > LIST_WIDTH // 2:
        pad = " " * 6
    return textwrap.wrap(head + text, LIST_WIDTH, subsequent_indent=pad, break_on_hyphens=False) or [head.rstrip()]


def render_library(lib):
    """Every material and stock size, one line each, with the kind of source."""
    out = ["Materials (E, density, source):"]
    for key, m in sorted(lib.materials.items()):
        src = dict(m.provenance).get("modulus")
        head = f"  {key:22} {m.modulus / 1e9:7.2f} GPa {m.density:7.0f} kg/m3  [{src.kind}] "
        out += _listed(head, m.description)
    out.append("")
    out.append("Stock sizes (outside diameter x wall):")
    for key, s in sorted(lib.stock.items()):
        sec = s.section
        out.append(f"  {key:18} {sec.outer / INCH:6.3f} x {sec.wall / INCH:5.3f} in "
                   f"({sec.outer / MM:6.2f} x {sec.wall / MM:4.2f} mm)  {s.standard}")
    return "\n".join(out) + "\n"


def render_library_entry(lib, name):
    """One material or stock size in full, with its sources; None when there is no such name."""
    if name in lib.materials:
        m = lib.materials[name]
        out = [f"{name}: {m.description}",
               f"  modulus        {m.modulus / 1e9:.3f} GPa ({m.modulus_basis}), spread {m.modulus_spread * 100:.0f} %",
               f"  density        {m.density:.0f} kg/m3, spread {m.density_spread * 100:.1f} %",
               f"  Poisson        {m.poisson:.3f}",
               f"  shear modulus  {m.shear_modulus_for('timoshenko') / 1e9:.3f} GPa (as used by the shear-corrected model)"]
        same = {}  # one line per source: properties from the same sheet share it
        for prop, prov in m.provenance:
            same.setdefault((prov.kind, prov.source, prov.where), []).append(prop)
        for (kind, source, where), props in same.items():
            cite = lib.sources.get(source, {}).get("citation", source)
            out += _listed(f"  source of {', '.join(props)}: ", f"[{kind}] {cite}; {where}", indent=4)
        return "\n".join(out) + "\n"
    if name in lib.stock:
        s = lib.stock[name]
        sec = s.section
        cite = lib.sources.get(s.provenance.source, {}).get("citation", s.provenance.source)
        out = [f"{name}: {s.description} ({s.standard})",
               f"  outside diameter {sec.outer / MM:.2f} mm ({sec.outer / INCH:.3f} in) +/- {s.outer_tolerance / MM:.3f} mm",
               f"  wall             {sec.wall / MM:.2f} mm ({sec.wall / INCH:.3f} in) +/- {s.wall_tolerance * 100:.0f} %",
               f"  bore for air     {sec.air_radius * 2 / MM:.2f} mm ({sec.air_radius * 2 / INCH:.3f} in)",
               f"  default material {s.material}",
               *_listed("  source: ", f"[{s.provenance.kind}] {cite}", indent=4)]
        return "\n".join(out) + "\n"
    return None
