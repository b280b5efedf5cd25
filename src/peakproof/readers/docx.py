"""Word .docx → plain text with a paragraph/run map, and run-level rewriting.

Text layout: every paragraph (body or table cell, in document order) ends with one "\\n";
a heading paragraph (style named "Heading …" or "Title", or with an outline level) is
preceded by a blank line so compound sections stand apart; an empty paragraph is simply an
empty line.  Tabs become spaces, line breaks (``w:br``, ``w:cr``) newlines, a no-break hyphen
"-"; soft hyphens, deleted text and field codes are skipped.  Superscript and subscript runs
give their plain characters (``1H``, ``CDCl3``).  Characters in the Symbol font (in a run
whose font is Symbol, or a ``w:sym`` element) are mapped to Unicode (Symbol "d" → δ).

Numbering: a location's paragraph counts from 1 within its table cell (the innermost one,
for nested tables), or, outside tables, across the document; ``document_paragraph`` counts
body and table-cell paragraphs together in document order from 1.  Runs count the ``w:r``
elements of a paragraph from 1, including runs inside hyperlinks, tracked insertions and
content controls; tables are numbered in document order (nested ones too) and rows and cells
from 1 within their table.  ``offset_in_run`` counts characters of the run's text from 0.
"""

from __future__ import annotations

import copy
import io
import os
import tempfile
import zipfile
from collections.abc import Iterable, Iterator
from dataclasses import dataclass

from .base import Location, ReaderError, SourceText, TextBuilder
from .limits import Limits, check_zip

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
_XML_NS = "http://www.w3.org/XML/1998/namespace"


def _w(tag: str) -> str:
    return f"{{{W}}}{tag}"


# Adobe Symbol font encoding → Unicode for the characters chemists type with it
# (from the Adobe "symbol.txt" encoding table, from memory).
SYMBOL_FONT = {
    "a": "α", "b": "β", "c": "χ", "d": "δ", "e": "ε", "f": "φ", "g": "γ", "h": "η", "i": "ι",
    "j": "ϕ", "k": "κ", "l": "λ", "m": "μ", "n": "ν", "o": "ο", "p": "π", "q": "θ", "r": "ρ",
    "s": "σ", "t": "τ", "u": "υ", "v": "ϖ", "w": "ω", "x": "ξ", "y": "ψ", "z": "ζ",
    "A": "Α", "B": "Β", "C": "Χ", "D": "Δ", "E": "Ε", "F": "Φ", "G": "Γ", "H": "Η", "I": "Ι",
    "K": "Κ", "L": "Λ", "M": "Μ", "N": "Ν", "O": "Ο", "P": "Π", "Q": "Θ", "R": "Ρ", "S": "Σ",
    "T": "Τ", "U": "Υ", "W": "Ω", "X": "Ξ", "Y": "Ψ", "Z": "Ζ", "-": "−", "¢": "′", "²": "″",
    "°": "°", "±": "±", "´": "×", "×": "×", "¸": "÷", "»": "≈", "¹": "≠", "£": "≤", "³": "≥",
    "®": "→", "¬": "←", "¥": "∞", "¶": "∂", "·": "•", "¼": "…", "Å": "⊕", "Ä": "⊗", "Ö": "√",
    "~": "∼", "@": "≅", "\\": "∴", "^": "⊥",
}  # fmt: skip
_HEADING_PREFIXES = ("heading", "title")
_CONTAINERS = {_w(t) for t in ("hyperlink", "ins", "smartTag", "fldSimple", "customXml", "moveTo",
                               "dir", "bdo")}  # fmt: skip


def symbol_to_unicode(ch: str) -> str:
    code = ord(ch)
    if 0xF020 <= code <= 0xF0FF:  # Word stores Symbol glyphs in the private-use area
        ch = chr(code - 0xF000)
    return SYMBOL_FONT.get(ch, ch)


