"""Commands for the bench: ``measure``, ``calibrate``, ``trim``, ``listen``."""

from __future__ import annotations

import contextlib
import errno
import json
import re
import textwrap
from dataclasses import replace
from pathlib import Path

import click

from cutplan.audio.analysis import measure
from cutplan.audio.synth import RATE, arpeggio, piece_preview
from cutplan.audio.wav import RecordingError, read_wav, wav_bytes
from cutplan.cli.common import (
    DESIGN_DIRS_OPTION,
    MATERIALS_OPTION,
    check_output_dir,
    fail,
    load_or_exit,
    material_folders,
    one_piece_design,
    option_help,
    overwrite_help,
    plan_or_exit,
    section_options,
    write_file,
    write_folder,
)
from cutplan.cli.measure import measure_file
from cutplan.folder_guard import locked
from cutplan.materials import MaterialError, load_library
from cutplan.numeric import NumericError, quiet, quiet_numbers
from cutplan.physics import air_column
from cutplan.physics.wall_losses import wall_loss_fraction
from cutplan.planning.air_calibrated import stock_toml
from cutplan.tuning import TrimError
from cutplan.tuning.calibrate import AIR_SPEED_RANGE, CalibrationError, fit_air_column_choice, measurement_problem
from cutplan.tuning.calibrate_moduli import calibrated_moduli_toml, fit_moduli, partial_frequencies, recorded_modes
from cutplan.tuning.trim_service import MAX_STATE_BYTES, STATE_SUFFIX, parse_measured, trim_reading
from cutplan.units import UnitError, parse_length, parse_temperature

__all__ = ["calibrate_command", "trim_command", "listen_command"]



def _parse_pieces(texts, kind, near_hz=None):
    """[(length m, frequency Hz, harmonic)] from --piece "LENGTH @ FREQ-or-WAV [#N]"."""

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
            freq = measure_file(what, kind, near_hz).fundamental_hz
        if not (length > 0 and freq > 0):
            fail(f"--piece: {text!r}: length and frequency must be positive")
        _check_measurement(text, length, [freq])
        out.append((length, freq, int(match.group(3) or 1)))
    return out


def _check_measurement(text, length, freqs):
    """Exit 2 with one line when a --piece's length or frequencies are not a measurement at all
    (infinite, absurd or vanishing), before any fit meets them."""
    problem = measurement_problem(length, freqs)
    if problem:
        fail(f"--piece: {text!r}: {problem}")


def _numbers(where, fn, *args):
    """``fn(*args)`` with numeric warnings kept inside; an overflow or impossible value is one line."""
    try:
        return quiet_numbers(fn, *args)
    except NumericError as exc:
        fail(f"{where}: {exc}; check the lengths, the frequencies and the section")


def _parse_beam_pieces(texts, kind, partial_ratios):
    """[(length m, mode, frequency Hz)] from --piece "LENGTH @ F1[, F2, ...]" or "LENGTH @ RECORDING.wav".

    Listed frequencies are partials 1, 2, ... in mode order (from partial N with "#N" after them,
    for a tuner reading of an overtone); a recording's partials are found
    with ``partial_ratios(length)``, the table model's f_n / f_1 for that length.
    """

    out = []
    for text in texts:
        match = re.fullmatch(r"\s*(.+?)\s*@\s*(.+?)\s*(?:#\s*(\d+))?\s*", text)
        if not match:
            fail(f'--piece: {text!r} must be "LENGTH @ FREQUENCY[, FREQUENCY...] [#FIRST-PARTIAL]" or '
                 '"LENGTH @ RECORDING.wav", e.g. "420 mm @ 1180.0, 3105.5, 5702.0"')
        first = int(match.group(3) or 1)
        if first < 1:
            fail(f"--piece: {text!r}: the first partial is #1 or more")
        try:
            length = parse_length(match.group(1))
        except UnitError as exc:
            fail(f"--piece: {match.group(1)!r} is not {exc.accepted}")
        if not length > 0:
            fail(f"--piece: {text!r}: the length must be positive")
        what = match.group(2)
        try:
            freqs = [float(x) for x in what.split(",")]
        except ValueError:
            if not Path(what).is_file():
                fail(f"--piece: {what!r} is neither frequencies in Hz (partials in mode order) nor a WAV file")
            freqs = None
        if freqs is None:
            _check_measurement(text, length, [])
            found = _recorded_partials(what, kind, _numbers(f"--piece: {text!r}", partial_ratios, length))
            out.extend((length, mode, f) for mode, f in found)
            continue
        if not all(f > 0 for f in freqs) or any(b <= a for a, b in zip(freqs, freqs[1:], strict=False)):
            fail(f"--piece: {text!r}: the partials must be positive and rising, in mode order")
        _check_measurement(text, length, freqs)
        out.extend((length, mode, f) for mode, f in enumerate(freqs, start=first))
    return out


