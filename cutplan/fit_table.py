"""Cut lengths of one kind of piece at many pitches at once: the table the from-stock search
draws its candidate sets from.

A piece's cut length depends only on its target frequency and on the material, section, model
and cut allowance, never on the other notes of its set.  So every pitch the search could need
is solved once, here, and each candidate set is a lookup.

Two engines give the same numbers as :func:`cutplan.plan`:

- uniform chimes and bars tuned by their fundamental are solved in one vectorised call of the
  planner's own physics (:func:`cutplan.physics.timoshenko.fundamental_lengths`, or the slender
  closed form) with the planner's allowance rule (the risk quantile of the same Monte Carlo
  spreads, or the fixed allowance);
- everything else (air columns, strike-note chimes) goes through ``cutplan.plan`` itself, in
  designs of up to 128 frequencies per set.

The search confirms the set it chooses with ``cutplan.plan`` on the design it writes, so a
drift between the two engines would show up there (and in ``tests/test_from_stock.py``).
"""

from __future__ import annotations

import math

import numpy as np

PLAN_CHUNK = 128
"""Frequencies per set in one planning call (the design file's limit per set) [-]."""
SETS_PER_PLAN = 3
"""Sets per planning call (the design file's limit is 400 pieces) [-]."""


def fast_engine_applies(spec):
    """Whether the vectorised engine reproduces the planner for this set."""
    return (spec.kind in ("chime", "bar") and spec.undercut is None and spec.target_mode == "fundamental"
            and spec.model in ("timoshenko", "slender"))


def _beam_lengths(spec, frequencies):
    from cutplan.physics import beam, timoshenko
    from cutplan.planner import beam_constants

    ei, mu, kga, rho_i = beam_constants(spec.material, spec.section, spec.model)
    if spec.model == "slender":
        return np.atleast_1d(beam.free_free_length(frequencies, ei, mu)).astype(float)
    return np.atleast_1d(timoshenko.fundamental_lengths(frequencies, ei, mu, kga, rho_i)).astype(float)


def _fast_cut_lengths(spec, stock, frequencies):
    """(lengths, cut lengths) [m] of uniform chimes or bars, as ``planner._plan_beam_set`` gives them."""
    from cutplan import uncertainty
    from cutplan.design import DEFAULT_SHARP_RISK

    f = np.asarray(frequencies, dtype=float)
    length = _beam_lengths(spec, f)
    if stock is not None and stock.allowance_risk is None:
        return length, length * (1 + stock.allowance) + stock.allowance_length
    risk = stock.allowance_risk if stock is not None and stock.allowance_risk else DEFAULT_SHARP_RISK
    ratios = uncertainty.beam_ratios(spec.material, spec.section, spec.outer_tolerance, spec.wall_tolerance)
    # uncertainty.cut_length_for_risk: the cut sounds target / q, q the (1 - risk) quantile
    q = float(np.quantile(ratios, 1.0 - risk))
    if q <= 1.0:
        return length, length.copy()
    return length, _beam_lengths(spec, f / q)


def _planned_cut_lengths(base_set, top, frequencies, materials_dirs):
    """(lengths, cut lengths) [m] through ``cutplan.plan``; NaN where a pitch cannot be made."""
    import cutplan
    from cutplan.design import DesignErrors

    freqs = [float(x) for x in frequencies]
    lengths = np.full(len(freqs), np.nan)
    cuts = np.full(len(freqs), np.nan)
    chunks = [list(range(i, min(i + PLAN_CHUNK, len(freqs)))) for i in range(0, len(freqs), PLAN_CHUNK)]
    batches = [chunks[i:i + SETS_PER_PLAN] for i in range(0, len(chunks), SETS_PER_PLAN)]
    for batch in batches:
        try:
            _plan_batch(cutplan, base_set, top, freqs, batch, lengths, cuts, materials_dirs)
        except DesignErrors:
            # some pitch of the batch cannot be made (an air column too short for its bore):
            # plan each pitch alone so the others still count
            for chunk in batch:
                for i in chunk:
                    try:
                        _plan_batch(cutplan, base_set, top, freqs, [[i]], lengths, cuts, materials_dirs)
                    except DesignErrors:
                        pass
    return lengths, cuts


def _plan_batch(cutplan, base_set, top, freqs, batch, lengths, cuts, materials_dirs):
    sets = [{**base_set, "name": f"pitch{k + 1}", "frequencies": [freqs[i] for i in chunk]}
            for k, chunk in enumerate(batch)]
    design = cutplan.design_from_mapping({**top, "set": sets}, materials_dirs)
    planned = cutplan.plan(design)
    for chunk, set_plan in zip(batch, planned.sets, strict=True):
        for i, piece in zip(chunk, set_plan.pieces, strict=True):
            lengths[i] = piece.length
            cuts[i] = piece.cut_length


def cut_length_table(spec, stock, frequencies, base_set=None, top=None, materials_dirs=()):
    """(lengths, cut lengths) [m] for each frequency [Hz]; NaN where the pitch cannot be made.

    ``spec`` and ``stock`` are the validated set and stock (a design's ``SetSpec`` and
    ``StockSpec``); ``base_set`` and ``top`` are the same set and design as mappings (the design
    file's keys), used when the pitches have to be planned one design at a time.
    """
    freqs = np.asarray(frequencies, dtype=float)
    if freqs.size == 0:
        return np.zeros(0), np.zeros(0)
    if fast_engine_applies(spec):
        try:
            return _fast_cut_lengths(spec, stock, freqs)
        except (ValueError, FloatingPointError):
            pass  # fall back on the planner, which reports pitches it cannot solve
    if base_set is None:
        raise ValueError("this kind of set needs base_set and top to be planned")
    return _planned_cut_lengths(base_set, top or {}, freqs, materials_dirs)


def stubby_below(spec):
    """Shortest length [m] the planner plans without a "stubby piece" warning (beams), or the
    shortest air column it plans without a "short column" warning; 0 when neither applies."""
    from cutplan.planner import STUBBY_RATIO

    if spec.kind in ("chime", "bar"):
        return STUBBY_RATIO * spec.section.depth
    if spec.kind == "air-column":
        return 4 * spec.section.air_radius
    return 0.0


def finite(x):
    """Whether a table entry is a real length (the planner could make that pitch)."""
    return x is not None and not math.isnan(x)
