"""The local web page's server: a thin JSON face over :mod:`peakproof.api`, like the CLI.

Every answer is computed here by the same modules the command line uses; the page's script
only displays it.  Uploads stay in memory (never a temporary file), requests carry text or
bytes but never a path, and every error is a JSON ``{"error": message}`` a person can act on.
"""

from __future__ import annotations

import difflib
import functools
import io
import os
import re
import secrets
import threading
from typing import Any

from flask import Flask, Request, jsonify, request, send_from_directory
from werkzeug.exceptions import HTTPException, RequestEntityTooLarge

DEFAULT_MAX_MB = 20
PLOT_WIDTH_PX, PLOT_HEIGHT_PX = 1600, 820
_HERE = os.path.dirname(os.path.abspath(__file__))
_STATIC = os.path.join(_HERE, "static")
_UPLOAD_FORMATS = {
    ".txt": "txt", ".text": "txt", ".md": "md", ".markdown": "md", ".tex": "tex",
    ".latex": "tex", ".docx": "docx", ".pdf": "pdf",
}  # fmt: skip
#: findings without a registered rule: the parser's own reports
_PARSER_RATIONALE = {
    "syntax": "The text could not be read as peak data here, so nothing after this point in "
    "the item was checked. Fix the spelling shown and check again.",
    "repair": "The reader accepted a common slip and read the data as shown; the formatter "
    "writes the repaired form.",
    "internal-error": "A rule failed on this text; the other findings are still complete.",
}


#: Parsing and checking are re-entrant (tests/test_parse_threads.py), so requests run at once.
#: Matplotlib's font cache and settings are process-wide: only the drawing takes turns.
_PLOT_LOCK = threading.Lock()
#: Seconds a request may compute before the page is told to use the command line instead.
TIME_BUDGET_S = 20.0
_BUDGET_POOL = None
_BUDGET_POOL_LOCK = threading.Lock()


class TooLarge(Exception):
    """Work that ran past :data:`TIME_BUDGET_S`: answered 413 with advice to use the CLI."""


def _one_at_a_time(function):
    """Run ``function`` within the request's time budget (the name is kept for history: calls
    no longer wait for each other).  Past the budget the caller gets :class:`TooLarge`; the
    abandoned work finishes in its pool thread and its result is dropped."""

    @functools.wraps(function)
    def budgeted(*args, **kwargs):
        global _BUDGET_POOL
        from concurrent.futures import ThreadPoolExecutor
        from concurrent.futures import TimeoutError as FutureTimeout

        with _BUDGET_POOL_LOCK:
            if _BUDGET_POOL is None:
                _BUDGET_POOL = ThreadPoolExecutor(max_workers=8,
                                                  thread_name_prefix="peakproof-web")  # fmt: skip
        future = _BUDGET_POOL.submit(function, *args, **kwargs)
        try:
            return future.result(timeout=TIME_BUDGET_S)
        except FutureTimeout:
            raise TooLarge(f"this text is too large for the page (not done within "
                           f"{TIME_BUDGET_S:g} s); use the command line instead, e.g. "
                           "'peakproof check FILE' or 'peakproof format FILE'") from None

    return budgeted


class InMemoryRequest(Request):
    """A request whose uploaded files are always kept in memory, never spooled to disk."""

    def _get_file_stream(self, total_content_length, content_type, filename=None,
                         content_length=None):  # fmt: skip
        return io.BytesIO()


class BadInput(Exception):
    """A request the page can explain: answered 400 with ``str()`` as the message."""


TOKEN_HEADER = "X-Peakproof-Token"
_TOKEN_SLOT = "{{PEAKPROOF_TOKEN}}"
_LOOPBACK_NAMES = ("localhost", "127.0.0.1", "[::1]")


