"""``cutplan examples``: list the example designs that come with cutplan, or print one.

The examples ship inside the package (``cutplan/_examples`` in a wheel, ``examples/`` in a source
checkout), so they are reachable from any folder; ``cutplan new --from NAME FILE`` copies one.
"""

from __future__ import annotations

import textwrap

import click

from cutplan.cli.common import fail
from cutplan.starters import example_paths

__all__ = ["example_names", "example_text", "examples_command"]


def example_names():
    """{name: path} of every bundled example, by file name without ``.toml``."""
    return example_paths()


def example_text(name):
    """The text of the bundled example ``name``; a one-line error (exit code 2) if there is none."""
    names = example_names()
    if name not in names:
        fail(f"--from: {name!r} is not a bundled example; use one of {', '.join(names)} (see `cutplan examples`)")
    return names[name].read_text(encoding="utf-8")


def _summary(path):
    """The example's opening comment (its scenario), joined into one paragraph."""
    words = []
    for line in path.read_text(encoding="utf-8").splitlines():
        if not line.startswith("#"):
            break
        words.append(line.lstrip("# ").strip())
    return " ".join(w for w in words if w)


@click.command("examples")
@click.argument("name", required=False)
def examples_command(name):
    """List the bundled example designs, or print one (NAME) to the screen.

    \b
    Examples:
      cutplan examples
      cutplan examples porch-chimes
      cutplan new --from porch-chimes my-chimes.toml
    """
    if name is not None:
        click.echo(example_text(name), nl=False)
        return
    names = example_names()
    width = max(len(n) for n in names)
    for n, path in names.items():
        lines = textwrap.wrap(_summary(path), 100 - width - 2, break_on_hyphens=False) or [""]
        click.echo(f"{n:{width}}  {lines[0]}")
        for more in lines[1:]:
            click.echo(f"{'':{width}}  {more}")
    click.echo("\ncopy one to edit: cutplan new --from NAME FILE", err=True)
