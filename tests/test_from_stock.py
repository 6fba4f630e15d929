"""Build from what you have: `cutplan from-stock` and :mod:`cutplan.fromstock.search`.

Every "fits" below is checked the way a builder would: the written design file is planned with
`cutplan plan`, whose cut list lays the pieces on the stock on hand.
"""

import json
import re
import tomllib
from pathlib import Path

import pytest
from click.testing import CliRunner

import cutplan
from cutplan import pitch
from cutplan.cli import cli
from cutplan.design import StockLength, StockSpec
from cutplan.fromstock import pack, search, table

ROOT = Path(__file__).resolve().parent.parent
EIGHT_FEET_MM = 2438.4  # 8 ft x 304.8 mm/ft (international foot, exact by definition since 1959)
KERF_MM = 25.4 / 16  # 1/16 in (exact)
SEMITONE_LENGTH_RATIO = 2 ** (1 / 24)
# A free-free bar's frequency goes as 1/L^2 (Euler-Bernoulli: f_n = (beta_n L)^2 / (2 pi L^2)
# sqrt(EI/mu); Thomson & Dahleh, Theory of Vibration with Applications, App. D), so one
# equal-tempered semitone lower (a factor 2^(-1/12) in frequency) makes every piece longer by
# 2^(1/24) = 1.0293 (shear raises it a little more; the ratio is a lower bound).
TUBE = ["--tube", "1 in x 0.065 in", "--material", "aluminum-6063-t5"]


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def plan_json(path):
    result = run("plan", path, "--format", "json")
    return result, (json.loads(result.output) if result.exit_code == 0 else None)


def with_root(text, root, count=None):
    text = re.sub(r'^root = ".*"$', f'root = "{root}"', text, flags=re.M)
    if count is not None:
        text = re.sub(r"^count = \d+$", f"count = {count}", text, flags=re.M)
    return text


def test_one_eight_foot_tube_holds_the_chosen_pentatonic_and_not_a_semitone_lower(tmp_path):
    out = tmp_path / "porch.toml"
    result = run("from-stock", "--have", "8 ft x 1", *TUBE, "--kerf", "1/16 in", "--count", 5,
                 "--scale", "major-pentatonic", "-o", out)
    assert result.exit_code == 0, result.output
    text = out.read_text()
    root = re.search(r'^root = "(.*)"$', text, flags=re.M).group(1)
    planned, data = plan_json(out)  # `cutplan plan` reads the written file unchanged
    assert planned.exit_code == 0, planned.output
    cuts = [p["cut_length_mm"] for p in data["pieces"]]
    assert len(cuts) == 5 and len(data["stock"]["sticks"]) == 1
    # hand check: five pieces and four saw cuts fit in 8 ft ...
    assert sum(cuts) + 4 * KERF_MM <= EIGHT_FEET_MM
    # ... and the same pieces a semitone lower, each 2^(1/24) longer, would not even without kerfs
    assert sum(cuts) * SEMITONE_LENGTH_RATIO > EIGHT_FEET_MM
    # with the shear-corrected model and the 5 % risk allowance: C5 to A5, 2379.0 mm of pieces
    assert root == "C5"
    lower = tmp_path / "porch-lower.toml"
    lower.write_text(with_root(text, pitch.note_name(pitch.parse_note(root) - 1)))
    refused, _ = plan_json(lower)
    assert refused.exit_code == 2
    assert "stock" in refused.output


