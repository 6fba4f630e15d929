"""What every command shares: one-line errors with exit code 2, loading and planning a design,
writing files whole, and the common options."""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import click

from cutplan import folder
from cutplan.design import DesignErrors, design_from_mapping, load_design, stock_from_options
from cutplan.design.text import shown
from cutplan.folder import FolderError, check_target, write_file_whole
from cutplan.materials import MaterialError, load_library
from cutplan.planning.planner import bars_to_solve
from cutplan.planning.service import REFUSALS, guarded_plan, refusal_lines
from cutplan.units import INCH_DENOMINATOR, INCH_DENOMINATORS

__all__ = [
    "EXIT_BAD_INPUT", "BadInput", "fail", "write_file", "write_folder", "load_or_exit", "PROGRESS_FROM",
    "plan_or_exit", "check_output_dir", "MATERIALS_OPTION", "section_options", "OPTION_FOR_KEY",
    "one_piece_design", "material_folders", "DESIGN_DIRS_OPTION", "parse_stock_option", "OPTION_HELP", "option_help", "INCH_DENOMINATOR_OPTION",
    "overwrite_help"
]

EXIT_BAD_INPUT = 2

"""Exit code for bad input, the code click's UsageError uses."""


class BadInput(click.ClickException):
    """Bad input: one line per problem on stderr, exit code 2, no traceback."""

    exit_code = EXIT_BAD_INPUT

    def __init__(self, lines):
        # several problems in one message (a collection's text) stay one line each, never a folded
        # line with its newlines escaped; escape codes are shown escaped, never sent
        self.lines = [shown(part) for line in lines for part in str(line).split("\n") if part.strip()]
        super().__init__("\n".join(self.lines))

    def show(self, file=None):
        """Print each problem as ``error: ...`` on stderr."""
        for line in self.lines:
            click.echo(f"error: {line}", err=True)


def fail(lines):
    """Stop the command with one line per problem and exit code 2 (raises :class:`BadInput`)."""
    raise BadInput(lines if isinstance(lines, (list, tuple)) else [lines])


def write_file(path, data):
    """Write text or bytes to ``path`` completely or not at all (temporary file + rename),
    with the usual permissions; a failure is one line and exit 2."""
    try:
        write_file_whole(path, data, force=True)
    except FolderError as exc:
        fail(str(exc))


def write_folder(output, files, force):
    """Write ``files`` as the folder ``output`` whole (see :mod:`cutplan.folder`); exit 2 on failure."""
    try:
        return folder.write_folder(output, files, force)
    except FolderError as exc:
        fail(str(exc))


def _library_loader(extra):
    def load(design_dirs):
        return load_library(list(extra) + list(design_dirs))

    return load


def load_or_exit(design_path, materials_dirs=(), units=None):
    """Design and library, or a clean exit 2 with one line per problem. ``units`` ("mm" or "in"),
    when given, replaces the design's own choice of the unit shown first."""
    if materials_dirs:  # a broken --materials folder is the option's fault, not the design's
        try:
            load_library(list(materials_dirs))
        except MaterialError as exc:
            fail(f"--materials: {exc}")
    try:
        des, lib = load_design(design_path, _library_loader(materials_dirs))
        return (replace(des, units=units) if units else des), lib
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
    except MaterialError as exc:
        fail(str(exc))


PROGRESS_FROM = 8

"""Show a progress bar when a design has at least this many arched bars to solve."""


def _wants_progress():
    """Progress bars only on a terminal, so that logs and piped JSON stay clean."""
    return sys.stderr.isatty()


def plan_or_exit(design, stock_override=None):
    """The plan through the one guarded plan service (as the page and from-stock), or exit 2
    with one line per problem; numeric warnings never reach the user."""
    def run(progress=None):
        return guarded_plan(design, progress=progress, stock_override=stock_override)

    try:
        count = bars_to_solve(design)
        if count >= PROGRESS_FROM and _wants_progress():
            with click.progressbar(length=count, label="solving arched bars", file=sys.stderr) as bar:
                return run(bar.update)
        return run()
    except REFUSALS as exc:
        fail(refusal_lines(exc))


def check_output_dir(output, force):
    problem = check_target(output, force)
    if problem:
        fail(problem)
    return Path(output)


OPTION_HELP = {
    "stock_size": 'Named stock size, e.g. "al-1.000x0.065" or "pvc-sch40-1"',
    "tube": 'Tube "OUTER x WALL", e.g. "1 in x 0.065 in"',
    "rod": 'Rod diameter, e.g. "12 mm"',
    "bar": 'Bar "WIDTH x THICKNESS", e.g. "38 mm x 19 mm"',
    "material": "Material name (chime/bar), from `cutplan materials`",
    "ends": "Air column ends",
    "a4": "Reference pitch A4 in Hz",
    "temperament": '"equal", "equal-N", "just" or "pythagorean"',
    "units": "Units shown first",
    "format": "What to print",
    "kerf": "Saw kerf",
    "end_trim": "Squared off each factory end of every stick",
    "force_folder": "Replace what an earlier run wrote in the output folder (your own files there are kept)",
    "inch_denominator": "Inches shown to the nearest 1/N",
}
"""The help text of each option that several commands take, written once (see :func:`option_help`)."""


def option_help(key, note=None):
    """An option's help text from :data:`OPTION_HELP`, with a command's own ``note`` in brackets."""
    return f"{OPTION_HELP[key]} ({note})." if note else f"{OPTION_HELP[key]}."


