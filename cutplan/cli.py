"""The ``cutplan`` command line: parse arguments, call one function, render. Nothing else.

Heavy modules (numpy, scipy, reportlab) are imported inside the commands that use them so
that ``cutplan --help`` starts fast.
"""

from __future__ import annotations

import os
import sys
import tempfile
from pathlib import Path

import click

from cutplan import __version__

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


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="cutplan")
def cli():
    """Cut plans for hand-built tuned percussion: chimes, bars, air columns, resonators.

    \b
    Start with a design file:
      cutplan new chime porch.toml
      cutplan plan porch.toml -o porch-packet
    """


@cli.command("plan")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("-o", "--output", type=click.Path(), help="Folder to write plan.csv, plan.json and the shop packet.")
@click.option("--units", type=click.Choice(["mm", "in"]), help="Units shown first (default: the design's).")
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table",
              show_default=True, help="What to print.")
@click.option("--paper", type=click.Choice(["letter", "a4"]), help="Paper size of the PDF (default: the design's).")
@click.option("--force", is_flag=True, help="Overwrite files in a non-empty output folder.")
@MATERIALS_OPTION
def plan_command(design, output, units, fmt, paper, force, materials_dirs):
    """Plan every piece of DESIGN: lengths, cut lengths, nodes, partials.

    \b
    Example:
      cutplan plan examples/porch-chimes.toml
      cutplan plan examples/porch-chimes.toml --format json
      cutplan plan examples/porch-chimes.toml -o porch-packet
    """
    out = _check_output_dir(output, force) if output else None
    des, _lib = _load(design, materials_dirs)
    the_plan = _plan(des)
    from cutplan.render.table import render_csv, render_cutlist_csv, render_json
    from cutplan.render.terminal import render_table

    if fmt == "json":
        click.echo(render_json(the_plan), nl=False)
    elif fmt == "csv":
        click.echo(render_csv(the_plan), nl=False)
    else:
        click.echo(render_table(the_plan, units), nl=False)
    if out is not None:
        files = {"plan.csv": render_csv(the_plan), "plan.json": render_json(the_plan)}
        if the_plan.cut_list is not None:
            files["cutlist.csv"] = render_cutlist_csv(the_plan.cut_list)
        files.update(_packet_files(the_plan, paper))
        for name, data in files.items():
            write_file(out / name, data)
        click.echo(f"wrote {len(files)} files to {out}", err=True)


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


@cli.command("cutlist")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("--stock", "stock_texts", multiple=True,
              help='What-if stock instead of the design\'s: "LENGTH [x COUNT] [@ PRICE]", e.g. "10 ft x 3" (repeatable).')
@click.option("--kerf", default="1/16 in", show_default=True, help="Saw kerf, with --stock.")
@click.option("--end-trim", default="1/8 in", show_default=True, help="Squaring cut at the factory end, with --stock.")
@click.option("--units", type=click.Choice(["mm", "in"]), help="Units shown first (default: the design's).")
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table", show_default=True,
              help="What to print.")
@MATERIALS_OPTION
def cutlist_command(design, stock_texts, kerf, end_trim, units, fmt, materials_dirs):
    """Lay the pieces of DESIGN out on stock: marks from each stick's end, offcuts, totals.

    \b
    Examples:
      cutplan cutlist examples/porch-chimes.toml
      cutplan cutlist examples/porch-chimes.toml --stock "6 ft x 4" --stock "10 ft @ 14.5"
    """
    import json

    des, _lib = _load(design, materials_dirs)
    override = _parse_stock_option(stock_texts, kerf, end_trim) if stock_texts else None
    the_plan = _plan(des, override)
    if the_plan.cut_list is None:
        fail(f"{design}: stock: the design has no [stock] lengths; add them or use --stock \"8 ft x 2\"")
    if fmt == "json":
        from cutplan.render.table import cut_list_dict

        click.echo(json.dumps(cut_list_dict(the_plan.cut_list), indent=2))
        return
    if fmt == "csv":
        from cutplan.render.table import render_cutlist_csv

        click.echo(render_cutlist_csv(the_plan.cut_list), nl=False)
        return
    from cutplan.render.terminal import render_stock

    click.echo("\n".join(render_stock(the_plan.cut_list, units or the_plan.units)))


