"""Batch runs over folders and globs: parallel, streamed, with constant memory.

The pieces, each usable alone::

    files, problems = expand_inputs(["si/", "theses/**/*.docx"])
    with JsonLinesWriter(sys.stdout) as out, ProgressBar(len(files)) as bar:
        summary = BatchSummary(unreadable=problems)
        for record in run_batch(files, check_worker, jobs=4, progress=bar):
            out.write(record)
            summary.add(record)
    print(summary.table(), file=sys.stderr)

or all of it at once: :func:`run_files`.

A *worker* is a module-level function ``worker(path) -> dict`` that returns small plain data
(a JSON-ready record with at least ``"file"``; ``"error"`` when the file could not be used),
never the parsed model, so nothing large crosses between processes.  :func:`run_batch`
yields records **in input order**: output is the same from run to run and from ``--jobs 1``
to ``--jobs 8``, and the in-flight window (a few files per worker) bounds memory however
long the run is.
"""

from __future__ import annotations

import errno
import glob
import json
import os
import sys
import time
from collections import Counter, deque
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from typing import IO, Any

from .readers import EXTENSIONS

#: Extensions a folder is searched for (a file named on the command line is always tried).
KNOWN_EXTENSIONS = tuple(sorted(EXTENSIONS))
_GLOB_CHARS = set("*?[")
#: Files per worker process kept in flight: enough to keep every core busy, few enough that
#: results waiting for a slow file ahead of them stay small.
_WINDOW_PER_JOB = 4
_SEVERITIES = ("error", "warning", "note")


# --------------------------------------------------------------------------------------------
# Inputs


@dataclass(frozen=True)
class InputProblem:
    """A command-line input that gave no file to process, and why (for the summary)."""

    path: str
    message: str

    def to_json(self) -> dict[str, Any]:
        return {"file": self.path, "error": self.message}


def names_several(inputs: Iterable[str]) -> bool:
    """Whether any input is a folder or a glob (and so needs :func:`expand_inputs`)."""
    return any(p != "-" and (os.path.isdir(p) or bool(_GLOB_CHARS & set(p))) for p in map(os.fspath, inputs))


def expand_inputs(inputs: Iterable[str], recursive: bool = True
                  ) -> tuple[list[str], list[InputProblem]]:  # fmt: skip
    """Files named by ``inputs`` (files, folders, globs), and the inputs that named nothing.

    Folders give the files with a known extension (``.txt .md .tex .docx .pdf`` …) below
    them, hidden entries and Word lock files (``~$…``) left out; globs follow ``**`` when
    ``recursive``.  Order is stable: inputs in the order given, each one's files sorted by
    path.  A file reached twice is listed once.  Missing and unreadable inputs are returned
    as problems rather than raised, so one typo does not stop a night's run.
    """
    files: list[str] = []
    problems: list[InputProblem] = []
    seen: set[str] = set()

    def take(path: str) -> None:
        key = os.path.normcase(os.path.abspath(path))
        if key in seen:
            return
        seen.add(key)
        broken = _broken_link(path)
        if broken:
            problems.append(InputProblem(path, broken))
            return
        if not os.access(path, os.R_OK):
            problems.append(InputProblem(path, "permission denied (the file cannot be read)"))
            return
        files.append(path)

    for item in inputs:
        item = os.fspath(item)
        if item == "-":
            files.append(item)
        elif os.path.isdir(item):
            found = sorted(_walk(item, recursive))
            if not found:
                problems.append(InputProblem(item, "folder holds no " + "/".join(KNOWN_EXTENSIONS)
                                             + " files"))  # fmt: skip
            for path in found:
                take(path)
        elif os.path.exists(item) or os.path.islink(item):
            take(item)
        elif _GLOB_CHARS & set(item):
            matches = sorted(glob.glob(item, recursive=recursive))
            matched_files = [m for m in matches if os.path.isfile(m) and not _hidden(m)]
            if not matched_files:
                problems.append(InputProblem(item, "no file matches this pattern"))
            for path in matched_files:
                take(path)
        else:
            problems.append(InputProblem(item, "no such file or folder"))
    return files, problems


def _broken_link(path: str) -> str:
    """What is wrong with ``path`` as a symlink ("" when it is none, or leads to a file)."""
    if not os.path.islink(path):
        return ""
    try:
        os.stat(path)
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            return "symlink loop (the link leads back to itself)"
        if exc.errno == errno.ENOENT:
            return f"dangling symlink (it points to {os.readlink(path)!r}, which does not exist)"
        return f"symlink that cannot be followed ({exc.strerror})"
    return ""