def create_app(max_request_mb: float = DEFAULT_MAX_MB) -> Flask:
    """The Flask application; requests above ``max_request_mb`` megabytes get a 413.

    Closed to other sites: a request whose ``Host`` is not a loopback name is refused (403), and
    once :func:`allow_hosts` has named the server's own ``host:port`` only those are accepted,
    against DNS rebinding.  Every POST must come from this page: a foreign ``Origin`` or a
    ``Sec-Fetch-Site`` other than ``same-origin``/``none`` is refused, and the per-session token
    (``app.config["PEAKPROOF_TOKEN"]``, written into the page) must come in ``X-Peakproof-Token``.
    """
    app = Flask(__name__, static_folder=None)
    app.config["PEAKPROOF_TOKEN"] = secrets.token_urlsafe(24)
    app.config["PEAKPROOF_HOSTS"] = None  # None: any loopback name, any port
    app.request_class = InMemoryRequest
    app.config["MAX_CONTENT_LENGTH"] = int(max_request_mb * 1024 * 1024)
    app.config["MAX_FORM_MEMORY_SIZE"] = int(max_request_mb * 1024 * 1024)
    app.json.ensure_ascii = False
    app.json.sort_keys = False

    @app.before_request
    def closed_to_other_sites():
        host = (request.host or "").lower()
        allowed = app.config["PEAKPROOF_HOSTS"]
        name = host.rsplit(":", 1)[0] if not host.endswith("]") else host
        if (host not in allowed) if allowed is not None else (name not in _LOOPBACK_NAMES):
            return _error(403, f"this page answers only at its own address "
                          f"({', '.join(sorted(allowed or _LOOPBACK_NAMES))}), not at "
                          f"'{host}'; open the address 'peakproof serve' printed")
        if request.method != "POST":
            return None
        origin = request.headers.get("Origin")
        if origin is not None and origin.lower() != f"{request.scheme}://{host}":
            return _error(403, f"requests from another site ({origin}) are refused; use the "
                          "page itself")
        fetch_site = request.headers.get("Sec-Fetch-Site")
        if fetch_site is not None and fetch_site not in ("same-origin", "none"):
            return _error(403, "requests from another site are refused; use the page itself")
        sent = request.headers.get(TOKEN_HEADER, "")
        if not secrets.compare_digest(sent.encode(), app.config["PEAKPROOF_TOKEN"].encode()):
            return _error(403, "this request lacks the page's session token (the server may "
                          "have been restarted): reload the page and try again")
        return None

    @app.get("/")
    def index():
        with open(os.path.join(_STATIC, "index.html"), encoding="utf-8") as handle:
            page = handle.read().replace(_TOKEN_SLOT, app.config["PEAKPROOF_TOKEN"])
        return app.response_class(page, mimetype="text/html",
                                  headers={"Cache-Control": "no-store"})  # fmt: skip

    @app.get("/favicon.ico")
    def favicon():
        return "", 204

    @app.get("/static/<name>")
    def static_asset(name: str):
        if name not in ("app.js", "style.css"):
            return _error(404, "no such file")
        return _static_file(name)

    @app.get("/api/styles")
    def styles():
        from ..styles import BUILTIN, DEFAULT

        return jsonify({
            "default": DEFAULT,
            "styles": [{"name": n, "description": s.description} for n, s in BUILTIN.items()],
        })  # fmt: skip

    @app.post("/api/check")
    def check_endpoint():
        body = _json_body()
        text = _text_field(body)
        return jsonify(analyse(text))

    @app.post("/api/format")
    def format_endpoint():
        body = _json_body()
        text = _text_field(body)
        style_name = body.get("style")
        if style_name is not None and not isinstance(style_name, str):
            raise BadInput("'style' must be a style name such as \"letters-first\"")
        return jsonify(format_text(text, style_name, bool(body.get("round", False))))

    @app.post("/api/plot")
    def plot_endpoint():
        body = _json_body()
        text = _text_field(body)
        block = body.get("block", 0)
        if not isinstance(block, int) or isinstance(block, bool) or block < 0:
            raise BadInput("'block' must be the number of a compound (0, 1, 2, …)")
        png = plot_png(text, block)
        return app.response_class(png, mimetype="image/png",
                                  headers={"Cache-Control": "no-store"})  # fmt: skip

    @app.post("/api/upload")
    def upload_endpoint():
        if "file" not in request.files:
            raise BadInput("no file in the upload: send the document as the form field 'file'")
        upload = request.files["file"]
        return jsonify(read_upload(upload.filename or "", upload.read()))

    @app.after_request
    def security_headers(response):
        # The page needs nothing from elsewhere: no inline scripts, no other origins.
        response.headers["Content-Security-Policy"] = (
            "default-src 'self'; img-src 'self' blob: data:; style-src 'self'; "
            "script-src 'self'; object-src 'none'; base-uri 'none'; frame-ancestors 'none'"
        )
        response.headers["X-Content-Type-Options"] = "nosniff"
        response.headers["Referrer-Policy"] = "no-referrer"
        return response

    @app.errorhandler(BadInput)
    def bad_input(exc):
        return _error(400, str(exc))

    @app.errorhandler(TooLarge)
    def too_slow(exc):
        return _error(413, str(exc))

    @app.errorhandler(RequestEntityTooLarge)
    def too_large(exc):
        return _error(413, f"the request is larger than the {max_request_mb:g} MB limit; split "
                      "the document, or restart with 'peakproof serve --max-mb N'")  # fmt: skip

    @app.errorhandler(HTTPException)
    def http_error(exc):
        return _error(exc.code or 500, exc.description or exc.name)

    return app


