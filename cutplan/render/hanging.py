"""How a chime set's hanging is worded and listed: the JSON ``hanging`` object and the phrases
the terminal, the cover, the shopping list and the plate template share.  Formatting only: every
number is a field of the set's ``hanging`` (cutplan.planning.hanging)."""

from __future__ import annotations

from cutplan.planning.hanging_load import KNOT_EFFICIENCY, buy_text, mass_text
from cutplan.units import INCH_DENOMINATOR, format_length

__all__ = [
    "MODE_WORDS", "hanging_dict", "height_reason", "sail_text", "weight_text", "lines_text", "plate_text",
    "hanging_lines", "clearance_text"
]

MODE_WORDS = {(1,): "the fundamental", (1, 4, 5, 6): "the fundamental and modes 4-6 (the strike note)"}


def _mm(x, nd=1):
    return None if x is None else round(float(x) * 1000, nd)


def hanging_dict(h, shown="mm", den=INCH_DENOMINATOR):
    """The set's ``hanging`` in the JSON contract (mm, g, N, m/s)."""
    sail = h.sail
    load = h.load
    return {
        "tube_outer_mm": _mm(h.tube_outer, 2),
        "plate_diameter_mm": _mm(h.plate_diameter),
        "plate_thickness_mm": _mm(h.plate_thickness),
        "hole_circle_diameter_mm": _mm(h.hole_circle_diameter),
        "hole_diameter_mm": _mm(h.hole_diameter),
        "striker_diameter_mm": _mm(h.striker_diameter),
        "striker_thickness_mm": _mm(h.striker_thickness),
        "striker_mass_g": round(h.striker_mass * 1000, 1),
        "striker_height_mm": _mm(h.striker_height),
        "striker_height_reason": height_reason(h, "mm", den),
        "strike_fractions": [round(x, 4) for x in h.strike_fractions],
        "strike_modes": list(h.strike_modes),
        "clearance_min_mm": _mm(h.clearance_min),
        "striker_clearance_mm": _mm(h.striker_clearance, 2),
        "tube_gap_min_mm": _mm(h.tube_gap_min),
        "tube_gap_mm": _mm(h.tube_gap, 2),
        "sail": {"side_mm": _mm(sail.side), "area_cm2": round(sail.area * 1e4, 1),
                 "mass_g": round(sail.mass * 1000, 1), "breeze_m_s": sail.breeze,
                 "drag_n": round(sail.drag, 4), "contact_push_n": round(sail.contact_push, 4),
                 "lightest_breeze_m_s": round(sail.lightest_breeze, 2),
                 "drag_coefficient": sail.drag_coefficient, "air_density_kg_m3": sail.air_density,
                 "too_light": sail.too_light},
        "lines": [{"role": line.role, "count": line.count, "each_mm": _mm(line.each, 0),
                   "line": line.row.what, "load_n": round(line.load, 2),
                   "breaking_n": round(line.row.breaking, 0), "knotted_n": round(line.row.breaking * KNOT_EFFICIENCY, 0),
                   "kind": line.row.kind} for line in load.lines],
        "line_total_mm": _mm(load.line_total, 0),
        "line_to_buy_mm": _mm(load.line_to_buy(shown), 0),
        "mass_g": round(load.mass * 1000, 1),
        "masses_g": {k: round(v * 1000, 1) for k, v in load.masses.__dict__.items()},
        "safety_factor": load.safety_factor,
        "safety_source": load.safety_source,
        "hook": None if load.hook is None else {"what": load.hook.what, "rated_kg": load.hook.rated,
                                                "kind": load.hook.kind},
        "hook_rating_kg": round(load.hook_rating, 2),
    }


def height_reason(h, shown="mm", den=INCH_DENOMINATOR):
    """One line: where the striker hangs and why."""
    lo, hi = min(h.strike_fractions), max(h.strike_fractions)
    modes = MODE_WORDS.get(tuple(h.strike_modes), f"modes {', '.join(map(str, h.strike_modes))}")
    return (f"striker centre {format_length(h.striker_height, shown, den)} below the tube tops: it meets every "
            f"tube at {lo * 100:.0f}-{hi * 100:.0f} % of its length, where {modes} moves at least "
            f"{h.strike_score * 100:.0f} % as much as at a free end, clear of the nodes "
            "(free-free beam mode shapes)")


def sail_text(h, shown="mm", den=INCH_DENOMINATOR):
    """One line: the sail and the breeze it is sized for."""
    s = h.sail
    head = (f"sail {format_length(s.side, shown, den)} square, 3 mm acrylic ({s.mass * 1000:.0f} g), sized so a "
            f"{s.breeze:g} m/s breeze pushes {s.drag:.3f} N (1/2 rho Cd A v^2, Cd {s.drag_coefficient:g} for a "
            f"flat plate, Hoerner 1965), {s.drag / s.contact_push:.1f} x the {s.contact_push:.3f} N that swings "
            f"the striker to the tubes; it starts to strike at about {s.lightest_breeze:.1f} m/s")
    if s.too_light:
        head += ". No sail of this sheet can swing this striker in that breeze: use a lighter striker"
    return head


def weight_text(h):
    """One line: what the set weighs, with the safety factor and the top fixing."""
    load = h.load
    hook = load.hook.what if load.hook is not None else "a fixing designed for it by a qualified person"
    return (f"whole set hangs {mass_text(load.mass)} (tubes {mass_text(load.masses.tubes)}); "
            f"top fixing rated {load.hook_rating:.0f} kg or more ({load.safety_factor:g} x the weight): {hook}")


def lines_text(h, shown="mm", den=INCH_DENOMINATOR):
    """One line: the lines to cut and what to buy."""
    load = h.load
    parts = [f"{line.count} x {format_length(line.each, shown, den)} {line.role}" for line in load.lines]
    return (f"lines: {'; '.join(parts)}; {format_length(load.line_total, shown, den)} in all with knots, "
            f"buy {buy_text(load.line_to_buy(shown), shown)}")


def plate_text(h, shown="mm", den=INCH_DENOMINATOR):
    """One line: plate, hole circle and striker sizes, and the clearances they leave."""
    gap = ("" if h.tube_gap is None
           else f", tubes {format_length(h.tube_gap, shown, den)} apart (at least {format_length(h.tube_gap_min, shown, den)})")
    return (f"plate {format_length(h.plate_diameter, shown, den)} across, holes on a "
            f"{format_length(h.hole_circle_diameter, shown, den)} circle; striker disc "
            f"{format_length(h.striker_diameter, shown, den)} x {format_length(h.striker_thickness, shown, den)} "
            f"({h.striker_mass * 1000:.0f} g), {format_length(h.striker_clearance, shown, den)} clear of the tubes "
            f"(at least {format_length(h.clearance_min, shown, den)}){gap}")


def hanging_lines(h, shown="mm", den=INCH_DENOMINATOR):
    """Every hanging phrase, in page order: plate and striker, striker height, sail, lines, weight."""
    return (plate_text(h, shown, den), height_reason(h, shown, den), sail_text(h, shown, den), lines_text(h, shown, den),
            weight_text(h))


def clearance_text(h, shown="mm", den=INCH_DENOMINATOR):
    """Short: what the dotted outlines on the plate show, with the clearances."""
    gap = "" if h.tube_gap is None else f"; tubes {format_length(h.tube_gap, shown, den)} apart"
    return (f"the striker disc ({format_length(h.striker_diameter, shown, den)}) and the tubes below it, "
            f"{format_length(h.striker_clearance, shown, den)} clear{gap}")
