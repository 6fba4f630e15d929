"""Commands about notes, materials and single pieces: ``scale``, ``materials``, ``length``, ``new``."""

from __future__ import annotations

from pathlib import Path

import click

from cutplan import pitch
from cutplan.cli.common import (
    DESIGN_DIRS_OPTION,
    INCH_DENOMINATOR_OPTION,
    MATERIALS_OPTION,
    fail,
    material_folders,
    one_piece_design,
    option_help,
    overwrite_help,
    plan_or_exit,
    section_options,
    write_file,
)
from cutplan.cli.examples import example_text
from cutplan.limits import A4_ALLOWED, a4_ok
from cutplan.materials import MaterialError, load_library
from cutplan.render.phrases import TRIM_RULE
from cutplan.render.terminal import other_modes_text, render_library, render_library_entry
from cutplan.spelling import closest_names
from cutplan.starters import STARTERS
from cutplan.units import format_length

__all__ = ["scale_command", "materials_command", "length_command", "new_command"]



@click.command("scale")
@click.argument("spec")
@click.option("--a4", type=float, default=440.0, show_default=True, help=option_help("a4"))
@click.option("--temperament", default="equal", show_default=True,
              help=option_help("temperament", "just/pythagorean relative to the root"))
@click.option("--spelling", type=click.Choice(["auto", "sharps", "flats"]), default="auto", show_default=True,
              help="Note names: from the key (flats in flat keys: Bb3 in F major), or always sharps or flats.")
def scale_command(spec, a4, temperament, spelling):
    """List the notes and frequencies of a scale.

    \b
    SPEC is "ROOT SCALE [COUNT]" or "LOW..HIGH [SCALE]". Examples:
      cutplan scale "D5 major-pentatonic 5"
      cutplan scale "C4..C5 major" --temperament just
    """

    if not a4_ok(a4):
        fail(f"--a4: {a4} {A4_ALLOWED}")
    try:
        targets = pitch.spec_targets(spec, temperament, a4, spelling)
    except pitch.PitchError as exc:
        fail(f"scale: {exc.text!r} is not {exc.accepted}")
    click.echo(f"{'note':6} {'Hz':>10} {'cents from ET':>14}")
    for t in targets:
        name, off = pitch.nearest_note(t.frequency, a4)
        click.echo(f"{t.name:6} {t.frequency:10.3f} {off:+14.2f}")


@click.command("materials")
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
    try:
        lib = load_library(materials_dirs)
    except MaterialError as exc:
        fail(str(exc))
    text = render_library(lib) if name is None else render_library_entry(lib, name)
    if text is None:
        near = ", ".join(closest_names(name, list(lib.materials) + list(lib.stock)))
        fail(f"materials: {name!r} is not a material or stock size; did you mean {near}? "
             "(`cutplan materials` lists them)")
    click.echo(text, nl=False)


@click.command("length")
@click.option("--kind", type=click.Choice(["chime", "bar", "air-column"]), default="chime", show_default=True,
              help="What the piece is.")
@click.option("--note", help='Target note, e.g. "D5".')
@click.option("--frequency", type=float, help="Target frequency in Hz (instead of --note).")
@click.option("--material", help=option_help("material"))
@section_options
@click.option("--ends", type=click.Choice(["open-open", "closed-open"]), default="open-open", show_default=True,
              help=option_help("ends"))
@click.option("--temperature", default="20 C", show_default=True, help="Air temperature for air columns.")
@click.option("--model", type=click.Choice(["timoshenko", "slender", "elastic-2d"]), default="timoshenko",
              show_default=True, help="Beam model for chimes and bars (elastic-2d: bars only).")
@click.option("--a4", type=float, default=440.0, show_default=True, help=option_help("a4"))
@click.option("--units", type=click.Choice(["mm", "in"]), default="mm", show_default=True,
              help=option_help("units"))
@INCH_DENOMINATOR_OPTION
@MATERIALS_OPTION
@DESIGN_DIRS_OPTION
def length_command(kind, note, frequency, material, stock_name, tube, rod, bar_size, ends, temperature, model, a4,
                   units, inch_denominator, materials_dirs, design_path):
    """Length and hang point of one piece, without a design file.

    \b
    Examples:
      cutplan length --note D5 --stock al-1.000x0.065
      cutplan length --kind bar --note C5 --material maple-sugar --bar "40 mm x 20 mm"
      cutplan length --kind air-column --note A4 --stock pvc-sch40-1 --ends closed-open
      cutplan length --kind bar --note C5 --material maple-calibrated --materials my-materials --bar "50 mm x 22 mm"
    """
    if (note is None) == (frequency is None):
        fail("length: give exactly one of --note or --frequency")
    des = one_piece_design("length", kind, note, frequency, material, stock_name, tube, rod, bar_size,
                            ends, temperature, model, a4, material_folders(materials_dirs, design_path),
                            inch_denominator)
    the_plan = plan_or_exit(des)
    den = the_plan.inch_denominator

    def length(metres):
        return format_length(metres, units, den)

    p = the_plan.pieces[0]
    click.echo(f"{p.note}: {p.target_hz:.2f} Hz, {the_plan.sets[0].section_label(units)}, {p.model}")
    click.echo(f"  length      {length(p.length)}")
    click.echo(f"  cut at      {length(p.cut_length)}: long by "
               f"{length(p.allowance)} ({the_plan.sets[0].allowance_rule}); {TRIM_RULE}")
    for i, x in enumerate(p.nodes, start=1):
        what = "hang hole" if kind == "chime" else "support"
        if kind == "chime" and i > 1:  # one hang hole per chime; the lower node is not drilled
            click.echo(f"  node {i} (no hole)  {length(x)} from the end")
            continue
        click.echo(f"  {what} {i}  {length(x)} from the end")
    click.echo(f"  trimming    {p.cents_per_mm:.2f} cents per mm")
    if kind != "air-column":
        click.echo(f"  shear correction {p.shear_correction_cents:+.1f} cents against the slender model")
    if p.other_modes:
        click.echo(f"  other modes {other_modes_text(p.other_modes)}")
    for w in p.warnings:
        click.echo(f"  ! {w.message}")


@click.command("new")
@click.argument("kind", required=False, metavar="[KIND]")
@click.argument("file", required=False, type=click.Path(dir_okay=False))
@click.option("--from", "example", metavar="NAME", help="Copy the bundled example NAME (see `cutplan examples`).")
@click.option("--force", is_flag=True, help=overwrite_help("FILE"))
def new_command(kind, file, example, force):
    """Write a commented starter design for KIND (chime, bar, air-column), or a copy of a bundled
    example, to FILE or the screen.

    \b
    Examples:
      cutplan new chime porch.toml
      cutplan new --from porch-chimes porch.toml
    """
    if example is not None:
        if file is not None:
            fail(f"new: give FILE once; with --from the only argument is FILE (got {kind!r} and {file!r})")
        text, file = example_text(example), kind
    elif kind is None:
        fail(f"new: give KIND ({', '.join(STARTERS)}) or --from NAME")
    elif kind not in STARTERS:
        fail(f"new: KIND {kind!r} is not one of {', '.join(STARTERS)} (or use --from NAME)")
    else:
        text = STARTERS[kind]
    if file is None:
        click.echo(text, nl=False)
        return
    if Path(file).exists() and not force:
        fail(f"{file}: already exists; use --force to overwrite it")
    write_file(file, text)
    click.echo(f"wrote {file}; next: cutplan plan {file}", err=True)