def allow_hosts(app: Flask, host: str, port: int) -> None:
    """Accept only ``host:port`` (and, for a loopback host, the other loopback names at that
    port) as the request's ``Host`` from now on."""
    host = host.lower()
    shown = f"[{host.strip('[]')}]" if ":" in host else host
    names = {shown}
    if shown in _LOOPBACK_NAMES or shown.startswith("127."):
        names |= set(_LOOPBACK_NAMES)
    app.config["PEAKPROOF_HOSTS"] = {f"{n}:{port}" for n in names}


def _static_file(name: str):
    response = send_from_directory(_STATIC, name, max_age=0)
    return response


def _error(status: int, message: str):
    response = jsonify({"error": message})
    response.status_code = status
    return response


def _json_body() -> dict[str, Any]:
    if not request.is_json:
        raise BadInput("send JSON (Content-Type: application/json), "
                       "e.g. {\"text\": \"1H NMR …\"}")
    try:
        body = request.get_json(silent=True)
    except RecursionError:
        # json's decoder recurses once per level; thousands of nested [ or { exhaust the stack
        raise BadInput("the request's JSON is nested too deeply to read; send a flat object "
                       "such as {\"text\": \"1H NMR …\"}") from None
    if body is None:
        raise BadInput("the request is not valid JSON")
    if not isinstance(body, dict):
        raise BadInput("the request must be a JSON object such as {\"text\": \"1H NMR …\"}")
    return body


def _text_field(body: dict[str, Any]) -> str:
    text = body.get("text")
    if not isinstance(text, str):
        raise BadInput("'text' is missing: paste the characterization data as a string")
    # JSON may carry lone UTF-16 surrogates ("\ud800") that no UTF-8 reply can hold; one
    # replacement character each keeps every offset (and so every highlight) in place
    return _LONE_SURROGATE.sub("\ufffd", text)


_LONE_SURROGATE = re.compile("[\ud800-\udfff]")


# ---- the engine, shaped for the page ----------------------------------------------------
@_one_at_a_time
def analyse(text: str) -> dict[str, Any]:
    """Findings, the text cut at every finding boundary, per-rule counts and the compounds."""
    from ..api import Source, parse_source
    from ..checker import check

    doc = parse_source(Source(text=text, name="pasted text", format="txt"))
    findings = [_finding_json(i, d) for i, d in enumerate(check(doc))]
    for f in findings:
        f["block"] = _block_at(doc, f["span"]["start"])
    return {
        "text": text,
        "findings": findings,
        "segments": segments(text, findings),
        "counts": rule_counts(findings),
        "compounds": [_compound_json(b) for b in doc.blocks],
        "totals": {s: sum(f["severity"] == s for f in findings)
                   for s in ("error", "warning", "note")},  # fmt: skip
    }


def _finding_json(index: int, diagnostic) -> dict[str, Any]:
    out = diagnostic.to_json()
    out["id"] = index
    rationale, source = _rationale(diagnostic.rule)
    out["rationale"] = rationale
    out["source"] = source
    return out


