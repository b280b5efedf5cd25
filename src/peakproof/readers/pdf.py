"""PDF → plain text, page by page and line by line, with a page/line/column map.

Lines are rebuilt from the characters (not from pdfplumber's own line grouping, which
splits raised superscripts and lowered subscripts into lines of their own): full-size
characters are grouped by baseline, and smaller characters join the nearest line, so
``¹H`` and ``CDCl₃`` come out as ``1H`` and ``CDCl3``.  Then:

* ligatures (ﬁ ﬂ ﬀ ﬃ ﬄ ﬅ ﬆ) are expanded;
* a line ending in two lowercase letters and a hyphen, followed by a line starting with a
  lowercase letter, is joined without the hyphen (never after a digit, so "7.36–" / "7.28"
  keeps its dash, nor after a capital, so "N-" / "methyl" keeps its hyphen);
* running headers and footers are removed: among the first and last three lines of each
  page, a line found at the same place (k-th from the top or bottom) on at least two pages
  and half the pages (compared exactly, or with digits masked when it is short, as
  "Page 3 of 9" is), and a bare page number; never a line holding a decimal number (data);
* line breaks inside a paragraph stay "\\n" (the parser joins lines); a wider vertical gap
  gives a blank line.  Page breaks are line breaks.
* damage that PDF text extraction commonly leaves (``¼`` for ``=``, ``d`` for ``δ``) is kept
  as is: repairing it is the parser's job, which also reports it.

``line`` counts every line rebuilt on the page, headers included, from the top, so it
matches what a reader counts; ``column`` is 1-based in that line's extracted text.
Multi-column layouts are read line by line across the columns.
Turned text (a page with ``/Rotate``, a landscape table drawn under a rotation) is read along
each glyph's own direction, snapped to quarter turns; a page's lines are those of its main
direction, with any other direction's lines after them as paragraphs of their own.
"""

from __future__ import annotations

import io
import os
import re
from bisect import bisect_left
from dataclasses import dataclass
from statistics import median

from .base import Location, ReaderError, SourceText, TextBuilder
from .limits import Limits

LIGATURES = {"ﬀ": "ff", "ﬁ": "fi", "ﬂ": "fl", "ﬃ": "ffi", "ﬄ": "ffl", "ﬅ": "ft", "ﬆ": "st"}
_PAGE_NUMBER = re.compile(
    r"(?:page\s*)?[-–—]?\s*[Ss]?\d{1,4}\s*[-–—]?(?:\s*(?:of|/)\s*\d{1,4})?", re.IGNORECASE
)
_DECIMAL = re.compile(r"\d[.,]\d")
_HYPHENS = "-\u2010\u00ad"
_EDGE_LINES = 3  # how many lines at the top and bottom of a page may be headers/footers
_SHORT_LINE = 40  # headers compared with digits masked only when at most this long
_SECTION_GAP = 1e4  # points between the lines of two reading directions: always a blank line


@dataclass(slots=True)
class _Line:
    page: int
    number: int
    text: str
    baseline: float
    size: float


def _direction(a: float, b: float) -> int:
    """The reading direction, in degrees counter-clockwise on the displayed page, of a glyph
    whose baseline runs along (a, b), snapped to the nearest quarter turn."""
    if abs(a) >= abs(b):
        return 0 if a > 0 else 180
    return 90 if b > 0 else 270


def _reading_frame(direction: int, x0: float, y0: float, x1: float, y1: float, e: float,
                   f: float) -> tuple[float, float, float, float]:  # fmt: skip
    """A glyph in its direction's reading frame: (baseline key, growing from the first line to
    the last; start and end along the text; size across it), from its displayed box and its
    origin (e, f)."""
    if direction == 90:  # reads upwards: the first line is the leftmost
        return e, y0, y1, x1 - x0
    if direction == 270:  # reads downwards: the first line is the rightmost
        return -e, -y1, -y0, x1 - x0
    if direction == 180:  # upside down
        return f, -x1, -x0, y1 - y0
    return -f, x0, x1, y1 - y0