def _recorded_partials(recording, kind, ratios):
    """((mode, Hz), ...) of a recording of a uniform test piece: every strong partial, each matched
    to a mode of the table model (``ratios``); exit 2 when strong partials fit no mode."""
    try:
        samples, rate = read_wav(recording)
        m = measure(samples, rate, kind, None, ratios)
    except RecordingError as exc:
        fail(f"{recording}: {exc}")
    if not m.fundamental_heard:
        fail(f"{recording}: the fundamental is not in the recording (estimated {m.fundamental_hz:.1f} Hz); "
             "strike the test piece again, away from a node of mode 1")
    try:
        found, unexplained = recorded_modes(m.partials_hz, m.fundamental_hz, ratios)
    except CalibrationError as exc:
        fail(f"{recording}: {exc}")
    if unexplained:
        click.echo(f"! {recording}: not used, fit no bending partial: "
                   + ", ".join(f"{f:.1f} Hz" for f in unexplained) + " (twisting or sideways modes?)")
    return found


@click.command("calibrate")
@click.option("--kind", type=click.Choice(["chime", "bar", "air-column"]), default="chime", show_default=True,
              help="What the test pieces are.")
@click.option("--piece", "pieces", multiple=True,
              help='A test piece: "LENGTH @ FREQUENCY", "LENGTH @ F1, F2, F3" (partials in mode order) or '
                   '"LENGTH @ RECORDING.wav" (repeatable); for air columns add "#N" for the N-th resonance.')
@click.option("--material", help="The table material the pieces started from (chime/bar).")
@section_options
@click.option("--model", type=click.Choice(["timoshenko", "slender", "elastic-2d"]), default="timoshenko",
              show_default=True, help="Model to fit with (use the one you plan with; elastic-2d for bars).")
@click.option("--ends", type=click.Choice(["open-open", "closed-open"]), default="closed-open", show_default=True,
              help=option_help("ends"))
@click.option("--temperature", default="20 C", show_default=True, help="Air temperature during the measurement.")
@click.option("--fit", "fit_what", type=click.Choice(["auto", "speed", "end-correction", "both"]), default="auto",
              show_default=True, help="Air columns: what to fit (auto: both with two or more lengths).")
