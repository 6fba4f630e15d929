"""Bounded work: cheap bounds before any search, a cut-list optimiser bounded by counted work
(never the clock) that says honestly when it stopped early, stick-mix enumeration with a ceiling,
from-stock tables that do not change with the machine's load, and ``unusual`` materials still
held to what a solid can be.  Speed figures are in bench/bench_stock_scaling.py, not here.

Scenarios and numbers are our own demos (porch and garden chimes)."""

from __future__ import annotations

import json
import random
import time

import pytest
from click.testing import CliRunner

import cutplan.layout.columns as columns
from cutplan.cli import cli
from cutplan.layout.optimiser import Item, StockError, StockType, layout

INCH = 0.0254  # exact by definition (international inch, 1959)


def _run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args])


def _pieces(n, seed=5):
    rng = random.Random(seed)
    return [Item(f"p{i}", round(rng.uniform(0.15, 0.9), 4)) for i in range(n)]


def test_too_little_stock_in_total_is_answered_without_any_search(monkeypatch):
    items = _pieces(400)
    kerf, trim = 1.6e-3, 3.2e-3
    stick = 96 * INCH
    # the oracle is arithmetic: the pieces with their kerfs are longer than all the sticks together
    count = int(sum(it.length + kerf for it in items) / (stick - trim + kerf)) - 1

    def no_search(*_args, **_kwargs):
        raise AssertionError("a search ran although the total length already says no")

    monkeypatch.setattr(columns, "column_generation", no_search)
    monkeypatch.setattr(columns, "cheaper_mixes", no_search)
    with pytest.raises(StockError, match="cannot hold all 400 pieces"):
        layout(items, [StockType(stick, count=count)], kerf=kerf, end_trim=trim)


def test_out_of_work_with_no_layout_says_so_instead_of_blaming_the_stock():
    # 4 + 3 + 3 twice fills two sticks of 10 exactly (by hand), but first fit decreasing puts
    # both 4s on one stick and runs out; finding the layout needs the exact search
    items = [Item(f"p{i}", x) for i, x in enumerate([0.4, 0.4, 0.3, 0.3, 0.3, 0.3])]
    types = [StockType(1.0, count=2)]
    assert len(layout(items, types).sticks) == 2
    with pytest.raises(StockError, match="work limit"):
        layout(items, types, ops=1)


def test_a_work_bound_in_operations_is_deterministic_and_honest():
    items = _pieces(60, seed=8)
    types = [StockType(96 * INCH, price=12.0), StockType(120 * INCH, price=14.0)]
    a = layout(items, types, kerf=1.6e-3, end_trim=3.2e-3, ops=50_000)
    b = layout(items, types, kerf=1.6e-3, end_trim=3.2e-3, ops=50_000)
    assert [(s.stock_length, s.cuts) for s in a.sticks] == [(s.stock_length, s.cuts) for s in b.sticks]
    assert a.cost == b.cost
    # whatever is shown carries a bound that is no more than it: the gap is stated, never hidden
    assert a.cost_lower_bound <= a.cost and (a.proven_optimal or a.cost_lower_bound < a.cost)


def test_stick_mix_enumeration_has_a_ceiling(monkeypatch):
    # eight priced lengths: the mixes below a cost grow as a power of eight; the walk must stop
    monkeypatch.setattr(columns, "MAX_MIX_NODES", 5_000)
    types = [StockType((60 + 12 * k) * INCH, price=8.0 + k) for k in range(8)]
    caps = [t.length for t in types]
    mixes, complete = columns._mixes(types, 40.0, caps, 400.0)
    assert not complete and len(mixes) <= columns.MAX_MIXES


def _racing_clocks(monkeypatch):
    """Every clock the search could read races ahead: a machine a thousand times slower."""
    ticks = [0.0]

    def racing():
        ticks[0] += 10.0
        return ticks[0]

    monkeypatch.setattr(time, "perf_counter", racing)
    monkeypatch.setattr(time, "monotonic", racing)
    monkeypatch.setattr(time, "time", racing)
    monkeypatch.setattr(time, "process_time", racing)  # CPU time races too: a busy machine


