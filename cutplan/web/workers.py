"""Planning processes for the page, each of which can be stopped on its own.

A request takes an idle worker process (waiting at most :data:`QUEUE_WAIT` for one), hands it
the job and waits for the answer.  When the request's time limit passes, or its client has
gone away (the browser dropped a stale preview), that worker is killed and a fresh one takes
its place at once, so a few heavy designs cannot hold every worker and an
abandoned request never keeps one busy.  Workers are clean interpreters (``spawn``), as on
Windows; forking a threaded server is unsafe.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import signal
import threading
import time

__all__ = ["TIME_LIMIT", "QUEUE_WAIT", "POLL", "Stopped", "WorkerPool"]

TIME_LIMIT = 120.0
"""Longest a page request may plan [s]; past it the worker is stopped and the request gets one line."""
QUEUE_WAIT = 30.0
"""Longest a request waits for a free worker [s]."""
POLL = 0.05
"""How often a waiting request checks its client and its time limit [s]."""


class Stopped(Exception):
    """The job did not finish: ``reason`` is "time", "gone", "busy" or "died"."""

    def __init__(self, reason):
        super().__init__(reason)
        self.reason = reason


def _worker_main(conn, warm=True):
    """The loop each worker process runs: receive (function, args), send back its result.
    With ``warm`` it loads the planner first, so the first plan does not wait for the imports."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl+C is the server's; it stops the workers
    if warm:
        import cutplan.planning.planner  # noqa: F401  (warm up before the first job arrives)
        import cutplan.web.service  # noqa: F401

    while True:
        try:
            fn, args, with_progress = conn.recv()
        except (EOFError, OSError):
            return
        extra = {"report": lambda done, total: conn.send(("progress", (done, total)))} if with_progress else {}
        conn.send(("done", fn(*args, **extra)))


class _Worker:
    def __init__(self, ctx, warm=True):
        parent, child = ctx.Pipe()
        self.conn = parent
        self.proc = ctx.Process(target=_worker_main, args=(child, warm), daemon=True)
        self.proc.start()
        child.close()

    def stop(self):
        with contextlib.suppress(Exception):
            self.proc.kill()
            self.proc.join(5)
        with contextlib.suppress(Exception):
            self.conn.close()


class WorkerPool:
    """At most ``size`` worker processes; :meth:`run` a job in one of them.

    ``warm`` (the default): each worker loads the planner as it starts, before its first job; a
    pool for light jobs that need none of it may start its workers without those imports."""

    def __init__(self, size, warm=True):
        self._warm = warm
        self._ctx = multiprocessing.get_context("spawn")
        self._slots = threading.BoundedSemaphore(size)
        self._idle = []
        self._lock = threading.Lock()
        self._closed = False

    def _take(self):
        with self._lock:
            if self._closed:
                raise Stopped("busy")
            if self._idle:
                return self._idle.pop()
        return _Worker(self._ctx, self._warm)

    def _give_back(self, worker):
        with self._lock:
            if not self._closed:
                self._idle.append(worker)
                return
        worker.stop()

    def run(self, fn, args, limit=None, gone=None, wait=None, progress=None):
        """``fn(*args)`` in a worker process; raises :class:`Stopped` when it cannot finish.

        ``limit`` [s] (default :data:`TIME_LIMIT`), ``gone``: a callable that is true once the
        client has disconnected; ``wait`` [s]: longest wait for a free worker; ``progress``: a
        callable ``(done, total)``, then ``fn`` is called with ``report=`` that sends them here."""
        limit = TIME_LIMIT if limit is None else limit
        if not self._slots.acquire(timeout=QUEUE_WAIT if wait is None else wait):
            raise Stopped("busy")
        try:
            worker = self._take()
            try:
                worker.conn.send((fn, args, progress is not None))
                deadline = time.monotonic() + limit
                while True:
                    while not worker.conn.poll(POLL):
                        reason = ("died" if not worker.proc.is_alive() else "time" if time.monotonic() > deadline
                                  else "gone" if gone is not None and gone() else None)
                        if reason:
                            worker.stop()
                            # its successor warms up now, not at the next job
                            self._give_back(_Worker(self._ctx, self._warm))
                            raise Stopped(reason)
                    kind, result = worker.conn.recv()
                    if kind == "done":
                        break
                    progress(*result)
            except (EOFError, OSError):
                worker.stop()
                raise Stopped("died") from None
            self._give_back(worker)
            return result
        finally:
            self._slots.release()

    def close(self):
        """Stop every idle worker; busy ones are stopped when their job returns."""
        with self._lock:
            self._closed, idle, self._idle = True, self._idle, []
        for worker in idle:
            worker.stop()