@click.option("--two-resonance", "two_res", help='Air: "L1, L2 @ FREQUENCY", the first two resonance depths of a closed tube.')
@click.option("--name", help="Name of the calibrated material or stock size (default: NAME-calibrated).")
@click.option("-o", "--output", type=click.Path(dir_okay=False), help="Write the calibrated material (or stock) TOML here.")
@click.option("--force", is_flag=True, help=overwrite_help("--output"))
@MATERIALS_OPTION
@DESIGN_DIRS_OPTION
def calibrate_command(kind, pieces, material, stock_name, tube, rod, bar_size, model, ends, temperature,
                      fit_what, two_res, name, output, force, materials_dirs, design_path):
    """Fit material or air-column constants from measured test pieces.

    \b
    With several partials of one piece (or pieces of several lengths) the stiffness E and the
    shear modulus G are fitted separately; with one partial, E alone. Test pieces must be
    uniform (a bar before undercutting): a fit that misses any partial by more than 15 cents,
    or gives E or E/G outside the material's class, is refused and nothing is written.
    \b
    Examples:
      cutplan calibrate --material aluminum-6063-t5 --stock al-1.000x0.065 \\
          --piece "503.9 mm @ 591.2" -o my-materials/al-tube.toml
      cutplan calibrate --kind bar --material maple-sugar --bar "50 mm x 22 mm" \\
          --piece "440 mm @ 495.8, 1300.3, 2383.5" -o my-materials/maple.toml
      cutplan calibrate --kind air-column --stock pvc-sch40-1 --piece "185 mm @ 444.4" --fit speed
      cutplan calibrate --kind air-column --two-resonance "160 mm, 495 mm @ 512"
    """
    dirs = material_folders(materials_dirs, design_path)
    if kind == "air-column":
        _calibrate_air(pieces, stock_name, tube, ends, temperature, fit_what, two_res, name, output, force, dirs)
        return
    if not pieces:
        fail("calibrate: give at least one --piece")
    if not material:
        fail("calibrate: --material is needed: the table material the test pieces are made of")
    des = one_piece_design("calibrate", kind, None, 440.0, material, stock_name, tube, rod, bar_size, model=model,
                            materials_dirs=dirs)
    spec = des.sets[0]
    mat, sec = spec.material, spec.section

    def ratios(length):
        f = partial_frequencies(mat, sec, model, mat.modulus_for(model), mat.shear_modulus_for(model), length, 6)
        return [x / f[0] for x in f]

    measured = _parse_beam_pieces(pieces, kind, ratios)
    try:
        fit = _numbers(f"--piece {'; '.join(pieces)}", fit_moduli, measured, mat, sec, model)
    except CalibrationError as exc:
        fail(f"--piece {'; '.join(pieces)}: {exc}; nothing written")
    lengths = sorted({length for length, _, _ in measured})
    click.echo(f"{len(lengths)} test piece(s), {len(measured)} partial(s) of {material}, {sec.describe()}, {model} model")
    for (length, mode, f), pred, res in zip(measured, fit.table_hz, fit.residuals_cents, strict=True):
        click.echo(f"  {length * 1000:8.1f} mm partial {mode}: measured {f:9.3f} Hz, table predicts {pred:9.3f} Hz, "
                   f"residual after fit {res:+.2f} cents")
    click.echo(f"effective modulus E {fit.modulus / 1e9:.3f} GPa against the table's {fit.table_modulus / 1e9:.3f} GPa "
               f"({100 * (fit.scale - 1):+.2f} %); sqrt(E/rho) = {(fit.modulus / mat.density) ** 0.5:.1f} m/s")
    g_how = {"fitted": f"fitted from the partials (+/-{100 * fit.shear_error:.1f} % at 1 cent per partial)",
             "held": "held at the earlier measured value", "scaled": "moved with E (not fitted)"}[fit.shear]
    click.echo(f"shear modulus G {fit.shear_modulus / 1e9:.3f} GPa against the table's "
               f"{fit.table_shear_modulus / 1e9:.3f} GPa ({100 * (fit.shear_modulus / fit.table_shear_modulus - 1):+.2f} %), "
               f"{g_how}; E/G = {fit.modulus / fit.shear_modulus:.2f}")
    for note in fit.notes:
        click.echo(f"! {note}")
    name = name or (material if material.endswith("-calibrated") else f"{material}-calibrated")
    text = calibrated_moduli_toml(name, mat, model, fit, sec.describe())
    if output is None:
        click.echo("\n" + text, nl=False)
        return
    if Path(output).exists() and not force:
        fail(f"{output}: already exists; use --force to overwrite it")
    write_file(output, text)
    click.echo(f"wrote {output}; plan with material = \"{name}\" and --materials {Path(output).parent or '.'}")