def test_from_stock_gives_the_same_table_however_slow_the_machine(monkeypatch):
    args = ["from-stock", "--have", "8 ft x 2", "--have", "6 ft x 2", "--stock-size", "al-1.000x0.065",
            "--kerf", "1/16 in", "--count", 12, "--scale", "major", "--scale", "minor-pentatonic",
            "--format", "json"]
    quiet = _run(*args)
    assert quiet.exit_code == 0, quiet.output
    _racing_clocks(monkeypatch)
    loaded = _run(*args)
    assert loaded.exit_code == 0, loaded.output
    assert json.loads(loaded.output)["candidates"] == json.loads(quiet.output)["candidates"]


UNUSUAL = '''[[set]]
kind = "chime"
notes = ["{note}"]
section = {{ shape = "tube", outer = "1 in", wall = "0.065 in" }}
material = {{ modulus = "{modulus}", density = "{density}", unusual = true }}
'''


@pytest.mark.parametrize("modulus, density", [("3.7e78 GPa", "2700 kg/m3"), ("70 GPa", "1e-9 kg/m3"),
                                               ("1e-12 GPa", "2700 kg/m3"), ("70 GPa", "1e9 kg/m3")])
def test_unusual_still_means_a_possible_solid(tmp_path, modulus, density):
    path = tmp_path / "odd.toml"
    path.write_text(UNUSUAL.format(note="C5", modulus=modulus, density=density))
    result = _run("plan", path, "-o", tmp_path / "packet")
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert "any solid" in result.output and not (tmp_path / "packet").exists()


def test_an_absurdly_long_piece_is_refused_before_any_renderer(tmp_path):
    # diamond-stiff and aerogel-light is a possible solid, but a C1 chime of it would be tens of
    # metres long (bar speed sqrt(E / rho) about 35,000 m/s against aluminium's 5,100 m/s)
    path = tmp_path / "odd.toml"
    path.write_text(UNUSUAL.format(note="C1", modulus="1000 GPa", density="1 kg/m3"))
    result = _run("plan", path, "-o", tmp_path / "packet")
    assert result.exit_code == 2 and "Traceback" not in result.output, result.output
    assert "30 m" in result.output and not (tmp_path / "packet").exists()


@pytest.mark.parametrize("key, value", [("shear_ratio", "inf"), ("shear_ratio", 1e308), ("shear_ratio", 0.0),
                                        ("poisson", "-inf")])
def test_material_ratios_have_ranges(tmp_path, key, value):
    path = tmp_path / "odd.toml"
    body = ('[[set]]\nkind = "bar"\nnotes = ["C5"]\nsection = { bar = "38 mm x 19 mm" }\n'
            'material = { modulus = "12 GPa", density = "700 kg/m3", class = "wood", %s = %s }\n')
    path.write_text(body % (key, value))
    result = _run("plan", path, "--format", "json")
    assert result.exit_code == 2 and "Traceback" not in result.output, result.output
    assert key in result.output and "Infinity" not in result.output


def test_from_stock_never_hands_the_optimiser_a_clock(monkeypatch):
    # the optimiser's own result does not depend on the clock (tests/test_stock.py); from-stock
    # must not add a wall-clock limit that turns a slow machine's sets into "not offered"
    from cutplan.fromstock import search

    real, limits = search.optimiser.layout, []

    def spy(items, types, kerf=0.0, end_trim=0.0, time_limit=None, **kw):
        limits.append(time_limit)
        return real(items, types, kerf, end_trim, time_limit, **kw)

    monkeypatch.setattr(search.optimiser, "layout", spy)
    result = _run("from-stock", "--have", "8 ft x 2", "--stock-size", "al-1.000x0.065", "--count", 8)
    assert result.exit_code == 0, result.output
    assert limits and set(limits) == {None}


def test_a_cut_list_stopped_early_states_its_bound(tmp_path, monkeypatch):
    from cutplan.layout import optimiser

    design = tmp_path / "porch.toml"
    design.write_text('[[set]]\nname = "porch"\nkind = "chime"\nnotes = ["C5", "D5", "E5", "F5", "G5", "A5", "B5", '
                      '"C6", "D6", "E6", "F6", "G6"]\nsection = { stock = "al-1.000x0.065" }\n'
                      '[stock]\nlengths = [{ length = "6 ft", price = 9.5 }, { length = "8 ft", price = 12 }]\n')
    monkeypatch.setattr(optimiser, "DEFAULT_OPS", 1)  # no work at all beyond first fit decreasing
    result = _run("cutlist", design)
    assert result.exit_code == 0, result.output
    assert "best found, not proven optimal" in result.output and "no layout costs less than" in result.output