def _die_with_parent(parent: int) -> None:
    """Worker initializer: end this worker when the process that started it is gone.

    A watchdog thread polls ``os.getppid()`` (a killed parent re-parents the worker), so a
    ``kill -9`` of the batch does not leave workers running.
    """
    import threading
    import time

    def watch() -> None:
        while os.getppid() == parent:
            time.sleep(0.25)
        os._exit(1)

    if os.getppid() != parent:
        os._exit(1)
    threading.Thread(target=watch, name="peakproof-parent-watch", daemon=True).start()


def _hidden(path: str) -> bool:
    base = os.path.basename(path)
    return base.startswith(".") or base.startswith("~$")


def _walk(folder: str, recursive: bool) -> Iterator[str]:
    for root, dirs, names in os.walk(folder, onerror=None):
        dirs[:] = sorted(d for d in dirs if not d.startswith(".")) if recursive else []
        for name in names:
            if _hidden(name) or os.path.splitext(name)[1].lower() not in EXTENSIONS:
                continue
            yield os.path.join(root, name)


# --------------------------------------------------------------------------------------------
# Running


def run_batch(files: Iterable[str], worker: Callable[[str], dict], jobs: int = 1,
              progress: ProgressBar | None = None, *, window: int | None = None,
              mp_context=None) -> Iterator[dict]:  # fmt: skip
    """Yield ``worker(path)`` for each file, in input order, using ``jobs`` processes.

    ``jobs=1`` runs in this process (no start-up cost); ``jobs=0`` means one per core.  At
    most ``window`` files (default four per process) are submitted and not yet yielded, so
    memory stays flat.  A worker that raises gives ``{"file": path, "error": ...}`` and the
    run goes on; so does a worker process that dies (killed, out of memory): the pool is
    restarted and the files it held are retried once each.
    """
    jobs = (os.cpu_count() or 1) if jobs == 0 else max(1, jobs)
    if jobs == 1:
        for path in files:
            record = _safe_call(worker, path)
            if progress is not None:
                progress.advance(path)
            yield record
        return
    yield from _run_parallel(iter(files), worker, jobs, progress, window or jobs * _WINDOW_PER_JOB,
                             mp_context)  # fmt: skip


def _safe_call(worker: Callable[[str], dict], path: str) -> dict:
    try:
        return worker(path)
    except Exception as exc:  # one bad file (or a bug it reveals) must not end the run
        return {"file": path, "error": f"internal error while processing the file "
                f"({type(exc).__name__}: {exc}); please report it with this file"}  # fmt: skip


def _run_parallel(files: Iterator[str], worker, jobs: int, progress, window: int,
                  mp_context) -> Iterator[dict]:  # fmt: skip
    from concurrent.futures import ProcessPoolExecutor
    from concurrent.futures.process import BrokenProcessPool

    def new_pool():
        return ProcessPoolExecutor(max_workers=jobs, mp_context=mp_context,
                                   initializer=_die_with_parent, initargs=(os.getpid(),))  # fmt: skip

    pool = new_pool()
    in_flight: deque[tuple[str, Any]] = deque()
    attempts: Counter[str] = Counter()
    try:
        while True:
            while len(in_flight) < window:
                path = next(files, None)
                if path is None:
                    break
                in_flight.append((path, pool.submit(_safe_call, worker, path)))
            if not in_flight:
                return
            path, future = in_flight[0]
            try:
                record = future.result()
            except BrokenProcessPool:
                # A process died; which file killed it is unknown, so retry them all once.
                attempts[path] += 1
                pool.shutdown(wait=False, cancel_futures=True)
                pool = new_pool()
                pending = [p for p, _ in in_flight]
                in_flight.clear()
                if attempts[path] >= 2:
                    pending.pop(0)
                    record = {"file": path, "error": "the worker process died while reading "
                              "this file (out of memory?); try it alone with --jobs 1"}  # fmt: skip
                    in_flight.extend((p, pool.submit(_safe_call, worker, p)) for p in pending)
                else:
                    in_flight.extend((p, pool.submit(_safe_call, worker, p)) for p in pending)
                    continue
            else:
                in_flight.popleft()
            attempts.pop(path, None)
            if progress is not None:
                progress.advance(path)
            yield record
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


# --------------------------------------------------------------------------------------------
# Workers


