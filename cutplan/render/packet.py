"""The shop packet's files: packet.pdf and templates/*.svg, as {relative name: bytes or text}."""

from __future__ import annotations

from cutplan.render.pdf import render_pdf
from cutplan.render.svg import svg_files


def packet_files(plan, paper=None):
    """Everything ``cutplan plan -o DIR`` writes besides plan.csv and plan.json."""
    files = {"packet.pdf": render_pdf(plan, paper)}
    files.update(svg_files(plan))
    return files
