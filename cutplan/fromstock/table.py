"""Cut lengths of one kind of piece at many pitches at once: the table the from-stock search
draws its candidate sets from.

A piece's cut length depends only on its target frequency and on the material, section, model
and cut allowance, never on the other notes of its set.  So every pitch the search could need
is planned once, here, by ``cutplan.plan`` itself (in designs of up to 128 frequencies per set),
and each candidate set is a lookup.  There is no second engine: the table is the planner's own
numbers, so the search and ``cutplan plan`` cannot drift apart.
"""

from __future__ import annotations

import numpy as np

import cutplan
from cutplan.planning.frequency import STUBBY_RATIO
from cutplan.planning.service import REFUSALS, guarded_plan

__all__ = ["PLAN_CHUNK", "SETS_PER_PLAN", "cut_length_table", "stubby_below"]


PLAN_CHUNK = 128
"""Frequencies per set in one planning call (the design file's limit per set) [-]."""
SETS_PER_PLAN = 3
"""Sets per planning call (the design file's limit is 400 pieces) [-]."""


def _planned_cut_lengths(base_set, top, frequencies, materials_dirs):
    """(lengths, cut lengths) [m] through ``cutplan.plan``; NaN where a pitch cannot be made."""
    freqs = [float(x) for x in frequencies]
    lengths = np.full(len(freqs), np.nan)
    cuts = np.full(len(freqs), np.nan)
    chunks = [list(range(i, min(i + PLAN_CHUNK, len(freqs)))) for i in range(0, len(freqs), PLAN_CHUNK)]
    batches = [chunks[i:i + SETS_PER_PLAN] for i in range(0, len(chunks), SETS_PER_PLAN)]
    for batch in batches:
        try:
            _plan_batch(cutplan, base_set, top, freqs, batch, lengths, cuts, materials_dirs)
        except REFUSALS:
            # some pitch of the batch cannot be made (an air column too short for its bore):
            # plan each pitch alone so the others still count
            for chunk in batch:
                for i in chunk:
                    try:
                        _plan_batch(cutplan, base_set, top, freqs, [[i]], lengths, cuts, materials_dirs)
                    except REFUSALS:
                        pass
    return lengths, cuts


def _plan_batch(cutplan, base_set, top, freqs, batch, lengths, cuts, materials_dirs):
    sets = [{**base_set, "name": f"pitch{k + 1}", "frequencies": [freqs[i] for i in chunk]}
            for k, chunk in enumerate(batch)]
    design = cutplan.design_from_mapping({**top, "set": sets}, materials_dirs)
    planned = guarded_plan(design)  # the one guarded plan service, as the command line and the page
    for chunk, set_plan in zip(batch, planned.sets, strict=True):
        for i, piece in zip(chunk, set_plan.pieces, strict=True):
            lengths[i] = piece.length
            cuts[i] = piece.cut_length


def cut_length_table(frequencies, base_set, top=None, materials_dirs=()):
    """(lengths, cut lengths) [m] for each frequency [Hz]; NaN where the pitch cannot be made.

    ``base_set`` and ``top`` are the set and the rest of the design as mappings (the design
    file's keys); each pitch is planned as a piece of that set.
    """
    freqs = np.asarray(frequencies, dtype=float)
    if freqs.size == 0:
        return np.zeros(0), np.zeros(0)
    return _planned_cut_lengths(base_set, top or {}, freqs, materials_dirs)


def stubby_below(spec):
    """Shortest length [m] the planner plans without a "stubby piece" warning (beams), or the
    shortest air column it plans without a "short column" warning; 0 when neither applies."""
    if spec.kind in ("chime", "bar"):
        return STUBBY_RATIO * spec.section.depth
    if spec.kind == "air-column":
        return 4 * spec.section.air_radius
    return 0.0
