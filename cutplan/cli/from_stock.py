"""``cutplan from-stock``: the sets of a scale that fit the stock on hand (see :mod:`cutplan.fromstock.search`)."""

from __future__ import annotations

import json
import re
from pathlib import Path

import click

from cutplan.cli.common import (
    INCH_DENOMINATOR_OPTION,
    MATERIALS_OPTION,
    fail,
    load_or_exit,
    option_help,
    overwrite_help,
    write_file,
)
from cutplan.design import DesignErrors, read_design_file
from cutplan.design.contract import MAX_STOCK_COUNT
from cutplan.design.writer import design_toml
from cutplan.fromstock.output import result_dict
from cutplan.fromstock.search import SearchError, search
from cutplan.render.phrases import TRIM_RULE, caution_lines, sentence
from cutplan.render.stock_layout import stick_lines, stick_rows
from cutplan.units import UnitError, length_parts, parse_frequency, parse_length

__all__ = ["HAVE_FORMS", "from_stock_command"]


HAVE_FORMS = '"LENGTH [x COUNT]" with a unit, e.g. "8 ft x 2", "2.4 m" or "600 mm x 3"'
_HAVE = re.compile(r"\s*(.+?)\s*(?:[x×*]\s*(-?\d+))?\s*")
_HAS_UNIT = re.compile(r"[a-zA-Z'\"′″]")


def _have_lengths(texts):
    """[{length, count}, ...] from --have options (one line and exit 2 on a bad one)."""
    out = []
    for text in texts:
        match = _HAVE.fullmatch(text)
        length_text = match.group(1) if match else ""
        if not _HAS_UNIT.search(length_text):
            fail(f'--have: {text!r}: the length has no unit; write it as {HAVE_FORMS} '
                 f'(e.g. "{length_text} in" or "{length_text} mm")')
        try:
            length = parse_length(length_text)
        except UnitError as exc:
            fail(f"--have: {text!r} is not {HAVE_FORMS}; the length must be {exc.accepted}")
        if not length > 0:
            fail(f"--have: {text!r}: the length must be more than zero, e.g. \"8 ft x 1\"")
        count = int(match.group(2)) if match.group(2) else 1
        if not 1 <= count <= MAX_STOCK_COUNT:
            fail(f"--have: {text!r}: the count must be a whole number from 1 to {MAX_STOCK_COUNT}, e.g. \"{length_text} x 1\"")
        out.append({"length": length_text, "count": count})
    return out


def _section(stock_size, tube, rod, bar_size):
    """The [[set]] section table from the section options (exit 2 unless exactly one is given)."""
    given = [s for s in (stock_size, tube, rod, bar_size) if s]
    if len(given) != 1:
        fail("from-stock: give exactly one of --stock-size, --tube, --rod or --bar")
    if stock_size:
        return {"stock": stock_size}
    if rod:
        return {"shape": "rod", "diameter": rod}
    parts = (tube or bar_size).lower().replace("×", "x").split("x")
    if len(parts) != 2:
        what = ('--tube', '"OUTER x WALL", e.g. "1 in x 0.065 in"') if tube else \
            ('--bar', '"WIDTH x THICKNESS", e.g. "38 mm x 19 mm"')
        fail(f"{what[0]}: {(tube or bar_size)!r} must be {what[1]}")
    a, b = (p.strip() for p in parts)
    return {"shape": "tube", "outer": a, "wall": b} if tube else {"shape": "bar", "width": a, "thickness": b}


_SET_KEYS_KEPT = ("kind", "material", "section", "model", "target", "ends", "end_correction", "temperature",
                  "humidity")
"""Keys of a design's set that describe the pieces (not their notes): what from-stock reuses."""


def _design_stock(path, materials_dirs):
    """From a design file: its [stock] as written, its units and tuning, its first chime, bar or
    air-column set without the notes, its material folders, its scale and its inch_denominator if set
    (exit 2 on errors)."""
    design, _lib = load_or_exit(path, materials_dirs)  # validates the whole file, one line per problem
    try:
        raw = read_design_file(path)
    except DesignErrors as exc:
        fail([str(e) for e in exc.errors])
    stock = raw.get("stock")
    if not isinstance(stock, dict) or not stock.get("lengths"):
        fail(f"{path}: stock.lengths: the design lists no stock on hand; add "
             '[stock] lengths = [{ length = "8 ft", count = 1 }] or use --have')
    sets = [s for s in raw.get("set", []) if s.get("kind") in ("chime", "bar", "air-column") and "undercut" not in s]
    piece = {k: v for k, v in sets[0].items() if k in _SET_KEYS_KEPT} if sets else None
    scale = sets[0].get("scale") if sets else None
    return (stock, raw.get("units", "mm"), raw.get("tuning", {}), piece, tuple(str(d) for d in design.material_dirs),
            scale, raw.get("inch_denominator"))