def _block_at(doc, offset: int) -> int | None:
    for block in doc.blocks:
        if block.span.start <= offset < max(block.span.end, block.span.start + 1):
            return block.index
    return None


def _rationale(rule_name: str) -> tuple[str, str]:
    from ..rules import REGISTRY, all_rules

    all_rules()
    rule = REGISTRY.get(rule_name)
    if rule is not None:
        return rule.rationale, rule.source
    key = "repair" if rule_name.startswith("repair-") else rule_name
    return _PARSER_RATIONALE.get(key, ""), ""


def segments(text: str, findings: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """``text`` cut into pieces, each with the ids of the findings covering it.

    The page builds its view from these pieces as text nodes, so it never does offset
    arithmetic (Python counts code points, JavaScript UTF-16 units).  A finding with an empty
    span becomes an empty piece marked ``point``.
    """
    n = len(text)
    ranges = [(min(max(f["span"]["start"], 0), n), min(max(f["span"]["end"], 0), n), f["id"])
              for f in findings]  # fmt: skip
    cuts = sorted({0, n, *(s for s, _, _ in ranges), *(e for _, e, _ in ranges)})
    points: dict[int, list[int]] = {}
    for start, end, ident in ranges:
        if end <= start:
            points.setdefault(start, []).append(ident)
    out: list[dict[str, Any]] = []
    for a, b in zip(cuts, cuts[1:] + [None]):
        if a in points:
            out.append({"text": "", "ids": points[a], "point": True})
        if b is None:
            break
        ids = [ident for start, end, ident in ranges if start <= a and b <= end and start < end]
        out.append({"text": text[a:b], "ids": ids})
    return [s for s in out if s["text"] or s.get("point")]


def rule_counts(findings: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """One row per rule: name, code, severity (the worst seen) and how many findings."""
    rank = {"error": 0, "warning": 1, "note": 2}
    rows: dict[str, dict[str, Any]] = {}
    for f in findings:
        row = rows.setdefault(f["rule"], {"rule": f["rule"], "code": f["code"],
                                          "severity": f["severity"], "count": 0})  # fmt: skip
        row["count"] += 1
        if rank[f["severity"]] < rank[row["severity"]]:
            row["severity"] = f["severity"]
    return sorted(rows.values(), key=lambda r: (rank[r["severity"]], -r["count"], r["rule"]))


def _compound_json(block) -> dict[str, Any]:
    label = block.compound or f"block {block.index + 1}"
    return {
        "block": block.index,
        "label": label,
        "line": block.span.line,
        "start": block.span.start,
        "nuclei": [s.nucleus for s in block.spectra],
        "has_1h": any(s.nucleus == "1H" and s.signals for s in block.spectra),
    }


@_one_at_a_time
def format_text(text: str, style_name: str | None, round_numbers: bool = False) -> dict[str, Any]:
    """The text in ``style_name``, proved safe by ``safety.checked_format``, and a diff."""
    from ..safety import UnsafeFormat, checked_format
    from ..styles import DEFAULT, StyleError, get_style

    try:
        style = get_style(style_name or DEFAULT)
    except StyleError as exc:
        raise BadInput(str(exc)) from None
    try:
        result = checked_format(text, style, round_numbers=round_numbers, path="pasted text")
    except UnsafeFormat as exc:
        raise BadInput(f"this text could not be reformatted safely ({exc.message}); nothing was "
                       "changed. Please report it with the text.") from None  # fmt: skip
    return {
        "style": style.name,
        "text": result.text,
        "changed": result.changed,
        "changes": [{"kind": c.kind, "message": c.message, "line": c.span.line,
                     "column": c.span.column} for c in result.changes],  # fmt: skip
        "diff": line_diff(text, result.text),
    }


_TOKEN = re.compile(r"\s+|[\w.,]+|[^\w\s]", re.UNICODE)


#: Beyond these the Changes tab shows whole lines (or stops) instead of finer detail.
WORD_DIFF_MAX_TOKENS = 3000  # tokens in one line, either side
LINE_MATCH_MAX_PAIRS = 4_000_000  # lines before × lines after in one changed stretch
DIFF_MAX_ROWS = 2000


def line_diff(before: str, after: str) -> list[dict[str, Any]]:
    """Changed lines, each with word-level parts: ``{"op": "equal"|"del"|"ins", "text"}``.

    The cost follows the size of the change: unchanged lines at both ends are cut off first,
    a stretch with as many lines before as after is paired line by line, only a changed line
    is split into words (and only when short enough, else shown whole), and after
    :data:`DIFF_MAX_ROWS` rows a last row with ``"op": "cut"`` says how much was left out.
    """
    a, b = before.split("\n"), after.split("\n")
    head = 0
    while head < min(len(a), len(b)) and a[head] == b[head]:
        head += 1
    tail = 0
    while tail < min(len(a), len(b)) - head and a[-1 - tail] == b[-1 - tail]:
        tail += 1
    mid_a, mid_b = a[head : len(a) - tail], b[head : len(b) - tail]
    if len(mid_a) == len(mid_b):
        opcodes = [("replace", head + k, head + k + 1, head + k, head + k + 1)
                   for k in range(len(mid_a)) if mid_a[k] != mid_b[k]]  # fmt: skip
    elif len(mid_a) * len(mid_b) <= LINE_MATCH_MAX_PAIRS:
        matcher = difflib.SequenceMatcher(None, mid_a, mid_b, autojunk=False)
        opcodes = [(t, i1 + head, i2 + head, j1 + head, j2 + head)
                   for t, i1, i2, j1, j2 in matcher.get_opcodes()]  # fmt: skip
    else:
        opcodes = [("replace", head, len(a) - tail, head, len(b) - tail)]
    rows: list[dict[str, Any]] = []
    changed = sum(max(i2 - i1, j2 - j1) for t, i1, i2, j1, j2 in opcodes if t != "equal")
    for tag, i1, i2, j1, j2 in opcodes:
        if tag == "equal":
            continue
        pairs = max(i2 - i1, j2 - j1)
        for k in range(pairs):
            if len(rows) == DIFF_MAX_ROWS:
                rows.append({"line": None, "parts": [{"op": "cut", "text":
                    f"{changed - DIFF_MAX_ROWS} more changed lines are not shown here; "
                    "the reformatted text above has them all"}]})  # fmt: skip
                return rows
            old = a[i1 + k] if i1 + k < i2 else None
            new = b[j1 + k] if j1 + k < j2 else None
            rows.append({
                "line": i1 + k + 1 if old is not None else None,
                "parts": _word_parts(old, new),
            })  # fmt: skip
    return rows


def _word_parts(old: str | None, new: str | None) -> list[dict[str, str]]:
    if old is None:
        return [{"op": "ins", "text": new or ""}]
    if new is None:
        return [{"op": "del", "text": old}]
    x, y = _TOKEN.findall(old), _TOKEN.findall(new)
    if max(len(x), len(y)) > WORD_DIFF_MAX_TOKENS:  # word matching is quadratic: whole lines
        return _trim_common(old, new)
    parts: list[dict[str, str]] = []
    for tag, i1, i2, j1, j2 in difflib.SequenceMatcher(None, x, y, autojunk=False).get_opcodes():
        if tag == "equal":
            parts.append({"op": "equal", "text": "".join(x[i1:i2])})
            continue
        if i2 > i1:
            parts.append({"op": "del", "text": "".join(x[i1:i2])})
        if j2 > j1:
            parts.append({"op": "ins", "text": "".join(y[j1:j2])})
    return _merge_small_gaps(parts)


def _merge_small_gaps(parts: list[dict[str, str]]) -> list[dict[str, str]]:
    """Fold one- or two-character unchanged pieces between changes into them, for legibility:
    ``(s, 2H)`` → ``(2H, s)`` reads as one change, not four."""
    out: list[dict[str, str]] = []
    for k, part in enumerate(parts):
        between = 0 < k < len(parts) - 1 and parts[k - 1]["op"] != "equal" != parts[k + 1]["op"]
        if part["op"] == "equal" and between and len(part["text"].strip()) <= 2:
            out += [{"op": "del", "text": part["text"]}, {"op": "ins", "text": part["text"]}]
        else:
            out.append(dict(part))
    merged: list[dict[str, str]] = []
    run: dict[str, str] = {}
    for part in out + [{"op": "equal", "text": ""}]:
        if part["op"] != "equal":
            run[part["op"]] = run.get(part["op"], "") + part["text"]
            continue
        merged += _trim_common(run.get("del", ""), run.get("ins", ""))
        run = {}
        if part["text"]:
            merged.append(part)
    joined: list[dict[str, str]] = []
    for part in merged:  # neighbours of one kind, left by the trimming, become one piece
        if joined and joined[-1]["op"] == part["op"]:
            joined[-1]["text"] += part["text"]
        elif part["text"]:
            joined.append(part)
    return joined


def _trim_common(old: str, new: str) -> list[dict[str, str]]:
    """A deletion and an insertion with their shared start and end shown as unchanged."""
    if not old or not new:
        return [{"op": op, "text": t} for op, t in (("del", old), ("ins", new)) if t]
    head = len(os.path.commonprefix([old, new]))
    tail = len(os.path.commonprefix([old[head:][::-1], new[head:][::-1]]))
    parts = [{"op": "equal", "text": old[:head]},
             {"op": "del", "text": old[head : len(old) - tail]},
             {"op": "ins", "text": new[head : len(new) - tail]},
             {"op": "equal", "text": old[len(old) - tail :]}]  # fmt: skip
    return [p for p in parts if p["text"]]


@_one_at_a_time
def read_upload(filename: str, data: bytes) -> dict[str, Any]:
    """Text of an uploaded document; only the name's extension is used, never as a path."""
    from ..api import InputError, read_source

    base = os.path.basename(filename.replace("\\", "/")) or "upload"
    ext = os.path.splitext(base)[1].lower()
    if ext and ext not in _UPLOAD_FORMATS:
        raise BadInput(f"{base}: {ext} files cannot be read here; open a .docx, .pdf, .tex, .md "
                       "or .txt file (Word: File ▸ Save As ▸ Word Document)")  # fmt: skip
    if not data:
        raise BadInput(f"{base}: the file is empty")
    try:
        source = read_source(base, fmt=_UPLOAD_FORMATS.get(ext), data=data)
    except InputError as exc:
        raise BadInput(str(exc)) from None
    return {"name": base, "format": source.format, "text": source.text}


@_one_at_a_time
def plot_png(text: str, block_index: int) -> bytes:
    """The simulated 1H spectrum of one compound as PNG bytes, drawn by :mod:`peakproof.plot`."""
    from ..api import Source, parse_source

    doc = parse_source(Source(text=text, name="pasted text", format="txt"))
    if not doc.blocks:
        raise BadInput("no NMR data found in the text: paste a block such as "
                       "'1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), …'")
    if block_index >= len(doc.blocks):
        raise BadInput(f"there is no compound number {block_index}: the text has "
                       f"{len(doc.blocks)} data block(s)")  # fmt: skip
    block = doc.blocks[block_index]
    if not any(s.nucleus == "1H" and s.signals for s in block.spectra):
        raise BadInput(f"{block.compound or 'this block'} has no 1H NMR signals to simulate")
    return _render_block_png(doc, block)


def _render_block_png(doc, block) -> bytes:
    """Exact and first-order simulations of the block's 1H spectra, drawn as ``peakproof plot``
    draws them (same simulator, same plotting function)."""
    from ..plot import PlotError, plot_spectra
    from ..simulate.from_model import implied_spectrum, simulate_implied
    from ..simulate.spin_system import SpinSystemError

    title = f"compound {block.compound}" if block.compound else f"block {block.index + 1}"
    panels = []
    try:
        for spectrum in block.spectra:
            if spectrum.nucleus == "1H" and spectrum.signals:
                implied = implied_spectrum(spectrum)
                panels.append((title, simulate_implied(implied, "quantum"),
                               simulate_implied(implied, "first-order")))  # fmt: skip
        out = io.BytesIO()
        with _PLOT_LOCK:
            plot_spectra(panels, out, width_px=PLOT_WIDTH_PX,
                         height_px=PLOT_HEIGHT_PX * len(panels))
    except (PlotError, SpinSystemError) as exc:
        raise BadInput(f"the spectrum of {title} cannot be drawn: {exc}") from None
    return out.getvalue()
