"""Commands that plan a whole design: ``plan`` and ``cutlist``."""

from __future__ import annotations

import json

import click

from cutplan.cli.common import (
    MATERIALS_OPTION,
    check_output_dir,
    fail,
    load_or_exit,
    option_help,
    parse_stock_option,
    plan_or_exit,
    write_folder,
)
from cutplan.render.table import cut_list_dict, render_csv, render_cutlist_csv, render_json
from cutplan.render.terminal import render_stock, render_table

__all__ = ["plan_command", "cutlist_command"]

# the shop packet's writers (reportlab for the PDF) load only when -o asks for a packet:
# start-up is 0.52 s CPU, 0.62 s with them at the top (measured; see cutplan.cli)


@click.command("plan")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("-o", "--output", type=click.Path(), help="Folder to write plan.csv, plan.json and the shop packet.")
@click.option("--units", type=click.Choice(["mm", "in"]), help=option_help("units", "default: the design's"))
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table",
              show_default=True, help=option_help("format"))
@click.option("--paper", type=click.Choice(["letter", "a4"]), help="Paper size of the PDF (default: the design's).")
@click.option("--force", is_flag=True,
              help=option_help("force_folder"))
@MATERIALS_OPTION
def plan_command(design, output, units, fmt, paper, force, materials_dirs):
    """Plan every piece of DESIGN: lengths, cut lengths, nodes, partials.

    \b
    Example:
      cutplan plan examples/porch-chimes.toml
      cutplan plan examples/porch-chimes.toml --format json
      cutplan plan examples/porch-chimes.toml -o porch-packet
    """
    out = check_output_dir(output, force) if output else None
    des, _lib = load_or_exit(design, materials_dirs, units)
    the_plan = plan_or_exit(des)
    if out is not None:  # the folder first: if it cannot be written, nothing else is said
        from cutplan.render.packet import plan_files

        files = plan_files(the_plan, paper)
        write_folder(out, files, force)
    if fmt == "json":
        click.echo(render_json(the_plan), nl=False)
    elif fmt == "csv":
        click.echo(render_csv(the_plan), nl=False)
    else:
        click.echo(render_table(the_plan), nl=False)
    if out is not None:
        click.echo(f"wrote {len(files)} files to {out}", err=True)


@click.command("cutlist")
@click.argument("design", type=click.Path(dir_okay=False))
@click.option("--stock", "stock_texts", multiple=True,
              help='What-if stock instead of the design\'s: "LENGTH [x COUNT] [@ PRICE]", e.g. "10 ft x 3" (repeatable).')
@click.option("--kerf", default="1/16 in", show_default=True, help=option_help("kerf", "with --stock"))
@click.option("--end-trim", default="1/8 in", show_default=True, help=option_help("end_trim", "with --stock"))
@click.option("--units", type=click.Choice(["mm", "in"]), help=option_help("units", "default: the design's"))
@click.option("--format", "fmt", type=click.Choice(["table", "csv", "json"]), default="table", show_default=True,
              help=option_help("format"))
@MATERIALS_OPTION
def cutlist_command(design, stock_texts, kerf, end_trim, units, fmt, materials_dirs):
    """Lay the pieces of DESIGN out on stock: marks from each stick's end, offcuts, totals.

    \b
    Examples:
      cutplan cutlist examples/porch-chimes.toml
      cutplan cutlist examples/porch-chimes.toml --stock "6 ft x 4" --stock "10 ft @ 14.5"
    """
    des, _lib = load_or_exit(design, materials_dirs, units)
    override = parse_stock_option(stock_texts, kerf, end_trim) if stock_texts else None
    the_plan = plan_or_exit(des, override)
    if the_plan.cut_list is None:
        fail(f"{design}: stock: the design has no [stock] lengths; add them or use --stock \"8 ft x 2\"")
    if fmt == "json":
        click.echo(json.dumps(cut_list_dict(the_plan.cut_list), indent=2))
        return
    if fmt == "csv":
        click.echo(render_cutlist_csv(the_plan.cut_list, the_plan.inch_denominator), nl=False)
        return
    click.echo("\n".join(render_stock(the_plan.cut_list, the_plan.units, the_plan.inch_denominator)))