def test_most_on_a_mixed_inventory_is_beaten_by_no_larger_count(tmp_path):
    out = tmp_path / "garage.toml"
    have = ["--have", "8 ft x 1", "--have", "4 ft", "--have", "600 mm x 3"]
    result = run("from-stock", *have, "--stock-size", "al-1.000x0.065", "--kerf", "1/16 in", "--most",
                 "--highest", "C7", "--scale", "major", "-o", out)
    assert result.exit_code == 0, result.output
    text = out.read_text()
    count = int(re.search(r"^count = (\d+)$", text, flags=re.M).group(1))
    planned, data = plan_json(out)
    assert planned.exit_code == 0, planned.output
    assert len(data["pieces"]) == count and count >= 5
    # count + 1 at the highest root that keeps every note at or below C7: the shortest pieces
    # that many notes can have (lengths fall as the pitch rises), so if these do not fit, no
    # lower root does either
    top = pitch.parse_note("C7") - pitch.scale_offsets("major", count + 1)[-1]
    more = tmp_path / "garage-more.toml"
    more.write_text(with_root(text, pitch.note_name(top), count + 1))
    refused, _ = plan_json(more)
    assert refused.exit_code == 2 and "stock" in refused.output


def test_json_has_candidates_and_the_chosen_design():
    result = run("from-stock", "--have", "8 ft x 1", *TUBE, "--count", 5, "--scale", "major-pentatonic",
                 "--scale", "minor-pentatonic", "--format", "json")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert set(data) >= {"candidates", "chosen"}
    first = data["candidates"][0]
    assert data["chosen"]["root"] == first["root"] and data["chosen"]["scale"] == first["scale"]
    assert data["chosen"]["design"]["stock"]["lengths"] == [{"length": "8 ft", "count": 1}]
    # candidates come lowest root first
    hz = [c["root_hz"] for c in data["candidates"]]
    assert hz == sorted(hz)


def test_table_shows_both_units_and_the_caution():
    result = run("from-stock", "--have", "8 ft x 1", *TUBE, "--count", 5)
    assert result.exit_code == 0
    assert " in (" in result.output and " mm" in result.output
    assert "trimming raises the pitch" in result.output


@pytest.mark.parametrize("have, words", [
    ("96 x 1", "no unit"),
    ("0 ft x 1", "more than zero"),
    ("-2 ft x 1", "more than zero"),
    ("8 ft x 0", "count"),
    ("eight feet", "LENGTH"),
])
def test_bad_inventory_gets_one_line_and_exit_2(tmp_path, have, words):
    out = tmp_path / "never.toml"
    result = run("from-stock", "--have", have, *TUBE, "--count", 5, "-o", out)
    assert result.exit_code == 2
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and "--have" in lines[0] and words in lines[0]
    assert not out.exists()


def test_a_count_that_cannot_fit_names_the_closest_that_does(tmp_path):
    out = tmp_path / "never.toml"
    result = run("from-stock", "--have", "2 ft x 1", *TUBE, "--count", 12, "-o", out)
    assert result.exit_code == 2
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and "--count" in lines[0] and "closest that fits" in lines[0]
    closest = int(re.search(r"closest that fits: (\d+) notes", lines[0]).group(1))
    assert 1 <= closest < 12
    assert not out.exists() and "Traceback" not in result.output


def test_a_stick_shorter_than_any_practical_piece_is_refused():
    result = run("from-stock", "--have", "4 in x 3", *TUBE, "--count", 3)
    assert result.exit_code == 2 and "longer stick" in result.output


def test_design_file_stock_is_used(tmp_path):
    design = ROOT / "examples" / "just-copper.toml"  # [stock]: one 10 ft stick
    out = tmp_path / "copper.toml"
    result = run("from-stock", "--design", design, "--stock-size", "copper-m-3/4", "--count", 5, "-o", out)
    assert result.exit_code == 0, result.output
    assert 'length = "10 ft"' in out.read_text()
    assert plan_json(out)[0].exit_code == 0


def test_the_table_gives_the_planners_cut_lengths():
    # pitches planned in chunks for the table must come out as cutplan.plan() plans the set
    notes = [pitch.note_name(m) for m in range(40, 100, 5)]
    for allowance in ("risk 5 %", "0.5 %", "3 mm"):
        base = {"kind": "chime", "section": {"stock": "al-1.000x0.065"}}
        top = {"stock": {"allowance": allowance}}
        design = cutplan.design_from_mapping({**top, "set": [{**base, "notes": notes}]})
        planned = cutplan.plan(design)
        spec = design.sets[0]
        lengths, cuts = table.cut_length_table([t.frequency for t in spec.targets], base, top)
        for piece, length, cut in zip(planned.pieces, lengths, cuts, strict=True):
            assert length == pytest.approx(piece.length, abs=1e-9)
            assert cut == pytest.approx(piece.cut_length, abs=1e-6)  # brentq xtol 1e-7 m in the planner