def _locate(source, offset: int) -> dict[str, Any]:
    located = source.locate(offset) if source.reader is not None else None
    if located is None:
        return {}
    return {"location": located.to_json(), "where": located.describe()}


def _block_of(document, offset: int):
    for block in document.blocks:
        if block.span.start <= offset < max(block.span.end, block.span.start + 1):
            return block
    return None


def check_worker(path: str, config=None, limits=None) -> dict:
    """Read, parse and check one file → ``{"file", "format", "blocks", "compounds",
    "findings": [...]}`` or ``{"file", "error"}``.

    Findings carry rule, severity, message (prefixed ``compound 12: `` when the block's
    compound is known), line and column in the parser's text, and the place in the
    original's own terms (``where``: "page 3, line 12"; ``location``: its parts).  Without
    :mod:`peakproof.checker` only the parse diagnostics are reported.  Use
    ``functools.partial(check_worker, config=...)`` to pass settings to every process.
    """
    from .api import InputError, parse_source, read_source

    try:
        source = read_source(path, limits=limits)
    except InputError as exc:
        return {"file": path, "error": str(exc)}
    document = parse_source(source)
    try:
        from .checker import check
    except ImportError:
        diagnostics = list(document.diagnostics)
    else:
        diagnostics = check(document, config)
    findings = []
    for d in diagnostics:
        block = _block_of(document, d.span.start)
        compound = block.compound if block is not None else None
        message = f"compound {compound}: {d.message}" if compound else d.message
        finding = {"rule": d.rule, "severity": d.severity, "message": message,
                   "compound": compound, "block": block.index if block is not None else None,
                   "line": d.span.line, "column": d.span.column}  # fmt: skip
        if d.code:
            finding["code"] = d.code
        finding.update(_locate(source, d.span.start))
        findings.append(finding)
    return {"file": path, "format": source.format, **_counts(document), "findings": findings}


def export_worker(path: str, per: str = "spectrum", limits=None) -> dict:
    """Read and parse one file → ``{"file", "format", "blocks", "compounds", "records": [...]}``
    with :func:`peakproof.export.records` (``per`` = "spectrum" or "signal"), each record
    also giving its place in the original (``where``), or ``{"file", "error"}``."""
    from .api import InputError, parse_source, read_source
    from .export import records

    try:
        source = read_source(path, limits=limits)
    except InputError as exc:
        return {"file": path, "error": str(exc)}
    document = parse_source(source)
    out = []
    for block in document.blocks:
        single = type(document)(text=document.text, blocks=(block,), path=path)
        if per == "signal":
            starts = [sig.span.start for s in block.spectra for sig in s.signals]
        else:
            starts = [s.span.start for s in block.spectra]
        for record, start in zip(records(single, per), starts):
            record.update(_locate(source, start))
            out.append(record)
    return {"file": path, "format": source.format, **_counts(document), "records": out}


def _counts(document) -> dict[str, int]:
    labelled = {b.compound for b in document.blocks if b.compound}
    unlabelled = sum(1 for b in document.blocks if not b.compound)
    return {"blocks": len(document.blocks), "compounds": len(labelled) + unlabelled}


# --------------------------------------------------------------------------------------------
# Output


class JsonLinesWriter:
    """Writes one JSON object per line and flushes each, so a reader can follow the run.

    ``per="file"`` writes each worker record as it is; ``per="finding"`` writes one line per
    finding (or export record), each with its ``file``, plus one line for a file's error.
    """

    def __init__(self, stream: IO[str], per: str = "file"):
        if per not in ("file", "finding"):
            raise ValueError(f"per must be 'file' or 'finding', not {per!r}")
        self.stream = stream
        self.per = per
        self.lines = 0

    def write(self, record: dict) -> None:
        if self.per == "file" or "error" in record:
            self._line(record)
        else:
            for item in record.get("findings", record.get("records", ())):
                self._line({"file": record["file"], **item})
        self.stream.flush()

    def _line(self, obj: dict) -> None:
        self.stream.write(json.dumps(obj, ensure_ascii=False) + "\n")
        self.lines += 1

    def __enter__(self) -> JsonLinesWriter:
        return self

    def __exit__(self, *exc) -> None:
        self.stream.flush()


