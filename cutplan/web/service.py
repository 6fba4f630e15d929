"""What the page and the JSON API do with a design, without any web framework.

Every design goes through :func:`cutplan.design_from_mapping`, the same validation as a design
file; the errors come back as ``{"key", "message"}`` records. Material folders come only from
the server's own options, never from a request.
"""

from __future__ import annotations

import io
import json
import threading
import zipfile
from collections import OrderedDict

from cutplan.audio.synth import RATE, arpeggio, piece_preview
from cutplan.audio.wav import wav_bytes
from cutplan.design import DesignErrors, design_from_mapping
from cutplan.design.notices import INVALID, Notice
from cutplan.design.writer import design_toml
from cutplan.materials import Library, MaterialError, load_library
from cutplan.planning.planner import bars_to_solve
from cutplan.planning.service import REFUSALS, guarded_plan, refusal_records
from cutplan.render.packet import plan_files
from cutplan.render.pdf import render_pdf
from cutplan.render.phrases import DESIGN_SAVED
from cutplan.web.workers import Stopped, WorkerPool

__all__ = [
    "DESIGN_NAME", "MAX_DESIGN_BYTES", "CACHE_SIZE", "STOPPED", "ZIP_TIME", "WebErrors", "error",
    "design_errors", "MAX_DEPTH", "plain_problem", "library", "Planner", "packet_zip",
    "packet_pdf", "piece_wav"
]


DESIGN_NAME = "design"
"""Name that stands for the design in error lines (there is no file)."""
MAX_DESIGN_BYTES = 1_000_000
"""Largest design accepted [bytes], as for a design file (a design is a few kB)."""
CACHE_SIZE = 16
"""Plans kept for repeated requests of the same design (play, trim, download after a preview)."""
STOPPED = {
    "time": "took longer than the page allows for one plan; plan a design this large with `cutplan plan` "
            "at the terminal, or split it into smaller sets",
    "gone": "the page stopped waiting for this plan (a newer edit replaced it)",
    "busy": "every planning process is busy; try again in a moment",
    "died": "the planning process stopped (out of memory?); try a smaller design",
}
"""Why a plan in a worker did not finish, as the page shows it."""
ZIP_TIME = (1980, 1, 1, 0, 0, 0)
"""Timestamp of every zip entry, so the same design gives the same zip bytes."""


class WebErrors(ValueError):
    """Problems with a request, each ``{"code": ..., "key": ..., "message": ...}`` (the key: a
    design key or a form field)."""

    def __init__(self, errors):
        self.errors = list(errors)
        super().__init__("; ".join(e["message"] for e in self.errors))


def error(key, message, code=INVALID):
    """One error record; the message starts with the key, as a design-file error line does."""
    return Notice(code, key, f"{key}: {message}").as_dict()


def design_errors(exc):
    """``DesignErrors`` -> error records (the one-line messages without the design's name)."""
    return [e.record().as_dict() for e in exc.errors]


MAX_DEPTH = 12
"""Deepest nesting of tables and lists a design may have [-] (a design nests four deep)."""


def plain_problem(value, key="(design)", depth=0):
    """The first error record for a value no design can hold (a date, or nesting deeper than
    :data:`MAX_DEPTH`), or None.  Checked before validation, so that nothing downstream meets it."""
    if depth > MAX_DEPTH:
        return error(key, f"nests tables or lists more than {MAX_DEPTH} deep; a design nests four deep")
    if isinstance(value, dict):
        for k, v in value.items():
            found = plain_problem(v, str(k) if key == "(design)" else f"{key}.{k}", depth + 1)
            if found:
                return found
    elif isinstance(value, list):
        for i, v in enumerate(value, start=1):
            found = plain_problem(v, f"{key}[{i}]", depth + 1)
            if found:
                return found
    elif value is not None and not isinstance(value, (str, int, float, bool)):
        return error(key, f"is a {type(value).__name__} ({value}); design values are text, numbers, true/false, "
                     "lists and tables")
    return None


_LIBRARIES: dict[tuple[str, ...], Library] = {}
_LIBRARY_LOCK = threading.Lock()


def library(materials_dirs=()):
    """The material library of the server's folders, read once per process (so answers do not
    change while the server runs, and no request waits for the folders to be read again)."""
    key = tuple(str(d) for d in materials_dirs)
    with _LIBRARY_LOCK:
        if key not in _LIBRARIES:
            _LIBRARIES[key] = load_library(list(materials_dirs))
        return _LIBRARIES[key]


def _cache_key(data):
    return json.dumps(data, sort_keys=True, ensure_ascii=False, default=str)


