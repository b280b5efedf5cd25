"""Positions in the user's text, shared by syntax errors and findings alike."""

from __future__ import annotations

from array import array
from bisect import bisect_right
from typing import Any, NamedTuple

from .records import compared_by_class


class Span:
    """A half-open range ``[start, end)`` of character offsets in the original text.

    ``line`` and ``column`` are 1-based and describe ``start``; ``end_line`` and
    ``end_column`` describe the last character (``end - 1``), or equal ``line``
    and ``column`` for an empty span.  Spans made by a :class:`LineIndex` work out their
    line and column on first use (the parser makes tens of thousands and most are never
    printed); treat spans as immutable.
    """

    __slots__ = ("start", "end", "_where")

    def __init__(self, start: int, end: int, line: int, column: int, end_line: int, end_column: int):
        self.start = start
        self.end = end
        # (line, column, end line, end column), or the LineIndex that works them out on first use
        self._where: tuple[int, int, int, int] | LineIndex = (line, column, end_line, end_column)

    def _lines(self) -> tuple[int, int, int, int]:
        where = self._where
        if not isinstance(where, tuple):  # a LineIndex: resolve once
            where = self._where = where.positions(self.start, self.end)
        return where

    @property
    def line(self) -> int:
        return self._lines()[0]

    @property
    def column(self) -> int:
        return self._lines()[1]

    @property
    def end_line(self) -> int:
        return self._lines()[2]

    @property
    def end_column(self) -> int:
        return self._lines()[3]

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Span):
            return NotImplemented
        return self.start == other.start and self.end == other.end and self._lines() == other._lines()

    def __hash__(self) -> int:
        return hash((self.start, self.end))

    def __repr__(self) -> str:
        line, column, end_line, end_column = self._lines()
        return (f"Span(start={self.start}, end={self.end}, line={line}, column={column}, "
                f"end_line={end_line}, end_column={end_column})")

    def __reduce__(self):
        return (Span, (self.start, self.end, *self._lines()))

    def to_json(self) -> dict[str, int]:
        line, column, end_line, end_column = self._lines()
        return {
            "start": self.start,
            "end": self.end,
            "line": line,
            "column": column,
            "end_line": end_line,
            "end_column": end_column,
        }

    def excerpt(self, text: str) -> str:
        """The text this span covers."""
        return text[self.start : self.end]


_new_object = object.__new__


class LineIndex:
    """Turns offsets into 1-based line and column numbers for one text."""

    __slots__ = ("text", "_starts")

    def __init__(self, text: str):
        self.text = text
        starts = array("q", [0])  # 8 bytes a line: memory stays small on long texts
        find = text.find
        i = find("\n")
        while i != -1:
            starts.append(i + 1)
            i = find("\n", i + 1)
        self._starts = starts

    def line_col(self, offset: int) -> tuple[int, int]:
        row = bisect_right(self._starts, offset) - 1
        return row + 1, offset - self._starts[row] + 1

    def span(self, start: int, end: int) -> Span:
        span = _new_object(Span)
        span.start = start
        span.end = end
        span._where = self
        return span

    def positions(self, start: int, end: int) -> tuple[int, int, int, int]:
        starts = self._starts
        row = bisect_right(starts, start) - 1
        last = end - 1 if end > start else start
        erow = bisect_right(starts, last, row) - 1
        return (row + 1, start - starts[row] + 1, erow + 1, last - starts[erow] + 1)

    def line_text(self, line: int) -> str:
        start = self._starts[line - 1]
        stop = self.text.find("\n", start)
        return self.text[start : stop if stop != -1 else len(self.text)]

    def caret(self, span: Span, width_limit: int = 100) -> str:
        """The source line of ``span`` with a caret line under the characters it names."""
        line = self.line_text(span.line)
        first = span.column - 1
        if span.end_line == span.line:
            length = max(1, span.end_column - span.column + 1) if span.end > span.start else 1
        else:
            length = max(1, len(line) - first)
        # Keep long lines readable: show a window around the span.
        offset = 0
        if len(line) > width_limit:
            offset = max(0, first - width_limit // 3)
            line = ("…" if offset else "") + line[offset : offset + width_limit]
            first = first - offset + (1 if offset else 0)
        pad = "".join("\t" if ch == "\t" else " " for ch in line[:first])
        return f"{line}\n{pad}{'^' * min(length, max(1, len(line) - first))}"


SEVERITIES = ("error", "warning", "note")


@compared_by_class
class Diagnostic(NamedTuple):
    """One problem at one place: a syntax error, a repair, or a rule's finding.

    ``data`` holds the numbers compared (machine-readable, or None), ``suggestion`` an
    optional machine-readable fix: ``{"span": Span, "replacement": str}`` or
    richer structures a rule documents.
    """

    rule: str
    severity: str
    message: str
    span: Span
    code: str = ""
    expected: tuple[str, ...] = ()
    hint: str = ""
    data: dict[str, Any] | None = None  # None when the finding carries no numbers
    suggestion: dict[str, Any] | None = None

    def to_json(self) -> dict[str, Any]:
        out: dict[str, Any] = {
            "rule": self.rule,
            "code": self.code,
            "severity": self.severity,
            "message": self.message,
            "line": self.span.line,
            "column": self.span.column,
            "span": self.span.to_json(),
        }
        if self.expected:
            out["expected"] = list(self.expected)
        if self.hint:
            out["hint"] = self.hint
        if self.data:
            out["data"] = _jsonable(self.data)
        if self.suggestion is not None:
            out["suggestion"] = _jsonable(self.suggestion)
        return out


def _jsonable(value: Any) -> Any:
    if hasattr(value, "to_json"):  # spans and model records (which are tuples too)
        return value.to_json()
    if isinstance(value, dict):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    return value
