"""Notes, temperaments and scales."""

import pytest

from cutplan import pitch


def test_middle_c_at_standard_pitch():
    # ISO 16:1975: A4 = 440 Hz; 12-TET C4 = 440 * 2^(-9/12) = 261.6256 Hz (computed)
    assert pitch.note_frequency("C4") == pytest.approx(261.625565, abs=1e-6)


def test_piano_range_ends():
    # ISO 16:1975 A4 = 440 Hz, 12-TET f = 440 * 2^((m - 69)/12) (computed): A0 = 27.5, C8 = 4186.009
    assert pitch.note_frequency("A0") == pytest.approx(27.5)
    assert pitch.note_frequency("C8") == pytest.approx(4186.009, abs=1e-3)


@pytest.mark.parametrize(("name", "midi"), [("C4", 60), ("A4", 69), ("C#4", 61), ("Db4", 61), ("C♯4", 61),
                                             ("D♭4", 61), ("B3", 59), ("Cb4", 59), ("E#4", 65), ("C-1", 0)])
def test_note_names(name, midi):
    assert pitch.parse_note(name) == midi


@pytest.mark.parametrize("bad", ["H4", "C", "4C", "C##", "Cx4", "", "C10", 60])
def test_unknown_notes_raise_with_accepted_forms(bad):
    with pytest.raises(pitch.PitchError) as info:
        pitch.parse_note(bad)
    assert "C4" in info.value.accepted


def test_adjustable_reference_pitch():
    assert pitch.note_frequency("A4", a4=442) == 442
    assert pitch.note_frequency("A5", a4=415) == 830


def test_just_major_scale_cents():
    # 5-limit just major scale: 0, 203.910, 386.314, 498.045, 701.955, 884.359, 1088.269, 1200
    # cents (computed as 1200 log2 of the ratios 1, 9/8, 5/4, 4/3, 3/2, 5/3, 15/8, 2)
    targets = pitch.scale_targets("C4", "major", 8, "just")
    got = [pitch.cents(t.frequency, targets[0].frequency) for t in targets]
    assert got == pytest.approx([0, 203.910, 386.314, 498.045, 701.955, 884.359, 1088.269, 1200], abs=1e-3)


def test_pythagorean_third_is_a_ditone():
    # Pythagorean major third 81/64 = 407.82 cents (standard)
    f = pitch.degree_frequency(60, 4, "pythagorean")
    assert pitch.cents(f, pitch.note_frequency("C4")) == pytest.approx(407.820, abs=1e-3)


def test_equal_19_maps_degrees_to_nearest_step():
    # 19-EDO: a major third (4 semitones) is 6 steps of 1200/19 cents = 378.95 cents
    f = pitch.degree_frequency(60, 4, "equal-19")
    assert pitch.cents(f, pitch.note_frequency("C4")) == pytest.approx(6 * 1200 / 19)


@pytest.mark.parametrize(
    ("scale", "names"),
    [
        ("major-pentatonic", ["D5", "E5", "F#5", "A5", "B5"]),
        ("minor-pentatonic", ["D5", "F5", "G5", "A5", "C6"]),
        # the blues scale is 1 b3 4 b5 5 b7 (common practice): its fifth note is a flattened fifth, Ab
        ("blues", ["D5", "F5", "G5", "Ab5", "A5", "C6"]),
        ("dorian", ["D5", "E5", "F5", "G5", "A5", "B5", "C6"]),
        ("whole-tone", ["D5", "E5", "F#5", "G#5", "A#5", "C6"]),
    ],
)
def test_named_scales(scale, names):
    assert [t.name for t in pitch.scale_targets("D5", scale, len(names))] == names


def test_range_with_scale_filter():
    names = [t.name for t in pitch.range_targets("C4", "C6", "major")]
    assert len(names) == 15 and names[0] == "C4" and names[-1] == "C6"


def test_nearest_note_with_cents():
    assert pitch.nearest_note(440.0) == ("A4", 0.0)
    name, off = pitch.nearest_note(583.1)
    assert name == "D5" and off == pytest.approx(-12.51, abs=0.01)


def test_ratios():
    assert pitch.parse_ratio("9/8") == 1.125
    with pytest.raises(pitch.PitchError):
        pitch.parse_ratio("9/0")


def test_scale_spec():
    assert [t.name for t in pitch.spec_targets("D5 major-pentatonic 5")] == ["D5", "E5", "F#5", "A5", "B5"]
    with pytest.raises(pitch.PitchError):
        pitch.spec_targets("D5 lydianish 5")


@pytest.mark.parametrize(
    ("root", "scale", "names"),
    [
        # key signatures (Kostka, Payne & Almen, Tonal Harmony, ch. 1; from memory): F major has one
        # flat, Bb; Bb major two, Bb and Eb; D minor is the relative minor of F major (one flat)
        ("F3", "major", ["F3", "G3", "A3", "Bb3", "C4", "D4", "E4", "F4"]),
        ("Bb3", "major", ["Bb3", "C4", "D4", "Eb4", "F4", "G4", "A4", "Bb4"]),
        ("D4", "natural-minor", ["D4", "E4", "F4", "G4", "A4", "Bb4", "C5", "D5"]),
        # harmonic minor raises the seventh of the natural minor (same text): C#, not Db, in D minor
        ("D4", "harmonic-minor", ["D4", "E4", "F4", "G4", "A4", "Bb4", "C#5", "D5"]),
        # Gb major has six flats, Cb among them (same text); sharp keys stay sharp
        ("Gb4", "major", ["Gb4", "Ab4", "Bb4", "Cb5", "Db5", "Eb5", "F5", "Gb5"]),
        ("E4", "major", ["E4", "F#4", "G#4", "A4", "B4", "C#5", "D#5", "E5"]),
        # a mode uses its parent major's signature: G dorian is a mode of F major (same text)
        ("G4", "dorian", ["G4", "A4", "Bb4", "C5", "D5", "E5", "F5", "G5"]),
        ("C4", "minor-pentatonic", ["C4", "Eb4", "F4", "G4", "Bb4", "C5"]),
    ],
)
def test_notes_are_spelled_from_the_key(root, scale, names):
    assert [t.name for t in pitch.scale_targets(root, scale, len(names))] == names


def test_spelling_setting_and_written_notes():
    assert [t.name for t in pitch.scale_targets("F3", "major", 4, spelling="sharps")][-1] == "A#3"
    assert [t.name for t in pitch.scale_targets("E4", "major", 2, spelling="flats")][-1] == "Gb4"
    assert [t.name for t in pitch.note_targets(["bb3", "E♭4", "F#4"])] == ["Bb3", "Eb4", "F#4"]  # as written


def test_an_f_major_design_shows_b_flat(tmp_path):
    import cutplan

    design = {"set": [{"kind": "chime", "scale": "major", "root": "F4", "count": 4,
                       "material": "aluminum-6063-t5", "section": {"stock": "al-1.000x0.065"}}]}
    assert [p.note for p in cutplan.plan(cutplan.design_from_mapping(design)).pieces][-1] == "Bb4"
    sharp = {**design, "tuning": {"spelling": "sharps"}}
    assert [p.note for p in cutplan.plan(cutplan.design_from_mapping(sharp)).pieces][-1] == "A#4"
    with pytest.raises(cutplan.design.DesignErrors, match='tuning.spelling: "flat" must be "auto"'):
        cutplan.design_from_mapping({**design, "tuning": {"spelling": "flat"}})
