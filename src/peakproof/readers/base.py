"""What every reader returns: plain text plus a compact map back to the original's own terms."""

from __future__ import annotations

import re
from bisect import bisect_right
from collections.abc import Callable, Hashable
from typing import Any, NamedTuple

from ..records import compared_by_class

FORMATS = ("txt", "md", "tex", "docx", "pdf")


class ReaderError(ValueError):
    """A file could not be read; ``message`` says what, ``hint`` what to do about it."""

    def __init__(self, message: str, hint: str = "", name: str = ""):
        self.message = message
        self.hint = hint
        self.name = name
        super().__init__(str(self))

    def __str__(self) -> str:
        where = f"{self.name}: " if self.name else ""
        tail = f" {self.hint}" if self.hint else ""
        return f"{where}{self.message}.{tail}"


@compared_by_class
class Location(NamedTuple):
    """A place in the original document, in that format's own terms (all numbers 1-based,
    except ``offset_in_run``, which counts characters from the start of the run's text).

    In a Word table cell ``paragraph`` counts the cell's own paragraphs, as a reader looking
    at the cell would, and ``document_paragraph`` holds the paragraph's number in the whole
    document; elsewhere ``paragraph`` is that number itself.  ``to_json()`` always gives a
    Word location's ``document_paragraph``."""

    format: str
    line: int | None = None
    column: int | None = None
    page: int | None = None
    paragraph: int | None = None
    run: int | None = None
    offset_in_run: int | None = None
    table: int | None = None
    row: int | None = None
    cell: int | None = None
    document_paragraph: int | None = None

    def describe(self) -> str:
        if self.format == "docx":
            parts = []
            if self.table is not None:
                parts.append(f"table {self.table}, row {self.row}, cell {self.cell}")
                parts.append(f"paragraph {self.paragraph} of the cell")
            else:
                parts.append(f"paragraph {self.paragraph}")
            if self.run is not None:
                parts.append(f"run {self.run}")
            return ", ".join(parts)
        if self.format == "pdf":
            return f"page {self.page}, line {self.line}"
        return f"line {self.line}, column {self.column}"

    def to_json(self) -> dict[str, Any]:
        out = {k: v for k, v in zip(self._fields, self) if v is not None}
        if self.format == "docx" and self.paragraph is not None:
            out.setdefault("document_paragraph", self.paragraph)  # outside cells: the same
        return out


class OffsetMap:
    """Output offsets → (key, position in the original) as sorted segment starts.

    A *linear* segment copies the original character for character, so a position inside it
    is the segment's source start plus the distance; a non-linear segment (a replacement such
    as ``\\delta`` → ``δ``) maps all its characters to the start of what it replaced.
    Adjacent linear segments that continue one another are merged, so plain text costs one
    segment per line or less.
    """

    __slots__ = ("_out", "_key", "_src", "_linear")

    def __init__(self) -> None:
        self._out: list[int] = []
        self._key: list[Hashable] = []
        self._src: list[int] = []
        self._linear: list[bool] = []

    def add(self, out_start: int, out_len: int, key: Hashable, src: int, linear: bool) -> None:
        if out_len <= 0:
            return
        if linear and self._out and self._linear[-1] and self._key[-1] == key:
            if self._src[-1] + (out_start - self._out[-1]) == src:
                return
        self._out.append(out_start)
        self._key.append(key)
        self._src.append(src)
        self._linear.append(linear)

    def lookup(self, offset: int) -> tuple[Hashable, int]:
        if not self._out:
            return None, 0
        i = max(0, bisect_right(self._out, offset) - 1)
        delta = offset - self._out[i] if self._linear[i] else 0
        return self._key[i], self._src[i] + delta

    def __len__(self) -> int:
        return len(self._out)


class TextBuilder:
    """Collects output text piece by piece while recording where each piece came from."""

    __slots__ = ("_parts", "length", "map")

    def __init__(self) -> None:
        self._parts: list[str] = []
        self.length = 0
        self.map = OffsetMap()

    def copy(self, text: str, src: int, key: Hashable = 0) -> None:
        """Append ``text`` that is the original's characters starting at ``src``."""
        self._append(text, key, src, True)

    def put(self, text: str, src: int, key: Hashable = 0) -> None:
        """Append ``text`` that stands for whatever begins at ``src`` (a replacement)."""
        self._append(text, key, src, len(text) == 1)

    def _append(self, text: str, key: Hashable, src: int, linear: bool) -> None:
        if not text:
            return
        self.map.add(self.length, len(text), key, src, linear)
        self._parts.append(text)
        self.length += len(text)

    def tail(self, n: int = 2) -> str:
        out = ""
        for part in reversed(self._parts):
            out = part + out
            if len(out) >= n:
                break
        return out[-n:]

    def text(self) -> str:
        joined = "".join(self._parts)
        self._parts = [joined]
        return joined


_NEWLINE = re.compile(r"\r\n|\r|\n")


def line_starts(text: str) -> list[int]:
    """Offsets where lines begin; CRLF, CR and LF all end a line, as editors count them."""
    return [0] + [m.end() for m in _NEWLINE.finditer(text)]


class SourceText:
    """Plain Unicode text for the parser, and a way back to the original document (read-only).

    ``notes`` tells the user about choices the reader made (e.g. an assumed encoding).
    """

    __slots__ = ("text", "format", "name", "notes", "_locator")
    text: str
    format: str
    name: str
    notes: tuple[str, ...]

    def __init__(self, text: str, format: str, name: str = "", notes: tuple[str, ...] = (),
                 locator: Callable[[int], Location] | None = None):
        for attr, value in zip(self.__slots__, (text, format, name, notes, locator)):
            object.__setattr__(self, attr, value)

    def __setattr__(self, attr: str, value: object) -> None:
        raise AttributeError(f"SourceText is read-only (cannot set {attr!r})")

    def __reduce__(self):
        return (SourceText, (self.text, self.format, self.name, self.notes, self._locator))

    def _key(self) -> tuple:
        return (self.text, self.format, self.name, self.notes)  # the locator is not compared

    def __eq__(self, other: object) -> bool:
        return type(other) is SourceText and self._key() == other._key()

    def __hash__(self) -> int:
        return hash(self._key())

    def __repr__(self) -> str:
        return (f"SourceText(text={self.text!r}, format={self.format!r}, name={self.name!r}, "
                f"notes={self.notes!r})")

    def locate(self, offset: int) -> Location:
        """Where ``offset`` in :attr:`text` came from in the original file."""
        if not 0 <= offset <= len(self.text):
            raise IndexError(f"offset {offset} is outside the text (length {len(self.text)})")
        return self._locator(offset)


class LineColumnLocator:
    """Locator for text formats: output offset → original offset → line and column."""

    __slots__ = ("_map", "_starts", "_format")

    def __init__(self, offset_map: OffsetMap, original: str, fmt: str):
        self._map = offset_map
        self._starts = line_starts(original)
        self._format = fmt

    def __call__(self, offset: int) -> Location:
        _, src = self._map.lookup(offset)
        row = bisect_right(self._starts, src) - 1
        return Location(self._format, line=row + 1, column=src - self._starts[row] + 1)
