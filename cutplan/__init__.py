"""cutplan: cut plans for hand-built tuned percussion (chimes, bars, air columns, resonators).

The public API: ``load_design(path)`` or ``design_from_mapping(data)`` gives a validated
design, and ``plan(design)`` gives the Plan, which owns every fact the outputs state
(``plan.sets``, ``plan.pieces``, ``plan.cut_list``). Heavy modules load on first use.

>>> import cutplan
>>> design = cutplan.design_from_mapping({"set": [{"kind": "chime", "notes": ["D5"],
...     "material": "aluminum-6063-t5", "section": {"stock": "al-1.000x0.065"}}]})
>>> p = cutplan.plan(design)
>>> p.pieces[0].label, p.cut_list is None
('chimes-1', True)
"""

__version__ = "0.1.0"

# the functions below import the design reader and planner when called: ``import cutplan`` takes
# 0.003 s CPU, 0.49 s with them at the top (measured, median of 9), and the CLI imports it for --version

__all__ = ["load_design", "design_from_mapping", "plan", "__version__"]


def _loader(materials_dirs):
    from cutplan.materials import load_library

    def load(design_dirs):
        return load_library(list(materials_dirs) + list(design_dirs))

    return load


def load_design(path, materials_dirs=()):
    """Read and validate a design file (TOML). Raises ``cutplan.design.DesignErrors``.

    ``materials_dirs`` are extra folders of material and stock tables, besides the packaged
    ones and the design's own ``material_dirs``.
    """
    from cutplan.design import load_design as _load

    return _load(path, _loader(materials_dirs))[0]


def design_from_mapping(data, materials_dirs=(), name="(design)", base_dir=None):
    """Validate a design given as a dict with the design file's keys (same checks, same errors).

    ``name`` stands for the file in error lines; the design's ``material_dirs`` are resolved
    against ``base_dir`` (default: the current folder).
    """
    from cutplan.design import design_from_mapping as _from

    return _from(data, _loader(materials_dirs), name, "." if base_dir is None else base_dir)[0]


def plan(design, progress=None, stock_override=None):
    """Plan a validated design: every piece and the cut list. Raises ``DesignErrors``.

    Pure: no file is read per call (the packaged shop tables are read once per process).
    Guarded as every front end's plan is: numeric warnings stay inside, and numbers that overflow
    or give an absurd piece raise ``cutplan.numeric.NumericError`` (one line)."""
    from cutplan.planning.service import guarded_plan

    return guarded_plan(design, progress=progress, stock_override=stock_override)