class Planner:
    """Validates and plans designs given as mappings; keeps the last few plans.

    ``materials_dirs`` are the server's extra material folders (``cutplan serve --materials``).
    With ``workers`` > 0, plans are computed in that many worker processes, so that several
    requests use several cores (planning holds the interpreter lock) and the server stays
    responsive; each has a time limit and is stopped when its client goes away
    (:mod:`cutplan.web.workers`).  With 0 they are computed in the calling thread. Call
    :meth:`close` when done.
    """

    def __init__(self, materials_dirs=(), cache_size=CACHE_SIZE, workers=0, lib=None):
        self.materials_dirs = tuple(materials_dirs)
        self.cache_size = cache_size
        self.workers = workers
        self._cache = OrderedDict()
        self._lock = threading.Lock()
        self._pool = None
        self._library = lib
        self._generation = 0

    @property
    def library(self):
        """The material library plans use now: the server's folders as read at start-up or at the
        last :meth:`reload` that succeeded."""
        with self._lock:
            if self._library is None:
                self._library = library(self.materials_dirs)
            return self._library

    def reload(self):
        """Read the material folders again; the new tables serve every plan asked for from now on.

        A broken folder raises :class:`WebErrors` naming the file (and changes nothing: the tables
        read before keep serving). Plans already under way finish on the tables they started with
        and are not kept for later requests."""

        try:
            fresh = load_library(list(self.materials_dirs))
        except MaterialError as exc:
            raise WebErrors([error("(materials)", f"were not re-read: {exc}; the tables read before "
                                   "still serve")]) from None
        except OSError as exc:
            raise WebErrors([error("(materials)", f"were not re-read: {exc.filename or ''} "
                                   f"{exc.strerror or exc}; the tables read before still serve")]) from None
        with self._lock:
            self._library = fresh
            self._generation += 1
            self._cache.clear()
        return fresh

    def design(self, data, lib=None):
        """A validated Design (on the material library ``lib``, default :attr:`library`), or
        :class:`WebErrors`."""

        if not isinstance(data, dict):
            raise WebErrors([error("(design)", "must be a table (JSON object) of design keys")])
        problem = plain_problem(data)
        if problem:
            raise WebErrors([problem])
        if "material_dirs" in data:
            raise WebErrors([error("material_dirs", "is not accepted from the page or the API; material "
                                   "folders are given to the server (cutplan serve --materials DIR)")])

        lib = self.library if lib is None else lib
        try:
            return design_from_mapping(data, lambda _dirs: lib, DESIGN_NAME, ".")[0]
        except DesignErrors as exc:
            raise WebErrors(design_errors(exc)) from None
        except MaterialError as exc:  # a broken server-side folder, not the request's fault
            raise WebErrors([error("(materials)", str(exc))]) from None

    def compute(self, data, lib=None, progress=None):
        """(Design, Plan) computed here and now, or :class:`WebErrors` (no cache, no workers);
        planned by the one guarded plan service, as the command line and from-stock are.

        ``progress(done, total)``, if given, is called as the design's arched bars are solved."""
        design = self.design(data, lib)
        step = None
        total = bars_to_solve(design) if progress is not None else 0
        if total:
            solved = [0]

            def step(n=1):
                solved[0] += n
                progress(min(solved[0], total), total)

            progress(0, total)
        try:
            return design, guarded_plan(design, DESIGN_NAME, progress=step)
        except REFUSALS as exc:  # numbers that overflow or give an absurd piece: the design's are to blame
            raise WebErrors([r.as_dict() for r in refusal_records(exc, DESIGN_NAME)]) from None

    def _in_worker(self, data, lib, gone=None, progress=None):

        with self._lock:
            if self._pool is None:
                self._pool = WorkerPool(self.workers)
            pool = self._pool
        try:
            kind, value = pool.run(_plan_in_worker, (data, lib), gone=gone, progress=progress)
        except Stopped as exc:
            raise WebErrors([error("(request)", STOPPED[exc.reason])]) from None
        if kind == "errors":
            raise WebErrors(value)
        return value

    def plan(self, data, gone=None, progress=None):
        """(Design, Plan) for a design mapping, or :class:`WebErrors`. Repeated designs are cached.

        ``gone``: a callable, true once the client has gone away (its worker is then stopped);
        ``progress(done, total)``: called as arched bars are solved (not for a cached plan)."""
        problem = plain_problem(data) if isinstance(data, dict) else None
        if problem:
            raise WebErrors([problem])
        key = _cache_key(data)
        self.library  # noqa: B018  (read at the first plan, if not yet)
        with self._lock:
            lib, generation = self._library, self._generation
            if key in self._cache:
                self._cache.move_to_end(key)
                return self._cache[key]
        result = (self._in_worker(data, lib, gone, progress) if self.workers > 0
                  else self.compute(data, lib, progress))
        with self._lock:
            if generation == self._generation:  # a plan on tables since re-read is not kept
                self._cache[key] = result
                while len(self._cache) > self.cache_size:
                    self._cache.popitem(last=False)
        return result

    def close(self):
        """Stop the worker processes, if any."""
        with self._lock:
            pool, self._pool = self._pool, None
        if pool is not None:
            pool.close()


def _plan_in_worker(data, lib, report=None):
    """Runs in a worker process on the server's material library ``lib`` (so a worker plans on
    the tables the server holds, re-read or not): ("plan", (Design, Plan)) or ("errors", [records]).
    ``report(done, total)`` sends progress back to the server."""
    try:
        return "plan", Planner(cache_size=0, lib=lib).compute(data, progress=report)
    except WebErrors as exc:
        return "errors", exc.errors


def packet_zip(plan, data):
    """A zip of every file ``cutplan plan -o`` writes for this plan, plus ``design.toml``."""
    files = dict(plan_files(plan))
    files["design.toml"] = design_toml(data, header=(DESIGN_SAVED,))
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED) as zf:
        for name, payload in files.items():
            info = zipfile.ZipInfo(name, ZIP_TIME)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            zf.writestr(info, payload.encode("utf-8") if isinstance(payload, str) else payload)
    return buf.getvalue()


def packet_pdf(plan):
    """The shop packet PDF alone (the same bytes as ``packet.pdf`` in the zip)."""
    return render_pdf(plan, None)


def piece_wav(plan, label):
    """WAV bytes of one piece ringing, or of a whole set struck in turn (``label`` = the set's name)."""
    for s in plan.sets:
        if s.name == label:
            return wav_bytes(arpeggio(s.pieces), RATE)
        for p in s.pieces:
            if p.label == label:
                return wav_bytes(piece_preview(p), RATE)
    raise WebErrors([error("listen", f"{label!r} is not a piece or set of this design")])
