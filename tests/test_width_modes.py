"""A bar planned on the 2-D body says when a partial is split between two modes, and warns of a mode
across its width near a tuned partial."""

from functools import lru_cache
from types import SimpleNamespace

import cutplan
from cutplan.design.notices import MODE_NEAR_PARTIAL, PARTIAL_SPLIT
from cutplan.physics.bending_partials import OtherMode
from cutplan.planning.width_modes import width_mode_warnings


@lru_cache(maxsize=2)
def one_bar(note, width):
    """The planned piece of one flat-sawn rosewood bar tuned 1:4 (a top bar of a four-octave set)."""
    design = cutplan.design_from_mapping({
        "title": "Top bar", "set": [{
            "name": "top", "kind": "bar", "notes": [note], "material": "rosewood-honduras", "grain": "flat",
            "section": {"shape": "bar", "width": width, "thickness": "24 mm"},
            "undercut": {"ratios": [4.0], "arch_width": 0.5, "min_thickness": "5 mm"}}]})
    return cutplan.plan(design).sets[0].pieces[0]


def test_a_split_partial_is_said_in_words_and_listed_at_the_stronger_mode():
    # F#6, 40 mm wide: the 3-D solid shares partial 3 between 13507 and 15317 Hz and partial 4
    # between about 19.7 and 20.3 kHz (tests/physics/test_mixed_partials.py); the plan lists
    # partial 3 at the stronger mode (13.5 kHz, not the 41964 Hz it printed before) and says both.
    piece = one_bar("F#6", "40 mm")
    assert 13300 < piece.partials_hz[2] < 13700 and 19500 < piece.partials_hz[3] < 20400
    split = [w for w in piece.warnings if w.code == PARTIAL_SPLIT]
    assert [w.message.split(":")[0] for w in split] == ["partial 3 split", "partial 4 split"]
    assert "F#6 bar" in split[0].message and f"{piece.partials_hz[2]:.0f} Hz" in split[0].message
    assert "across its width" in split[0].message and split[0].key == "set[1].section"


def test_a_cross_width_mode_near_the_tuned_second_partial_is_warned():
    # F#6, 55 mm wide, plans (1:4 reached) with a mode across its width 23 cents above its tuned
    # second partial; the 3-D solid has that mode 18 cents above its own partial 2
    # (tests/physics/test_mixed_partials.py).  The warning names the note, the mode and the partial.
    piece = one_bar("F#6", "55 mm")
    near = [w for w in piece.warnings if w.code == MODE_NEAR_PARTIAL and "cross-width" in w.message]
    assert len(near) == 1
    text = near[0].message
    assert "F#6 bar" in text and "55.0 mm (2-5/32 in) width" in text and "tuned second partial (partial 2" in text
    assert "cents above" in text


def _piece(partials, arched=True, note="G6"):
    return SimpleNamespace(partials_hz=partials, note=note, arch=object() if arched else None)


def test_a_mode_that_splits_a_partial_is_not_warned_twice():
    # Wording and bookkeeping only (no physics): a cross-width mode tagged as splitting partial 2
    # gets the split warning and no second "near the partial" one; an untagged mode 10 cents from
    # the tuned partial 2 gets the near warning; one 40 cents off (outside 30) none.
    partials = (1000.0, 4000.0, 10000.0, 14000.0)
    modes = SimpleNamespace(frequencies=partials, longitudinal=(
        OtherMode(4000.0 * 2 ** (5 / 1200), "cross-width", 2), OtherMode(4000.0 * 2 ** (10 / 1200), "cross-width"),
        OtherMode(4000.0 * 2 ** (-40 / 1200), "cross-width"), OtherMode(4010.0, "lengthwise")))
    notices = width_mode_warnings(_piece(partials), modes, 0.05, (1, 2), 30.0, "set[1].section")
    assert [n.code for n in notices] == [PARTIAL_SPLIT, MODE_NEAR_PARTIAL]
    assert "tuned second partial" in notices[0].message and "tune it by the louder" in notices[0].message
    assert "10 cents above" in notices[1].message


def test_a_plain_bar_gets_no_width_warnings():
    partials = (1000.0, 2760.0, 5400.0, 8900.0)
    modes = SimpleNamespace(frequencies=partials, longitudinal=(OtherMode(3500.0, "cross-width"),))
    assert width_mode_warnings(_piece(partials, arched=False), modes, 0.03, (1, 2), 30.0) == []
