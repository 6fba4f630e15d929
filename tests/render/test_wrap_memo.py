"""Table cells and paragraphs are wrapped once per text, size, width and font: the remembered
lines are reportlab's own ``simpleSplit`` lines (the oracle, measured with the Helvetica metrics
that ship with reportlab), and a caller changing its list never changes the next caller's."""

from reportlab.lib.utils import simpleSplit

from cutplan.render.pdf.base import BOLD, FONT, wrap

TEXT = "Cut the longest piece first; check each length against the rulers before the next cut."


def test_remembered_lines_are_reportlabs_lines():
    for font in (FONT, BOLD):
        for width in (60.0, 150.0, 400.0):
            expected = simpleSplit(TEXT, font, 9, width)
            assert wrap(TEXT, 9, width, font) == expected
            assert wrap(TEXT, 9, width, font) == expected  # the second answer is the remembered one
    assert wrap("", 9, 100.0) == [""]


def test_a_caller_changing_its_lines_does_not_change_the_next_answer():
    lines = wrap(TEXT, 9, 100.0)
    lines.clear()
    assert wrap(TEXT, 9, 100.0) == simpleSplit(TEXT, FONT, 9, 100.0)
