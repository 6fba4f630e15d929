"""Cut-list optimisation: hand-checked instances, optima known by construction, brute force."""

import itertools
import random

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.layout.optimiser import Item, StockError, StockType, layout, lower_bound_l2


def items(*lengths_mm):
    return [Item(f"p{i + 1}", length / 1000) for i, length in enumerate(lengths_mm)]


def used_length(stick, kerf):
    """End of the last piece from the stick's end."""
    last = stick.cuts[-1]
    return last[1] + last[2]


def test_hand_checked_two_sticks():
    # By hand: 1000 mm sticks, 3 mm kerf, no end trim. 600+300 = 900 + 1 kerf = 903 <= 1000;
    # 500+400 = 900 + 3 = 903 <= 1000; total 1800 + kerfs cannot fit one stick -> 2 sticks.
    out = layout(items(600, 500, 400, 300), [StockType(1.0)], kerf=0.003)
    assert len(out.sticks) == 2 and out.proven_optimal
    for stick in out.sticks:
        assert used_length(stick, 0.003) <= 1.0 + 1e-12


def test_piece_that_fits_exactly_with_kerf():
    # 500 + 497 + one kerf of 3 = 1000: fits exactly on a 1000 mm stick (no cut after the last)
    out = layout(items(500, 497), [StockType(1.0)], kerf=0.003)
    assert len(out.sticks) == 1
    assert out.sticks[0].offcut == 0.0
    assert out.sticks[0].cuts[1][1] == pytest.approx(0.503)


def test_piece_one_mm_too_long_for_the_kerf():
    # 500 + 498 + 3 = 1001 > 1000: needs two sticks, though the lengths alone (998) would fit
    assert len(layout(items(500, 498), [StockType(1.0)], kerf=0.003).sticks) == 2
    assert len(layout(items(500, 498), [StockType(1.0)], kerf=0.0).sticks) == 1


def test_piece_that_fits_exactly_without_kerf():
    assert len(layout(items(500, 500), [StockType(1.0)], kerf=0.0).sticks) == 1
    assert len(layout(items(500, 500), [StockType(1.0)], kerf=0.001).sticks) == 2


def test_end_trim_is_taken_from_both_factory_ends():
    # Both factory ends of a stick are squared before use (common practice): a piece never ends at
    # the raw far end. By hand: 1000 mm - 2 x 10 mm = 980 mm for pieces; the last piece needs no
    # separating cut when it ends where the far end is squared, so 980 mm fits and 981 mm does not.
    out = layout(items(980), [StockType(1.0)], kerf=0.003, end_trim=0.010)
    assert out.sticks[0].cuts[0][1] == pytest.approx(0.010)
    assert out.sticks[0].offcut == pytest.approx(0.010 - 0.003)  # the far end's squaring, less its cut
    with pytest.raises(StockError, match="end trim at each end"):
        layout(items(981), [StockType(1.0)], kerf=0.003, end_trim=0.010)


def test_offcut_accounts_for_the_separating_cut():
    out = layout(items(600), [StockType(1.0)], kerf=0.003)
    assert out.sticks[0].offcut == pytest.approx(0.397)


def test_optimum_known_by_construction():
    # Cut 6 sticks of 2000 mm into 3 pieces each (sizes include the kerf), shuffle: optimum is 6.
    rng = random.Random(7)
    kerf = 0.002
    pieces = []
    for _ in range(6):
        a, b = rng.uniform(0.3, 0.9), rng.uniform(0.3, 0.7)
        c = 2.0 - a - b - 2 * kerf  # a + b + c + 2 kerfs = 2.0 exactly
        pieces += [a, b, c]
    rng.shuffle(pieces)
    its = [Item(f"q{i}", x) for i, x in enumerate(pieces)]
    out = layout(its, [StockType(2.0)], kerf=kerf)
    assert len(out.sticks) == 6 and out.lower_bound == 6 and out.proven_optimal


def partitions(n):
    """Every way to split pieces 0..n-1 into groups (Bell(n) of them; n <= 8 here)."""
    if n == 0:
        yield []
        return
    for rest in partitions(n - 1):
        for k in range(len(rest)):
            yield rest[:k] + [rest[k] + [n - 1]] + rest[k + 1:]
        yield rest + [[n - 1]]


def group_length(lengths, group, kerf):
    return sum(lengths[i] for i in group) + kerf * (len(group) - 1)


def brute_force_min_sticks(lengths, stock, kerf):
    """Smallest number of sticks over every partition of the pieces."""
    return min(len(p) for p in partitions(len(lengths))
               if all(group_length(lengths, g, kerf) <= stock + 1e-12 for g in p))


