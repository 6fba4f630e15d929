"""Every file of a plan's output folder, as {relative name: bytes or text}.

The command line (``plan -o``) and the web page's packet download both take their files from
:func:`plan_files`, so the same design gives the same bytes wherever it is planned.
"""

from __future__ import annotations

from cutplan.render.pdf import render_pdf
from cutplan.render.svg import svg_files
from cutplan.render.table import render_csv, render_cutlist_csv, render_json

__all__ = ["packet_files", "plan_files"]


def packet_files(plan, paper=None):
    """The shop packet: packet.pdf and templates/*.svg."""
    files = {"packet.pdf": render_pdf(plan, paper)}
    files.update(svg_files(plan))
    return files


def plan_files(plan, paper=None):
    """Everything ``cutplan plan -o DIR`` writes: plan.csv, plan.json, cutlist.csv (with stock),
    packet.pdf and templates/*.svg."""
    files = {"plan.csv": render_csv(plan), "plan.json": render_json(plan)}
    if plan.cut_list is not None:
        files["cutlist.csv"] = render_cutlist_csv(plan.cut_list, plan.inch_denominator)
    files.update(packet_files(plan, paper))
    return files