class ProgressBar:
    """A one-line progress bar on stderr, drawn only when stderr is a terminal.

    ``enabled=None`` decides from ``stream.isatty()``; redraws at most ten times a second.
    """

    def __init__(self, total: int, stream: IO[str] | None = None, enabled: bool | None = None,
                 width: int = 28):  # fmt: skip
        self.stream = stream if stream is not None else sys.stderr
        self.enabled = _isatty(self.stream) if enabled is None else enabled
        self.total = total
        self.done = 0
        self.width = width
        self._start = time.monotonic()
        self._drawn = 0.0
        self._shown = False

    def advance(self, label: str = "", n: int = 1) -> None:
        self.done += n
        now = time.monotonic()
        if self.enabled and (now - self._drawn >= 0.1 or self.done >= self.total):
            self._drawn = now
            self.stream.write("\r" + self.render(label, now) + "\x1b[K")
            self.stream.flush()
            self._shown = True

    def render(self, label: str = "", now: float | None = None) -> str:
        elapsed = max((now or time.monotonic()) - self._start, 1e-9)
        fraction = self.done / self.total if self.total else 1.0
        filled = int(round(self.width * min(fraction, 1.0)))
        rate = self.done / elapsed
        left = (self.total - self.done) / rate if rate > 0 else 0.0
        bar = "█" * filled + "·" * (self.width - filled)
        name = os.path.basename(label)
        name = name if len(name) <= 30 else "…" + name[-29:]
        return (f"{bar} {self.done}/{self.total} files  {rate:.1f}/s  "
                f"{_clock(left)} left  {name}")  # fmt: skip

    def close(self) -> None:
        if self._shown:
            self.stream.write("\r\x1b[K")
            self.stream.flush()
            self._shown = False

    def __enter__(self) -> ProgressBar:
        return self

    def __exit__(self, *exc) -> None:
        self.close()


def _isatty(stream) -> bool:
    try:
        return stream.isatty()
    except (AttributeError, ValueError):
        return False


def _clock(seconds: float) -> str:
    seconds = int(seconds + 0.5)
    hours, rest = divmod(seconds, 3600)
    return f"{hours}:{rest // 60:02d}:{rest % 60:02d}" if hours else f"{rest // 60}:{rest % 60:02d}"


@dataclass
class BatchSummary:
    """Counts gathered record by record (no record is kept), and the table shown at the end."""

    files: int = 0
    read: int = 0
    blocks: int = 0
    compounds: int = 0
    records: int = 0  # export records
    checked: bool = False  # a record carried findings (a check run, not an export)
    findings: Counter = field(default_factory=Counter)  # (rule, severity) → count
    unreadable: list = field(default_factory=list)  # InputProblem, the first max_listed
    unreadable_count: int = 0
    max_listed: int = 50
    seconds: float = 0.0

    def __post_init__(self) -> None:
        problems, self.unreadable = list(self.unreadable), []
        for problem in problems:
            self.add_problem(problem)
        self._start = time.monotonic()

    def add_problem(self, problem: InputProblem) -> None:
        self.files += 1
        self.unreadable_count += 1
        if len(self.unreadable) < self.max_listed:
            self.unreadable.append(problem)

    def add(self, record: dict) -> None:
        self.seconds = time.monotonic() - self._start
        if "error" in record:
            self.add_problem(InputProblem(record["file"], record["error"]))
            return
        self.files += 1
        self.read += 1
        self.blocks += record.get("blocks", 0)
        self.compounds += record.get("compounds", 0)
        self.records += len(record.get("records", ()))
        self.checked = self.checked or "findings" in record
        for finding in record.get("findings", ()):
            self.findings[finding["rule"], finding["severity"]] += 1

    def by_severity(self) -> dict[str, int]:
        counts = Counter()
        for (_, severity), n in self.findings.items():
            counts[severity] += n
        return {s: counts.get(s, 0) for s in _SEVERITIES}

    def to_json(self) -> dict[str, Any]:
        return {
            "files": self.files, "read": self.read, "blocks": self.blocks,
            "compounds": self.compounds, "records": self.records, "by_severity": self.by_severity(),
            "by_rule": [{"rule": r, "severity": s, "count": n}
                        for (r, s), n in sorted(self.findings.items(), key=_table_order)],
            "unreadable": self.unreadable_count,
            "seconds": round(self.seconds, 3),
        }  # fmt: skip

    def table(self) -> str:
        """The end-of-run summary for people."""
        unread = self.unreadable_count
        rate = self.files / self.seconds if self.seconds > 0 else 0.0
        lines = [
            f"files      {self.files} ({self.read} read, {unread} unreadable)"
            + (f"  in {self.seconds:.1f} s, {rate:.1f} files/s" if self.seconds else ""),
            f"compounds  {self.compounds} ({self.blocks} data blocks)",
        ]
        if self.records or not self.checked:
            lines.append(f"records    {self.records}")
        if not self.checked:
            return "\n".join(lines + self._unreadable_lines())
        sev = self.by_severity()
        lines.append("findings   " + ", ".join(f"{sev[s]} {s}{'s' if sev[s] != 1 else ''}"
                                               for s in _SEVERITIES))  # fmt: skip
        if self.findings:
            width = max(len(rule) for rule, _ in self.findings)
            lines.append("")
            lines.append(f"  {'rule':<{width}}  {'severity':<8}  {'count':>6}")
            for (rule, severity), n in sorted(self.findings.items(), key=_table_order):
                lines.append(f"  {rule:<{width}}  {severity:<8}  {n:>6}")
        return "\n".join(lines + self._unreadable_lines())

    def _unreadable_lines(self) -> list[str]:
        unread = self.unreadable_count
        if not unread:
            return []
        lines = ["", f"unreadable ({unread}):"]
        lines.extend(f"  {p.path}: {_without_name(p)}" for p in self.unreadable)
        if unread > len(self.unreadable):
            lines.append(f"  … and {unread - len(self.unreadable)} more (see the JSON Lines)")
        return lines


