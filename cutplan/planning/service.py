"""One guarded plan for every front end: the command line, the page and from-stock.

:func:`guarded_plan` runs :func:`cutplan.planning.planner.plan` with the same guards wherever it
is called from: numeric warnings kept inside, an overflow or an absurd or non-finite length
refused with one line (:func:`cutplan.numeric.checked_plan`).  :func:`plan_mapping` validates a
design given as a mapping (the design file's keys) and plans it through the same guard.  A
refusal is :class:`cutplan.design.DesignErrors` or :class:`cutplan.numeric.NumericError`
(both in :data:`REFUSALS`); :func:`refusal_lines` and :func:`refusal_records` turn either into
what a front end shows: one line per problem, or records (code, key, message).
"""

from __future__ import annotations

from cutplan.design import DesignErrors, design_from_mapping
from cutplan.design.notices import Notice
from cutplan.numeric import NumericError, checked_plan
from cutplan.planning.planner import plan

__all__ = ["NUMERIC", "REFUSALS", "guarded_plan", "plan_mapping", "refusal_lines", "refusal_records"]

REFUSALS = (DesignErrors, NumericError)
"""What a guarded plan raises for a design it cannot plan."""
NUMERIC = "numeric"
"""Code of a refusal for numbers that overflow or give an impossible piece."""


def guarded_plan(design, where=None, progress=None, stock_override=None, tables=None):
    """The Plan of a validated design, planned quietly and checked; raises one of :data:`REFUSALS`.

    ``where`` names the design in a numeric refusal (default: its file); ``progress``,
    ``stock_override`` and ``tables`` are passed to the planner."""
    name = where if where is not None else design.path
    return checked_plan(lambda: plan(design, progress=progress, stock_override=stock_override, tables=tables),
                        name)


def plan_mapping(data, load_library, name="(design)", base_dir=".", progress=None, tables=None):
    """(Design, Plan) of a design given as a mapping: validated as a design file is
    (``load_library(design_dirs)`` gives the material library), then :func:`guarded_plan`."""
    design = design_from_mapping(data, load_library, name, base_dir)[0]
    return design, guarded_plan(design, name, progress=progress, tables=tables)


def refusal_lines(exc):
    """One line per problem of a refusal, as the command line prints them."""
    if isinstance(exc, DesignErrors):
        return [str(e) for e in exc.errors]
    return [str(exc)]


def refusal_records(exc, name=""):
    """A refusal as records (code, key, message), the messages without the design's ``name``."""
    if isinstance(exc, DesignErrors):
        return [e.record() for e in exc.errors]
    return [Notice(NUMERIC, "(design)", str(exc).removeprefix(f"{name}: " if name else ""))]
