"""Table pages: the cut list, the tuning sheet and the resonator stopper table.

Every number is a Plan field, formatted in the plan's units first; the one allowance each piece
gets (``piece.allowance``) is the same on every table.
"""

from __future__ import annotations

from cutplan.render.pdf.base import (
    MARGIN,
    draw_table,
    first,
    heading,
    length_lines,
    mm,
    paragraph,
    paragraph_height,
    table_pages,
)
from cutplan.render.phrases import STOPPER_RULE, TRIM_RULE, other_modes_text, sentence
from cutplan.units import ZERO_CELSIUS

__all__ = ["allowance", "cut_list", "tuning", "stoppers"]



def allowance(p):
    """The allowance the piece actually gets [m] (a Plan field)."""
    return p.allowance


def _stoppered(s):
    return any(p.stopper for p in s.pieces)


def _chunked(packet, title, intro, header, rows, widths, size):
    """Add pages for one table: heading, intro paragraph, then as many rows as fit."""
    w, h = packet.size
    room = h - 40 * mm - paragraph_height(intro, 9, w - 2 * MARGIN) - 4 * mm
    chunks = table_pages(header, rows, widths, size, room)
    n = len(chunks)
    for k, chunk in enumerate(chunks, start=1):
        def draw(c, page, chunk=chunk, k=k):
            y = heading(c, page, title + (f" ({k} of {n})" if n > 1 else ""))
            y = paragraph(c, page.left, y, intro, 9, page.width)
            draw_table(c, [header] + chunk, widths, page.left, y - 2 * mm, size)
        packet.add(draw)


def cut_list(packet):
    plan = packet.plan
    w, _ = packet.size
    width = w - 2 * MARGIN
    widths = [width * f for f in (0.12, 0.06, 0.08, 0.13, 0.15, 0.15, 0.07, 0.08, 0.08, 0.08)]
    for s in plan.sets:
        pieces = sorted(s.pieces, key=lambda p: -p.length)
        node_head = {"chime": "hang hole from top", "bar": "supports from centre"}.get(s.kind, "-")
        stoppered = _stoppered(s)
        cut_head = "cut tube at" if stoppered else "cut at (allowance)"
        header = ["label", "note", "Hz", "finished", cut_head, node_head, "mass", "cut", "drilled", "tuned"]
        rows = []
        for p in pieces:
            if s.kind == "bar":  # both supports, the same distance either side of the centre line
                nodes = "\n".join("+/-" + length_lines(plan, d) for d in p.supports_from_centre) or "-"
            else:
                shown = p.nodes[:1] if s.kind == "chime" else p.nodes  # a chime hangs from its top node
                nodes = "\n".join(length_lines(plan, x) for x in shown) if shown else "-"
            mass = f"{p.mass * 1000:.0f} g" if p.mass is not None else "-"
            cut = length_lines(plan, p.cut_length)
            if not stoppered:
                cut += f"\n(+{first(plan, allowance(p))})"
            finished = "tuned with the stopper" if stoppered else length_lines(plan, p.length)
            rows.append([p.label, p.note, f"{p.target_hz:.2f}", finished, cut, nodes, mass, "", "", ""])
        what = STOPPER_RULE if stoppered else TRIM_RULE
        intro = (f"{s.kind}, {s.material}, {s.section_label(plan.units)}; longest first. Cut at the '{cut_head}' length: "
                 f"{what}.")
        if getattr(plan, "copies", 1) > 1:
            intro = f"One kit of {plan.copies}: make {plan.copies} of each piece (the stock layout holds all of them). " + intro
        if s.kind == "bar":
            intro += (" Mark the centre line on the rough blank and measure both supports from it; trim half from "
                      "each end, so the supports stay on the nodes. If a bar finishes at another length, "
                      "cutplan trim gives the supports for it.")
        _chunked(packet, f"Cut list: {s.name}", intro, header, rows, widths, 9)