@cli.command("scale")
@click.argument("spec")
@click.option("--a4", type=float, default=440.0, show_default=True, help="Reference pitch A4 in Hz.")
@click.option("--temperament", default="equal", show_default=True,
              help='"equal", "equal-N", "just" or "pythagorean" (just/pythagorean relative to the root).')
def scale_command(spec, a4, temperament):
    """List the notes and frequencies of a scale.

    \b
    SPEC is "ROOT SCALE [COUNT]" or "LOW..HIGH [SCALE]". Examples:
      cutplan scale "D5 major-pentatonic 5"
      cutplan scale "C4..C5 major" --temperament just
    """
    from cutplan import pitch

    if not 400 <= a4 <= 480:
        fail(f"--a4: {a4} must be between 400 and 480 Hz")
    try:
        targets = pitch.spec_targets(spec, temperament, a4)
    except pitch.PitchError as exc:
        fail(f"scale: {exc.text!r} is not {exc.accepted}")
    click.echo(f"{'note':6} {'Hz':>10} {'cents from ET':>14}")
    for t in targets:
        name, off = pitch.nearest_note(t.frequency, a4)
        click.echo(f"{t.name:6} {t.frequency:10.3f} {off:+14.2f}")


@cli.command("materials")
@click.argument("name", required=False)
@MATERIALS_OPTION
def materials_command(name, materials_dirs):
    """List materials and stock sizes with their sources, or show one.

    \b
    Examples:
      cutplan materials
      cutplan materials maple-sugar
      cutplan materials pvc-sch40-2
    """
    from cutplan.materials import MaterialError, load_library

    try:
        lib = load_library(materials_dirs)
    except MaterialError as exc:
        fail(str(exc))
    from cutplan.render.terminal import render_library, render_library_entry

    text = render_library(lib) if name is None else render_library_entry(lib, name)
    if text is None:
        fail(f"materials: {name!r} is not a material or stock size; run `cutplan materials` to list them")
    click.echo(text, nl=False)


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


@cli.command("length")
@click.option("--kind", type=click.Choice(["chime", "bar", "air-column"]), default="chime", show_default=True,
              help="What the piece is.")
@click.option("--note", help='Target note, e.g. "D5".')
@click.option("--frequency", type=float, help="Target frequency in Hz (instead of --note).")
@click.option("--material", help="Material name (chime/bar), from `cutplan materials`.")
@section_options
@click.option("--ends", type=click.Choice(["open-open", "closed-open"]), default="open-open", show_default=True,
              help="Air column ends.")
@click.option("--temperature", default="20 C", show_default=True, help="Air temperature for air columns.")
@click.option("--model", type=click.Choice(["timoshenko", "slender"]), default="timoshenko", show_default=True,
              help="Beam model for chimes and bars.")
@click.option("--a4", type=float, default=440.0, show_default=True, help="Reference pitch A4 in Hz.")
def length_command(kind, note, frequency, material, stock_name, tube, rod, bar_size, ends, temperature, model, a4):
    """Length and hang point of one piece, without a design file.

    \b
    Examples:
      cutplan length --note D5 --stock al-1.000x0.065
      cutplan length --kind bar --note C5 --material maple-sugar --bar "40 mm x 20 mm"
      cutplan length --kind air-column --note A4 --stock pvc-sch40-1 --ends closed-open
    """
    if (note is None) == (frequency is None):
        fail("length: give exactly one of --note or --frequency")
    des = _one_piece_design("length", kind, note, frequency, material, stock_name, tube, rod, bar_size,
                            ends, temperature, model, a4)
    the_plan = _plan(des)
    from cutplan.units import format_length

    p = the_plan.pieces[0]
    click.echo(f"{p.note}: {p.target_hz:.2f} Hz, {the_plan.sets[0].section}, {p.model}")
    click.echo(f"  length      {format_length(p.length)}")
    for i, x in enumerate(p.nodes, start=1):
        what = "hang hole" if kind == "chime" else "support"
        click.echo(f"  {what} {i}  {format_length(x)} from the end")
    click.echo(f"  trimming    {p.cents_per_mm:.2f} cents per mm")
    if kind != "air-column":
        click.echo(f"  shear correction {p.shear_correction_cents:+.1f} cents against the slender model")
    for w in p.warnings:
        click.echo(f"  ! {w}")


