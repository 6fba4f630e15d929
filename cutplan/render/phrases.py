"""Short phrases shared by the terminal table and the packet, so both say a fact the same way."""

from __future__ import annotations

from cutplan.units import format_length


def other_modes_text(modes):
    """"sideways 1510, 4030 Hz; twisting 2210, 4420 Hz": the modes a piece is not tuned by, in short."""
    parts = []
    for kind in ("sideways", "twisting", "ring"):
        freqs = [f for k, _, f in modes if k == kind]
        if freqs:
            parts.append(f"{kind} " + ", ".join(f"{f:.0f}" for f in freqs) + " Hz")
    return "; ".join(parts)


def trim_lines(piece, advice, measured_hz, units="mm"):
    """The answer to "how much do I trim?", one line per fact, the same at the terminal and on the page."""
    lines = [f"{piece.label} ({piece.note}, target {piece.target_hz:.2f} Hz) measured {measured_hz:.2f} Hz "
             f"at {format_length(advice.length_now, units)}",
             f"length for the target: {format_length(advice.length_needed, units)}"]
    if advice.caution:
        lines.append(f"! {advice.caution}")
    lines.append(advice.action)
    if piece.nodes and advice.remove > 0:
        fractions = [x / piece.length for x in piece.nodes]
        lines.append("if not yet drilled, hang/support points for the trimmed length: "
                     + ", ".join(format_length(f * advice.length_needed, units) for f in fractions)
                     + " from the top/reference end")
    return lines
