"""Diagnostics for people: ``path:line:column: severity rule message`` with the excerpt and a caret."""

from __future__ import annotations

from .span import LineIndex


def diagnostic_lines(source, diagnostics, *, show_source: bool = True):
    """Yield printable lines for each diagnostic; positions in the original's own terms."""
    index = LineIndex(source.text)
    for d in diagnostics:
        where = f"{d.span.line}:{d.span.column}"
        located = source.locate(d.span.start) if source.reader is not None else None
        if located is not None and getattr(source, "format", "txt") in ("docx", "pdf"):
            where = located.describe()
        elif located is not None and getattr(located, "line", None):
            where = f"{located.line}:{located.column}"
        yield f"{source.name}:{where}: {d.severity} {d.rule} {d.message}"
        if show_source:
            for line in index.caret(d.span).splitlines():
                yield f"    {line}"
            if d.expected:
                yield "    expected: " + "; ".join(d.expected[:6])
            if d.hint:
                yield f"    hint: {d.hint}"
