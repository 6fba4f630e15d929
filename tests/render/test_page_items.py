"""Small page items: the deepest point of an arch keeps its number on every sheet, stoppered tubes
are told to tune with the stopper, plan.csv carries the stopper depths, the chart's pitch axis."""

import csv
import io

from cutplan.render.pdf.charts import round_hz
from cutplan.render.table import render_csv


def test_every_arched_bar_shows_its_thinnest_point_on_the_profile(example_plan, example_pdf_text):
    plan = example_plan("music-room-marimba")
    text = "\n".join(example_pdf_text("music-room-marimba"))  # rendered and read once per run
    for p in plan.pieces:
        if p.arch is not None:
            thinnest = min(h for _, h in p.arch.stations)
            assert f"{thinnest * 1000:.1f}" in text, p.label


def test_stoppered_tubes_are_tuned_with_the_stopper_and_the_csv_says_where(example_plan):
    plan = example_plan("music-room-marimba")
    stoppered = [p for p in plan.pieces if p.stopper]
    assert stoppered
    for p in stoppered:
        assert "stopper" in p.trim_end and "open end" not in p.trim_end.split(":")[0]
        assert "cannot be lengthened" not in p.if_sharp and "stopper" in p.if_sharp
    rows = {r["label"]: r for r in csv.DictReader(io.StringIO(render_csv(plan)))}
    for p in stoppered:
        t, depth = p.stopper[0]
        assert f"{t - 273.15:.0f} C: {depth * 1000:.1f}" in rows[p.label]["stopper_depths_mm"]


def test_the_pitch_axis_has_several_round_ticks():
    # a two-octave set, 230-1200 Hz: 1-2-5 steps give only 500 and 1000 Hz, so finer steps are used
    ticks = round_hz(230.0, 1200.0)
    assert len(ticks) >= 4 and all(230 <= f <= 1200 for f in ticks)
