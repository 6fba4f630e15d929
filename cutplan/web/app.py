"""Flask routes for the page and the JSON API. Each route reads the request, calls
:mod:`cutplan.web.service`, and renders; the work is done elsewhere.

Limits: a design or form is at most 1 MB, a request with a recording at most 16 MB; uploads
stay in memory. Nothing from a request becomes a file path: examples are chosen from a list
the server read itself, and material folders come from the server's options only.
"""

from __future__ import annotations

import io
import json
import re
import time
import tomllib

from flask import Flask, Request, Response, g, jsonify, render_template, request
from markupsafe import Markup
from werkzeug.exceptions import HTTPException

from cutplan import pitch
from cutplan.design.writer import design_toml
from cutplan.planning.shopping import general_cautions
from cutplan.render.phrases import DESIGN_SAVED, SAFETY_HEADING, TRIM_RULE
from cutplan.render.table import plan_dict
from cutplan.starters import CHIME, example_paths
from cutplan.units import INCH_DENOMINATOR, INCH_DENOMINATORS, LengthParts
from cutplan.web import form as webform
from cutplan.web import view
from cutplan.web.progress import ProgressBoard
from cutplan.web.service import (
    MAX_DESIGN_BYTES,
    Planner,
    WebErrors,
    error,
    packet_pdf,
    packet_zip,
    piece_wav,
    plain_problem,
)
from cutplan.web.trim import trim_answer

__all__ = [
    "MAX_UPLOAD_BYTES", "UPLOAD_ROUTES", "LOOPBACK_NAMES", "CSP", "MemoryRequest",
    "create_app", "same_origin"
]

MAX_UPLOAD_BYTES = 16 * 1024 * 1024
"""Largest request with a recording [bytes]: about 90 s of 16-bit mono at 44.1 kHz."""
UPLOAD_ROUTES = ("/", "/api/trim")
"""Routes that accept a recording or a design file; every other route takes at most a design."""
LOOPBACK_NAMES = ["127.0.0.1", "localhost", "::1", "[::1]"]
CSP = ("default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; "
       "media-src 'self' blob:; connect-src 'self'; object-src 'none'; base-uri 'none'; form-action 'self'; "
       "frame-ancestors 'none'")


class MemoryRequest(Request):
    """Uploaded files are kept in memory (bounded by the request size limit), never spooled to disk."""

    def _get_file_stream(self, total_content_length, content_type, filename=None, content_length=None):
        return io.BytesIO()


def _starter():
    return tomllib.loads(CHIME)


