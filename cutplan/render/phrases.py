"""The fixed phrases every front end shares (terminal, PDF, SVG, the page, from-stock, the bench),
so each fact is said one way and written once.

The cautions themselves are not here: they are chosen from the set's kinds and materials by
:func:`cutplan.planning.shopping.cautions_for` (the table ``materials/shop/cautions.toml``) and
carried on the Plan; :func:`caution_lines` only lays them out.
"""

from __future__ import annotations

import textwrap

from cutplan.limits import IN_TUNE_CENTS
from cutplan.units import INCH_DENOMINATOR, format_length

TRIM_RAISES = "trimming raises the pitch"
"""Why every piece is cut long (a shorter piece sounds higher)."""
TRIM_RULE = f"cut long, then trim to pitch ({TRIM_RAISES})"
"""How a piece that is tuned by trimming is cut."""
STOPPER_RULE = "cut the tube to its cut length, tune with the stopper"
"""How a stoppered tube is cut and tuned."""
CENTRE_OUT = "trim half from each end; supports from the centre line"
"""How a bar marked on a rough blank is trimmed and marked (so the supports stay on the nodes)."""
SAFETY_HEADING = "Safety: the cautions for these pieces and materials"
"""The heading above the cautions (terminal, from-stock, the page)."""
DESIGN_SAVED = "cutplan design, saved from the cutplan page"
"""The comment at the top of a design file saved from the page."""


def sentence(phrase):
    """A phrase as a sentence: capital first letter, full stop.

    >>> sentence("cut long")
    'Cut long.'
    """
    return phrase[:1].upper() + phrase[1:] + ("" if phrase.endswith(".") else ".")


def caution_lines(cautions, width=100):
    """The plan's cautions (:class:`cutplan.planning.shopping.Caution`) as plain-text lines no
    wider than ``width``, under :data:`SAFETY_HEADING`; no lines when there are none."""
    if not cautions:
        return []
    out = [SAFETY_HEADING]
    for c in cautions:
        out += textwrap.wrap(f"- {c.text}", width, subsequent_indent="  ", break_on_hyphens=False,
                             break_long_words=False)
    return out

__all__ = ["other_modes_text", "trim_lines", "partial_lines", "trim_report_lines", "removal_lines"]



def other_modes_text(modes):
    """"sideways 1510, 4030 Hz; twisting 2210, 4420 Hz": the modes a piece is not tuned by, in short."""
    parts = []
    for kind in ("sideways", "twisting", "ring"):
        freqs = [f for k, _, f in modes if k == kind]
        if freqs:
            parts.append(f"{kind} " + ", ".join(f"{f:.0f}" for f in freqs) + " Hz")
    return "; ".join(parts)


def trim_lines(piece, advice, measured_hz, units="mm", den=INCH_DENOMINATOR):
    """The answer to "how much do I trim?", one line per fact, the same at the terminal and on the page."""
    lines = [f"{piece.label} ({piece.note}, target {piece.target_hz:.2f} Hz) measured {measured_hz:.2f} Hz "
             f"at {format_length(advice.length_now, units, den)}",
             f"length for the target: {format_length(advice.length_needed, units, den)}"]
    if advice.caution:
        lines.append(f"! {advice.caution}")
    lines.append(advice.action)
    if piece.nodes and advice.remove > 0:
        fractions = [x / piece.length for x in piece.nodes]
        lines.append("if not yet drilled, hang/support points for the trimmed length: "
                     + ", ".join(format_length(f * advice.length_needed, units, den) for f in fractions)
                     + " from the top/reference end")
    return lines


def partial_lines(report):
    """One line per partial read: "partial 2: 1401.3 Hz, target 1396.9 Hz, +5.4 cents"."""
    out = []
    for p in report.partials:
        if p.target_hz is None:
            out.append(f"partial {p.mode}: {p.measured_hz:.2f} Hz (not tuned)")
        else:
            out.append(f"partial {p.mode}: {p.measured_hz:.2f} Hz, target {p.target_hz:.2f} Hz, {p.cents:+.1f} cents")
    return out


def _supports_text(report, units, den=INCH_DENOMINATOR):
    if not report.supports:
        return ""
    shown = dict.fromkeys(format_length(s, units, den) for s in report.supports)
    return ("support points for this length: " + ", ".join("+/-" + s for s in shown)
            + " from the centre line (mark them from the centre line, after trimming)")


def trim_report_lines(piece, report, advice, units="mm", den=INCH_DENOMINATOR):
    """Lines of a plain trim answer (uniform bars, chimes, air columns)."""
    lines = trim_lines(piece, advice, report.partials[0].measured_hz, units, den)
    if piece.kind == "bar" and advice.remove > 0:
        lines = [line for line in lines if not line.startswith("if not yet drilled")]
        lines.append("if not yet drilled, " + _supports_text(report, units, den))
    lines[2:2] = partial_lines(report)[1:]
    if report.action == "re-record":
        lines = [line for line in lines if not line.startswith("! ")]
        lines = lines[:1] + [f"! {text}" for _, text in report.messages] + [
            "nothing to cut until a clean reading confirms it; if one does: " + advice.action]
    return lines


def removal_lines(piece, report, units="mm", den=INCH_DENOMINATOR):
    """Lines of an undercut bar's trim answer: partials, cuts in work order, what they leave."""
    lines = [f"{piece.label} ({piece.note}, target {piece.target_hz:.2f} Hz), "
             f"{format_length(report.length_now, units, den)} long now"]
    lines += partial_lines(report)
    lines += [f"! {text}" for code, text in report.messages if code in ("far-off", "low-confidence", "unreachable")]
    lines += [text for code, text in report.messages if code not in ("far-off", "low-confidence", "unreachable")]
    if report.action == "re-record":
        lines.append("nothing to cut until a clean reading confirms it")
        return lines
    if report.action == "in-tune":
        lines.append(f"every tuned partial is within {IN_TUNE_CENTS:g} cents: leave it")
        return lines
    step = 1
    if report.trim_each_end > 0.05e-3:
        lines.append(f"{step}. trim {format_length(report.trim_each_end, units, den)} from each end (raises every partial)")
        step += 1
    if report.removal:
        lines.append(f"{step}. cut from the underside, in this order, each cut blended to nothing "
                     f"{format_length(report.blend, units, den)} either side of its stations (x from end A):")
    pairs = {}
    for x, depth, mode, raises in report.removal:
        pairs.setdefault((depth, mode, raises), []).append(x)
    for k, ((depth, mode, raises), xs) in enumerate(pairs.items(), start=1):
        where = " and ".join(format_length(v, units, den) for v in xs)
        lines.append(f"  {chr(96 + k) if k <= 26 else k}) {depth * 1e3:.2f} mm deep at {where} "
                     f"(mostly {'raises' if raises else 'lowers'} partial {mode})")
    lines.append("removal cannot be undone: take each cut in two or three passes and record between them")
    lines.append("expected after: " + ", ".join(f"{f:.1f}" for f in report.predicted_after_hz) + " Hz")
    if report.supports:
        lines.append(_supports_text(report, units, den))
    return lines
