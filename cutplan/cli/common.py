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
    """Print one line per problem to stderr and exit with code 2 (no traceback)."""
    for line in lines if isinstance(lines, (list, tuple)) else [lines]:
        click.echo(f"error: {line}", err=True)
    sys.exit(EXIT_BAD_INPUT)


def write_file(path, data):
    """Write text or bytes to ``path`` completely or not at all (temporary file + rename)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    payload = data.encode("utf-8") if isinstance(data, str) else data
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(payload)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


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
    from cutplan.design import DesignErrors
    from cutplan.planner import bars_to_solve, plan

    try:
        count = bars_to_solve(design)
        if count >= PROGRESS_FROM and _wants_progress():
            with click.progressbar(length=count, label="solving arched bars", file=sys.stderr) as bar:
                return plan(design, progress=bar.update, stock_override=stock_override)
        return plan(design, stock_override=stock_override)
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])


def _check_output_dir(output, force):
    out = Path(output)
    if out.exists() and not out.is_dir():
        fail(f"{out}: -o/--output must be a folder, and this is a file")
    if out.is_dir() and any(out.iterdir()) and not force:
        fail(f"{out}: the folder is not empty; use --force to overwrite the files cutplan writes there")
    return out


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
                      ends="open-open", temperature="20 C", model="timoshenko", a4=440.0, materials_dirs=()):
    """A validated one-set design built from command-line options (exit 2 on bad options);
    ``materials_dirs`` are extra folders of material and stock tables."""
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
            des, _ = load_design(path, _library_loader(materials_dirs))
        except DesignErrors as exc:
            fail([str(e).replace(str(path), command) for e in exc.errors])
    return des


def material_folders(materials_dirs, design_path):
    """--materials folders plus the material_dirs of --design (resolved against its folder)."""
    dirs = [str(d) for d in materials_dirs]
    if design_path:
        des, _lib = _load(design_path, materials_dirs)
        dirs += [str(d) for d in des.material_dirs]
    return tuple(dirs)


DESIGN_DIRS_OPTION = click.option(
    "--design", "design_path", type=click.Path(dir_okay=False),
    help="Also use the material_dirs of this design file (its calibrated materials and stock).",
)


def _packet_files(the_plan, paper):
    """PDF packet and SVG templates, when the renderers are present."""
    try:
        from cutplan.render import packet
    except ImportError:
        return {}
    return packet.packet_files(the_plan, paper)


def _parse_stock_option(values, kerf, end_trim):
    """StockSpec from --stock "10 ft x 3 @ 14.50" options (count and price optional)."""
    import re

    from cutplan.design import StockLength, StockSpec
    from cutplan.units import UnitError, parse_length

    lengths = []
    for text in values:
        match = re.fullmatch(r"\s*(.+?)\s*(?:[x*]\s*(\d+))?\s*(?:@\s*(\d+(?:\.\d+)?))?\s*", text)
        try:
            length = parse_length(match.group(1)) if match else None
        except UnitError as exc:
            fail(f'--stock: {text!r} is not "LENGTH [x COUNT] [@ PRICE]"; the length must be {exc.accepted}')
        if match is None or not length or length <= 0:
            fail(f'--stock: {text!r} is not "LENGTH [x COUNT] [@ PRICE]", e.g. "10 ft x 3" or "3 m x 2 @ 12.50"')
        count = int(match.group(2)) if match.group(2) else None
        if count is not None and count < 1:
            fail(f"--stock: {text!r}: the count must be at least 1")
        price = float(match.group(3)) if match.group(3) else None
        lengths.append(StockLength(length, count, price))
    try:
        kerf_m = parse_length(kerf)
        trim_m = parse_length(end_trim)
    except UnitError as exc:
        fail(f"--kerf/--end-trim: {exc.text!r} is not {exc.accepted}")
    return StockSpec(tuple(lengths), kerf_m, trim_m)
