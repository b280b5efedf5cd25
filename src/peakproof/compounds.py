"""Associate each data block with its compound: the label or heading before it, and its formula."""

from __future__ import annotations

import re
from dataclasses import replace

from .model import Block
from .span import LineIndex

_HEADING = re.compile(r"^[ \t]*(?:#{1,6}[ \t]+)?(?P<title>\S[^\n]{0,200}?)[ \t]*$", re.M)
_LABEL = re.compile(r"\((?P<label>\d{1,3}[a-z]?|[IVX]{1,5}[a-z]?|S?\d{1,3}[a-z]?['′]?)\)\s*[.:]?\s*$")
_COMPOUND_WORD = re.compile(r"\b(?:[Cc]ompound|[Pp]roduct)\s+(?P<label>\d{1,3}[a-z]?)\b")
_FORMULA_NEAR = re.compile(r"\b(?:C\d{1,3}H\d{1,3}(?:[A-Z][a-z]?\d{0,3})*)\b")


def attach_compounds(text: str, blocks: list[Block], index: LineIndex) -> list[Block]:
    """Fill ``compound`` (label or name) and ``formula`` for each block from the text before it."""
    out = []
    floor = 0
    for block in blocks:
        before = text[floor : block.span.start]
        compound, c_start, c_end = _compound_before(before)
        formula = None
        if block.analyses and block.analyses[0].formula:
            formula = block.analyses[0].formula
        if compound is not None:
            c_span = index.span(floor + c_start, floor + c_end)
            out.append(replace(block, compound=compound, compound_span=c_span, formula=formula))
        else:
            out.append(replace(block, formula=formula))
        floor = block.span.end
    return out


def _compound_before(before: str) -> tuple[str | None, int, int]:
    """The nearest heading or label before a block, as (name, start, end) in ``before``."""
    # Prefer a heading line (Markdown '#', or a short line ending in a label like "(12)").
    lines = list(_HEADING.finditer(before))
    for m in reversed(lines):
        title = m.group("title").strip()
        raw = before[m.start() : m.end()]
        if raw.lstrip().startswith("#") or (_LABEL.search(title) and len(title) < 160):
            label = _LABEL.search(title)
            name = label.group("label") if label else title.lstrip("#").strip()
            start = m.start("title") + (label.start("label") if label else 0)
            end = start + len(name)
            return name, start, end
    m = None
    for m in _COMPOUND_WORD.finditer(before):
        pass
    if m:
        return m.group("label"), m.start("label"), m.end("label")
    # A label in parentheses right after a name in the sentence that introduces the block.
    for m in reversed(list(re.finditer(r"\((\d{1,3}[a-z]?)\)", before))):
        return m.group(1), m.start(1), m.end(1)
    return None, 0, 0
