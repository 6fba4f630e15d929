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

import tomli_w

import cutplan
from cutplan.audio.synth import RATE, arpeggio, piece_preview
from cutplan.audio.wav import wav_bytes
from cutplan.design import DesignErrors, design_from_mapping
from cutplan.materials import Library, MaterialError, load_library
from cutplan.numeric import NumericError, checked_plan
from cutplan.render.packet import plan_files
from cutplan.render.pdf import render_pdf
from cutplan.web.workers import Stopped, WorkerPool

__all__ = [
    "DESIGN_NAME", "MAX_DESIGN_BYTES", "CACHE_SIZE", "STOPPED", "ZIP_TIME", "WebErrors", "error",
    "design_errors", "MAX_DEPTH", "plain_problem", "library", "Planner", "design_toml", "packet_zip",
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
    """Problems with a request, each ``{"key": ..., "message": ...}`` (a design key or a form field)."""

    def __init__(self, errors):
        self.errors = list(errors)
        super().__init__("; ".join(e["message"] for e in self.errors))


def error(key, message):
    """One error record; the message starts with the key, as a design-file error line does."""
    return {"key": key, "message": f"{key}: {message}"}


def design_errors(exc):
    """``DesignErrors`` -> error records (the one-line messages without the design's name)."""
    prefix = f"{DESIGN_NAME}: "
    return [{"key": e.key, "message": str(e)[len(prefix):] if str(e).startswith(prefix) else str(e)}
            for e in exc.errors]


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

    def __init__(self, materials_dirs=(), cache_size=CACHE_SIZE, workers=0):
        self.materials_dirs = tuple(materials_dirs)
        self.cache_size = cache_size
        self.workers = workers
        self._cache = OrderedDict()
        self._lock = threading.Lock()
        self._pool = None

    def design(self, data):
        """A validated Design, or :class:`WebErrors`."""
        if not isinstance(data, dict):
            raise WebErrors([error("(design)", "must be a table (JSON object) of design keys")])
        problem = plain_problem(data)
        if problem:
            raise WebErrors([problem])
        if "material_dirs" in data:
            raise WebErrors([error("material_dirs", "is not accepted from the page or the API; material "
                                   "folders are given to the server (cutplan serve --materials DIR)")])
        try:
            return design_from_mapping(data, lambda _dirs: library(self.materials_dirs), DESIGN_NAME, ".")[0]
        except DesignErrors as exc:
            raise WebErrors(design_errors(exc)) from None
        except MaterialError as exc:  # a broken server-side folder, not the request's fault
            raise WebErrors([error("(materials)", str(exc))]) from None

    def compute(self, data):
        """(Design, Plan) computed here and now, or :class:`WebErrors` (no cache, no workers)."""
        design = self.design(data)
        try:
            return design, checked_plan(lambda: cutplan.plan(design), DESIGN_NAME)
        except DesignErrors as exc:
            raise WebErrors(design_errors(exc)) from None
        except NumericError as exc:  # an absurd or overflowing result: the design's numbers are to blame
            raise WebErrors([error("(design)", str(exc).removeprefix(f"{DESIGN_NAME}: "))]) from None

    def _in_worker(self, data, gone=None):
        with self._lock:
            if self._pool is None:
                self._pool = WorkerPool(self.workers)
            pool = self._pool
        try:
            kind, value = pool.run(_plan_in_worker, (data, self.materials_dirs), gone=gone)
        except Stopped as exc:
            raise WebErrors([error("(request)", STOPPED[exc.reason])]) from None
        if kind == "errors":
            raise WebErrors(value)
        return value

    def plan(self, data, gone=None):
        """(Design, Plan) for a design mapping, or :class:`WebErrors`. Repeated designs are cached.

        ``gone``: a callable, true once the client has gone away (its worker is then stopped)."""
        problem = plain_problem(data) if isinstance(data, dict) else None
        if problem:
            raise WebErrors([problem])
        key = _cache_key(data)
        with self._lock:
            if key in self._cache:
                self._cache.move_to_end(key)
                return self._cache[key]
        result = self._in_worker(data, gone) if self.workers > 0 else self.compute(data)
        with self._lock:
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


def _plan_in_worker(data, materials_dirs):
    """Runs in a worker process: ("plan", (Design, Plan)) or ("errors", [records])."""
    try:
        return "plan", Planner(materials_dirs, cache_size=0).compute(data)
    except WebErrors as exc:
        return "errors", exc.errors


_ORDER = {
    "": ("title", "units", "paper", "tuning", "set", "stock"),
    "tuning": ("a4", "temperament"),
    "set": ("name", "kind", "notes", "scale", "root", "count", "range", "frequencies", "cents", "ratios", "material",
            "section", "model", "grain", "target", "ends", "end_correction", "temperature", "humidity", "serves",
            "max_length", "temperature_range", "undercut", "stock"),
    "section": ("stock", "shape", "outer", "wall", "inner", "diameter", "width", "thickness"),
    "stock": ("lengths", "kerf", "end_trim", "allowance"),
    "lengths": ("length", "count", "price"),
}


def _ordered(value, where=""):
    """The mapping with keys in the design contract's order (unknown keys after, as given)."""
    if isinstance(value, list):
        return [_ordered(v, where) for v in value]
    if not isinstance(value, dict):
        return value
    order = _ORDER.get(where, ())
    keys = [k for k in order if k in value] + [k for k in value if k not in order]
    return {k: _ordered(value[k], k if k in _ORDER else "") for k in keys}


def design_toml(data):
    """The design as TOML text with the design file's keys, in the contract's order, so the same
    design gives the same bytes however its keys arrived (``tomllib`` reads it back equal)."""
    return "# cutplan design, saved from the cutplan page\n" + tomli_w.dumps(_ordered(data))


def packet_zip(plan, data):
    """A zip of every file ``cutplan plan -o`` writes for this plan, plus ``design.toml``."""
    files = dict(plan_files(plan))
    files["design.toml"] = design_toml(data)
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