def create_app(materials_dirs=(), loopback_only=True, workers=0, host=None):
    """The Flask application. ``materials_dirs`` are the server's extra material folders;
    ``workers`` > 0 plans in that many worker processes (stop them with ``app.planner.close()``);
    ``host``: the loopback address it is bound to (127.0.0.2, ::1), accepted as a Host header."""
    app = Flask(__name__)
    app.request_class = MemoryRequest
    app.config.update(MAX_CONTENT_LENGTH=MAX_UPLOAD_BYTES, MAX_FORM_MEMORY_SIZE=MAX_DESIGN_BYTES,
                      MAX_FORM_PARTS=2000)
    # a loopback server answers only its own names (a page on another site cannot rebind a name
    # of its own to 127.0.0.1 and read the answers); werkzeug's TRUSTED_HOSTS cannot hold ::1
    trusted = {_bare_host(h) for h in LOOPBACK_NAMES + ([host] if host else [])} if loopback_only else None
    planner = Planner(materials_dirs, workers=workers)
    app.planner = planner
    board = ProgressBoard()
    examples = example_paths()
    app.jinja_env.filters["both"] = _both_units
    app.jinja_env.globals.update(trim_rule=TRIM_RULE, safety_heading=SAFETY_HEADING,
                                 general_cautions=[c.text for c in general_cautions()],
                                 inch_choices=[(str(d), f"1/{d}") for d in INCH_DENOMINATORS],
                                 inch_default=f"1/{INCH_DENOMINATOR} (default)")
    choices = {
        **_library_choices(planner.library),  # read once per process (and on "re-read"); the planners share it
        "scales": [(s, s) for s in pitch.SCALES], "examples": list(examples),
        "temperaments": ["equal", "equal-19", "equal-24", "just", "pythagorean"],
        "set_extras": webform.SET_EXTRAS,
    }

    @app.before_request
    def _limits():
        g.started = time.perf_counter()
        if trusted is not None and _bare_host(request.headers.get("Host", "")) not in trusted:
            return jsonify(errors=[error("(request)", "names a host this page is not served as; open the "
                                         "address `cutplan serve` printed")]), 400
        if request.path not in UPLOAD_ROUTES:
            request.max_content_length = MAX_DESIGN_BYTES
        if request.method == "POST" and not same_origin(request):
            return jsonify(errors=[error("(request)", "comes from another web site; the page answers only "
                                         "its own forms and scripts")]), 403
        return None

    @app.after_request
    def _headers(resp):
        resp.headers["Content-Security-Policy"] = CSP
        resp.headers["X-Content-Type-Options"] = "nosniff"
        resp.headers["Referrer-Policy"] = "same-origin"  # never sent to another site; its own posts carry their Origin
        resp.headers["Cache-Control"] = "no-store" if not request.path.startswith("/static/") else "max-age=3600"
        if "started" in g:
            resp.headers["Server-Timing"] = f"app;dur={1000 * (time.perf_counter() - g.started):.1f}"
        return resp

    @app.errorhandler(413)
    def _too_large(_exc):
        limit = request.max_content_length or MAX_UPLOAD_BYTES
        return jsonify(errors=[error("(request)", f"is over {limit} bytes; a design is a few kB, "
                                     f"a recording of one strike well under {MAX_UPLOAD_BYTES // 2**20} MB")]), 413

    @app.errorhandler(Exception)
    def _unexpected(exc):
        if isinstance(exc, HTTPException):
            return exc
        app.logger.exception("unexpected error on %s", request.path)  # the server's log keeps the detail
        line = " ".join(f"{type(exc).__name__}: {exc}".split())[:200]
        return jsonify(errors=[error("(request)", f"could not be handled ({line}); the input that caused "
                                     "it is worth reporting")]), 422

    def page(fields, status=200, errors=(), plan_pair=None, trim=None, notes=()):
        slots = _slots(fields)
        placed = view.place_errors(errors, slots, _own_stock(fields))
        warnings, preview = {}, None
        if plan_pair is not None:
            design, the_plan = plan_pair
            warnings = view.place_warnings(the_plan, design, slots)
            preview = view.preview(the_plan, design, fields.get("units") or None)
        html = render_template("page.html", f=fields, n_sets=webform.set_count(fields), errors=placed,
                               warnings=warnings, preview=preview, choices=choices, trim=trim, notes=notes)
        return html, status

    def plan_form(fields, progress=None):
        data = webform.mapping_from_form(fields)
        return data, planner.plan(data, gone=_gone(), progress=progress)

    @app.get("/")
    def index():
        name = request.args.get("example", "")
        data = tomllib.loads(examples[name].read_text(encoding="utf-8")) if name in examples else _starter()
        fields = webform.form_from_mapping(data)
        try:
            return page(fields, plan_pair=planner.plan(data, gone=_gone()))
        except WebErrors as exc:
            return page(fields, 422, exc.errors)

    @app.post("/")
    def submit():
        fields = request.form.to_dict()
        action = fields.pop("action", "preview")
        if action == "open":
            return _open_file(fields)
        if action == "add-set":
            fields["sets"] = str(min(webform.MAX_SETS, webform.set_count(fields) + 1))
            fields.setdefault(f"set[{fields['sets']}].kind", "chime")
        elif action.startswith("remove-set-"):
            fields = _remove_set(fields, action.removeprefix("remove-set-"))
        elif action == "reload-materials":
            return _reload_materials(fields)
        try:
            _data, pair = plan_form(fields)
        except WebErrors as exc:
            return page(fields, 422, exc.errors)
        trim = None
        if action == "trim":
            try:
                trim = _trim(pair, fields).as_dict()
            except WebErrors as exc:
                return page(fields, 422, exc.errors, plan_pair=pair)
        return page(fields, plan_pair=pair, trim=trim)

    def _reload_materials(fields):
        """Re-read the material folders, then show the form again with what happened."""
        try:
            lib = planner.reload()
        except WebErrors as exc:
            return page(fields, 422, exc.errors)
        choices.update(_library_choices(lib))
        note = (f"material tables re-read: {len(lib.materials)} materials and {len(lib.stock)} stock sizes "
                f"from {len(lib.files)} files")
        try:
            return page(fields, plan_pair=plan_form(fields)[1], notes=[note])
        except WebErrors as exc:
            return page(fields, 422, exc.errors, notes=[note])

    def _open_file(fields):
        upload = request.files.get("design_file")
        raw = upload.read(MAX_DESIGN_BYTES + 1) if upload else b""
        problem = None
        if not raw:
            problem = "choose a design file (.toml) first"
        elif len(raw) > MAX_DESIGN_BYTES:
            problem = f"is over {MAX_DESIGN_BYTES} bytes; a design is a few kB"
        else:
            try:
                data = tomllib.loads(raw.decode("utf-8"))
            except UnicodeDecodeError:
                problem = "is not UTF-8 text (is it a design file?)"
            except tomllib.TOMLDecodeError as exc:
                problem = f"is not valid TOML ({exc})"
            except RecursionError:
                problem = "nests tables or lists too deeply to be a design"
        if problem:
            return page(fields, 422, [error("open", problem)])
        found = plain_problem(data)
        if found:
            return page(fields, 422, [error("open", found["message"])])
        fields = webform.form_from_mapping(data)
        try:
            return page(fields, plan_pair=planner.plan(data, gone=_gone()))
        except WebErrors as exc:
            return page(fields, 422, exc.errors)

    def _trim(pair, fields):
        upload = request.files.get("trim.recording")
        recording = upload.read() if upload else b""
        return trim_answer(*pair, fields.get("trim.piece", ""), fields.get("trim.measured", ""), recording,
                           fields.get("trim.length_now", ""), fields.get("trim.state", ""),
                           bool(fields.get("trim.done")))

    def _form_or_errors(make):
        """Run ``make(data, (design, plan))`` on the posted form; errors go back as the page (422)."""
        fields = request.form.to_dict()
        try:
            data, pair = plan_form(fields)
            return make(data, pair)
        except WebErrors as exc:
            if request.accept_mimetypes.best == "application/json":
                return jsonify(errors=exc.errors), 422
            return page(fields, 422, exc.errors)

    @app.get("/progress")
    def progress():
        """How far the preview named ``job`` has got: {"done", "total"} (both 0 when unknown or finished)."""
        done, total = board.get(request.args.get("job", "")) or (0, 0)
        return jsonify(done=done, total=total)

    @app.post("/preview")
    def preview_fragment():
        fields = request.form.to_dict()
        job = request.headers.get("X-Cutplan-Job", "")
        try:
            _data, (design, the_plan) = plan_form(fields, progress=board.reporter(job))
        except WebErrors as exc:
            return jsonify(ok=False, errors=view.place_errors(exc.errors, _slots(fields), _own_stock(fields)),
                           warnings={})
        finally:
            board.finish(job)
        pv = view.preview(the_plan, design, fields.get("units") or None)
        html = render_template("_preview.html", preview=pv, f=fields, choices=choices, trim=None)
        return jsonify(ok=True, html=html, errors={}, warnings=view.place_warnings(the_plan, design, _slots(fields)),
                       labels=pv["labels"], sets=pv["set_names"])

    @app.post("/packet.zip")
    def packet_download():
        return _form_or_errors(lambda data, pair: _attachment(packet_zip(pair[1], data), "application/zip",
                                                              "packet.zip"))

    @app.post("/packet.pdf")
    def packet_print():
        return _form_or_errors(lambda data, pair: _attachment(packet_pdf(pair[1]), "application/pdf",
                                                              "packet.pdf", inline=True))

    @app.post("/design.toml")
    def save_design():
        return _form_or_errors(lambda data, pair: _attachment(
            design_toml(data, header=(DESIGN_SAVED,)).encode("utf-8"), "application/toml", "design.toml"))

    @app.post("/listen")
    def listen():
        label = request.form.get("listen", "")
        return _form_or_errors(lambda data, pair: _attachment(piece_wav(pair[1], label), "audio/wav",
                                                              "preview.wav", inline=True))

    @app.post("/api/trim")
    def api_trim():
        fields = request.form.to_dict()
        try:
            _data, pair = plan_form(fields)
            return jsonify(ok=True, trim=_trim(pair, fields).as_dict())
        except WebErrors as exc:
            return jsonify(ok=False, errors=view.place_errors(exc.errors, _slots(fields))), 422

    @app.post("/api/plan")
    def api_plan():
        try:
            data = _json_design()
            _design, the_plan = planner.plan(data, gone=_gone())
        except WebErrors as exc:
            return jsonify(errors=exc.errors), 422
        return app.response_class(_dumps(plan_dict(the_plan)), mimetype="application/json")

    @app.post("/api/packet")
    def api_packet():
        try:
            data = _json_design()
            _design, the_plan = planner.plan(data, gone=_gone())
        except WebErrors as exc:
            return jsonify(errors=exc.errors), 422
        return _attachment(packet_zip(the_plan, data), "application/zip", "packet.zip")

    return app