@dataclass(slots=True)
class _Piece:
    """One stretch of output text produced by one element of one run."""

    out_start: int
    length: int
    element: object
    run_element: object
    kind: str  # "t", "tab", "br", "sym", "hyphen"
    symbol_font: bool


class _Walk:
    def __init__(self, heading_styles: set[str], keep_pieces: bool):
        self.out = TextBuilder()
        # (document paragraph, run or None, table, row, cell, paragraph within the cell)
        self.records: list[tuple] = []
        self.paragraph = 0
        self.cell_paragraph = 0  # paragraphs so far in the innermost cell being read
        self.tables = 0
        self.heading_styles = heading_styles
        self.pieces: list[_Piece] | None = [] if keep_pieces else None

    def record(self, run: int | None, where: tuple | None) -> int:
        if where is None:
            self.records.append((self.paragraph, run, None, None, None, None))
        else:
            self.records.append((self.paragraph, run, *where, self.cell_paragraph))
        return len(self.records) - 1

    def blocks(self, container, where: tuple | None) -> None:
        for child in container:
            tag = child.tag
            if tag == _w("p"):
                self.paragraph_text(child, where)
            elif tag == _w("tbl"):
                self.tables += 1
                number = self.tables
                outer_count = self.cell_paragraph  # a nested table sits inside a cell
                for r, tr in enumerate(child.iterchildren(_w("tr")), 1):
                    for c, tc in enumerate(tr.iterchildren(_w("tc")), 1):
                        self.cell_paragraph = 0
                        self.blocks(tc, (number, r, c))
                self.cell_paragraph = outer_count
            elif tag == _w("sdt") or tag == _w("customXml"):
                content = child.find(_w("sdtContent")) if tag == _w("sdt") else child
                if content is not None:
                    self.blocks(content, where)

    def is_heading(self, p) -> bool:
        ppr = p.find(_w("pPr"))
        if ppr is None:
            return False
        style = ppr.find(_w("pStyle"))
        if style is not None and style.get(_w("val")) in self.heading_styles:
            return True
        return ppr.find(_w("outlineLvl")) is not None

    def paragraph_text(self, p, where: tuple | None) -> None:
        self.paragraph += 1
        self.cell_paragraph += 1
        out = self.out
        paragraph_key = self.record(None, where)
        if self.is_heading(p) and out.length and out.tail(2) != "\n\n":
            out.put("\n", 0, paragraph_key)
        for number, r in enumerate(paragraph_runs(p), 1):
            key = self.record(number, where)
            symbol_font = _is_symbol_font(r)
            pos = 0
            for child in r:
                tag = child.tag
                if tag == _w("t"):
                    text = child.text or ""
                    if symbol_font:
                        text = "".join(symbol_to_unicode(ch) for ch in text)
                    kind = "t"
                elif tag == _w("tab"):
                    text, kind = " ", "tab"
                elif tag in (_w("br"), _w("cr")):
                    text, kind = "\n", "br"
                elif tag == _w("sym"):
                    text, kind = _sym_text(child), "sym"
                elif tag == _w("noBreakHyphen"):
                    text, kind = "-", "hyphen"
                else:
                    continue
                if self.pieces is not None:
                    self.pieces.append(_Piece(out.length, len(text), child, r, kind, symbol_font))
                out.copy(text, pos, key)
                pos += len(text)
        out.put("\n", 0, paragraph_key)


def paragraph_runs(p) -> Iterator:
    """The paragraph's ``w:r`` elements in order, looking inside links and insertions."""
    for child in p:
        if child.tag == _w("r"):
            yield child
        elif child.tag in _CONTAINERS:
            yield from paragraph_runs(child)
        elif child.tag == _w("sdt"):
            content = child.find(_w("sdtContent"))
            if content is not None:
                yield from paragraph_runs(content)