_OPTION_OF_KEY = (("set[1].section.stock", "--stock-size"), ("set[1].section", "--stock-size/--tube/--rod/--bar"),
                  ("set[1].material", "--material"),
                  ("set[1].ends", "--ends"), ("set[1]", "--kind"), ("stock.lengths", "--have"),
                  ("stock.kerf", "--kerf"), ("stock.end_trim", "--end-trim"), ("stock.allowance", "--allowance"),
                  ("tuning.a4", "--a4"), ("tuning.temperament", "--temperament"),
                  ("inch_denominator", "--inch-denominator"))


def _option_error(error):
    """A design error about the options, named by the option rather than the design key."""
    option = next((o for k, o in _OPTION_OF_KEY if error.key.startswith(k)), None)
    if option is None:
        return str(error)
    shown = "" if error.value is None else f"{error.value!r} "
    return f"{option}: {shown}{error.allowed}"


def _render(result, heard=False):
    units, den = result.units, result.plan.inch_denominator

    def length(m):
        return str(length_parts(m, units, den))

    head = ["#", "root", "scale", "notes", "lowest", "highest", "sticks", "offcut", "utilisation"]
    rows = [[str(i), c.root, c.scale, str(c.count), c.lowest, c.highest, str(c.sticks_used), length(c.offcut),
             f"{100 * c.utilisation:.1f} %"] for i, c in enumerate(result.candidates, start=1)]
    widths = [max(len(r[j]) for r in [head] + rows) for j in range(len(head))]
    out = ["  ".join(h.ljust(w) for h, w in zip(head, widths, strict=True)).rstrip()]
    out += ["  ".join(x.ljust(w) for x, w in zip(r, widths, strict=True)).rstrip() for r in rows]
    span = result.stats.get("practical_range")
    if span:
        low, high = result.stats["window"]
        out += ["", f"notes tried {low} to {high}; of these, this section on this stock makes {span[0]} to {span[1]} "
                    "(longer pieces miss the longest stick, shorter ones are stubby)"]
    c = result.chosen
    out += ["", f"chosen: {c.count} notes of {c.root} {c.scale} ({c.lowest} to {c.highest}), "
                f"planned and laid out{' (layout proven optimal)' if c.proven_optimal else ''}:"]
    for row in stick_rows(((*stick, "") for stick in c.sticks), units, den):
        out.extend(stick_lines(row, str, "  ", 0))
    out += [f"note: {n}" for n in result.notes]
    if heard:
        out.append("note: roots and notes are strike notes (the pitch heard, about half the mode-4 frequency)")
    out += ["", sentence(TRIM_RULE), *caution_lines(result.plan.cautions)]
    return "\n".join(out) + "\n"


@click.command("from-stock")
@click.option("--have", "have", multiple=True,
              help='Stock on hand, "LENGTH [x COUNT]" with a unit, e.g. "8 ft x 1" (repeatable; count 1 if left out).')
@click.option("--design", "design_file", type=click.Path(dir_okay=False),
              help="Use this design file's [stock], units and tuning instead of --have; and its first set's "
                   "kind, material and section unless section options are given.")
@click.option("--kerf", default="1.6 mm", show_default=True, help=option_help("kerf"))
@click.option("--end-trim", default="0 mm", show_default=True, help=option_help("end_trim"))
@click.option("--allowance", default="risk 5 %", show_default=True,
              help='Rough-cut allowance: "risk 5 %" (chance of coming out sharp), "0.5 %" or "3 mm".')
@click.option("--kind", type=click.Choice(["chime", "bar", "air-column"]),
              help="What the pieces are (default chime, or the --design file's first set).")
@click.option("--material", help=option_help("material"))
@click.option("--stock-size", help=option_help("stock_size"))
@click.option("--tube", help=option_help("tube"))
@click.option("--rod", help=option_help("rod"))
@click.option("--bar", "bar_size", help=option_help("bar"))
@click.option("--ends", type=click.Choice(["open-open", "closed-open"]), help=option_help("ends"))
@click.option("--target", type=click.Choice(["fundamental", "strike-note"]),
              help="Chimes and bars: name each piece by its lowest mode (default) or by the strike note you "
                   "hear (chimes ring at about half their mode-4 frequency), so the root is the note heard.")
@click.option("--scale", "scales", multiple=True,
              help="Scale to try (repeatable to compare; default major-pentatonic, or the --design file's scale).")
@click.option("--count", type=int, help="Notes in the set: find the lowest root that fits.")
@click.option("--most", is_flag=True, help="As many notes as fit (then the lowest root).")
@click.option("--least-waste", is_flag=True, help="With --count: the root that uses the sticks cut best.")
@click.option("--lowest", help='Lowest note allowed, e.g. "C4".')
@click.option("--highest", help='Highest note allowed, e.g. "C7".')
@click.option("--a4", type=float, help=option_help("a4", "default 440, or the design's"))
@click.option("--temperament", help=option_help("temperament", "default equal, or the design's"))
@click.option("--units", type=click.Choice(["mm", "in"]), help=option_help(
    "units", "default: the design's, or inches when every --have is in feet or inches"))