@cli.command("new")
@click.argument("kind", type=click.Choice(["chime", "bar", "air-column"]))
@click.argument("file", required=False, type=click.Path(dir_okay=False))
@click.option("--force", is_flag=True, help="Overwrite FILE if it exists.")
def new_command(kind, file, force):
    """Write a commented starter design file for KIND (to FILE or the screen).

    \b
    Example:
      cutplan new chime porch.toml
    """
    from cutplan.starters import STARTERS

    text = STARTERS[kind]
    if file is None:
        click.echo(text, nl=False)
        return
    if Path(file).exists() and not force:
        fail(f"{file}: already exists; use --force to overwrite it")
    write_file(file, text)
    click.echo(f"wrote {file}; next: cutplan plan {file}", err=True)


MEASURE_KINDS = ["chime", "bar", "air-column", "open-open", "closed-open"]


def _measure_file(recording, kind, near_hz, ratios=None):
    """Measurement of a WAV file, or exit 2 with one line saying why it cannot be used."""
    from cutplan.audio.analysis import measure
    from cutplan.audio.wav import RecordingError, read_wav

    try:
        samples, rate = read_wav(recording)
        return measure(samples, rate, kind, near_hz, ratios)
    except RecordingError as exc:
        fail(f"{recording}: {exc}")


@cli.command("measure")
@click.argument("recording", required=False, type=click.Path(dir_okay=False))
@click.option("--frequency", type=float, help="A frequency read from a tuner instead of a recording [Hz].")
@click.option("--kind", type=click.Choice(MEASURE_KINDS), default="chime", show_default=True,
              help="What was struck: sets the pattern of partials used to name the fundamental.")
@click.option("--near", help='Expected note, e.g. "D5": only fundamentals within half an octave are considered.')
@click.option("--a4", type=float, default=440.0, show_default=True, help="Reference pitch A4 in Hz.")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True,
              help="What to print.")
def measure_command(recording, frequency, kind, near, a4, fmt):
    """Measure the pitch and partials of a struck piece from a WAV recording.

    \b
    Examples:
      cutplan measure porch-1.wav --near D5
      cutplan measure pipe.wav --kind closed-open --format json
      cutplan measure --frequency 583.1
    """
    import json

    from cutplan import pitch

    if (recording is None) == (frequency is None):
        fail("measure: give a RECORDING or --frequency (one of them)")
    near_hz = None
    if near:
        try:
            near_hz = pitch.note_frequency(near, a4)
        except pitch.PitchError as exc:
            fail(f"--near: {exc.text!r} is not {exc.accepted}")
    if frequency is not None:
        if not 10 <= frequency <= 30000:
            fail(f"--frequency: {frequency} must be between 10 and 30000 Hz")
        fundamental, partials, confidence = frequency, [frequency], 1.0
    else:
        m = _measure_file(recording, kind, near_hz)
        fundamental, partials, confidence = m.fundamental_hz, list(m.partials_hz), m.confidence
    name, off = pitch.nearest_note(fundamental, a4)
    if fmt == "json":
        click.echo(json.dumps({"fundamental_hz": round(fundamental, 4), "note": name, "cents": off,
                               "partials_hz": [round(f, 3) for f in partials], "confidence": confidence}))
        return
    click.echo(f"fundamental {fundamental:.3f} Hz = {name} {off:+.2f} cents (confidence {confidence:.2f})")
    if len(partials) > 1:
        click.echo("partials: " + ", ".join(f"{f:.1f}" for f in partials) + " Hz")


