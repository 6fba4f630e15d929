"""Run the page under waitress, a production WSGI server in pure Python (no compiler needed on
a classroom laptop, Windows included). Loopback by default; any other host is the caller's
explicit choice and gets a warning."""

from __future__ import annotations

import errno
import ipaddress
import os
import signal
import socket
import threading
import time
import webbrowser

from waitress import create_server
from waitress.channel import HTTPChannel

from cutplan.web.app import MAX_UPLOAD_BYTES, create_app

__all__ = [
    "DEFAULT_HOST", "DEFAULT_PORT", "THREADS", "SPARE_THREADS", "CONNECTION_LIMIT", "IDLE_TIMEOUT",
    "is_loopback", "exposure_warning", "page_url", "default_workers", "listening_socket", "serve"
]

DEFAULT_HOST = "127.0.0.1"
DEFAULT_PORT = 8750
THREADS = 4
"""Planning processes at most [-]: enough for a classroom on one laptop; planning is CPU-bound."""
SPARE_THREADS = 4
"""Server threads beyond the planning workers [-], so pages, static files and quick answers are
served while every worker plans."""
CONNECTION_LIMIT = 400
"""Open connections at most [-] (slow clients beyond it wait; they never hold a thread)."""
IDLE_TIMEOUT = 20
"""Seconds a connection may stay silent before it is closed [s]."""
HEADER_TIMEOUT = 10
"""Seconds a client has to send a request's headers, counted from their first byte [s]. A client
that dribbles them out a byte at a time resets the idle clock with every byte; this one it cannot."""
REQUEST_TIMEOUT = 120
"""Seconds a client has to send a whole request, a recording included [s] (16 MB at 1 Mbit/s)."""
CHECK_INTERVAL = 2
"""How often the server looks for connections past a limit [s]."""


class DeadlineChannel(HTTPChannel):
    """A waitress connection that remembers when the request it is reading began, so the server
    can cut off a client that never finishes its headers (waitress's own ``channel_timeout``
    only closes connections that fall silent)."""

    request_started = None

    def received(self, data):
        if data and self.request is None:
            self.request_started = time.monotonic()
        return super().received(data)

    def overdue(self, now, header_timeout, request_timeout):
        """True when the request being read has been arriving longer than its limit."""
        req = self.request
        if req is None or self.requests or self.request_started is None or req.completed:
            return False
        limit = request_timeout if req.headers_finished else header_timeout
        return now - self.request_started > limit


def make_server(app, sock, threads, header_timeout=HEADER_TIMEOUT, request_timeout=REQUEST_TIMEOUT,
                idle_timeout=IDLE_TIMEOUT, check_interval=CHECK_INTERVAL):
    """A waitress server for ``app`` on the bound socket ``sock`` with the page's limits: request
    size, connection count, idle connections closed after ``idle_timeout`` s, and a request's
    headers within ``header_timeout`` s and the whole request within ``request_timeout`` s of its
    first byte. Slow clients never hold a thread (waitress reads requests in its main loop), and
    past these limits they no longer hold a connection either."""
    # channel_request_lookahead: waitress then tells the app when a client has gone away
    server = create_server(app, sockets=[sock], threads=threads, max_request_body_size=MAX_UPLOAD_BYTES,
                           ident="cutplan", clear_untrusted_proxy_headers=True, channel_request_lookahead=1,
                           connection_limit=CONNECTION_LIMIT, channel_timeout=idle_timeout,
                           cleanup_interval=check_interval)
    server.channel_class = DeadlineChannel
    idle_maintenance = server.maintenance

    def maintenance(now):
        idle_maintenance(now)
        clock = time.monotonic()
        for channel in list(server.active_channels.values()):
            if isinstance(channel, DeadlineChannel) and channel.overdue(clock, header_timeout, request_timeout):
                channel.will_close = True  # closed by the main loop, as waitress closes idle ones

    server.maintenance = maintenance
    return server


def is_loopback(host):
    """True for 127.x.x.x, ::1 and "localhost"."""
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host.strip("[]")).is_loopback
    except ValueError:
        return False


def exposure_warning(host):
    """The warning printed when the page is served beyond this machine, or None on loopback."""
    if is_loopback(host):
        return None
    return (f"warning: serving on {host}: anyone who can reach this machine on that network can use the page "
            "(and its CPU). There is no login. Use the default 127.0.0.1 unless the class needs it.")


def page_url(host, port):
    """The address to open in a browser."""
    shown = "127.0.0.1" if host in ("0.0.0.0", "::", "") else host
    if ":" in shown and not shown.startswith("["):
        shown = f"[{shown}]"
    return f"http://{shown}:{port}/"


def _listening_socket(host, port):
    """A bound TCP socket (closed again if binding fails, so nothing leaks on a busy port)."""
    bare = host.strip("[]")
    family = socket.AF_INET6 if ":" in bare else socket.AF_INET
    sock = socket.socket(family, socket.SOCK_STREAM)
    try:
        sock.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        sock.bind((bare, port))
    except OSError:
        sock.close()
        raise
    return sock


def _stop(_signum, _frame):
    raise KeyboardInterrupt


def default_workers():
    """Planning processes: one per core, at most :data:`THREADS` (each request holds one)."""
    return max(1, min(THREADS, os.cpu_count() or 1))


def listening_socket(host, port, any_port_if_busy=False, echo=print):
    """A bound socket on ``port``; with ``any_port_if_busy``, a free port (said in one line) when
    that one is taken, e.g. by a second ``cutplan serve``."""
    try:
        return _listening_socket(host, port)
    except OSError as exc:
        if not any_port_if_busy or port == 0 or exc.errno != errno.EADDRINUSE:
            raise
    sock = _listening_socket(host, 0)
    echo(f"port {port} is busy (another cutplan serve?); using port {sock.getsockname()[1]} instead "
         "(choose one with --port N)")
    return sock


def serve(host=DEFAULT_HOST, port=DEFAULT_PORT, open_browser=False, materials_dirs=(), echo=print, workers=None,
          any_port_if_busy=False):
    """Serve the page until interrupted (blocks). With ``any_port_if_busy``, a busy ``port`` gives way
    to a free one (the default port, when the builder did not name one)."""
    workers = default_workers() if workers is None else workers
    sock = listening_socket(host, port, any_port_if_busy, echo)
    try:
        app = create_app(materials_dirs, loopback_only=is_loopback(host), workers=workers, host=host)
    except BaseException:
        sock.close()
        raise
    try:
        server = make_server(app, sock, threads=max(workers, 1) + SPARE_THREADS)
    except BaseException:
        sock.close()
        app.planner.close()
        raise
    url = page_url(host, sock.getsockname()[1])
    echo(f"cutplan page at {url} (Ctrl+C to stop)")
    if open_browser:
        threading.Timer(0.5, webbrowser.open, args=(url,)).start()
    if threading.current_thread() is threading.main_thread():
        signal.signal(signal.SIGTERM, _stop)  # a plain kill stops the workers too
    try:
        server.run()
    except KeyboardInterrupt:
        pass
    finally:
        server.close()
        app.planner.close()
