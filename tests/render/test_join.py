"""Tiles join unambiguously: on neighbouring tiles, the marks in the shared overlap sit at the same
positions along the piece (strips longer than a sheet, and arched bars' side profiles)."""

import io
from pathlib import Path

import pytest
from reportlab.pdfgen.canvas import Canvas

import cutplan
from cutplan.render import marks as mk
from cutplan.render.pdf import templates
from cutplan.render.pdf.base import A4, mm

ROOT = Path(__file__).resolve().parents[2]


class RecordingCanvas(Canvas):
    """A real canvas that also records vertical lines and filled bars [pt]."""

    def __init__(self):
        super().__init__(io.BytesIO(), pagesize=A4, invariant=1)
        self.verticals, self.bars = [], []

    def line(self, x1, y1, x2, y2):
        if abs(x1 - x2) < 1e-9:
            self.verticals.append(x1)
        super().line(x1, y1, x2, y2)

    def rect(self, x, y, width, height, stroke=1, fill=0):
        if fill and not stroke:
            self.bars.append((x, x + width))
        super().rect(x, y, width, height, stroke=stroke, fill=fill)


def _along(tile, draw, units):
    """Vertical-line positions and overlap bars of one tile, in mm along the piece."""
    c = RecordingCanvas()
    x0 = 20 * mm
    draw(c, tile, x0, 250 * mm, 190, units)
    to_mm = lambda x: round(tile.start + (x - x0) / mm, 4)  # noqa: E731
    return {to_mm(x) for x in c.verticals}, {(to_mm(a), to_mm(b)) for a, b in c.bars}


def _tiles(plan, label, what):
    pages = templates.layout(plan, A4)
    return [t for page in pages for t, _x, _y in page if t.piece.label == label and t.what == what]


def _check_neighbours(tiles, draw, units):
    assert len(tiles) >= 2
    for left, right in zip(tiles, tiles[1:], strict=False):
        assert right.start == pytest.approx(left.end - templates.OVERLAP_MM)  # exact overlap
        lines_l, bars_l = _along(left, draw, units)
        lines_r, bars_r = _along(right, draw, units)
        lo, hi = right.start, left.end
        shared_l = {x for x in lines_l if lo - 1e-3 <= x <= hi + 1e-3}
        shared_r = {x for x in lines_r if lo - 1e-3 <= x <= hi + 1e-3}
        assert shared_l and shared_l == shared_r, (left.sheet, sorted(shared_l ^ shared_r))
        # one overlap bar on each side of the join, covering the same stretch of the piece
        assert (lo, hi) in {(round(a, 3), round(b, 3)) for a, b in bars_l}
        assert (lo, hi) in {(round(a, 3), round(b, 3)) for a, b in bars_r}
        # a cross at the middle of the overlap on both tiles
        assert round(lo + templates.OVERLAP_MM / 2, 4) in shared_l


def test_a_strip_longer_than_a_sheet_joins_at_the_same_marks():
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    piece = plan.pieces[0]
    assert mk.strip_length_mm(piece) > (A4[0] / mm - 24)  # longer than one A4 tile
    _check_neighbours(_tiles(plan, piece.label, "strip"), templates.draw_strip, plan.units)


def test_an_undercut_profile_joins_at_the_same_marks(example_plan):
    plan = example_plan("music-room-marimba")
    piece = next(p for p in plan.pieces if p.arch is not None)
    _check_neighbours(_tiles(plan, piece.label, "profile"), templates.draw_profile, plan.units)


def test_no_tile_has_an_unpaired_overlap_mark():
    # the first tile has bars only on its right, the last only on its left; none is short
    plan = cutplan.plan(cutplan.load_design(ROOT / "examples" / "garden-conduit-chime.toml"))
    for piece in plan.pieces:
        tiles = _tiles(plan, piece.label, "strip")
        for t in tiles:
            _lines, bars = _along(t, templates.draw_strip, plan.units)
            want = (t.sheet > 1) + (t.sheet < t.sheets)
            assert len(bars) == want
            assert t.end - t.start >= 2 * templates.OVERLAP_MM or t.sheets == 1


def test_tiles_are_equal_and_overlap_exactly():
    # 400 mm on 190 mm sheets with 20 mm overlaps: n = ceil(380 / 170) = 3 tiles of (400 + 40) / 3
    parts = mk.tiles(400, 190, 20)
    assert len(parts) == 3
    spans = [b - a for a, b in parts]
    assert max(spans) - min(spans) < 1e-2 and max(spans) <= 190
    assert all(abs(parts[k][1] - parts[k + 1][0] - 20) < 1e-2 for k in range(2))