def _library_choices(lib):
    """The material and stock-size names the form offers, from a material library."""
    return {"materials": sorted((n, m.description) for n, m in lib.materials.items()),
            "stock_sizes": sorted((n, s.description) for n, s in lib.stock.items())}


def _bare_host(value):
    """The host of a Host header or address, without port or brackets, lower case ("[::1]:80" -> "::1")."""
    value = value.strip().lower()
    if value.startswith("["):
        return value[1:].partition("]")[0]
    return value.rpartition(":")[0] if value.count(":") == 1 else value


def same_origin(req):
    """Whether a POST comes from the page itself (or from a script, which sends no Origin).

    Browsers name the sending site in ``Sec-Fetch-Site`` and ``Origin`` on every POST, forms
    included; a post from any other site (or a sandboxed "null" origin) is refused, so another
    web site cannot make this page work or hand its answers over."""
    site = req.headers.get("Sec-Fetch-Site")
    if site is not None and site not in ("same-origin", "none"):
        return False
    origin = req.headers.get("Origin")
    return origin is None or origin == req.host_url.rstrip("/")


def _gone():
    """A callable that is true once the client has disconnected (waitress tells), or None."""
    return request.environ.get("waitress.client_disconnected")


def _json_design():
    """The request's design mapping, or WebErrors when the body is not JSON."""
    try:
        data = request.get_json(silent=True)
    except RecursionError:
        raise WebErrors([error("(design)", "nests tables or lists too deeply to be a design")]) from None
    if data is None:
        raise WebErrors([error("(design)", "the body must be a design as JSON (the design file's keys)")])
    return data