@INCH_DENOMINATOR_OPTION
@click.option("--top", type=click.IntRange(1, 100), default=10, show_default=True, help="Rows in the ranked table.")
@click.option("--format", "fmt", type=click.Choice(["table", "json"]), default="table", show_default=True,
              help=option_help("format"))
@click.option("-o", "--output", type=click.Path(dir_okay=False), help="Write the chosen set as a design file.")
@click.option("--force", is_flag=True, help=overwrite_help("the --output file"))
@MATERIALS_OPTION
def from_stock_command(have, design_file, kerf, end_trim, allowance, kind, material, stock_size, tube, rod, bar_size,
                       ends, target, scales, count, most, least_waste, lowest, highest, a4, temperament, units,
                       inch_denominator, top, fmt, output, force, materials_dirs):
    """Find the set of a scale that fits the stock on hand, and write it as a design.

    \b
    Examples:
      cutplan from-stock --have "8 ft x 1" --stock-size al-1.000x0.065 --count 5
      cutplan from-stock --have "10 ft x 2" --have "600 mm x 3" --tube "1 in x 0.065 in" \\
          --material aluminum-6063-t5 --most --scale major --scale major-pentatonic
      cutplan from-stock --design porch.toml --count 5 -o porch-5.toml
      cutplan from-stock --have "10 ft x 1" --stock-size emt-3/4 --count 5 --target strike-note
    """
    if bool(have) == bool(design_file):
        fail("from-stock: give the stock on hand with --have (repeatable) or --design FILE, one of the two")
    if (count is None) == (not most):
        fail("from-stock: give --count N (lowest root that fits) or --most (as many notes as fit)")
    if least_waste and count is None:
        fail("--least-waste: needs --count N")
    if output and Path(output).exists() and not force:
        fail(f"{output}: already exists; use --force to overwrite it")
    for option, value in (("--kerf", kerf), ("--end-trim", end_trim)):
        if not _HAS_UNIT.search(value) and value.strip() not in ("0", "0.0"):
            fail(f'{option}: {value!r} has no unit; write e.g. "{value.strip()} mm" or "1/16 in"')
    tuning, piece = {}, None
    if have:
        stock = {"lengths": _have_lengths(have), "kerf": kerf, "end_trim": end_trim, "allowance": allowance}
        inch_like = all(re.search(r"ft|in|'|\"|foot|feet|inch", h["length"]) for h in stock["lengths"])
        shown = units or ("in" if inch_like else "mm")
    else:
        stock, design_units, tuning, piece, design_dirs, design_scale, design_den = _design_stock(design_file,
                                                                                                  materials_dirs)
        inch_denominator = inch_denominator or design_den
        materials_dirs = tuple(materials_dirs) + design_dirs
        scales = scales or ((design_scale,) if isinstance(design_scale, str) else ())
        shown = units or design_units
    if piece is not None and not any((stock_size, tube, rod, bar_size, kind, material)):
        base_set = piece  # the design's own pieces: kind, material, section
    else:
        base_set = {"kind": kind or "chime", "section": _section(stock_size, tube, rod, bar_size)}
        if material:
            base_set["material"] = material
    if ends:
        base_set["ends"] = ends
    if target:
        base_set["target"] = target
    objective = "most" if most else ("waste" if least_waste else "lowest")
    if a4 is None and isinstance(tuning.get("a4"), str):  # the design file may say a4 = "440 Hz"
        try:
            tuning["a4"] = parse_frequency(tuning["a4"])
        except UnitError as exc:
            fail(f"{design_file}: tuning.a4: {exc.text!r} is not {exc.accepted}")
    try:
        result = search(
            base_set, stock, scales or ("major-pentatonic",), count=count, objective=objective, lowest=lowest,
            highest=highest, a4=a4 if a4 is not None else tuning.get("a4", 440.0),
            temperament=temperament or tuning.get("temperament", "equal"), units=shown,
            materials_dirs=materials_dirs, top=top, inch_denominator=inch_denominator)
    except DesignErrors as exc:
        fail([_option_error(e) for e in exc.errors])
    except SearchError as exc:
        fail(f"--{exc}" if exc.key in ("count", "lowest", "highest", "scale", "kind") else f"from-stock: {exc}")
    if fmt == "json":
        click.echo(json.dumps(result_dict(result), indent=1))
    else:
        click.echo(_render(result, heard=target == "strike-note"), nl=False)
    if output:
        c = result.chosen
        text = design_toml(result.design, header=(
            f"{c.count} notes of {c.root} {c.scale}, chosen by `cutplan from-stock` to fit the stock below.",
            "Plan it with: cutplan plan THIS-FILE"))
        write_file(output, text)
        click.echo(f"wrote {output}; next: cutplan plan {output}", err=True)