def test_lowest_root_by_bisection_equals_a_scan_of_every_root():
    base = {"kind": "chime", "section": {"stock": "al-1.000x0.065"}}
    stock = {"lengths": [{"length": "8 ft", "count": 1}, {"length": "4 ft", "count": 1},
                         {"length": "600 mm", "count": 3}], "kerf": "1/16 in", "end_trim": "1/8 in"}
    scales, counts = ("major", "minor-pentatonic"), tuple(range(3, 11))
    answers, _ = search.lowest_roots(base, stock, scales, counts, "C2", "C8")
    found, _, _ = search._prepare(base, stock, scales, list(counts), "C2", "C8", 440.0, "equal", "mm", ())
    for s in scales:
        for c in counts:
            scan = next((r for r in found.roots(s, c)
                         if found.room.exact_fit(found.cut_lengths(r, s, c))), None)
            assert answers[(s, c)] == (None if scan is None else pitch.note_name(scan)), (s, c)


def test_exact_assignment_finds_a_tight_layout_and_refuses_an_impossible_one():
    # hand arithmetic: 0.6 + 0.5 + 0.4 = 1.5 m, so two 1.5 m sticks hold two such triples exactly
    room = pack.StockRoom(StockSpec((StockLength(1.5, 2),), kerf=0.0, end_trim=0.0))
    cuts = [0.6, 0.6, 0.5, 0.5, 0.4, 0.4]
    layout = room.exact_assignment(cuts)
    assert len(layout) == 2
    assert all(sum(cuts[i] for i in idx) <= 1.5 + 1e-12 for _, idx in layout)
    # five pieces of 0.6 m: only two fit on a 1.5 m stick (3 x 0.6 = 1.8), so two sticks hold four
    assert room.exact_assignment([0.6] * 5) == []
    # the same total length fits as three 0.5 m pieces per stick
    assert room.exact_fit([0.5] * 6) is True


def test_bounds_never_refuse_a_set_the_exact_search_places():
    room = pack.StockRoom(StockSpec((StockLength(2.4384, 1), StockLength(0.6, 3)), kerf=1.6e-3,
                                        end_trim=3.2e-3))
    for k in range(40):
        cuts = [0.2 + 0.37 * ((k * 7 + i * 13) % 11) / 11 for i in range(3 + k % 7)]
        if room.exact_fit(cuts):
            assert not room.cannot_fit(cuts)
        if room.first_fit(cuts):
            assert room.exact_fit(cuts)


def test_unknown_scale_and_bad_limits_are_one_line_errors():
    assert "--scale" in run("from-stock", "--have", "8 ft", *TUBE, "--count", 5, "--scale", "bluesy").output
    result = run("from-stock", "--have", "8 ft", *TUBE, "--count", 5, "--lowest", "C6", "--highest", "C5")
    assert result.exit_code == 2 and "--highest" in result.output
    result = run("from-stock", "--have", "8 ft", *TUBE)
    assert result.exit_code == 2 and "--count" in result.output


def test_design_file_gives_stock_section_and_scale(tmp_path):
    design = ROOT / "examples" / "porch-chimes.toml"
    out = tmp_path / "porch-again.toml"
    result = run("from-stock", "--design", design, "--count", 5, "-o", out)
    assert result.exit_code == 0, result.output
    original = tomllib.loads(design.read_text())
    written = tomllib.loads(out.read_text())
    assert written["stock"] == original["stock"]
    assert written["set"][0]["section"] == original["set"][0]["section"]
    assert plan_json(out)[0].exit_code == 0