def _warning_lines(pieces):
    """Each distinct piece warning once, with the labels it applies to."""
    seen = {}
    for p in pieces:
        for w in p.warnings:
            seen.setdefault(w.message, []).append(p.label)
    return [f"{', '.join(labels)}: {text}." for text, labels in seen.items()]


def tuning(packet):
    plan = packet.plan
    w, _ = packet.size
    width = w - 2 * MARGIN
    header = ["label", "note", "target Hz", "cents per mm", "per 10 cents", "cut long by",
              "trim from", "if sharp", "other modes Hz", "Hz before trim", "Hz after trim"]
    widths = [width * f for f in (0.10, 0.045, 0.07, 0.055, 0.075, 0.14, 0.105, 0.13, 0.12, 0.075, 0.075)]
    for s in plan.sets:
        rows = []
        for p in s.pieces:
            per10 = length_lines(plan, p.trim_per_10_cents) if p.trim_per_10_cents else "-"
            if p.stopper:
                allow = STOPPER_RULE
            else:
                allow = (f"{length_lines(plan, allowance(p))}\nchance sharp {p.sharp_risk * 100:.0f} %\n"
                         f"after a test piece: {first(plan, p.allowance_calibrated)}")
            target = f"{p.target_hz:.2f}" + (f"\nstrike note {p.strike_note_hz:.1f}" if p.strike_note_hz else "")
            others = other_modes_text(p.other_modes).replace(" Hz", "") if getattr(p, "other_modes", ()) else "-"
            rows.append([p.label, p.note, target, f"{p.cents_per_mm:.2f}", per10, allow,
                         p.trim_end, p.if_sharp, others, "", ""])
        rule = s.allowance_rule
        if _stoppered(s):
            intro = (f"{s.name}: {STOPPER_RULE}: the cut length is the deepest stopper setting plus room for "
                     "the stopper (see the stopper table). Set the stopper for the room's temperature, strike, "
                     "measure, and move the stopper in small steps.")
        else:
            intro = (f"{s.name}: {TRIM_RULE}. Trim in small steps: take off a third of the computed amount, "
                     "strike, measure, repeat; a piece flat by 10 cents needs about the 'per 10 cents' shown. "
                     f"'Cut long by' is the one allowance this piece gets{' (' + rule + ')' if rule else ''}, "
                     "with its chance of coming out sharp; after one test piece is measured (cutplan calibrate) "
                     "it shrinks to the last figure (wood keeps a between-board spread until several blanks are "
                     "calibrated).")
        if s.kind in ("air-column", "resonator"):
            intro += " Air columns go sharp as the air warms: tune at the temperature they are played in."
        warnings = _warning_lines(s.pieces)
        if warnings:
            intro += " WARNINGS: " + " ".join(warnings)
        _chunked(packet, f"Tuning sheet: {s.name}", intro, header, rows, widths, 8)


def stoppers(packet):
    """Stopper depth by temperature: one table per resonator set (sets may have their own ranges)."""
    plan = packet.plan
    w, _ = packet.size
    width = w - 2 * MARGIN
    for s in plan.sets:
        pieces = [p for p in s.pieces if p.stopper]
        if not pieces:
            continue
        temps = [t for t, _ in pieces[0].stopper]
        header = ["label", "note", "cut tube at"] + [f"{t - ZERO_CELSIUS:.0f} C" for t in temps]
        widths = [width * x for x in [0.11, 0.06, 0.13] + [0.70 / len(temps)] * len(temps)]
        rows = []
        for p in pieces:
            rows.append([p.label, p.note, length_lines(plan, p.cut_length)]
                        + [length_lines(plan, d) for _, d in p.stopper])
        intro = (f"{sentence(STOPPER_RULE)} Depth from the open end to the face of the "
                 "stopper, by air temperature. Warmer air carries sound faster, so the column must be longer to "
                 "stay in tune. Set the stopper for the temperature of the room the set is played in.")
        _chunked(packet, f"Resonator stopper settings: {s.name}", intro, header, rows, widths, 8)