def _dumps(data):
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"  # strict JSON: never NaN or Infinity


def _attachment(payload, mimetype, name, inline=False):
    resp = Response(payload, mimetype=mimetype)
    resp.headers["Content-Disposition"] = f'{"inline" if inline else "attachment"}; filename="{name}"'
    return resp


def _both_units(value):
    """A length's two units, each kept on one line: "20-1/32 in (508.6 mm)" from its
    :class:`~cutplan.units.LengthParts` (other text is shown as it is)."""

    if not isinstance(value, LengthParts):
        return Markup('<span class="nw">{}</span>').format(value)
    return Markup('<span class="nw">{}</span> <span class="nw">({})</span>').format(value.first, value.second)


def _slots(fields):
    """Every place a message can appear: the fields, each set, its section, the stock, the form."""
    slots = {"form", "open", "stock", "title", "units", "inch_denominator", "(materials)", "paper", "tuning.a4", "tuning.temperament", "tuning.spelling",
             "more",
             "trim.piece", "trim.measured", "trim.recording", "trim.length_now", "trim.state", "trim.done"}
    slots.update(f"stock.{k}" for k in webform.STOCK_FIELDS)
    for i in range(1, webform.set_count(fields) + 1):
        p = f"set[{i}]"
        slots.update({p, f"{p}.section", f"{p}.more", f"{p}.stock", f"{p}.pitch", f"{p}.stock.lengths"})
        slots.update(f"{p}.{k}" for k in webform.SET_FIELDS)
        slots.update(f"{p}.{k}" for k in webform.EXTRA_KEYS)  # a whole-table error goes beside the set
        slots.update(f"{p}.section.{k}" for k in webform.SECTION_FIELDS)
        slots.update(f"{p}.stock.{k}" for k in webform.STOCK_FIELDS)
    return slots


def _own_stock(fields):
    """The sets ("set[2]") whose own stock fields are filled in."""
    return {f"set[{i}]" for i in range(1, webform.set_count(fields) + 1) if fields.get(f"set[{i}].stock.lengths")}


def _remove_set(fields, which):
    """The form without set ``which`` (later sets move up one place)."""
    n = webform.set_count(fields)
    try:
        k = int(which)
    except ValueError:
        return fields
    if not 1 <= k <= n or n == 1:
        return fields
    out = {name: v for name, v in fields.items() if not name.startswith("set[")}
    for name, v in fields.items():
        m = re.match(r"set\[(\d+)\](.*)", name)
        if m:
            i = int(m.group(1))
            if i < k:
                out[name] = v
            elif i > k:
                out[f"set[{i - 1}]{m.group(2)}"] = v
    out["sets"] = str(n - 1)
    return out
