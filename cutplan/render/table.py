"""Plan -> JSON (contract ``cutplan-plan/1``, described in DEVELOPERS.md) and CSV text. No physics here."""

from __future__ import annotations

import csv
import io
import json

from cutplan.render.hanging import hanging_dict
from cutplan.render.stock_layout import cut_list_view
from cutplan.units import INCH_DENOMINATOR, MM, ZERO_CELSIUS, length_parts

__all__ = [
    "PLAN_FORMAT", "piece_dict", "plan_dict", "cut_list_dict", "csv_cell", "render_json", "CSV_COLUMNS",
    "render_csv", "CUTLIST_COLUMNS", "render_cutlist_csv"
]

PLAN_FORMAT = "cutplan-plan/1"


def _both(metres, den=INCH_DENOMINATOR):
    """(mm, inches) cells of one length: ``("514.9", "20-9/32 in")``."""
    q = length_parts(metres, "mm", den)
    return q.mm, q.part("in")


def _r(x, nd):
    return None if x is None else round(float(x), nd)


def piece_dict(p):
    """One piece in the JSON contract's shape (mm, g, Hz)."""
    out = {
        "set": p.set,
        "kind": p.kind,
        "label": p.label,
        "note": p.note,
        "target_hz": _r(p.target_hz, 3),
        "predicted_hz": _r(p.predicted_hz, 3),
        "length_mm": _r(p.length / MM, 2),
        "cut_length_mm": _r(p.cut_length / MM, 2),
        "nodes_mm": [_r(x / MM, 2) for x in p.nodes],
        "mass_g": _r(None if p.mass is None else p.mass * 1000, 1),
        "partials_hz": [_r(f, 2) for f in p.partials_hz],
        "partial_notes": [{"note": n, "cents": c} for n, c in p.partial_notes],
        "cents_per_mm": _r(p.cents_per_mm, 3),
        "model": p.model,
        "shear_correction_cents": _r(p.shear_correction_cents, 2),
        "allowance_mm": {"added": _r(p.allowance / MM, 2),
                         "uncalibrated": _r(p.allowance_uncalibrated / MM, 2),
                         "after_test_piece": _r(p.allowance_calibrated / MM, 2)},
        "trim_end": p.trim_end,
        "if_sharp": p.if_sharp,
        "sharp_risk": _r(p.sharp_risk, 3),
        "warnings": [w.message for w in p.warnings],
        "warning_records": [w.as_dict() for w in p.warnings],
    }
    if p.strike_note_hz is not None:
        out["fundamental_hz"] = _r(p.fundamental_hz, 3)
        out["strike_note_hz"] = _r(p.strike_note_hz, 3)
    if getattr(p, "other_modes", ()):
        out["other_modes"] = [{"kind": kind, "mode": n, "hz": _r(f, 1)} for kind, n, f in p.other_modes]
    if getattr(p, "hang_hole", None) is not None:
        h = p.hang_hole
        out["hang_hole"] = {"drill_mm": _r(h.drill / MM, 2), "mode": h.mode,
                            "in_plane_cents": _r(h.in_plane_cents, 2), "across_cents": _r(h.across_cents, 2),
                            "beat_hz": _r(h.beat_hz, 3), "largest_drill_mm": _r(h.largest_drill / MM, 2)}
    if p.arch is not None:
        a = p.arch
        out["undercut"] = {
            "blank_thickness_mm": _r(a.thickness / MM, 2),
            "centre_depth_mm": _r(a.depth / MM, 2),
            "centre_thickness_mm": _r((a.thickness - a.depth) / MM, 2),
            "arch_width": _r(a.arch_width, 4),
            "shape_exponent": _r(a.exponent, 4),
            "stations_mm": [[_r(x / MM, 1), _r(h / MM, 2)] for x, h in a.stations],
            "profile_mm": [[_r(x / MM, 3), _r(h / MM, 3)] for x, h in a.outline],
            "model": p.model,
            "ratios": list(a.ratios),
            "ratio_residuals_cents": [_r(r, 3) for r in a.ratio_residuals_cents],
        }
    if p.stopper:
        out["stopper"] = {
            "depths_mm": [{"temperature_c": _r(t - ZERO_CELSIUS, 1), "depth_mm": _r(d / MM, 2)} for t, d in p.stopper],
            "travel_mm": _r((max(d for _, d in p.stopper) - min(d for _, d in p.stopper)) / MM, 2),
        }
    return out


def _constants(pairs):
    """Elastic constants as numbers: moduli in GPa, density in kg/m3, Poisson ratio."""
    units = {"modulus_along": ("modulus_along_gpa", 1e9), "modulus_across": ("modulus_across_gpa", 1e9),
             "shear_modulus": ("shear_modulus_gpa", 1e9), "density": ("density_kg_m3", 1.0), "poisson": ("poisson", 1.0),
             "modulus_width": ("modulus_width_gpa", 1e9), "shear_modulus_length_width": ("shear_modulus_length_width_gpa", 1e9),
             "shear_modulus_width_thickness": ("shear_modulus_width_thickness_gpa", 1e9),
             "poisson_length_width": ("poisson_length_width", 1.0), "poisson_width_thickness": ("poisson_width_thickness", 1.0)}
    return {units[k][0]: _r(v / units[k][1], 4) for k, v in pairs}