@pytest.mark.parametrize("seed", range(12))
def test_matches_brute_force_on_small_instances(seed):
    rng = random.Random(seed)
    n = rng.randint(3, 8)
    lengths = [round(rng.uniform(0.15, 0.95), 3) for _ in range(n)]
    kerf = rng.choice([0.0, 0.002, 0.004])
    out = layout([Item(f"r{i}", x) for i, x in enumerate(lengths)], [StockType(1.2)], kerf=kerf)
    assert len(out.sticks) == brute_force_min_sticks(lengths, 1.2, kerf)
    assert out.proven_optimal
    placed = sorted(c[0] for s in out.sticks for c in s.cuts)
    assert placed == sorted(f"r{i}" for i in range(n))


def test_l2_bound_beats_the_continuous_bound():
    # Martello & Toth 1990: three items over half the bin need three bins
    assert lower_bound_l2([0.51, 0.51, 0.51], 1.0) == 3
    assert lower_bound_l2([0.5, 0.5, 0.5, 0.5], 1.0) == 2


def test_prices_choose_the_cheaper_mix():
    # Two 1.4 m pieces: one 3 m stick at 20 or two 1.5 m sticks at 8 each (16): cheaper is 2 x 1.5
    out = layout(items(1400, 1400), [StockType(3.0, price=20.0), StockType(1.5, price=8.0)], kerf=0.003)
    assert out.cost == pytest.approx(16.0)
    assert sorted(s.stock_length for s in out.sticks) == [1.5, 1.5]


def test_limited_inventory_says_how_many_more_sticks():
    with pytest.raises(StockError, match="more stick"):
        layout(items(900, 900, 900), [StockType(1.0, count=2)], kerf=0.003)


def test_piece_longer_than_every_stock_names_it():
    with pytest.raises(StockError, match="p1.*longest stock"):
        layout(items(1500), [StockType(1.0), StockType(1.2)])


def test_deterministic():
    its = [Item(f"s{i}", x / 1000) for i, x in enumerate([812, 455, 455, 301, 700, 650, 220, 990, 120])]
    a = layout(its, [StockType(1.5)], kerf=0.002)
    b = layout(list(reversed(its)), [StockType(1.5)], kerf=0.002)
    assert [s.cuts for s in a.sticks] == [s.cuts for s in b.sticks]


def test_exact_search_improves_on_first_fit_decreasing():
    # FFD is known to miss here (sizes with capacity 1.0): 0.45 0.45 0.35 0.3 0.25 0.2 ... build an
    # instance where the optimum (2 sticks: 0.5+0.3+0.2, 0.45+0.35+0.2) differs from FFD's 3 if any.
    its = items(500, 450, 350, 300, 200, 200)
    out = layout(its, [StockType(1.0)], kerf=0.0)
    assert len(out.sticks) == 2 and out.proven_optimal


def test_cutlist_command_and_what_if(tmp_path):
    from pathlib import Path

    porch = str(Path(__file__).resolve().parent.parent / "examples" / "porch-chimes.toml")
    result = CliRunner().invoke(cli, ["cutlist", porch])
    assert result.exit_code == 0 and "offcut" in result.output
    what_if = CliRunner().invoke(cli, ["cutlist", porch, "--stock", "3 ft x 4", "--format", "json"])
    assert what_if.exit_code == 0, what_if.output
    assert '"lower_bound"' in what_if.output
    short = CliRunner().invoke(cli, ["cutlist", porch, "--stock", "2 ft x 1"])
    assert short.exit_code == 2 and "more stick" in short.output
    bad = CliRunner().invoke(cli, ["cutlist", porch, "--stock", "ten feet"])
    assert bad.exit_code == 2 and "--stock" in bad.output


def test_pieces_of_different_sections_never_share_a_stick(example_json):
    data = example_json("workshop-marimba")
    for stick in data["stock"]["sticks"]:
        sets = {c["label"].rsplit("-", 1)[0] for c in stick["cuts"]}
        assert len(sets) == 1


def test_plan_json_has_the_stock_key_shape(example_json):
    data = example_json("porch-chimes")
    stick = data["stock"]["sticks"][0]
    assert {"stock_length_mm", "cuts", "offcut_mm"} <= set(stick)
    assert {"label", "start_mm", "length_mm"} <= set(stick["cuts"][0])
    assert data["stock"]["proven_optimal"] is True
    assert stick["stock_length_mm"] == pytest.approx(2438.4)