def _parse_pieces(texts, kind, near_hz=None):
    """[(length m, frequency Hz, harmonic)] from --piece "LENGTH @ FREQ-or-WAV [#N]"."""
    import re

    from cutplan.units import UnitError, parse_length

    out = []
    for text in texts:
        match = re.fullmatch(r"\s*(.+?)\s*@\s*(.+?)\s*(?:#\s*(\d+))?\s*", text)
        if not match:
            fail(f'--piece: {text!r} must be "LENGTH @ FREQUENCY" or "LENGTH @ RECORDING.wav", e.g. "503 mm @ 591.2"')
        try:
            length = parse_length(match.group(1))
        except UnitError as exc:
            fail(f"--piece: {match.group(1)!r} is not {exc.accepted}")
        what = match.group(2)
        try:
            freq = float(what)
        except ValueError:
            if not Path(what).is_file():
                fail(f"--piece: {what!r} is neither a frequency in Hz nor a WAV file")
            freq = _measure_file(what, kind, near_hz).fundamental_hz
        if not (length > 0 and freq > 0):
            fail(f"--piece: {text!r}: length and frequency must be positive")
        out.append((length, freq, int(match.group(3) or 1)))
    return out


@cli.command("calibrate")
@click.option("--kind", type=click.Choice(["chime", "bar", "air-column"]), default="chime", show_default=True,
              help="What the test pieces are.")
@click.option("--piece", "pieces", multiple=True,
              help='A test piece: "LENGTH @ FREQUENCY" or "LENGTH @ RECORDING.wav" (repeatable); '
                   'for air columns add "#N" for the N-th resonance.')
@click.option("--material", help="The table material the pieces started from (chime/bar).")
@section_options
@click.option("--model", type=click.Choice(["timoshenko", "slender"]), default="timoshenko", show_default=True,
              help="Beam model to fit with (use the one you plan with).")
@click.option("--ends", type=click.Choice(["open-open", "closed-open"]), default="closed-open", show_default=True,
              help="Air column ends.")
@click.option("--temperature", default="20 C", show_default=True, help="Air temperature during the measurement.")
@click.option("--fit", "fit_what", type=click.Choice(["auto", "speed", "end-correction", "both"]), default="auto",
              show_default=True, help="Air columns: what to fit (auto: both with two or more lengths).")
@click.option("--two-resonance", "two_res", help='Air: "L1, L2 @ FREQUENCY", the first two resonance depths of a closed tube.')
@click.option("--name", help="Name of the calibrated material (default: MATERIAL-calibrated).")
@click.option("-o", "--output", type=click.Path(dir_okay=False), help="Write the calibrated material TOML here.")
@click.option("--force", is_flag=True, help="Overwrite --output if it exists.")
def calibrate_command(kind, pieces, material, stock_name, tube, rod, bar_size, model, ends, temperature,
                      fit_what, two_res, name, output, force):
    """Fit material or air-column constants from measured test pieces.

    \b
    Examples:
      cutplan calibrate --material aluminum-6063-t5 --stock al-1.000x0.065 \\
          --piece "503.9 mm @ 591.2" -o my-materials/al-tube.toml
      cutplan calibrate --kind air-column --stock pvc-sch40-1 --piece "190 mm @ 426.7" --fit speed
      cutplan calibrate --kind air-column --two-resonance "160 mm, 495 mm @ 512"
    """
    if kind == "air-column":
        _calibrate_air(pieces, stock_name, tube, ends, temperature, fit_what, two_res)
        return
    if not pieces:
        fail("calibrate: give at least one --piece")
    if not material:
        fail("calibrate: --material is needed: the table material the test pieces are made of")
    from cutplan.calibrate import calibrated_material_toml, fit_beam
    from cutplan.planner import beam_frequency_function

    des = _one_piece_design("calibrate", kind, None, 440.0, material, stock_name, tube, rod, bar_size, model=model)
    spec = des.sets[0]
    measured = _parse_pieces(pieces, kind)
    f_table = beam_frequency_function(spec.material, spec.section, model)
    fit = fit_beam([(length, f) for length, f, _ in measured], f_table)
    click.echo(f"{len(measured)} test piece(s) of {material}, {spec.section.describe()}, {model} model")
    for (length, f, _), pred, res in zip(measured, fit.predicted_hz, fit.residuals_cents, strict=True):
        click.echo(f"  {length * 1000:8.1f} mm: measured {f:9.3f} Hz, table predicts {pred:9.3f} Hz, "
                   f"residual after fit {res:+.2f} cents")
    e_table = spec.material.modulus_for(model)
    click.echo(f"effective modulus {e_table * fit.scale / 1e9:.3f} GPa against the table's {e_table / 1e9:.3f} GPa "
               f"({fit.change_percent:+.2f} %); sqrt(E/rho) = "
               f"{(e_table * fit.scale / spec.material.density) ** 0.5:.1f} m/s")
    name = name or f"{material}-calibrated"
    text = calibrated_material_toml(name, spec.material, model, fit.scale, fit.spread,
                                    measured, fit.residuals_cents, spec.section.describe())
    if output is None:
        click.echo("\n" + text, nl=False)
        return
    if Path(output).exists() and not force:
        fail(f"{output}: already exists; use --force to overwrite it")
    write_file(output, text)
    click.echo(f"wrote {output}; plan with material = \"{name}\" and --materials {Path(output).parent or '.'}")