def _calibrate_air(pieces, stock_name, tube, ends, temperature, fit_what, two_res, name=None, output=None, force=False,
                   dirs=()):
    try:
        kelvin = parse_temperature(temperature)
    except UnitError as exc:
        fail(f"--temperature: {exc.text!r} is not {exc.accepted}")
    speed_t = air_column.speed_of_sound(kelvin, air_column.DEFAULT_HUMIDITY)
    if two_res:
        match = re.fullmatch(r"\s*(.+?)\s*,\s*(.+?)\s*@\s*([0-9.]+)\s*", two_res)
        if not match:
            fail(f'--two-resonance: {two_res!r} must be "L1, L2 @ FREQUENCY", e.g. "160 mm, 495 mm @ 512"')
        try:
            l1, l2 = parse_length(match.group(1)), parse_length(match.group(2))
        except UnitError as exc:
            fail(f"--two-resonance: {exc.text!r} is not {exc.accepted}")
        for length in (l1, l2):
            problem = measurement_problem(length, [float(match.group(3))])
            if problem:
                fail(f"--two-resonance: {two_res!r}: {problem}")
        try:
            speed, corr = air_column.two_resonance(float(match.group(3)), l1, l2)
        except ValueError as exc:
            fail(f"--two-resonance: {exc}")
        lo, hi = AIR_SPEED_RANGE
        if not lo <= speed <= hi:
            fail(f"--two-resonance: {two_res!r} gives a speed of sound of {speed:.0f} m/s, outside the {lo:.0f}-"
                 f"{hi:.0f} m/s of air; check the two depths and the frequency")
        click.echo(f"speed of sound {speed:.1f} m/s in the pipe (free air {speed_t:.1f} m/s at {temperature}, "
                   f"{air_column.DEFAULT_HUMIDITY:.0f} % RH; wall losses slow it in a pipe); "
                   f"end correction {corr * 1000:.1f} mm")
        if corr < 0:
            click.echo("! a negative end correction means the two readings disagree; measure again")
            if output:
                fail(f"{output}: not written; a negative end correction cannot be saved")
        _save_air(output, force, name, stock_name, dirs, speed, kelvin, corr,
                  f"two-resonance reading {two_res}", f"two-resonance reading at {temperature}",
                  frequency=float(match.group(3)))
        return
    if not pieces:
        fail("calibrate: give --piece or --two-resonance")
    measured = _parse_pieces(pieces, ends)
    radius = None
    if stock_name or tube:
        des = one_piece_design("calibrate", "air-column", None, 440.0, None, stock_name, tube, None, None,
                                ends=ends, temperature=temperature, materials_dirs=dirs)
        radius = des.sets[0].section.air_radius
    reference = 0.0
    fitted = measured
    if radius:
        # take each pipe's wall losses out, so the fit finds the free-air speed (Keefe 1984); the
        # speed saved is the one in the first pipe, with its frequency, for the planner
        reference = measured[0][1]
        fitted = [(length, f / (1 - wall_loss_fraction(f, radius, kelvin)), n) for length, f, n in measured]
    try:
        fit = _numbers("calibrate", fit_air_column_choice, fitted, ends, fit_what, speed_t, radius)
    except CalibrationError as exc:
        fail(f"calibrate: {exc}")
    if reference:
        fit = replace(fit, speed=fit.speed * (1 - wall_loss_fraction(reference, radius, kelvin)))
    where = f" in the pipe at {reference:.1f} Hz" if reference else ""
    click.echo(f"speed of sound {fit.speed:.1f} m/s{where} (free air {speed_t:.1f} m/s at {temperature}); "
               f"end correction {fit.end_correction * 1000:.2f} mm per open end"
               + (f" = {fit.end_correction / radius:.3f} x inner radius" if radius else ""))
    for (length, f, n), res in zip(measured, fit.residuals_cents, strict=True):
        click.echo(f"  {length * 1000:8.1f} mm, resonance {n} at {f:.2f} Hz: residual {res:+.2f} cents")
    if radius and not output:
        click.echo(f'use it in a design with end_correction = {fit.end_correction / radius:.3f}')
    text = "; ".join(f"{length * 1000:.1f} mm @ {f:.2f} Hz #{n}" for length, f, n in measured)
    _save_air(output, force, name, stock_name, dirs, fit.speed, kelvin, fit.end_correction,
              f"{ends} pipes {text} (fit: {fit_what})", f"{len(measured)} {ends} pipe resonance(s) at {temperature}",
              frequency=reference)


def _save_air(output, force, name, stock_name, dirs, speed, kelvin, corr, note, header_note, frequency=0.0):
    """Write the stock calibration file when --output is given (needs a named --stock)."""
    if output is None:
        return
    if not stock_name:
        fail("calibrate: saving an air-column calibration needs --stock, the stock size it was measured on")
    try:
        stock = load_library(dirs).stock[stock_name]
    except MaterialError as exc:
        fail(str(exc))
    except KeyError:
        fail(f"--stock: {stock_name!r} is not a stock size; `cutplan materials` lists them")
    if Path(output).exists() and not force:
        fail(f"{output}: already exists; use --force to overwrite it")
    name = name or (stock_name if stock_name.endswith("-calibrated") else f"{stock_name}-calibrated")
    write_file(output, stock_toml(name, stock, speed, kelvin, corr, note.replace('"', "'"), header_note, frequency))
    click.echo(f'wrote {output}; plan air columns and resonators with section = {{ stock = "{name}" }} '
               f"and --materials {Path(output).parent or '.'}")


@click.command("trim")
@click.argument("design", type=click.Path(dir_okay=False))
@click.argument("label")
@click.option("--measured", help='What the piece sounds now [Hz] (a tuner): "583.1", or partials 1, 2, 3 of a bar '
                                 'as "349.1, 1398.6, 3490.2".')
@click.option("--recording", type=click.Path(dir_okay=False), help="Or a WAV recording of the piece.")
@click.option("--length-now", help="Length of the piece now (default: its cut length, or after the rounds on record).")
@click.option("--done", is_flag=True, help="Undercut bars: the cuts advised last time were made.")
@click.option("--state", "state_path", type=click.Path(dir_okay=False),
              help="Undercut bars: the file keeping the rounds (default: DESIGN's name + .trim-state.json beside it).")
@click.option("--units", type=click.Choice(["mm", "in"]), help=option_help("units", "default: the design's"))
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True,
              help=option_help("format"))
