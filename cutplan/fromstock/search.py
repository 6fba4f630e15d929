"""Build from what you have: the sets of a scale that fit the stock on hand.

:func:`search` tries roots on every semitone of the practical range, the counts asked for and
each scale, and keeps the sets whose cut pieces have a proven layout on the sticks on hand
(the cut-list optimiser of :mod:`cutplan.layout.optimiser`).  The chosen set is written as a design (the
design file's keys, with the stock on hand as its ``[stock]``) and confirmed with
:func:`cutplan.plan`, so what the search promises is what ``cutplan plan`` shows.

How it stays fast
-----------------
- A piece's cut length depends only on its pitch, so every pitch is solved once
  (:mod:`cutplan.fromstock.table`); a candidate set is a lookup.
- Bounds rule a set out before any packing: its longest piece against the longest stick, the
  pieces plus kerfs against all the stock, and the Martello-Toth L2 bound against the number of
  sticks.
- Feasibility is monotone: raising the root shortens every piece (free-free beams and air
  columns get shorter as the pitch rises), and a set with one note fewer is a subset.  So the
  lowest root that fits and the largest count that fits are each found by bisection, packing a
  handful of sets instead of every one.

The objectives: ``"lowest"`` (the deepest root for a count), ``"most"`` (the most notes, then the
deepest root) and ``"waste"`` (the best utilisation of the sticks used, for a count).
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Any

import numpy as np

import cutplan
from cutplan import pitch
from cutplan.fromstock import pack, table
from cutplan.fromstock.output import SET_NAMES, design_mapping
from cutplan.layout import optimiser
from cutplan.planning.records import Plan
from cutplan.planning.service import REFUSALS, guarded_plan

__all__ = [
    "SEARCH_LOW", "SEARCH_HIGH", "MAX_COUNT", "PACK_OPS", "ROWS_PER_SCALE", "OBJECTIVES", "SearchError",
    "Candidate", "SearchResult", "search", "lowest_roots"
]


SEARCH_LOW = "C1"
"""Lowest root tried when no lower limit is given (a piece this low rarely fits any stick)."""
SEARCH_HIGH = "C8"
"""Highest note tried when no upper limit is given (top of the piano's range)."""
MAX_COUNT = 24
"""Most notes ``objective="most"`` tries [-] (two octaves of a 12-note scale)."""
PACK_OPS = 2_000_000
"""Work the cut-list optimiser may do per candidate set [operations, see cutplan.layout.optimiser._Work]
(about 2 CPU s; a tenth of a plan's): bounded by work, never by the clock, so the table is the
same on a busy machine.  Whether a set fits is settled by bounds, first fit and an exhaustive search with a node limit
(:mod:`cutplan.fromstock.pack`); the optimiser decides only sets too big for that, and lays out the
sets shown."""
ROWS_PER_SCALE = 4
"""Roots shown per scale and count in the ranked table [-]."""
OBJECTIVES = ("lowest", "most", "waste")


class SearchError(ValueError):
    """The inventory or the request cannot give any set: option (key), value, what would work."""

    def __init__(self, key, value, allowed):
        self.key, self.value, self.allowed = key, value, allowed
        shown = "" if value is None else f"{value!r} "
        super().__init__(f"{key}: {shown}{allowed}")


@dataclass(frozen=True)
class Candidate:
    """A set that fits: ``count`` notes of ``scale`` from ``root``, laid out on the stock.

    ``sticks`` are ((stock length [m], ((label, start [m], length [m]), ...), offcut [m]), ...).
    """

    scale: str
    root: str
    count: int
    notes: tuple[str, ...]
    cut_lengths: tuple[float, ...]
    sticks: tuple[tuple[float, tuple[tuple[str, float, float], ...], float], ...]
    proven_optimal: bool
    root_hz: float = 0.0

    @property
    def lowest(self):
        """The lowest note (the root)."""
        return self.notes[0]

    @property
    def highest(self):
        """The highest note."""
        return self.notes[-1]

    @property
    def sticks_used(self):
        """Number of sticks cut [-]."""
        return len(self.sticks)

    @property
    def stock_used(self):
        """Total length of the sticks cut [m]."""
        return float(sum(s[0] for s in self.sticks))

    @property
    def offcut(self):
        """What is left of the sticks cut, summed [m]."""
        return float(sum(s[2] for s in self.sticks))

    @property
    def utilisation(self):
        """Fraction of the sticks cut that ends up in pieces [-]."""
        used = self.stock_used
        return float(sum(self.cut_lengths)) / used if used else 0.0


@dataclass(frozen=True)
class SearchResult:
    """The ranked candidates, the chosen one, its design (the design file's keys) and its Plan."""

    objective: str
    candidates: tuple[Candidate, ...]
    chosen: Candidate
    design: dict[str, Any]
    plan: Plan
    units: str = "mm"
    stats: dict[str, Any] = field(default_factory=dict)
    notes: tuple[str, ...] = ()


def _sticks_of_layout(layout):
    return tuple((s.stock_length, tuple(s.cuts), s.offcut) for s in layout.sticks)


def _sticks_of_cut_list(cut_list):
    return tuple((s.stock_length, tuple((c.label, c.start, c.length) for c in s.cuts), s.offcut)
                 for s in cut_list.sticks)


class _Search:
    """The lookup table, bounds, memoised packing and bisections of one search."""

    def __init__(self, spec, stock, lo, hi, scales, max_count, temperament, a4, base_set, top, materials_dirs):
        self.spec, self.stock, self.lo, self.hi = spec, stock, lo, hi
        self.temperament, self.a4 = temperament, a4
        self.name = SET_NAMES.get(spec.kind, "pieces")
        self.offsets = {s: pitch.scale_offsets(s, max_count) for s in scales}
        self.stats = {"pitches": 0, "sets_bounded_out": 0, "sets_first_fit": 0, "sets_exact": 0,
                      "sets_packed": 0, "table_s": 0.0, "exact_s": 0.0, "pack_s": 0.0}
        self.memo, self.layouts, self.answers, self.notes = {}, {}, {}, []
        self.room = pack.StockRoom(stock)
        self.types, self.longest = self.room.types, self.room.longest
        self._build_table(base_set, top, materials_dirs)

    def _frequency(self, root, off):
        return pitch.degree_frequency(root, off, self.temperament, self.a4)

    def _build_table(self, base_set, top, materials_dirs):
        start = time.process_time()
        keys = {}
        for offs in self.offsets.values():
            for r in range(self.lo, self.hi + 1):
                for off in offs:
                    if r + off > self.hi:
                        break
                    keys.setdefault(self._key(r, off), self._frequency(r, off))
        self.keys = list(keys)
        freqs = np.array([keys[k] for k in self.keys])
        lengths, cuts = table.cut_length_table(freqs, base_set, top, materials_dirs)
        short = table.stubby_below(self.spec)
        cuts = np.where(np.isnan(lengths) | (lengths < short), np.nan, cuts)
        self.table = dict(zip(self.keys, cuts.tolist(), strict=True))
        self.freqs = dict(zip(self.keys, freqs.tolist(), strict=True))
        self.stats["pitches"] = len(self.keys)
        self.stats["table_s"] = time.process_time() - start

    def practical_range(self):
        """(lowest, highest) note names of the pieces this section makes on this stock: the
        lowest whose piece fits the longest stick, the highest without a stubby-piece warning."""
        room = optimiser.usable_length(self.longest, self.stock.end_trim) + optimiser.FIT_TOLERANCE
        ok = [self.freqs[k] for k, cut in self.table.items() if not math.isnan(cut) and cut <= room]
        if not ok:
            return None
        return tuple(pitch.nearest_note(f, self.a4)[0] for f in (min(ok), max(ok)))

    def _key(self, root, off):
        # equal temperaments: a pitch is its MIDI number; others depend on the root as well
        return root + off if self.temperament == "equal" else (root, off)

    def cut_lengths(self, root, scale, count):
        """Cut lengths [m] of the set, or None when a note lies outside the practical range."""
        offs = self.offsets[scale][:count]
        if root < self.lo or root + offs[-1] > self.hi:
            return None
        out = [self.table.get(self._key(root, off), math.nan) for off in offs]
        return None if any(math.isnan(x) for x in out) else out

    def roots(self, scale, count):
        """Roots whose ``count`` notes all lie in the window and the practical range, low to high."""
        return [r for r in range(self.lo, self.hi - self.offsets[scale][count - 1] + 1)
                if self.cut_lengths(r, scale, count) is not None]

    def bounded_out(self, cuts):
        """Whether a bound proves the pieces cannot fit (see :meth:`pack.StockRoom.cannot_fit`)."""
        return self.room.cannot_fit(cuts)

    def fits(self, root, scale, count):
        """Whether the set has a layout on the stock on hand (bounds, then first fit, then the
        exact packer)."""
        key = (root, scale, count)
        if key not in self.memo:
            self.memo[key] = self._fits(root, scale, count)
        return self.memo[key]

    def _fits(self, root, scale, count):
        cuts = self.cut_lengths(root, scale, count)
        if cuts is None:
            return False
        if self.bounded_out(cuts):
            self.stats["sets_bounded_out"] += 1
            return False
        if self.room.first_fit(cuts):
            self.stats["sets_first_fit"] += 1
            return True
        start = time.process_time()
        exact = self.room.exact_fit(cuts)
        self.stats["exact_s"] += time.process_time() - start
        if exact is not None:
            self.stats["sets_exact"] += 1
            return exact
        return self.layout(root, scale, count) is not None

    def layout(self, root, scale, count):
        """The optimiser's Layout (fewest sticks) of the set, or None when it finds none."""
        key = (root, scale, count)
        if key in self.layouts:
            return self.layouts[key]
        cuts = self.cut_lengths(root, scale, count)
        start = time.process_time()
        self.stats["sets_packed"] += 1
        items = [optimiser.Item(f"{self.name}-{i}", c) for i, c in enumerate(cuts, start=1)]
        try:
            out = optimiser.layout(items, self.types, self.stock.kerf, self.stock.end_trim, None, ops=PACK_OPS)
        except optimiser.StockError:
            out = None
        self.stats["pack_s"] += time.process_time() - start
        self.layouts[key] = out
        return out

    def lowest_root(self, scale, count):
        """The lowest root whose set fits, or None.

        Fitting is monotone in the root and in the count, so the search starts at the lowest
        root no bound rules out (and no lower than the answer for one note fewer), gallops up
        until a set fits, then bisects back.
        """
        roots = self.roots(scale, count)
        floor = self.answers.get((scale, count - 1), roots[0] if roots else None)
        roots = [r for r in roots if floor is not None and r >= floor]
        first = next((i for i, r in enumerate(roots) if not self.bounded_out(self.cut_lengths(r, scale, count))),
                     None)
        if first is None:
            return self.answers.setdefault((scale, count), None)
        lo, step, hi = first, 1, first
        while not self.fits(roots[hi], scale, count):
            if hi == len(roots) - 1:
                return self.answers.setdefault((scale, count), None)
            lo, hi, step = hi + 1, min(hi + step, len(roots) - 1), step * 2
        while lo < hi:  # roots[hi] fits; everything below lo does not
            mid = (lo + hi) // 2
            if self.fits(roots[mid], scale, count):
                hi = mid
            else:
                lo = mid + 1
        self.answers[(scale, count)] = roots[hi]
        return roots[hi]

    def most_notes(self, scale, counts):
        """The largest count in ``counts`` that fits at some root (bisection), or None."""
        counts = [c for c in counts if c <= len(self.offsets[scale]) and self.roots(scale, c)]

        def ok(c):
            return self.fits(self.roots(scale, c)[-1], scale, c)  # highest root: shortest pieces

        if not counts or not ok(counts[0]):
            return None
        lo, hi = 0, len(counts) - 1
        while lo < hi:
            mid = (lo + hi + 1) // 2
            if ok(counts[mid]):
                lo = mid
            else:
                hi = mid - 1
        return counts[lo]

    def candidate(self, root, scale, count):
        layout = self.layout(root, scale, count)
        if layout is None:
            self.notes.append(f"{count} notes of {pitch.note_name(root)} {scale} fit by exhaustive search, but "
                              "the cut-list optimiser (and so `cutplan plan`) finds no layout; not offered")
            return None
        offs = self.offsets[scale][:count]
        return Candidate(scale, pitch.note_name(root), count, tuple(pitch.note_name(root + o) for o in offs),
                         tuple(self.cut_lengths(root, scale, count)), _sticks_of_layout(layout),
                         bool(layout.proven_optimal), self._frequency(root, 0))


def _ranked(search, scales, objective, count, counts, top):
    """The candidates, best first.  Rows are ranked before they are laid out, so the optimiser
    lays out only the rows shown (all fitting roots for "waste", which ranks by the layout)."""
    rows = []
    if objective in ("lowest", "waste"):
        for s in scales:
            r0 = search.lowest_root(s, count)
            if r0 is not None:
                roots = [r for r in search.roots(s, count) if r >= r0]
                rows += [(r, s, count) for r in (roots[:ROWS_PER_SCALE] if objective == "lowest" else roots)]
    else:
        for s in scales:
            best = search.most_notes(s, counts)
            if best is None:
                continue
            if best == counts[-1]:
                search.notes.append(f"{best} notes of {s} fit, the most this search tries; more may fit")
            for c in sorted({best, best - 1} & set(counts), reverse=True):
                r0 = search.lowest_root(s, c)
                if r0 is not None:
                    rows += [(r, s, c) for r in search.roots(s, c) if r >= r0][:ROWS_PER_SCALE if c == best else 1]
    rows = [row for row in rows if search.fits(*row)]
    if objective == "waste":
        cands = [c for c in (search.candidate(*row) for row in rows) if c is not None]
        return sorted(cands, key=lambda c: (-round(c.utilisation, 9), c.root_hz, c.scale))[:top]
    if objective == "lowest":
        rows.sort(key=lambda row: (search._frequency(row[0], 0), row[1]))
    else:
        rows.sort(key=lambda row: (-row[2], search._frequency(row[0], 0), row[1]))
    cands = []
    for row in rows:
        cand = search.candidate(*row)
        if cand is not None:
            cands.append(cand)
        if len(cands) == top:
            break
    return cands


def _window(lowest, highest):
    bounds = []
    for key, value in (("lowest", lowest or SEARCH_LOW), ("highest", highest or SEARCH_HIGH)):
        try:
            bounds.append(pitch.parse_note(value))
        except pitch.PitchError as exc:
            raise SearchError(key, value, f"is not {exc.accepted}") from None
    if bounds[1] <= bounds[0]:
        if highest is None:
            raise SearchError("lowest", lowest, f"must be below the highest note tried ({SEARCH_HIGH})")
        raise SearchError("highest", highest, f"must be above the lowest note ({lowest or SEARCH_LOW})")
    return bounds


def _prepare(base_set, stock, scales, counts, lowest, highest, a4, temperament, units, materials_dirs,
             inch_denominator=None):
    """Validate the request and build the search: (_Search, scales, kind, design top keys)."""
    scales = tuple(dict.fromkeys(scales or ("major-pentatonic",)))
    for s in scales:
        if s not in pitch.SCALES:
            raise SearchError("scale", s, f"is not {pitch.scale_forms(s)}")
    kind = base_set.get("kind")
    if kind not in SET_NAMES:
        raise SearchError("kind", kind, f"must be one of: {', '.join(SET_NAMES)}")
    if "undercut" in base_set:
        raise SearchError("undercut", None, "is not searched: from-stock plans uniform bars; add the undercut "
                       "to the written design afterwards")
    if "stock" in base_set:
        raise SearchError("set.stock", None, "is not used: give the stock on hand as the search's stock table")
    if not isinstance(stock, dict) or not stock.get("lengths"):
        raise SearchError("stock", None, 'lists no sticks; give at least one, e.g. "8 ft x 1"')
    lo, hi = _window(lowest, highest)
    top_keys = {"units": units, "tuning": {"a4": a4, "temperament": temperament}}
    if inch_denominator is not None:
        top_keys["inch_denominator"] = inch_denominator
    probe = cutplan.design_from_mapping({**top_keys, "set": [{**base_set, "notes": ["A4"]}], "stock": stock},
                                        materials_dirs, name="from-stock")
    found = _Search(probe.sets[0], probe.stock, lo, hi, scales, max(counts), temperament, a4, base_set,
                    {**top_keys, "stock": {k: v for k, v in stock.items() if k != "lengths"}}, materials_dirs)
    return found, scales, kind


def search(base_set, stock, scales=("major-pentatonic",), count=None, objective="lowest", lowest=None,
           highest=None, a4=pitch.A4_FREQUENCY, temperament="equal", units="mm", materials_dirs=(), top=10,
           max_count=MAX_COUNT, title=None, inch_denominator=None):
    """Search the sets of ``scales`` that fit ``stock`` and choose one by ``objective``.

    ``base_set`` is a [[set]] table without its notes (kind, material, section, model, ...) and
    ``stock`` a [stock] table (lengths with counts, kerf, end_trim, allowance), both with the
    design file's keys; ``inch_denominator`` (None: the design default) goes into the design.
    ``count`` is required for "lowest" and "waste"; "most" tries 1 to
    ``max_count`` notes.  Raises :class:`cutplan.design.DesignErrors` for bad keys and
    :class:`SearchError` (naming what does fit) when nothing fits.
    """
    start = time.process_time()
    if objective not in OBJECTIVES:
        raise SearchError("objective", objective, f"must be one of: {', '.join(OBJECTIVES)}")
    if objective != "most" and not (isinstance(count, int) and 1 <= count <= max_count):
        raise SearchError("count", count, f"must be a whole number from 1 to {max_count} (or ask for the most notes)")
    counts = list(range(1, max_count + 1)) if objective == "most" else [count]
    found, scales, kind = _prepare(base_set, stock, scales, counts, lowest, highest, a4, temperament, units,
                                   materials_dirs, inch_denominator)
    cands = _ranked(found, scales, objective, count, counts, max(1, top))
    if not cands:
        raise _nothing_fits(found, scales, count, objective, counts)
    confirm_start = time.process_time()
    chosen, design, the_plan, skipped = _confirm(cands, base_set, stock, units, a4, temperament, title, kind,
                                                 materials_dirs, inch_denominator)
    found.notes += [f"{c.count} notes of {c.root} {c.scale}: the planner did not confirm the layout; not offered"
                    for c in cands[:skipped]]
    cands = cands[skipped:]
    found.stats["confirm_s"] = time.process_time() - confirm_start
    found.stats["practical_range"] = found.practical_range()
    found.stats["window"] = (pitch.note_name(found.lo), pitch.note_name(found.hi))
    found.stats["total_s"] = time.process_time() - start
    return SearchResult(objective, tuple(cands), chosen, design, the_plan, units, dict(found.stats),
                     tuple(dict.fromkeys(found.notes)))


def lowest_roots(base_set, stock, scales, counts, lowest=None, highest=None, a4=pitch.A4_FREQUENCY,
                 temperament="equal", materials_dirs=()):
    """The whole map: {(scale, count): lowest root that fits (note name) or None}, and the stats.

    The same table, bounds and packing as :func:`search`, without choosing or confirming.
    """
    start = time.process_time()
    found, scales, _kind = _prepare(base_set, stock, scales, list(counts), lowest, highest, a4, temperament,
                                    "mm", materials_dirs)
    out = {}
    for s in scales:
        for c in counts:
            r = found.lowest_root(s, c)
            out[(s, c)] = None if r is None else pitch.note_name(r)
    found.stats["total_s"] = time.process_time() - start
    return out, dict(found.stats)


def _confirm(cands, base_set, stock, units, a4, temperament, title, kind, materials_dirs, inch_denominator=None):
    """Plan the best candidate's design with the real planner; the first that plans is chosen."""
    for k, cand in enumerate(cands):
        mapping = design_mapping(base_set, stock, cand, units, a4, temperament, title, kind, materials_dirs,
                                 inch_denominator)
        try:  # the one guarded plan service, as the command line and the page
            the_plan = guarded_plan(cutplan.design_from_mapping(mapping, materials_dirs, name="from-stock"))
        except REFUSALS:
            continue
        if the_plan.cut_list is None:
            continue
        cut = tuple(p.cut_length for p in the_plan.pieces)
        chosen = Candidate(cand.scale, cand.root, cand.count, cand.notes, cut,
                           _sticks_of_cut_list(the_plan.cut_list), bool(the_plan.cut_list.proven_optimal),
                           cand.root_hz)
        return chosen, mapping, the_plan, k
    raise SearchError("stock", None, "no candidate set could be confirmed by the planner; "
                   "check the material and section with `cutplan length`")


def _nothing_fits(found, scales, count, objective, counts):
    """A SearchError naming the closest thing that does fit."""
    shown = ", ".join(scales)
    window = f"{pitch.note_name(found.lo)} to {pitch.note_name(found.hi)}"
    best = None
    for s in scales:
        c = found.most_notes(s, [k for k in range(1, (count or max(counts)) + 1)])
        if c is not None and (best is None or c > best[1]):
            best = (s, c, found.lowest_root(s, c))
    longest = optimiser.usable_length(found.longest, found.stock.end_trim)
    if best is None:
        usable = [v for v in found.table.values() if not math.isnan(v)]
        if not usable:
            return SearchError("lowest/highest", window, "holds no note this section makes without a stubby-piece "
                            "warning; widen the range")
        shortest = min(usable)
        return SearchError("stock", None, f"the longest stick gives {longest * 1000:.0f} mm after end trim, shorter "
                        f"than the shortest practical piece from {window} ({shortest * 1000:.0f} mm); "
                        "add a longer stick or a smaller section")
    s, c, r = best
    if objective == "most":
        return SearchError("stock", None, f"no set fits; closest: {c} notes of {s} from {pitch.note_name(r)}")
    return SearchError("count", count, f"notes of {shown} do not fit the stock on hand at any root from {window}; "
                    f"closest that fits: {c} notes of {s} from {pitch.note_name(r)}")
