"""Plan -> plain-text tables for the terminal. No physics here, only formatting."""

from __future__ import annotations

from cutplan.units import INCH, MM, format_inches

SAFETY_LINE = (
    "Safety: wear eye and hearing protection when cutting and striking; deburr cut tube; never "
    "heat or burn PVC and vacuum its dust; hang anything overhead from rated hardware with a "
    "safety factor, as local codes require."
)


def _length(metres, units):
    mm = f"{metres / MM:.1f}"
    inch = format_inches(metres, 32, show_error=False).replace(" in", "")
    return (f"{inch} in ({mm})" if units == "in" else f"{mm} ({inch} in)")


def _table(headers, rows):
    widths = [max(len(str(h)), *(len(str(r[i])) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]
    line = "  ".join(str(h).ljust(w) for h, w in zip(headers, widths, strict=True))
    out = [line, "  ".join("-" * w for w in widths)]
    for r in rows:
        out.append("  ".join(str(c).rjust(w) if i >= 2 else str(c).ljust(w)
                             for i, (c, w) in enumerate(zip(r, widths, strict=True))))
    return out


def render_table(plan, units=None):
    """Readable plan: one block per set, lengths in mm and fractional inches."""
    units = units or plan.units
    unit_head = "in (mm)" if units == "in" else "mm (in)"
    out = [plan.title, "=" * len(plan.title), f"A4 = {plan.a4:g} Hz, {plan.temperament} temperament", ""]
    for s in plan.sets:
        out.append(f"{s.name}: {len(s.pieces)} x {s.kind}, {s.material}, {s.section_text}")
        for a in s.assumptions:
            out.append(f"  {a}")
        node_head = "hang hole from top" if s.kind == "chime" else "supports from end" if s.kind == "bar" else ""
        headers = ["label", "note", "target Hz", f"length {unit_head}", f"cut {unit_head}"]
        if node_head:
            headers.append(f"{node_head} {unit_head}")
        headers += ["c/mm", "partials Hz (2-4)", "shear c"]
        rows = []
        for p in s.pieces:
            row = [p.label, p.note, f"{p.target_hz:.2f}", _length(p.length, units), _length(p.cut_length, units)]
            if node_head:
                row.append(_length(p.nodes[0], units) if p.nodes else "")
            row += [f"{p.cents_per_mm:.2f}", " ".join(f"{f:.0f}" for f in p.partials_hz[1:]),
                    f"{p.shear_correction_cents:+.1f}" if s.kind in ("chime", "bar") else "-"]
            rows.append(row)
        out.extend(_table(headers, rows))
        for p in s.pieces:
            if getattr(p, "other_modes", ()):
                out.append(f"  {p.label}: other modes " + other_modes_text(p.other_modes))
            if p.arch is not None:
                a = p.arch
                res = ", ".join(f"{r:+.2f}" for r in a.ratio_residuals_cents)
                out.append(f"  {p.label}: arch {a.depth / MM:.1f} mm deep at the centre (leaves "
                           f"{(a.thickness - a.depth) / MM:.1f} mm), over the middle {a.arch_width:.2f} of the "
                           f"length, shape {a.exponent:.2f}; ratio residuals {res} cents")
            if p.stopper:
                lo, hi = p.stopper[0], p.stopper[-1]
                out.append(f"  {p.label}: stopper at {_length(lo[1], units)} from the open end at "
                           f"{lo[0] - 273.15:.0f} C, {_length(hi[1], units)} at {hi[0] - 273.15:.0f} C")
        for p in s.pieces:
            for w in p.warnings:
                out.append(f"  ! {p.label}: {w}")
        out.append("")
    if plan.cut_list is not None:
        out.extend(render_stock(plan.cut_list, units))
        out.append("")
    out.append(SAFETY_LINE)
    return "\n".join(out) + "\n"


def other_modes_text(modes):
    """"sideways 1510, 4030 Hz; twisting 2210, 4420 Hz": the modes a piece is not tuned by, in short."""
    parts = []
    for kind in ("sideways", "twisting"):
        freqs = [f for k, _, f in modes if k == kind]
        if freqs:
            parts.append(f"{kind} " + ", ".join(f"{f:.0f}" for f in freqs) + " Hz")
    return "; ".join(parts)


def render_stock(cut_list, units="mm"):
    """The cut list on stock: one block per stick with the marks measured from its end."""
    status = "proven optimal" if cut_list.proven_optimal else "best found, not proven optimal"
    out = [f"Cut list on stock ({status}; marks measured from the stick's factory end)"]
    group = None
    for i, stick in enumerate(cut_list.sticks, start=1):
        if stick.group != group:
            group = stick.group
            out.append(f"  {group}:")
        out.append(f"    stick {i}, {_length(stick.stock_length, units)}:")
        for c in stick.cuts:
            out.append(f"      {c.label:<12} from {_length(c.start, units):>22} "
                       f"to {_length(c.start + c.length, units):>22}  ({_length(c.length, units)})")
        out.append(f"      offcut {_length(stick.offcut, units)}")
    by_length = ", ".join(f"{n} x {_length(length, units)}" for length, n in cut_list.sticks_by_length)
    out.append(f"  sticks: {by_length}; lower bound {cut_list.lower_bound}; "
               f"utilisation {100 * cut_list.utilisation:.1f} %"
               + (f"; cost {cut_list.cost:.2f}" if cut_list.cost is not None else ""))
    return out


def render_library(lib):
    """Every material and stock size, one line each, with the kind of source."""
    out = ["Materials (E, density, source):"]
    for key, m in sorted(lib.materials.items()):
        src = dict(m.provenance).get("modulus")
        out.append(f"  {key:22} {m.modulus / 1e9:7.2f} GPa {m.density:7.0f} kg/m3  [{src.kind}] {m.description}")
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
        for prop, prov in m.provenance:
            cite = lib.sources.get(prov.source, {}).get("citation", prov.source)
            out.append(f"  source of {prop}: [{prov.kind}] {cite}; {prov.where}")
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
               f"  source: [{s.provenance.kind}] {cite}"]
        return "\n".join(out) + "\n"
    return None
