"""Diagnostics for people: ``path:line:column: severity rule message`` with the excerpt and a caret."""

from __future__ import annotations

from .span import LineIndex


def _compound_finder(document):
    """offset → "compound 12: " for the block holding it (empty when the block has no label)."""
    if document is None:
        return lambda offset: ""
    from bisect import bisect_right

    starts = [b.span.start for b in document.blocks]

    def find(offset: int) -> str:
        i = bisect_right(starts, offset) - 1
        if i >= 0:
            block = document.blocks[i]
            if block.compound and offset <= block.span.end:
                return f"compound {block.compound}: "
        return ""

    return find


def diagnostic_lines(source, diagnostics, *, show_source: bool = True, document=None):
    """Yield printable lines for each diagnostic; positions in the original's own terms.
    With ``document``, messages start with the compound they concern ("compound 12: …")."""
    index = LineIndex(source.text)
    compound_of = _compound_finder(document)
    for d in diagnostics:
        where = f"{d.span.line}:{d.span.column}"
        located = source.locate(d.span.start) if source.reader is not None else None
        if located is not None and getattr(source, "format", "txt") in ("docx", "pdf"):
            where = located.describe()
        elif located is not None and getattr(located, "line", None):
            where = f"{located.line}:{located.column}"
        yield f"{source.name}:{where}: {d.severity} {d.rule} {compound_of(d.span.start)}{d.message}"
        if show_source:
            for line in index.caret(d.span).splitlines():
                yield f"    {line}"
            if d.expected:
                yield "    expected: " + "; ".join(d.expected[:6])
            if d.hint:
                yield f"    hint: {d.hint}"


def finding_lines(source, diagnostics, *, show_source: bool = True, document=None):
    """Like :func:`diagnostic_lines`, plus each finding's suggested fix when it has one."""
    diagnostics = list(diagnostics)
    lines = diagnostic_lines(source, diagnostics, show_source=show_source, document=document)
    if not show_source:
        yield from lines
        return
    per = iter(diagnostics)
    current = None
    for line in lines:
        if not line.startswith("    "):
            if current is not None and current.suggestion:
                yield f"    suggestion: {current.suggestion.get('description', '')}"
            current = next(per)
        yield line
    if current is not None and current.suggestion:
        yield f"    suggestion: {current.suggestion.get('description', '')}"


def summary_line(counts: dict[str, int], files: int) -> str:
    parts = [f"{counts.get(s, 0)} {s}{'s' if counts.get(s, 0) != 1 else ''}" for s in ("error", "warning", "note")]
    return f"{files} file(s) checked: " + ", ".join(parts)


def apply_suggestion(text: str, suggestion: dict) -> str:
    """``text`` with one suggestion's replacements applied (right to left, offsets unchanged)."""
    for edit in sorted(suggestion.get("replace", ()), key=lambda e: (e["start"], e["end"]), reverse=True):
        text = text[: edit["start"]] + edit["text"] + text[edit["end"] :]
    return text
