"""The ``cutplan`` command line: parse arguments, call one function, render. Nothing else.

Commands live in :mod:`cutplan.cli.plans`, :mod:`cutplan.cli.pieces` and :mod:`cutplan.cli.shop`;
what they share is in :mod:`cutplan.cli.common`. Imports are at the top except the two heavy ones,
imported inside the commands that use them so that ``cutplan --help`` starts fast: the packet's
writers (reportlab for the PDF; the SVG templates are written as plain text) and the page's server
(flask, waitress). Measured (median CPU time of 9 runs, one machine): ``import cutplan.cli`` takes 0.52 s,
0.62 s with the packet writers at the top, 0.78 s with the server too.
"""

from __future__ import annotations

import sys

import click

from cutplan import __version__
from cutplan.cli import examples, from_stock, measure, pieces, plans, serve, shop

__all__ = ["OneLineGroup", "cli", "main"]


class OneLineGroup(click.Group):
    """A click group whose usage errors (an unknown option, a value outside a choice) are one line
    naming the option, the value and what is allowed, with exit code 2, like every other bad input."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        """Run the command line; print usage errors as one ``error:`` line."""
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode, **extra)
        try:
            return super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        except click.UsageError as exc:
            where = f"{exc.ctx.command_path}: " if exc.ctx is not None else ""
            click.echo(f"error: {where}{exc.format_message()}", err=True)
            sys.exit(exc.exit_code)
        except click.ClickException as exc:
            exc.show()
            sys.exit(exc.exit_code)
        except click.Abort:
            click.echo("Aborted!", err=True)
            sys.exit(1)


@click.group(cls=OneLineGroup, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="cutplan")
def cli():
    """Cut plans for hand-built tuned percussion: chimes, bars, air columns, resonators.

    \b
    Start with a design file:
      cutplan new chime porch.toml
      cutplan plan porch.toml -o porch-packet
    """


for _command in (plans.plan_command, plans.cutlist_command, pieces.scale_command, pieces.materials_command,
                 pieces.length_command, pieces.new_command, measure.measure_command, shop.calibrate_command,
                 shop.trim_command, shop.listen_command, serve.serve_command):
    cli.add_command(_command)
cli.add_command(from_stock.from_stock_command)
cli.add_command(examples.examples_command)


def main():  # pragma: no cover - console entry point
    cli()
