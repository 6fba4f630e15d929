"""From-stock results as plain data: the design a search writes (mapping and TOML text) and its JSON.

Pure functions of a :class:`cutplan.fromstock.search.SearchResult`; lengths in mm in the JSON, as in the
plan JSON.
"""

from __future__ import annotations

from pathlib import Path

from cutplan import pitch

__all__ = ["SET_NAMES", "design_mapping", "candidate_dict", "result_dict"]

SET_NAMES = {"chime": "chimes", "bar": "bars", "air-column": "pipes"}
"""Name of the written set per kind (the pieces are labelled chimes-1, bars-1, ...)."""


def design_mapping(base_set, stock, candidate, units="mm", a4=pitch.A4_FREQUENCY, temperament="equal",
                   title=None, kind="chime", materials_dirs=(), inch_denominator=None):
    """The design (the design file's keys) of a candidate set, with ``stock`` as its [stock]
    (and ``inch_denominator`` when one was asked for).

    Extra material folders are written as absolute ``material_dirs``, so the design plans
    unchanged wherever it is saved.
    """
    name = SET_NAMES.get(kind, "pieces")
    out = {
        "title": title or f"{candidate.count} notes of {candidate.root} {candidate.scale} from the stock on hand",
        "units": units,
    }
    if inch_denominator is not None:
        out["inch_denominator"] = inch_denominator
    if materials_dirs:
        out["material_dirs"] = [str(Path(d).resolve()) for d in materials_dirs]
    out.update({
        "tuning": {"a4": a4, "temperament": temperament},
        "set": [{"name": name, **base_set, "scale": candidate.scale, "root": candidate.root,
                 "count": candidate.count}],
        "stock": stock,
    })
    return out


def candidate_dict(c, rank=None):
    """A candidate as JSON-ready data (mm)."""
    out = {} if rank is None else {"rank": rank}
    out.update({
        "root": c.root, "scale": c.scale, "count": c.count, "notes": list(c.notes),
        "lowest": c.lowest, "highest": c.highest, "root_hz": round(c.root_hz, 3),
        "cut_lengths_mm": [round(x * 1000, 1) for x in c.cut_lengths],
        "sticks_used": c.sticks_used, "stock_used_mm": round(c.stock_used * 1000, 1),
        "offcut_mm": round(c.offcut * 1000, 1), "utilisation_percent": round(100 * c.utilisation, 1),
        "proven_optimal": c.proven_optimal,
    })
    return out


def result_dict(result):
    """``{"candidates": [...], "chosen": {...}}`` of a search (mm), with the chosen set's design
    and cut list."""
    chosen = candidate_dict(result.chosen)
    chosen["design"] = result.design
    chosen["sticks"] = [{"stock_length_mm": round(s[0] * 1000, 1), "offcut_mm": round(s[2] * 1000, 1),
                         "cuts": [{"label": lab, "start_mm": round(a * 1000, 1), "length_mm": round(b * 1000, 1)}
                                  for lab, a, b in s[1]]} for s in result.chosen.sticks]
    return {"format": "cutplan-fit/1", "objective": result.objective, "notes": list(result.notes),
            "candidates": [candidate_dict(c, i) for i, c in enumerate(result.candidates, start=1)],
            "chosen": chosen}
