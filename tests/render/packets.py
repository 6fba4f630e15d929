"""The bundled examples' shop packets, rendered once per test process and shared.

Rendering a packet and pulling its text out with pypdf cost a few tenths of a second each, and
several test files read the same example's packet.  Tests that only read a packet take it from
here, from the session's example plans (``example_plan`` in tests/conftest.py).  The values are
bytes and tuples of strings, so no test can change what another one reads.
"""

from __future__ import annotations

import io

from pypdf import PdfReader

from cutplan.render.pdf import render_pdf

__all__ = ["rendered_packet", "rendered_packet_text"]

_PACKETS: dict[tuple[str, str], bytes] = {}
_TEXTS: dict[tuple[str, str], tuple[str, ...]] = {}


def rendered_packet(example_plan, name, paper=None):
    """PDF bytes of example ``name``'s packet on ``paper`` (the design's own paper if None)."""
    plan = example_plan(name)
    key = (name, paper or plan.paper)
    if key not in _PACKETS:
        _PACKETS[key] = render_pdf(plan, key[1])
    return _PACKETS[key]


def rendered_packet_text(example_plan, name, paper=None):
    """The text of each page of :func:`rendered_packet`, as pypdf extracts it."""
    plan = example_plan(name)
    key = (name, paper or plan.paper)
    if key not in _TEXTS:
        reader = PdfReader(io.BytesIO(rendered_packet(example_plan, name, paper)))
        _TEXTS[key] = tuple(page.extract_text() or "" for page in reader.pages)
    return _TEXTS[key]