def overwrite_help(what):
    """Help for a ``--force`` that overwrites one file."""
    return f"Overwrite {what} if it exists."


INCH_DENOMINATOR_OPTION = click.option(
    "--inch-denominator", type=click.Choice([str(d) for d in INCH_DENOMINATORS]),
    callback=lambda _ctx, _param, value: None if value is None else int(value),
    help=option_help("inch_denominator", f"default: the design's; a design's default is {INCH_DENOMINATOR}"),
)
"""The design key ``inch_denominator`` as an option, for the commands that build their own design."""

MATERIALS_OPTION = click.option(
    "--materials", "materials_dirs", multiple=True, type=click.Path(file_okay=False),
    help="Extra folder of material/stock TOML tables (may be repeated).",
)


def section_options(command):
    """The four ways to give a section on the command line: --stock, --tube, --rod, --bar."""
    for option in reversed([
        click.option("--stock", "stock_name", help=option_help("stock_size")),
        click.option("--tube", help=option_help("tube")),
        click.option("--rod", help=option_help("rod")),
        click.option("--bar", "bar_size", help=option_help("bar")),
    ]):
        command = option(command)
    return command


OPTION_FOR_KEY = (
    ("set[1].section.outer", "--tube"), ("set[1].section.wall", "--tube"), ("set[1].section.inner", "--tube"),
    ("set[1].section.diameter", "--rod"), ("set[1].section.width", "--bar"), ("set[1].section.thickness", "--bar"),
    ("set[1].section.stock", "--stock"), ("set[1].section", "--stock/--tube/--rod/--bar"), ("set[1].notes", "--note"),
    ("set[1].frequencies", "--frequency"), ("set[1].material", "--material"),
    ("set[1].temperature", "--temperature"), ("set[1].ends", "--ends"), ("set[1].model", "--model"),
    ("tuning.a4", "--a4"), ("inch_denominator", "--inch-denominator"), ("set[1]", "the options"),
)
"""Design keys of a one-piece design and the command-line options they come from."""


def _option_line(command, error):
    """A design error of a one-piece design, reworded to name the option it came from."""
    key = error.key
    for prefix, option in OPTION_FOR_KEY:
        if key == prefix or key.startswith(prefix + ".") or key.startswith(prefix + "["):
            key = option
            break
    shown = "" if error.value is None else f"{error.value!r} "
    allowed = error.allowed.replace('kind = "bar"', "--kind bar").replace('kind = "chime"', "--kind chime")
    return f"{command}: {key}: {shown}{allowed}"


def _pair(text, option, example):
    parts = text.lower().split("x")
    if len(parts) != 2:
        fail(f'{option}: {text!r} must be "{example}"')
    return parts[0].strip(), parts[1].strip()


def one_piece_design(command, kind, note, frequency, material, stock_name, tube, rod, bar_size,
                      ends="open-open", temperature="20 C", model="timoshenko", a4=440.0, materials_dirs=(),
                      inch_denominator=None):
    """A validated one-set design built from command-line options (exit 2 on bad options).

    The options become a design mapping and go through the same validation as a design file.
    """
    shapes = [s for s in (stock_name, tube, rod, bar_size) if s]
    if len(shapes) != 1:
        fail(f"{command}: give exactly one of --stock, --tube, --rod or --bar")
    if stock_name:
        section = {"stock": stock_name}
    elif tube:
        outer, wall = _pair(tube, "--tube", "OUTER x WALL\", e.g. \"1 in x 0.065 in")
        section = {"shape": "tube", "outer": outer, "wall": wall}
    elif rod:
        section = {"shape": "rod", "diameter": rod}
    else:
        width, thickness = _pair(bar_size, "--bar", "WIDTH x THICKNESS\", e.g. \"38 mm x 19 mm")
        section = {"shape": "bar", "width": width, "thickness": thickness}
    piece = {"name": "piece", "kind": kind, "section": section}
    if note:
        piece["notes"] = [note]
    else:
        piece["frequencies"] = [frequency]
    if material:
        piece["material"] = material
    if kind in ("air-column", "resonator"):
        piece.update(ends=ends, temperature=temperature)
    else:
        piece["model"] = model
    data = {"title": "one piece", "tuning": {"a4": a4}, "set": [piece]}
    if inch_denominator is not None:
        data["inch_denominator"] = inch_denominator
    try:
        des, _ = design_from_mapping(data, _library_loader(materials_dirs), command, ".")
    except DesignErrors as exc:
        fail([_option_line(command, e) for e in exc.errors])
    return des


def material_folders(materials_dirs, design_path):
    """--materials folders plus the material_dirs of --design (resolved against its folder)."""
    dirs = [str(d) for d in materials_dirs]
    if design_path:
        des, _lib = load_or_exit(design_path, materials_dirs)
        dirs += [str(d) for d in des.material_dirs]
    return tuple(dirs)


DESIGN_DIRS_OPTION = click.option(
    "--design", "design_path", type=click.Path(dir_okay=False),
    help="Also use the material_dirs of this design file (its calibrated materials and stock).",
)


def parse_stock_option(values, kerf, end_trim):
    """StockSpec from --stock "10 ft x 3 @ 14.50" options (count and price optional), with the
    design file's ranges for stock length, kerf and end trim."""
    try:
        return stock_from_options(values, kerf, end_trim)
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