def test_combinations_never_overfill(tmp_path):
    rng = random.Random(3)
    for _ in range(5):
        its = [Item(f"t{i}", rng.uniform(0.1, 1.1)) for i in range(25)]
        kerf, trim = 0.003, 0.005
        out = layout(its, [StockType(2.4), StockType(1.2)], kerf=kerf, end_trim=trim)
        for stick in out.sticks:
            assert used_length(stick, kerf) <= stick.stock_length + 1e-9
            for (_a, sa, la), (_b, sb, _lb) in itertools.pairwise(stick.cuts):
                assert sb == pytest.approx(sa + la + kerf)


def test_cutlist_csv_written_with_the_plan(tmp_path):
    import csv
    from pathlib import Path

    porch = str(Path(__file__).resolve().parent.parent / "examples" / "porch-chimes.toml")
    out = tmp_path / "o"
    assert CliRunner().invoke(cli, ["plan", porch, "-o", str(out)]).exit_code == 0
    rows = list(csv.DictReader((out / "cutlist.csv").read_text().splitlines()))
    cuts = [r for r in rows if r["cut"] != "offcut"]
    assert [r["label"] for r in cuts] == [f"porch-{i}" for i in range(1, 6)]
    assert float(cuts[0]["start_mm"]) == pytest.approx(3.2, abs=0.05)  # 1/8 in end trim
    text = CliRunner().invoke(cli, ["cutlist", porch, "--format", "csv"]).output
    assert text.startswith("stick,group,stock_length_mm")


def brute_force_min_cost(lengths, types, kerf):
    """Cheapest layout over every partition of the pieces: each group on its cheapest stick."""

    def group_cost(group):
        fits = [price for length, price in types if group_length(lengths, group, kerf) <= length + 1e-12]
        return min(fits) if fits else float("inf")

    return min(sum(group_cost(g) for g in p) for p in partitions(len(lengths)))


@pytest.mark.parametrize("seed", range(8))
def test_priced_layout_matches_brute_force(seed):
    rng = random.Random(100 + seed)
    lengths = [round(rng.uniform(0.2, 1.1), 3) for _ in range(rng.randint(4, 7))]
    types = [(1.2, 9.0), (2.4, 14.0), (3.0, 19.5)]
    out = layout([Item(f"c{i}", x) for i, x in enumerate(lengths)],
                 [StockType(length, price=price) for length, price in types], kerf=0.003)
    assert out.cost == pytest.approx(brute_force_min_cost(lengths, types, 0.003))
    assert out.proven_optimal


def seeded_priced_instance(n=45, seed=1007):
    """A priced instance like bench/bench_stock.py #08: pieces 150-1000 mm, 8 ft and 10 ft sticks."""
    rng = random.Random(seed)
    its = [Item(f"p{i}", round(rng.uniform(0.15, 1.0), 4)) for i in range(n)]
    return its, [StockType(96 * 0.0254, price=12.0), StockType(120 * 0.0254, price=14.0)]


def layout_key(out):
    return [(s.stock_length, s.cuts, s.offcut) for s in out.sticks], out.proven_optimal, out.cost


def test_same_layout_however_slow_the_clock(monkeypatch):
    # The search is bounded by work, not time: a clock that races ahead (a machine a thousand
    # times slower, or one under heavy load) must give the very same layout.
    import time

    its, types = seeded_priced_instance()
    quiet = layout(its, types, kerf=0.0016, end_trim=0.0032)
    ticks = [0.0]

    def racing_clock():
        ticks[0] += 10.0
        return ticks[0]

    monkeypatch.setattr(time, "perf_counter", racing_clock)
    loaded = layout(its, types, kerf=0.0016, end_trim=0.0032)
    assert layout_key(loaded) == layout_key(quiet)
    assert quiet.proven_optimal


def test_a_time_limit_stops_with_a_message_never_a_different_layout(monkeypatch):
    import time

    from cutplan.layout.optimiser import StockTimeout

    its, types = seeded_priced_instance()
    ticks = [0.0]

    def racing_clock():
        ticks[0] += 10.0
        return ticks[0]

    monkeypatch.setattr(time, "perf_counter", racing_clock)
    with pytest.raises(StockTimeout, match="time limit"):
        layout(its, types, kerf=0.0016, end_trim=0.0032, time_limit=1.0)


def test_work_bound_is_deterministic_and_honest():
    # With too little work allowed, the layout is not proven; run twice, it is the same layout.
    its, types = seeded_priced_instance()
    a = layout(its, types, kerf=0.0016, end_trim=0.0032, effort=2)
    b = layout(its, types, kerf=0.0016, end_trim=0.0032, effort=2)
    assert layout_key(a) == layout_key(b)
    assert not a.proven_optimal