def test_extra_material_folder_travels_with_the_written_design(tmp_path):
    folder = tmp_path / "shop-materials"
    folder.mkdir()
    # the packaged 6063-T5 values under another name (ASM data, key asm-6063 in sources.toml)
    (folder / "shop.toml").write_text(
        '[rack-alu]\ndescription = "Aluminium tube from the rack"\n'
        'modulus = { value = "68.9 GPa", source = "asm-6063", where = "6063-T5 sheet", kind = "handbook" }\n'
        'density = { value = "2700 kg/m3", source = "asm-6063", where = "6063-T5 sheet", kind = "handbook" }\n'
        'poisson = { value = 0.33, source = "asm-6063", where = "6063-T5 sheet", kind = "handbook" }\n')
    out = tmp_path / "elsewhere" / "rack.toml"
    result = run("from-stock", "--have", "8 ft", "--tube", "1 in x 0.065 in", "--material", "rack-alu",
                 "--materials", folder, "--count", 5, "-o", out)
    assert result.exit_code == 0, result.output
    assert plan_json(out)[0].exit_code == 0


def test_help_has_examples():
    result = run("from-stock", "--help")
    assert result.exit_code == 0 and "Example" in result.output and "--have" in result.output


def test_strike_note_target_names_the_root_by_the_note_heard(tmp_path):
    # 10 ft of 3/4 in EMT (ANSI C80.3 trade size 3/4). With --target strike-note the chosen root is
    # the strike note of its piece: the written design, planned, gives a first piece whose strike
    # note is the root's equal-tempered frequency, f = 440 * 2**((m - 69) / 12) (ISO 16:1975 for
    # A4 = 440 Hz; MIDI numbering with A4 = 69, MIDI 1.0 specification).
    out = tmp_path / "heard.toml"
    result = run("from-stock", "--have", "10 ft x 1", "--stock-size", "emt-3/4", "--count", 5,
                 "--target", "strike-note", "-o", out)
    assert result.exit_code == 0, result.output
    assert "strike note" in result.output
    written = tomllib.loads(out.read_text())
    assert written["set"][0]["target"] == "strike-note"
    planned, data = plan_json(out)
    assert planned.exit_code == 0, planned.output
    first = data["pieces"][0]
    root_hz = 440.0 * 2 ** ((pitch.parse_note(written["set"][0]["root"]) - 69) / 12)
    assert first["strike_note_hz"] == pytest.approx(root_hz, rel=1e-3)
    assert first["note"] == written["set"][0]["root"]
    # by the lowest mode the same stick is named about three octaves lower (mode 4 of a free-free
    # tube is near 8.9 times mode 1; its half is 4.5 times, a little over two octaves)
    low = run("from-stock", "--have", "10 ft x 1", "--stock-size", "emt-3/4", "--count", 5)
    low_root = re.search(r"chosen: 5 notes of (\S+)", low.output).group(1)
    assert pitch.parse_note(written["set"][0]["root"]) - pitch.parse_note(low_root) >= 24


@pytest.mark.parametrize("typed", ["3/4 EMT", "3/4 in EMT", "emt 3/4", "emt-0.75", '3/4" emt'])
def test_how_a_builder_writes_conduit_is_answered_with_the_size_meant(typed):
    # trade size 3/4 electrical metallic tubing is listed as emt-3/4 (ANSI C80.3 trade sizes)
    result = run("from-stock", "--have", "10 ft x 1", "--stock-size", typed, "--count", 5)
    assert result.exit_code == 2
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1, lines  # one mistake, one line: no second "--material: is missing"
    assert lines[0].startswith(f"error: --stock-size: {typed!r} is not a stock size; did you mean emt-3/4?")


def test_pentatonic_is_answered_with_the_pentatonic_scales():
    # the major and minor pentatonic are the two five-note scales usually meant (common practice)
    result = run("from-stock", "--have", "8 ft", *TUBE, "--count", 5, "--scale", "pentatonic")
    assert result.exit_code == 2
    assert "did you mean major-pentatonic or minor-pentatonic?" in result.output
    assert len([line for line in result.output.splitlines() if line.strip()]) == 1
