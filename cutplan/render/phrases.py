"""Short phrases shared by the terminal table and the packet, so both say a fact the same way."""

from __future__ import annotations


def other_modes_text(modes):
    """"sideways 1510, 4030 Hz; twisting 2210, 4420 Hz": the modes a piece is not tuned by, in short."""
    parts = []
    for kind in ("sideways", "twisting"):
        freqs = [f for k, _, f in modes if k == kind]
        if freqs:
            parts.append(f"{kind} " + ", ".join(f"{f:.0f}" for f in freqs) + " Hz")
    return "; ".join(parts)
