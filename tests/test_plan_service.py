"""One guarded plan for every front end, and a planner that reads no file per call.

References: the bar speed sqrt(E / rho) of a free-free bar (Rayleigh, The Theory of Sound, 1877,
vol. 1, ch. VIII): a chime of a 1000 GPa, 1 kg/m3 solid tuned to C1 (32.7 Hz) would be tens of
metres long, past the 30 m any piece may have (cutplan.numeric.LENGTH_RANGE, common practice).
The shop tables are the packaged ``materials/shop/*.toml``.
"""

import builtins
import io
import math

import numpy as np
import pytest
from click.testing import CliRunner

import cutplan
from cutplan.cli import cli
from cutplan.fromstock.table import cut_length_table
from cutplan.materials import shop_table
from cutplan.numeric import NumericError
from cutplan.planning import shopping
from cutplan.planning.service import guarded_plan, plan_mapping
from cutplan.web.service import Planner, WebErrors

ABSURD_SET = {"kind": "chime", "section": {"shape": "tube", "outer": "1 in", "wall": "0.065 in"},
              "material": {"modulus": "1000 GPa", "density": "1 kg/m3", "unusual": True}}
PORCH_LIKE = {"title": "t", "set": [{"kind": "chime", "notes": ["D5", "A5"], "material": "aluminum-6063-t5",
                                     "section": {"stock": "al-1.000x0.065"}}]}


def _absurd_file(path):
    lines = ['[[set]]', 'kind = "chime"', 'notes = ["C1"]',
             'section = { shape = "tube", outer = "1 in", wall = "0.065 in" }',
             'material = { modulus = "1000 GPa", density = "1 kg/m3", unusual = true }']
    path.write_text("\n".join(lines) + "\n")
    return path


def test_plan_reads_no_file_once_the_shop_tables_are_loaded(monkeypatch):
    design = cutplan.design_from_mapping(PORCH_LIKE)
    shop_table.cache_clear()
    shopping.shop_tables.cache_clear()
    opened = []
    real_open = builtins.open

    def spy(file, *args, **kwargs):
        opened.append(str(file))
        return real_open(file, *args, **kwargs)

    monkeypatch.setattr(builtins, "open", spy)
    monkeypatch.setattr(io, "open", spy)
    first = cutplan.plan(design)
    assert sorted(p.rsplit("/", 1)[-1] for p in opened) == ["cautions.toml", "hang_holes.toml", "hanging_lines.toml"]
    opened.clear()
    second = cutplan.plan(design)
    assert opened == []  # the second plan of the process reads nothing
    assert second.pieces == first.pieces and second.shopping == first.shopping and second.cautions == first.cautions


def test_plan_takes_the_shop_tables_as_a_parameter():
    design = cutplan.design_from_mapping(PORCH_LIKE)
    tables = shopping.shop_tables()
    assert guarded_plan(design, tables=tables).cautions == cutplan.plan(design).cautions
    fewer = shopping.ShopTables(tables.hang_holes, tables.lines, {"caution": []})
    assert len(guarded_plan(design, tables=fewer).cautions) == 1  # only the codes line: the tables were used


def test_the_absurd_piece_is_refused_alike_by_the_command_line_the_page_and_from_stock(tmp_path):
    data = {"title": "t", "set": [{**ABSURD_SET, "notes": ["C1"]}]}
    # the guarded service itself
    with pytest.raises(NumericError) as info:
        plan_mapping(data, lambda dirs: cutplan.materials.load_library(list(dirs)), "odd")
    assert "30 m" in str(info.value)
    # the command line: exit 2, one line
    result = CliRunner().invoke(cli, ["plan", str(_absurd_file(tmp_path / "odd.toml"))])
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert len([x for x in result.output.splitlines() if x.strip()]) == 1 and "30 m" in result.output
    # the page: a record with a code
    with pytest.raises(WebErrors) as web:
        Planner().compute(data)
    (err,) = web.value.errors
    assert err["code"] == "numeric" and err["key"] == "(design)" and "30 m" in err["message"]
    # from-stock's table of cut lengths: that pitch cannot be made (NaN), never a 30 m piece
    lengths, cuts = cut_length_table([32.70], {**ABSURD_SET, "name": "x"})
    assert math.isnan(lengths[0]) and math.isnan(cuts[0])


def test_from_stock_plans_pitches_through_the_guard():
    # a pitch the guard accepts is planned to the same length as the command line's plan
    base = {"kind": "chime", "material": "aluminum-6063-t5", "section": {"stock": "al-1.000x0.065"}}
    lengths, _cuts = cut_length_table([587.33], base)
    planned = guarded_plan(cutplan.design_from_mapping({"set": [{**base, "frequencies": [587.33]}]}))
    assert np.isclose(lengths[0], planned.pieces[0].length, rtol=0, atol=1e-9)