def _is_symbol_font(r) -> bool:
    rpr = r.find(_w("rPr"))
    fonts = rpr.find(_w("rFonts")) if rpr is not None else None
    if fonts is None:
        return False
    return any((fonts.get(_w(a)) or "").lower() == "symbol" for a in ("ascii", "hAnsi", "cs"))


def _sym_text(sym) -> str:
    code = sym.get(_w("char")) or ""
    try:
        ch = chr(int(code, 16))
    except ValueError:
        return ""
    font = (sym.get(_w("font")) or "").lower()
    if font == "symbol" or 0xF020 <= ord(ch) <= 0xF0FF:
        return symbol_to_unicode(ch)
    return ch


def _heading_styles(document) -> set[str]:
    ids = set()
    for style in document.styles:
        name = (style.name or "").lower()
        if name.startswith(_HEADING_PREFIXES) and style.style_id:
            ids.add(style.style_id)
    return ids


def _open(source, limits: Limits, name: str):
    import docx  # heavy; imported only when a .docx is read

    members = set(check_zip(source, limits, name))
    if "_rels/.rels" not in members or not any(
        m.startswith("word/") and m.endswith(".xml") for m in members
    ):
        raise ReaderError("the zip file has no Word document in it (word/document.xml)",
                          "Give a .docx saved by a word processor.", name)  # fmt: skip
    stream = io.BytesIO(source) if isinstance(source, bytes) else source
    try:
        return docx.Document(stream)
    except (zipfile.BadZipFile, EOFError) as exc:
        raise ReaderError(f"the .docx file is damaged ({exc})",
                          "Open it in Word and save it again.", name) from None
    except KeyError:
        raise ReaderError("the zip file has no Word document in it (word/document.xml)",
                          "Give a .docx saved by a word processor.", name) from None
    except ValueError as exc:  # python-docx: not a Word document (e.g. an .xlsx)
        raise ReaderError(f"this is not a Word document ({exc})",
                          "Give a .docx saved by a word processor.", name) from None
    except Exception as exc:  # lxml syntax errors and the like: one clear message
        raise ReaderError(f"the .docx file could not be read ({type(exc).__name__}: {exc})",
                          "Open it in Word and save it again.", name) from None


def _walk(document, keep_pieces: bool) -> _Walk:
    walk = _Walk(_heading_styles(document), keep_pieces)
    walk.blocks(document.element.body, None)
    return walk


class _DocxLocator:
    __slots__ = ("_map", "_records")

    def __init__(self, walk: _Walk):
        self._map = walk.out.map
        self._records = walk.records

    def __call__(self, offset: int) -> Location:
        key, pos = self._map.lookup(offset)
        if key is None:
            return Location("docx", paragraph=1)
        paragraph, run, table, row, cell, in_cell = self._records[key]
        return Location("docx", paragraph=paragraph if in_cell is None else in_cell, run=run,
                        offset_in_run=pos if run is not None else None, table=table, row=row,
                        cell=cell, document_paragraph=None if in_cell is None else paragraph,
                        )  # fmt: skip


def read_docx(source: str | os.PathLike | bytes, name: str = "", limits: Limits | None = None,
              ) -> SourceText:  # fmt: skip
    limits = limits or Limits()
    walk = _walk(_open(source, limits, name), keep_pieces=False)
    return SourceText(walk.out.text(), "docx", name, (), _DocxLocator(walk))


# -- rewriting -------------------------------------------------------------------------------


