"""What every command shares: one-line errors with exit code 2, loading and planning a design,
writing files whole, and the common options."""

from __future__ import annotations

import os
import sys
import tempfile
from pathlib import Path

import click

EXIT_BAD_INPUT = 2

"""Exit code for bad input, the code click's UsageError uses."""


def fail(lines):
    """Print one line per problem to stderr and exit with code 2 (no traceback).

    Control characters (escape codes, newlines inside a line) are shown escaped, never sent."""
    from cutplan.design.text import shown

    for line in lines if isinstance(lines, (list, tuple)) else [lines]:
        click.echo(f"error: {shown(line)}", err=True)
    sys.exit(EXIT_BAD_INPUT)


def write_file(path, data):
    """Write text or bytes to ``path`` completely or not at all (temporary file + rename),
    with the usual permissions; a failure is one line and exit 2."""
    from cutplan.folder import FolderError, write_file_whole

    try:
        write_file_whole(path, data, force=True)
    except FolderError as exc:
        fail(str(exc))


def write_folder(output, files, force):
    """Write ``files`` as the folder ``output`` whole (see :mod:`cutplan.folder`); exit 2 on failure."""
    from cutplan.folder import FolderError
    from cutplan.folder import write_folder as _write

    try:
        return _write(output, files, force)
    except FolderError as exc:
        fail(str(exc))


def _library_loader(extra):
    from cutplan.materials import load_library

    def load(design_dirs):
        return load_library(list(extra) + list(design_dirs))

    return load


def _load(design_path, materials_dirs=()):
    """Design and library, or a clean exit 2 with one line per problem."""
    from cutplan.design import DesignErrors, load_design
    from cutplan.materials import MaterialError

    try:
        return load_design(design_path, _library_loader(materials_dirs))
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
    except MaterialError as exc:
        fail(str(exc))


PROGRESS_FROM = 8

"""Show a progress bar when a design has at least this many arched bars to solve."""


def _wants_progress():
    """Progress bars only on a terminal, so that logs and piped JSON stay clean."""
    return sys.stderr.isatty()


def _plan(design, stock_override=None):
    """The plan, or exit 2 with one line per problem; numeric warnings never reach the user."""
    from cutplan.design import DesignErrors
    from cutplan.numeric import NumericError, checked_plan
    from cutplan.planner import bars_to_solve, plan

    def run(progress=None):
        return checked_plan(lambda: plan(design, progress=progress, stock_override=stock_override), design.path)

    try:
        count = bars_to_solve(design)
        if count >= PROGRESS_FROM and _wants_progress():
            with click.progressbar(length=count, label="solving arched bars", file=sys.stderr) as bar:
                return run(bar.update)
        return run()
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
    except NumericError as exc:
        fail(str(exc))


def _check_output_dir(output, force):
    from cutplan.folder import check_target

    problem = check_target(output, force)
    if problem:
        fail(problem)
    return Path(output)


MATERIALS_OPTION = click.option(
    "--materials", "materials_dirs", multiple=True, type=click.Path(file_okay=False),
    help="Extra folder of material/stock TOML tables (may be repeated).",
)


def section_options(command):
    """The four ways to give a section on the command line: --stock, --tube, --rod, --bar."""
    for option in reversed([
        click.option("--stock", "stock_name", help='Named stock size, e.g. "al-1.000x0.065" or "pvc-sch40-1".'),
        click.option("--tube", help='Tube "OUTER x WALL", e.g. "1 in x 0.065 in".'),
        click.option("--rod", help='Rod diameter, e.g. "12 mm".'),
        click.option("--bar", "bar_size", help='Bar "WIDTH x THICKNESS", e.g. "38 mm x 19 mm".'),
    ]):
        command = option(command)
    return command


def _toml_string(value):
    return '"' + str(value).replace("\\", "\\\\").replace('"', '\\"') + '"'


def _one_piece_design(command, kind, note, frequency, material, stock_name, tube, rod, bar_size,
                      ends="open-open", temperature="20 C", model="timoshenko", a4=440.0):
    """A validated one-set design built from command-line options (exit 2 on bad options)."""
    import tomllib

    from cutplan.design import DesignErrors, load_design

    q = _toml_string
    shapes = [s for s in (stock_name, tube, rod, bar_size) if s]
    if len(shapes) != 1:
        fail(f"{command}: give exactly one of --stock, --tube, --rod or --bar")
    if stock_name:
        section = f"{{ stock = {q(stock_name)} }}"
    elif tube:
        parts = tube.lower().split("x")
        if len(parts) != 2:
            fail(f'--tube: {tube!r} must be "OUTER x WALL", e.g. "1 in x 0.065 in"')
        section = f'{{ shape = "tube", outer = {q(parts[0].strip())}, wall = {q(parts[1].strip())} }}'
    elif rod:
        section = f'{{ shape = "rod", diameter = {q(rod)} }}'
    else:
        parts = bar_size.lower().split("x")
        if len(parts) != 2:
            fail(f'--bar: {bar_size!r} must be "WIDTH x THICKNESS", e.g. "38 mm x 19 mm"')
        section = f'{{ shape = "bar", width = {q(parts[0].strip())}, thickness = {q(parts[1].strip())} }}'
    lines = ['title = "one piece"', "[tuning]", f"a4 = {a4}", "[[set]]", 'name = "piece"', f"kind = {q(kind)}"]
    lines.append(f"notes = [{q(note)}]" if note else f"frequencies = [{frequency}]")
    lines.append(f"section = {section}")
    if material:
        lines.append(f"material = {q(material)}")
    if kind in ("air-column", "resonator"):
        lines += [f"ends = {q(ends)}", f"temperature = {q(temperature)}"]
    else:
        lines.append(f"model = {q(model)}")
    text = "\n".join(lines) + "\n"
    try:
        tomllib.loads(text)
    except tomllib.TOMLDecodeError:
        fail(f"{command}: the options could not be combined; check for stray quotes")
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / f"{command}-options.toml"
        path.write_text(text, encoding="utf-8")
        try:
            des, _ = load_design(path, _library_loader(()))
        except DesignErrors as exc:
            fail([str(e).replace(str(path), command) for e in exc.errors])
    return des


def _packet_files(the_plan, paper):
    """PDF packet and SVG templates, when the renderers are present."""
    try:
        from cutplan.render import packet
    except ImportError:
        return {}
    return packet.packet_files(the_plan, paper)


def _parse_stock_option(values, kerf, end_trim):
    """StockSpec from --stock "10 ft x 3 @ 14.50" options (count and price optional), with the
    design file's ranges for stock length, kerf and end trim."""
    from cutplan.design import DesignErrors, stock_from_options

    try:
        return stock_from_options(values, kerf, end_trim)
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