def _calibrate_air(pieces, stock_name, tube, ends, temperature, fit_what, two_res):
    from cutplan.calibrate import CalibrationError, fit_air_column_choice
    from cutplan.physics import air_column
    from cutplan.units import UnitError, parse_length, parse_temperature

    try:
        kelvin = parse_temperature(temperature)
    except UnitError as exc:
        fail(f"--temperature: {exc.text!r} is not {exc.accepted}")
    speed_t = air_column.speed_of_sound(kelvin)
    if two_res:
        import re

        match = re.fullmatch(r"\s*(.+?)\s*,\s*(.+?)\s*@\s*([0-9.]+)\s*", two_res)
        if not match:
            fail(f'--two-resonance: {two_res!r} must be "L1, L2 @ FREQUENCY", e.g. "160 mm, 495 mm @ 512"')
        try:
            l1, l2 = parse_length(match.group(1)), parse_length(match.group(2))
        except UnitError as exc:
            fail(f"--two-resonance: {exc.text!r} is not {exc.accepted}")
        try:
            speed, corr = air_column.two_resonance(float(match.group(3)), l1, l2)
        except ValueError as exc:
            fail(f"--two-resonance: {exc}")
        click.echo(f"speed of sound {speed:.1f} m/s (expected {speed_t:.1f} m/s at {temperature}); "
                   f"end correction {corr * 1000:.1f} mm")
        if corr < 0:
            click.echo("! a negative end correction means the two readings disagree; measure again")
        return
    if not pieces:
        fail("calibrate: give --piece or --two-resonance")
    measured = _parse_pieces(pieces, ends)
    radius = None
    if stock_name or tube:
        des = _one_piece_design("calibrate", "air-column", None, 440.0, None, stock_name, tube, None, None,
                                ends=ends, temperature=temperature)
        radius = des.sets[0].section.air_radius
    try:
        fit = fit_air_column_choice(measured, ends, fit_what, speed_t, radius)
    except CalibrationError as exc:
        fail(f"calibrate: {exc}")
    click.echo(f"speed of sound {fit.speed:.1f} m/s (table {speed_t:.1f} m/s at {temperature}); "
               f"end correction {fit.end_correction * 1000:.2f} mm per open end"
               + (f" = {fit.end_correction / radius:.3f} x inner radius" if radius else ""))
    for (length, f, n), res in zip(measured, fit.residuals_cents, strict=True):
        click.echo(f"  {length * 1000:8.1f} mm, resonance {n} at {f:.2f} Hz: residual {res:+.2f} cents")
    if radius:
        click.echo(f'use it in a design with end_correction = {fit.end_correction / radius:.3f}')