def write_docx_runs(path_in: str | os.PathLike, path_out: str | os.PathLike,
                    replacements: Iterable[tuple[int, int, str]], limits: Limits | None = None,
                    ) -> None:  # fmt: skip
    """Apply ``(start, end, new_text)`` edits, given as offsets in :func:`read_docx`'s text.

    Only the runs an edit covers change: the first covered run receives the new text in
    place of its covered part, the covered parts of later runs are removed (a run left empty
    is dropped), and every other run keeps its XML and formatting untouched.  An edit may
    span runs but not a paragraph break.  If the first covered run is in the Symbol font the
    new text goes into a new run beside it with the same formatting minus the font.
    The output is written to a temporary file and moved into place.
    """
    name = os.path.basename(os.fspath(path_in))
    document = _open(path_in, limits or Limits(), name)
    walk = _walk(document, keep_pieces=True)
    text = walk.out.text()
    edits = sorted(replacements, key=lambda e: (e[0], e[1]))
    previous_end = 0
    for start, end, _ in edits:
        if not 0 <= start <= end <= len(text):
            raise ValueError(f"replacement {start}–{end} is outside the text (0–{len(text)})")
        if start < previous_end:
            raise ValueError(f"replacement at {start} overlaps the one before it")
        previous_end = end
    touched_runs = []
    for start, end, new_text in reversed(edits):
        touched_runs.extend(_apply(walk.pieces, text, start, end, new_text))
    for r in touched_runs:
        if all(child.tag == _w("rPr") for child in r) and r.getparent() is not None:
            r.getparent().remove(r)
    _save_atomically(document, path_out)


def _apply(pieces: list[_Piece], text: str, start: int, end: int, new_text: str) -> list:
    covered = [p for p in pieces if p.out_start < end and p.out_start + p.length > start]
    if start == end:  # pure insertion: the piece holding ``start``, or the one ending there
        covered = [p for p in pieces if p.out_start <= start < p.out_start + p.length]
        covered = covered or [p for p in pieces if p.out_start + p.length == start]
        if not covered:
            raise ValueError(f"nothing to attach an insertion at {start} to")
        covered = covered[:1]
    if sum(min(end, p.out_start + p.length) - max(start, p.out_start) for p in covered) != (
        end - start
    ):
        raise ValueError(
            f"replacement {start}–{end} ({text[start:end]!r}) crosses a paragraph break"
        )
    first, touched = covered[0], []
    for piece in reversed(covered):
        a = max(start, piece.out_start) - piece.out_start
        b = min(end, piece.out_start + piece.length) - piece.out_start
        insert = new_text if piece is first else ""
        if piece is first and piece.symbol_font and insert:
            _insert_plain_run(piece.run_element, insert, before=(a == 0))
            insert = ""
        if piece.kind == "t":
            old = piece.element.text or ""
            if start == end and piece.out_start + piece.length == start:
                a = b = len(old)
            piece.element.text = old[:a] + insert + old[b:]
            piece.element.set(f"{{{_XML_NS}}}space", "preserve")
        elif insert:
            t = piece.element.makeelement(_w("t"), {})
            t.text = insert
            t.set(f"{{{_XML_NS}}}space", "preserve")
            piece.element.addprevious(t)
            if start != end:
                piece.element.getparent().remove(piece.element)
        elif start != end:
            piece.element.getparent().remove(piece.element)
        touched.append(piece.run_element)
        if piece.kind == "t" and not piece.element.text:
            piece.element.getparent().remove(piece.element)
    return touched


def _insert_plain_run(run, new_text: str, before: bool) -> None:
    fresh = run.makeelement(_w("r"), {})
    rpr = run.find(_w("rPr"))
    if rpr is not None:
        rpr = copy.deepcopy(rpr)
        fonts = rpr.find(_w("rFonts"))
        if fonts is not None:
            rpr.remove(fonts)
        fresh.append(rpr)
    t = fresh.makeelement(_w("t"), {})
    t.text = new_text
    t.set(f"{{{_XML_NS}}}space", "preserve")
    fresh.append(t)
    (run.addprevious if before else run.addnext)(fresh)


def _save_atomically(document, path_out) -> None:
    path_out = os.fspath(path_out)
    folder = os.path.dirname(os.path.abspath(path_out))
    fd, tmp = tempfile.mkstemp(prefix=".peakproof-", suffix=".docx", dir=folder)
    os.close(fd)
    try:
        document.save(tmp)
        os.replace(tmp, path_out)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