def _group_lines(glyphs: list[tuple]) -> list[tuple[float, float, str]]:
    """Glyphs of one reading direction, as (baseline key, start, end, size, text) in that
    direction's frame → (baseline key, size, text) lines, first line first."""
    if not glyphs:
        return []
    sizes = sorted(g[3] for g in glyphs)
    body = sizes[len(sizes) // 2] or 10.0
    full = sorted((g for g in glyphs if g[3] >= 0.85 * body), key=lambda g: g[0])
    small = [g for g in glyphs if g[3] < 0.85 * body]
    clusters: list[list] = []
    for g in full:
        if clusters and g[0] - clusters[-1][0][0] <= 0.3 * body:
            clusters[-1].append(g)
        else:
            clusters.append([g])
    baselines = [c[0][0] for c in clusters]
    orphans = []
    for g in small:
        i = bisect_left(baselines, g[0])
        near = [j for j in (i - 1, i) if 0 <= j < len(baselines)]
        best = min(near, key=lambda j: abs(baselines[j] - g[0]), default=None)
        if best is not None and abs(baselines[best] - g[0]) <= 0.7 * body:
            clusters[best].append(g)
        else:
            orphans.append(g)
    for g in sorted(orphans, key=lambda g: g[0]):  # small print far from any full line
        clusters.append([g])
    clusters.sort(key=lambda c: c[0][0])
    merged: list[list] = []
    for c in clusters:  # orphans on one baseline form one line
        if merged and len(merged[-1]) and merged[-1][0][3] < 0.85 * body and c[0][3] < 0.85 * body \
                and abs(c[0][0] - merged[-1][0][0]) <= 0.3 * body:  # fmt: skip
            merged[-1].extend(c)
        else:
            merged.append(c)
    lines = []
    for cluster in merged:
        cluster.sort(key=lambda g: g[1])
        parts, last_x1, last_text = [], None, " "
        for _, x0, x1, size, text in cluster:
            gap_limit = 0.2 * max(size, 0.6 * body)
            if last_x1 is not None and x0 - last_x1 > gap_limit and last_text[-1] != " " \
                    and text[0] != " ":  # fmt: skip
                parts.append(" ")
            parts.append(text)
            last_x1, last_text = x1, text
        text = "".join(parts).strip()
        if text:
            lines.append((cluster[0][0], max(g[3] for g in cluster), text))
    return lines


def _page_lines(upright: list[tuple], turned: dict[int, list[tuple]],
                ) -> list[tuple[float, float, str]]:  # fmt: skip
    """All lines of a page.  The reading direction holding the most glyphs is the body; when
    that is a turned one, upright lines displayed above it (a running header over a landscape
    table) come first and every other line after it, each direction in its own reading order.
    Baseline keys of the different directions are made to follow one another with a wide gap,
    so each direction's lines stand apart as a paragraph of their own."""
    if not turned:
        return _group_lines(upright)
    groups = sorted(([(0, upright)] if upright else []) + list(turned.items()),
                    key=lambda item: -len(item[1]))  # fmt: skip
    body_direction, body = groups[0]
    sections = [[], _group_lines(body), []]  # upright above a turned body, body, upright rest
    if body_direction != 0 and upright:
        top = _displayed_top(body_direction, body)
        for line in _group_lines(upright):
            sections[0 if -line[0] > top else 2].append(line)
    sections.extend(_group_lines(glyphs) for direction, glyphs in groups[1:] if direction != 0)
    lines: list[tuple[float, float, str]] = []
    for section in sections:
        if section:
            shift = lines[-1][0] + _SECTION_GAP - section[0][0] if lines else 0.0
            lines.extend((key + shift, size, text) for key, size, text in section)
    return lines


def _displayed_top(direction: int, glyphs: list[tuple]) -> float:
    """The highest displayed y that glyphs of a turned reading direction reach."""
    if direction == 90:  # start and end along the text are displayed y
        return max(g[2] for g in glyphs)
    if direction == 270:  # start and end are minus displayed y
        return -min(g[1] for g in glyphs)
    return max(g[0] + g[3] for g in glyphs)  # 180: the key is the displayed baseline y


def _masked(text: str) -> str:
    return re.sub(r"\d+", "#", " ".join(text.split()))


def _edge_keys(line: _Line, edge: str, place: int) -> list[tuple]:
    keys = [(edge, place, "=", " ".join(line.text.split()))]
    if len(line.text) <= _SHORT_LINE:
        keys.append((edge, place, "#", _masked(line.text)))
    return keys


def _edges(lines: list[_Line]):
    for place, line in enumerate(lines[:_EDGE_LINES]):
        yield line, "top", place
    for place, line in enumerate(reversed(lines[-_EDGE_LINES:])):
        yield line, "bottom", place


def _running_lines(pages: list[list[_Line]]) -> set[tuple]:
    """Edge lines repeated at the same place (k-th from the top or bottom) across pages:
    the same text, or, for short lines, the same text with digits masked."""
    counts: dict[tuple, int] = {}
    for lines in pages:
        keys = {key for line, edge, place in _edges(lines) for key in _edge_keys(line, edge, place)}
        for key in keys:
            counts[key] = counts.get(key, 0) + 1
    needed = max(2, (len(pages) + 1) // 2)
    return {key for key, count in counts.items() if count >= needed}


def _strip_running(lines: list[_Line], running: set[tuple]) -> list[_Line]:
    # a line with a decimal number is data (a shift list's tail such as "127.8, 60.8, 21.6."
    # looks alike on many pages once digits are masked); running headers carry no decimals
    drop = {
        id(line)
        for line, edge, place in _edges(lines)
        if _PAGE_NUMBER.fullmatch(line.text.strip())
        or (
            not _DECIMAL.search(line.text)
            and any(key in running for key in _edge_keys(line, edge, place))
        )
    }
    return [line for line in lines if id(line) not in drop]


class _PdfLocator:
    __slots__ = ("_map", "_records")

    def __init__(self, offset_map, records: list[tuple[int, int]]):
        self._map = offset_map
        self._records = records

    def __call__(self, offset: int) -> Location:
        key, pos = self._map.lookup(offset)
        if key is None:
            return Location("pdf", page=1, line=1, column=1)
        page, line = self._records[key]
        return Location("pdf", page=page, line=line, column=pos + 1)


def _emit_line(out: TextBuilder, text: str, key: int, drop_last: bool) -> None:
    if drop_last:
        text = text[:-1]
    pos = 0
    for i, ch in enumerate(text):
        if ch in LIGATURES:
            out.copy(text[pos:i], pos, key)
            out.put(LIGATURES[ch], i, key)
            pos = i + 1
    out.copy(text[pos:], pos, key)


def _joins_hyphenated(text: str, following: str) -> bool:
    return (
        len(text) >= 3
        and text[-1] in _HYPHENS
        and text[-2].isalpha() and text[-2].islower()
        and text[-3].isalpha() and text[-3].islower()
        and following[:1].isalpha() and following[:1].islower()
    )  # fmt: skip


def _open_pdf(source, name: str):
    import pdfplumber  # heavy; imported only when a PDF is read
    from pdfminer.pdfdocument import PDFEncryptionError, PDFPasswordIncorrect

    encrypted = ReaderError("the PDF is encrypted",
                            "Remove the password and try again.", name)  # fmt: skip
    stream = io.BytesIO(source) if isinstance(source, bytes) else source
    try:
        pdf = pdfplumber.open(stream)
        pages = pdf.pages  # forces the page tree to be read: malformed files fail here
    except Exception as exc:
        cause = exc
        while cause is not None:  # pdfplumber wraps pdfminer's exceptions
            if isinstance(cause, (PDFPasswordIncorrect, PDFEncryptionError)):
                raise encrypted from None
            cause = cause.__cause__ or (cause.args[0] if cause.args and
                                        isinstance(cause.args[0], BaseException) else None)
        raise ReaderError(f"the PDF is damaged or not a PDF ({type(exc).__name__}: {exc})",
                          "Export the PDF again from the program that made it.", name) from None
    return pdf, pages


def _char_reader(pdf):
    """A function page → its glyphs as (baseline key, start, end, size, text), upright ones
    in a list and turned ones by reading direction (see :func:`_reading_frame`).

    pdfminer's interpreter is driven directly with no layout analysis: pdfplumber's
    ``page.chars`` resolves every attribute of every glyph object, which costs about four times
    the interpretation itself (a 300-page SI took half a minute).  The coordinates are the
    same: both come from pdfminer's device space, relative to the page's media box.  That space
    is the page as displayed: pdfminer folds the page's ``/Rotate`` into the transformation
    it starts from, so each glyph's matrix (text matrix × CTM) carries the reading direction
    of a rotated page and of text drawn under a rotation alike."""
    from pdfminer.converter import PDFPageAggregator
    from pdfminer.layout import LTChar
    from pdfminer.pdfinterp import PDFPageInterpreter, PDFResourceManager

    resources = PDFResourceManager(caching=True)
    device = PDFPageAggregator(resources, laparams=None)
    interpreter = PDFPageInterpreter(resources, device)

    def walk(item, upright: list[tuple], turned: dict[int, list[tuple]]) -> None:
        for child in item:
            if isinstance(child, LTChar):
                m = child.matrix
                if m[0] > 0 and m[0] >= abs(m[1]):  # upright: nearly every glyph, kept cheap
                    upright.append((-m[5], child.x0, child.x1, child.size, child.get_text()))
                    continue
                direction = _direction(m[0], m[1])
                frame = _reading_frame(direction, child.x0, child.y0, child.x1, child.y1,
                                       m[4], m[5])  # fmt: skip
                turned.setdefault(direction, []).append((*frame, child.get_text()))
            elif hasattr(child, "__iter__"):
                walk(child, upright, turned)  # figures and forms hold characters too

    def page_chars(page) -> tuple[list[tuple], dict[int, list[tuple]]]:
        interpreter.process_page(page.page_obj)
        upright: list[tuple] = []
        turned: dict[int, list[tuple]] = {}
        walk(device.get_result(), upright, turned)
        return upright, turned

    return page_chars


def read_pdf(source: str | os.PathLike | bytes, name: str = "", limits: Limits | None = None,
             ) -> SourceText:  # fmt: skip
    limits = limits or Limits()
    deadline = limits.deadline(name)
    pdf, pages = _open_pdf(source, name)
    try:
        if len(pages) > limits.max_pages:
            raise ReaderError(f"the PDF has {len(pages)} pages, more than the "
                              f"{limits.max_pages}-page limit",
                              "Split it, or raise Limits(max_pages=...).", name)  # fmt: skip
        page_lines: list[list[_Line]] = []
        page_chars = _char_reader(pdf)
        for number, page in enumerate(pages, 1):
            deadline.check(f"page {number}")
            try:
                grouped = _page_lines(*page_chars(page))
            except Exception as exc:
                raise ReaderError(f"page {number} of the PDF could not be read "
                                  f"({type(exc).__name__}: {exc})",
                                  "Export the PDF again.", name) from None  # fmt: skip
            page_lines.append([_Line(number, i, text, baseline, size)
                               for i, (baseline, size, text) in enumerate(grouped, 1)])
    finally:
        pdf.close()
    if not any(page_lines):
        raise ReaderError("the PDF has no extractable text (it may be scanned images)",
                          "Run OCR on it first, or use the original document.", name)
    running = _running_lines(page_lines) if len(page_lines) >= 2 else set()
    return _assemble([_strip_running(lines, running) for lines in page_lines], name)


def _assemble(pages: list[list[_Line]], name: str) -> SourceText:
    out = TextBuilder()
    records: list[tuple[int, int]] = []
    flat = [line for lines in pages for line in lines]
    pitches = {}
    for lines in pages:
        steps = [b.baseline - a.baseline for a, b in zip(lines, lines[1:]) if b.baseline > a.baseline]
        pitches[lines[0].page if lines else 0] = median(steps) if steps else None
    for i, line in enumerate(flat):
        key = len(records)
        records.append((line.page, line.number))
        following = flat[i + 1] if i + 1 < len(flat) else None
        join = following is not None and _joins_hyphenated(line.text, following.text)
        _emit_line(out, line.text, key, drop_last=join)
        if following is None or join:
            continue
        out.put("\n", len(line.text), key)
        pitch = pitches.get(line.page) or 1.2 * line.size
        if following.page == line.page and following.baseline - line.baseline > 1.5 * pitch:
            out.put("\n", len(line.text), key)
    out.put("\n", len(flat[-1].text), len(records) - 1)
    return SourceText(out.text(), "pdf", name, (), _PdfLocator(out.map, records))