@MATERIALS_OPTION
def trim_command(design, label, measured, recording, length_now, done, state_path, units, fmt, materials_dirs):
    """How much to trim a piece, and from which end, to bring it to pitch; for an undercut bar,
    where and how deep to remove wood from the underside to tune its partials.

    \b
    Examples:
      cutplan trim examples/porch-chimes.toml porch-1 --measured 583.1
      cutplan trim examples/porch-chimes.toml porch-1 --recording porch-1.wav --length-now "505 mm"
      cutplan trim examples/music-room-marimba.toml bars-1 --measured "255.2, 1049.8"
      cutplan trim examples/music-room-marimba.toml bars-1 --measured "261.4, 1046.0" --done
    """

    if (measured is None) == (recording is None):
        fail("trim: give --measured or --recording (one of them)")
    if measured is not None and measured.strip():
        try:  # a bad reading gets its one line at once, before the design is planned (the service checks it again)
            parse_measured(measured, "--measured")
        except TrimError as exc:
            fail(f"{exc.key}: {exc}")
    des, _lib = load_or_exit(design, materials_dirs, units)
    the_plan = plan_or_exit(des)
    path = Path(state_path) if state_path else Path(design).with_name(Path(design).stem + STATE_SUFFIX)
    keys = {"piece": "trim", "measured": "--measured", "length_now": "--length-now", "recording": str(recording),
            "state": "trim"}
    with _state_lock(path):  # read, advise and write the rounds as one step: two runs at once lose no round
        try:  # the one trim service, with the page's checks
            report = trim_reading(des, the_plan, label, measured or "", (lambda: read_wav(recording)) if recording
                                  else None, length_now or "", _read_state(path), done, keys, str(path)).report
        except TrimError as exc:
            fail(f"{exc.key}: {exc}")
        if report.state is not None:
            write_file(path, json.dumps(report.state, indent=1) + "\n")
    if fmt == "json":
        click.echo(json.dumps(report.as_dict()))
        return
    lines = report.lines[:1] + tuple("  " + line for line in report.lines[1:])
    if report.state is not None and report.action in ("remove", "trim"):
        lines += (f"  (rounds kept in {path}; after making these cuts, record again and add --done)",)
    for line in lines:
        indent = line[:len(line) - len(line.lstrip())]
        click.echo("\n".join(textwrap.wrap(line, 100, subsequent_indent=indent + "  ", break_on_hyphens=False,
                                           break_long_words=False)))


@contextlib.contextmanager
def _state_lock(path):
    """Hold the trim-state file's lock (the output folders' lock file, beside it) while the block
    runs; a second trim of the same design waits for the first.  Where no lock file can be made
    (a read-only folder) the block runs unlocked: a round to keep would fail to write there anyway."""
    stack = contextlib.ExitStack()
    try:
        stack.enter_context(locked(path.parent, path.name))
    except OSError as exc:
        if exc.errno == errno.EBUSY:
            fail(f"{path}: {exc.strerror}")
    with stack:
        yield


def _read_state(path):
    """The text of the rounds on record for a design ('' when there are none yet); exit 2 when
    unreadable. The trim service checks what it holds."""
    if not path.exists():
        return ""
    try:
        with open(path, "rb") as fh:
            raw = fh.read(MAX_STATE_BYTES + 1)
        return raw.decode("utf-8") if len(raw) <= MAX_STATE_BYTES else raw.decode("utf-8", "replace")
    except (OSError, UnicodeDecodeError) as exc:
        fail(f"{path}: not a trim-state file ({exc.__class__.__name__}); move it away to start the rounds afresh")


@click.command("listen")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("-o", "--output", required=True, type=click.Path(), help="Folder for the WAV files.")
@click.option("--strike-at", type=click.FloatRange(0.0, 0.5), default=0.1, show_default=True,
              help="Strike point as a fraction of the length from the end (chimes and bars).")
@click.option("--force", is_flag=True,
              help=option_help("force_folder"))
@MATERIALS_OPTION
def listen_command(design, output, strike_at, force, materials_dirs):
    """Hear the set before cutting: one WAV per piece and the whole set as an arpeggio.

    \b
    Example:
      cutplan listen examples/porch-chimes.toml -o porch-sounds
    """
    out = check_output_dir(output, force)
    des, _lib = load_or_exit(design, materials_dirs)
    the_plan = plan_or_exit(des)
    files = {f"{p.label}.wav": wav_bytes(quiet(piece_preview, p, strike_at=strike_at), RATE) for p in the_plan.pieces}
    files.update({f"{s.name}-arpeggio.wav": wav_bytes(quiet(arpeggio, s.pieces, strike_at=strike_at), RATE)
                  for s in the_plan.sets})
    write_folder(out, files, force)
    click.echo(f"wrote {len(files)} WAV files to {out}")
