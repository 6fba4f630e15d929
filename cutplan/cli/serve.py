"""The ``serve`` command: the local web page."""

from __future__ import annotations

import errno

import click

from cutplan.cli.common import MATERIALS_OPTION, fail
from cutplan.materials import MaterialError, load_library

__all__ = ["serve_command"]

# the page's server (flask, waitress, and the packet writers) loads only when the command runs:
# start-up is 0.52 s CPU, 0.78 s with it and the packet writers at the top (measured; see cutplan.cli)


@click.command("serve")
@click.option("--port", type=click.IntRange(0, 65535), default=8750, show_default=True,
              help="TCP port (0: any free port). When the default is busy, a free port is chosen and shown.")
@click.option("--host", default="127.0.0.1", show_default=True,
              help="Address to listen on; anything but loopback lets other machines in (a warning is printed).")
@click.option("--open", "open_browser", is_flag=True, help="Open the page in the default browser.")
@click.option("--workers", type=click.IntRange(0, 64), default=None,
              help="Processes that plan designs (default: one per core, at most 4; 0: plan in the server process).")
@MATERIALS_OPTION
def serve_command(port, host, open_browser, workers, materials_dirs):
    """Serve the design page on this machine: design, preview, listen, trim and print in a browser.

    \b
    Examples:
      cutplan serve --open
      cutplan serve --port 8800 --materials my-materials
    """
    from cutplan.web.server import exposure_warning, serve

    try:
        load_library(list(materials_dirs))
    except MaterialError as exc:
        fail(f"--materials: {exc}")
    warning = exposure_warning(host)
    if warning:
        click.echo(warning, err=True)
    chosen = click.get_current_context().get_parameter_source("port") != click.core.ParameterSource.DEFAULT
    try:
        serve(host, port, open_browser, materials_dirs, echo=lambda line: click.echo(line, err=True), workers=workers,
              any_port_if_busy=not chosen)
    except OSError as exc:
        hint = ("; another program (perhaps another cutplan serve) has it: choose another with --port N, "
                "or --port 0 for any free port") if exc.errno == errno.EADDRINUSE else ""
        fail(f"--host/--port: cannot listen on {host}:{port} ({exc.strerror or exc}){hint}")