def _table_order(item) -> tuple:
    (rule, severity), n = item
    return (_SEVERITIES.index(severity) if severity in _SEVERITIES else 9, -n, rule)


def _without_name(problem: InputProblem) -> str:
    """Reader messages start with the file's name, which the table already shows."""
    base = os.path.basename(problem.path)
    for prefix in (f"{problem.path}: ", f"{base}: "):
        if problem.message.startswith(prefix):
            return problem.message[len(prefix):]
    return problem.message


# --------------------------------------------------------------------------------------------
# Everything at once, for the commands


def add_arguments(parser) -> None:
    """The batch options ``check`` and ``export`` share."""
    parser.add_argument("--jobs", "-j", type=int, default=1, metavar="N",
                        help="process files in N parallel processes (0: one per core)")
    parser.add_argument("--jsonl", metavar="FILE", default=None,
                        help="stream one JSON record per file to FILE ('-' for stdout)")
    parser.add_argument("--jsonl-per", choices=("file", "finding"), default="file",
                        help="one JSON Lines record per file (default) or per finding")
    parser.add_argument("--no-recursive", dest="recursive", action="store_false",
                        help="do not look inside sub-folders of a folder argument")
    parser.add_argument("--no-progress", dest="progress", action="store_false",
                        help="never draw the progress bar (drawn only on a terminal)")  # fmt: skip


def run_files(inputs: Iterable[str], worker: Callable[[str], dict], *, jobs: int = 1,
              jsonl: IO[str] | None = None, per: str = "file", recursive: bool = True,
              progress: bool = True, on_record: Callable[[dict], None] | None = None,
              summary_stream: IO[str] | None = None) -> BatchSummary:  # fmt: skip
    """Expand ``inputs``, run ``worker`` over them, stream records to ``jsonl`` and print the
    summary table to ``summary_stream`` (default stderr).  ``on_record`` sees every record as
    it arrives (e.g. to print human-readable findings).  Returns the summary; the caller
    picks the exit status (e.g. 2 when ``summary.unreadable_count``, 1 for findings)."""
    files, problems = expand_inputs(inputs, recursive=recursive)
    summary = BatchSummary(unreadable=problems)
    writer = JsonLinesWriter(jsonl, per) if jsonl is not None else None
    if writer is not None:
        for problem in problems:
            writer.write(problem.to_json())
    with ProgressBar(len(files), enabled=None if progress else False) as bar:
        for record in run_batch(files, worker, jobs=jobs, progress=bar):
            if writer is not None:
                writer.write(record)
            if on_record is not None:
                if bar._shown:
                    bar.close()
                on_record(record)
            summary.add(record)
    stream = summary_stream if summary_stream is not None else sys.stderr
    print(summary.table(), file=stream)
    return summary


__all__ = [
    "BatchSummary", "InputProblem", "JsonLinesWriter", "KNOWN_EXTENSIONS", "ProgressBar",
    "add_arguments", "check_worker", "expand_inputs", "export_worker", "run_batch", "run_files",
]  # fmt: skip
