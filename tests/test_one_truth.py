"""One plan, one truth: every output states the same cut length and allowance for a piece.

The check is between the outputs themselves (terminal table, plan.csv, cutlist.csv, plan.json,
packet text), for every example and for variants of the allowance and the units, so that no
renderer can round or restate a fact on its own.
"""

import csv
import io
import json
import re
import tomllib
from pathlib import Path

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from tests.pdf_text import page_texts

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))


def _toml(data):
    """A small TOML writer for the variants (strings, numbers, lists, inline tables)."""

    def value(v):
        if isinstance(v, str):
            return json.dumps(v)
        if isinstance(v, bool):
            return "true" if v else "false"
        if isinstance(v, (int, float)):
            return repr(v)
        if isinstance(v, list):
            return "[" + ", ".join(value(x) for x in v) + "]"
        return "{ " + ", ".join(f"{k} = {value(x)}" for k, x in v.items()) + " }"

    lines = [f"{k} = {value(v)}" for k, v in data.items() if not isinstance(v, (dict, list)) or
             (isinstance(v, list) and not all(isinstance(x, dict) for x in v))]
    for k, v in data.items():
        if isinstance(v, dict):
            lines += [f"[{k}]"] + [f"{a} = {value(b)}" for a, b in v.items()]
        elif isinstance(v, list) and v and all(isinstance(x, dict) for x in v):
            for item in v:
                lines += [f"[[{k}]]"] + [f"{a} = {value(b)}" for a, b in item.items()]
    return "\n".join(lines) + "\n"


def _variant(path, tmp_path, units=None, allowance=None):
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    if units:
        data["units"] = units
    if allowance:
        data.setdefault("stock", {})["allowance"] = allowance
    out = tmp_path / f"{path.stem}-{units}-{(allowance or 'default').replace(' ', '').replace('%', 'pc')}.toml"
    out.write_text(_toml(data), encoding="utf-8")
    return out


CASES = [(p, None, None) for p in EXAMPLES] + [
    (ROOT / "examples" / name, units, allowance)
    for name in ("porch-chimes.toml", "garden-conduit-chime.toml", "classroom-pipes.toml")
    for units, allowance in (("mm", "0.5 %"), ("in", "risk 20 %"), ("in", "3 mm"), ("mm", None))
]


def _plan_outputs(design, tmp_path):
    # one run prints the terminal table and writes the files (plan.json, CSVs, packet, templates)
    out = tmp_path / "packet"
    table = CliRunner().invoke(cli, ["plan", str(design), "-o", str(out)])
    assert table.exit_code == 0, table.output
    return table.stdout, out


@pytest.fixture(scope="module")
def outputs(tmp_path_factory, example_packet):
    """``outputs(example, units, allowance)`` -> (design file, terminal table, output folder, packet
    pages or None): an example as it stands is written once per run (tests/conftest.py), a variant
    once for this module (the variant tests below read the same packets as the parametrised one)."""
    made = {}

    def get(path, units=None, allowance=None):
        key = (path.stem, units, allowance)
        if key not in made:
            if units or allowance:
                folder = tmp_path_factory.mktemp("variant")
                design = _variant(path, folder, units, allowance)
                made[key] = (design, *_plan_outputs(design, folder), None)
            else:
                table, out, pages = example_packet(path.stem)
                made[key] = (path, table, out, pages)
        return made[key]

    return get


@pytest.mark.parametrize("design,units,allowance", CASES,
                         ids=[f"{p.stem}-{u or 'own'}-{a or 'own'}" for p, u, a in CASES])
def test_every_output_states_the_same_cut_length(design, units, allowance, outputs, example_plan):
    # an example as it stands is planned and written once per session (tests/conftest.py); a variant here
    planned = None if units or allowance else example_plan(design.stem)
    design, table, out, pages = outputs(design, units, allowance)
    plan = json.loads((out / "plan.json").read_text(encoding="utf-8"))
    rows = list(csv.DictReader(io.StringIO((out / "plan.csv").read_text(encoding="utf-8"))))
    cuts = {}
    if (out / "cutlist.csv").exists():
        for r in csv.DictReader(io.StringIO((out / "cutlist.csv").read_text(encoding="utf-8"))):
            if r["label"]:
                cuts[r["label"]] = (r["length_mm"], r["length_in"])
    lines = table.splitlines()
    inch_first = plan["units"] == "in"
    for row, piece in zip(rows, plan["pieces"], strict=True):
        label, mm, inch = row["label"], row["cut_length_mm"], row["cut_length_in"].removesuffix(" in")
        assert piece["label"] == label
        # plan.json keeps two decimals of the same number: the two roundings overlap
        assert abs(piece["cut_length_mm"] - float(mm)) <= 0.05 + 0.005 + 1e-9
        # the cut list on stock states the very same strings as the plan table
        if label in cuts:
            assert cuts[label] == (mm, row["cut_length_in"]), label
        # the terminal row of this piece shows the same cut length, in the design's units first
        line = next(x for x in lines if x.startswith(label + " "))
        cell = f"{inch} ({mm})" if inch_first else f"{mm} ({inch})"
        assert cell in line, (cell, line)
        # the allowance a piece is cut with is cut minus finished length everywhere
        added = piece["allowance_mm"]["added"]
        assert added == pytest.approx(piece["cut_length_mm"] - piece["length_mm"], abs=0.011)
    _check_packet_text(design, out, planned, pages)