def plan_dict(plan):
    """The whole plan as JSON-ready data."""
    out = {
        "format": PLAN_FORMAT,
        "title": plan.title,
        "a4_hz": float(plan.a4),
        "temperament": plan.temperament,
        "units": plan.units,
        "sets": [
            {"name": s.name, "kind": s.kind, "material": s.material, "section": s.section_text,
             "model": s.model, "assumptions": list(s.assumptions), "allowance": s.allowance_rule,
             **({"elastic_constants": _constants(s.elastic_constants)} if s.elastic_constants else {})}
            for s in plan.sets
        ],
        "pieces": [piece_dict(p) for p in plan.pieces],
    }
    for entry, s in zip(out["sets"], plan.sets, strict=True):
        if getattr(s, "hanging", None) is not None:
            entry["hanging"] = hanging_dict(s.hanging, plan.units, plan.inch_denominator)
    if plan.cut_list is not None:
        out["stock"] = cut_list_dict(plan.cut_list)
    return out


def cut_list_dict(cut_list):
    """The cut list in the plan JSON's ``stock`` shape (mm)."""
    return {
        "sticks": [
            {"stock_length_mm": _r(s.stock_length / MM, 2),
             "cuts": [{"label": c.label, "start_mm": _r(c.start / MM, 2), "length_mm": _r(c.length / MM, 2)}
                      for c in s.cuts],
             "offcut_mm": _r(s.offcut / MM, 2), "group": s.group}
            for s in cut_list.sticks
        ],
        "groups": [{"group": g.group, "material": g.material, "lower_bound": g.lower_bound,
                    "proven_optimal": g.proven_optimal, "method": g.method, "cost": g.cost} for g in cut_list.groups],
        "lower_bound": cut_list.lower_bound,
        "proven_optimal": cut_list.proven_optimal,
        "sticks_by_length": [{"stock_length_mm": _r(length / MM, 2), "count": n}
                             for length, n in cut_list.sticks_by_length],
        "utilisation_percent": _r(100 * cut_list.utilisation, 1),
        "cost": cut_list.cost,
    }


_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def csv_cell(value):
    """A CSV cell a spreadsheet will not run as a formula: text beginning with = + - @ (or a tab
    or carriage return) gets a leading apostrophe, the usual practice for spreadsheet exports;
    numbers such as "-3.20" stay numbers.

    >>> csv_cell("=1+1"), csv_cell("-3.20"), csv_cell("@SUM(A1)"), csv_cell("porch-1")
    ("'=1+1", '-3.20', "'@SUM(A1)", 'porch-1')
    """
    if isinstance(value, str) and value.startswith(_FORMULA_START):
        try:
            float(value)
        except ValueError:
            return "'" + value
    return value


class _csv_writer:  # noqa: N801 - used like csv.writer
    """csv.writer whose rows go through :func:`csv_cell`."""

    def __init__(self, buf):
        self._writer = csv.writer(buf, lineterminator="\n")

    def writerow(self, row):
        self._writer.writerow([csv_cell(c) for c in row])


def render_json(plan):
    """Plan as indented JSON text."""
    return json.dumps(plan_dict(plan), indent=2, ensure_ascii=False) + "\n"


CSV_COLUMNS = (
    "set", "label", "note", "target_hz", "predicted_hz", "length_mm", "length_in", "cut_length_mm",
    "cut_length_in", "node_1_mm", "node_2_mm", "node_1_in", "node_2_in", "mass_g", "cents_per_mm",
    "partial_2_hz", "partial_3_hz", "partial_4_hz", "model", "shear_correction_cents", "warnings",
    "stopper_depths_mm",
)


def render_csv(plan):
    """One row per piece, lengths in both mm and fractional inches (to the plan's 1/N in)."""
    buf = io.StringIO()
    writer = _csv_writer(buf)
    writer.writerow(CSV_COLUMNS)
    den = plan.inch_denominator
    blank = ("", "")
    for p in plan.pieces:
        nodes = [_both(x, den) for x in p.nodes[:2]] + [blank, blank]
        (length_mm, length_in), (cut_mm, cut_in) = _both(p.length, den), _both(p.cut_length, den)
        writer.writerow([
            p.set, p.label, p.note, f"{p.target_hz:.3f}", f"{p.predicted_hz:.3f}",
            length_mm, length_in, cut_mm, cut_in,
            nodes[0][0], nodes[1][0], nodes[0][1], nodes[1][1],
            "" if p.mass is None else f"{p.mass * 1000:.1f}", f"{p.cents_per_mm:.2f}",
            *[f"{f:.1f}" for f in p.partials_hz[1:4]], p.model, f"{p.shear_correction_cents:.2f}",
            "; ".join(w.message for w in p.warnings),
            "; ".join(f"{t - ZERO_CELSIUS:.0f} C: {d / MM:.1f}" for t, d in p.stopper),
        ])
    return buf.getvalue()


CUTLIST_COLUMNS = (
    "stick", "group", "stock_length_mm", "stock_length_in", "cut", "label", "start_mm", "start_in",
    "length_mm", "length_in", "end_mm", "end_in",
)


def render_cutlist_csv(cut_list, denominator=INCH_DENOMINATOR):
    """The cut list as CSV: one row per cut, marks measured from the stick's factory end."""
    buf = io.StringIO()
    writer = _csv_writer(buf)
    writer.writerow(CUTLIST_COLUMNS)
    for stick in cut_list_view(cut_list, "mm", denominator).sticks:
        head = [stick.number, stick.group, stick.length.mm, stick.length.part("in")]
        for c in stick.cuts:
            writer.writerow([*head, c.number, c.label, c.start.mm, c.start.part("in"), c.length.mm,
                             c.length.part("in"), c.end.mm, c.end.part("in")])
        writer.writerow([*head, "offcut", "", "", "", stick.offcut.mm, stick.offcut.part("in"), "", ""])
    return buf.getvalue()