@cli.command("trim")
@click.argument("design", type=click.Path(dir_okay=False))
@click.argument("label")
@click.option("--measured", type=float, help="Frequency the piece sounds now [Hz] (from a tuner).")
@click.option("--recording", type=click.Path(dir_okay=False), help="Or a WAV recording of the piece.")
@click.option("--length-now", help="Length of the piece now (default: its cut length on the cut sheet).")
@MATERIALS_OPTION
def trim_command(design, label, measured, recording, length_now, materials_dirs):
    """How much to trim a piece, and from which end, to bring it to pitch.

    \b
    Examples:
      cutplan trim examples/porch-chimes.toml porch-1 --measured 583.1
      cutplan trim examples/porch-chimes.toml porch-1 --recording porch-1.wav --length-now "505 mm"
    """
    from cutplan.calibrate import CalibrationError, trim_advice
    from cutplan.planner import piece_frequency_function
    from cutplan.units import UnitError, format_length, parse_length

    if (measured is None) == (recording is None):
        fail("trim: give --measured or --recording (one of them)")
    des, _lib = _load(design, materials_dirs)
    the_plan = _plan(des)
    pieces = {p.label: p for p in the_plan.pieces}
    if label not in pieces:
        fail(f"trim: {label!r} is not a piece of {design}; labels are {', '.join(list(pieces)[:8])}...")
    piece = pieces[label]
    spec = next(s for s in des.sets if s.name == piece.set)
    f_at = piece_frequency_function(spec, piece)
    if recording:
        kind = spec.kind if spec.kind in ("chime", "bar") else spec.ends
        planned = [f / piece.partials_hz[0] for f in piece.partials_hz]
        measured = _measure_file(recording, kind, piece.target_hz, planned).fundamental_hz
    now = None
    if length_now:
        try:
            now = parse_length(length_now)
        except UnitError as exc:
            fail(f"--length-now: {exc.text!r} is not {exc.accepted}")
    try:
        advice = trim_advice(piece, f_at, measured, now)
    except CalibrationError as exc:
        fail(f"trim: {exc}")
    click.echo(f"{piece.label} ({piece.note}, target {piece.target_hz:.2f} Hz) measured {measured:.2f} Hz "
               f"at {format_length(advice.length_now)}")
    click.echo(f"  length for the target: {format_length(advice.length_needed)}")
    click.echo(f"  {advice.action}")
    if piece.nodes and advice.remove > 0:
        fractions = [x / piece.length for x in piece.nodes]
        click.echo("  if not yet drilled, hang/support points for the trimmed length: "
                   + ", ".join(format_length(f * advice.length_needed) for f in fractions) + " from the top/reference end")


@cli.command("listen")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("-o", "--output", required=True, type=click.Path(), help="Folder for the WAV files.")
@click.option("--strike-at", type=click.FloatRange(0.0, 0.5), default=0.1, show_default=True,
              help="Strike point as a fraction of the length from the end (chimes and bars).")
@click.option("--force", is_flag=True, help="Overwrite files in a non-empty output folder.")
@MATERIALS_OPTION
def listen_command(design, output, strike_at, force, materials_dirs):
    """Hear the set before cutting: one WAV per piece and the whole set as an arpeggio.

    \b
    Example:
      cutplan listen examples/porch-chimes.toml -o porch-sounds
    """
    from cutplan.audio.synth import RATE, arpeggio, piece_preview
    from cutplan.audio.wav import wav_bytes

    out = _check_output_dir(output, force)
    des, _lib = _load(design, materials_dirs)
    the_plan = _plan(des)
    for p in the_plan.pieces:
        write_file(out / f"{p.label}.wav", wav_bytes(piece_preview(p, strike_at=strike_at), RATE))
    for s in the_plan.sets:
        write_file(out / f"{s.name}-arpeggio.wav", wav_bytes(arpeggio(s.pieces, strike_at=strike_at), RATE))
    click.echo(f"wrote {len(the_plan.pieces) + len(the_plan.sets)} WAV files to {out}")


def main():  # pragma: no cover - console entry point
    cli()