def _check_packet_text(design, out, plan=None, pages=None):
    """The packet's cut list, tuning sheet and templates state each piece's cut length and its one
    allowance with the same strings, the plan's units first (``pages``: the packet's page texts,
    when already read)."""
    import cutplan
    from cutplan.units import format_length

    plan = plan or cutplan.plan(cutplan.load_design(design))
    if pages is None:
        pages = page_texts(out / "packet.pdf")
    cut_pages = "\n".join(t for t in pages if "Cut list: " in t)
    tuning = "\n".join(t for t in pages if "Tuning sheet: " in t)
    strips = "\n".join(t for t in pages if "Marking strips" in t)
    for p in plan.pieces:
        first, second = format_length(p.cut_length, plan.units).removesuffix(")").split(" (")
        assert f"{first}\n{second}" in cut_pages, (p.label, first, second)
        allowance = format_length(p.allowance, plan.units).split(" (")[0]
        if not p.stopper:
            assert f"(+{allowance})" in cut_pages, (p.label, allowance)
            assert f"rough cut {format_length(p.cut_length, plan.units)}" in strips, p.label
            # the tuning sheet row of this piece carries the same allowance
            row = tuning[tuning.index(f"\n{p.label}\n"):][:400]
            assert f"\n{allowance}\n" in row, (p.label, allowance, row)
            assert f"chance sharp {p.sharp_risk * 100:.0f} %" in " ".join(row.split())


def test_a_risk_allowance_is_stated_as_written(outputs):
    _, table, out, _ = outputs(ROOT / "examples" / "porch-chimes.toml", "in", "risk 20 %")
    plan = json.loads((out / "plan.json").read_text(encoding="utf-8"))
    assert plan["sets"][0]["allowance"] == "risk 20 %"
    assert "allowance risk 20 %" in table
    # at the risk rule's own cut length, the chance of a sharp piece is the rule's 20 %
    assert all(p["sharp_risk"] == pytest.approx(0.20, abs=0.005) for p in plan["pieces"])


def test_a_fixed_allowance_states_its_own_chance_of_a_sharp_piece(outputs):
    _, table, out, _ = outputs(ROOT / "examples" / "porch-chimes.toml", "mm", "0.5 %")
    plan = json.loads((out / "plan.json").read_text(encoding="utf-8"))
    for p in plan["pieces"]:
        # a fixed 0.5 % is 0.5 % of the finished length, and its own sharp risk is reported
        assert p["allowance_mm"]["added"] == pytest.approx(0.005 * p["length_mm"], abs=0.011)
        risk = p["sharp_risk"]
        assert 0 < risk < 1
        line = next(x for x in table.splitlines() if x.startswith(p["label"] + " "))
        assert re.search(rf"\b{risk * 100:.0f} %", line)
        if risk > 0.10:
            assert any("chance" in w for w in p["warnings"])


def test_inch_designs_put_inches_first_in_every_command(tmp_path):
    porch = ROOT / "examples" / "porch-chimes.toml"  # units = "in"
    runner = CliRunner()
    table = runner.invoke(cli, ["plan", str(porch)]).output
    assert "length in (mm)" in table and "tube 1.000 x 0.065 in wall" in table
    trim = runner.invoke(cli, ["trim", str(porch), "porch-1", "--measured", "583.1"]).output
    assert re.search(r"measured 583\.10 Hz at \d+-\d+/32 in \(\d+\.\d mm\)", trim)
    length = runner.invoke(cli, ["length", "--note", "D5", "--stock", "al-1.000x0.065", "--units", "in"]).output
    assert re.search(r"length\s+19-27/32 in \(503\.9 mm\)", length)
    cutlist = runner.invoke(cli, ["cutlist", str(porch)]).output
    assert "in (mm)" in cutlist.splitlines()[0]


def test_the_public_api_plans_a_design_file_and_a_mapping():
    import cutplan

    p = cutplan.plan(cutplan.load_design(ROOT / "examples" / "porch-chimes.toml"))
    assert "porch-1" in str(p.cut_list)
    # every cut on the stock is the piece's own cut length, the very same float
    by_label = {piece.label: piece.cut_length for piece in p.pieces}
    assert all(c.length == by_label[c.label] for s in p.cut_list.sticks for c in s.cuts)
    one = cutplan.plan(cutplan.design_from_mapping({"set": [{
        "kind": "chime", "notes": ["D5"], "material": "aluminum-6063-t5",
        "section": {"shape": "tube", "outer": "1 in", "wall": "0.065 in"}}]}))
    assert one.pieces[0].length == pytest.approx(p.pieces[0].length, rel=1e-12)
