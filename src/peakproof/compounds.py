"""Associate each data block with its compound: the label or heading before it, and its formula.

Looked for in the text between the previous block and this one, nearest first:

1. a heading line: Markdown ``#``, or a short line ending in a label (``… benzoate (12)``,
   optionally followed by the compound's formula: ``(12), C10H9NO2`` or ``(12; C10H9NO2)``);
   a ``#`` heading without a label names the compound by its title;
2. ``compound 12`` / ``product 3a`` in the text;
3. a label in parentheses in the sentence that introduces the block (``… benzoate (12):``);
4. a title standing alone on its line right before the block (``Methyl benzoate``).

The formula is one written by the name (in the heading, or right after the label), else the
elemental analysis formula.  The HRMS ion formula is left to the checker, which knows the
adduct to take away.
"""

from __future__ import annotations

import re

from .lazyre import lazy
from .span import LineIndex

_LABEL_TEXT = r"\d{1,3}[a-z]?['′]?|[IVX]{1,5}[a-z]?|S\d{1,3}[a-z]?"
_FORMULA_TEXT = r"C\d{1,3}H\d{0,3}(?:[A-Z][a-z]?\d{0,3})*"
# The title is taken greedily (fast) and its trailing blanks stripped where it is read.
_HEADING = re.compile(r"^[ \t]*(?:#{1,6}[ \t]+)?(?P<title>\S[^\n]{0,200})[ \t]*$", re.M)
# "(12)", "(12), C10H9NO2", "(12; C10H9NO2)", at the end of a heading line
_LABEL_AT_END = re.compile(
    rf"\((?P<label>{_LABEL_TEXT})(?:\s*[;,]\s*(?P<inner>{_FORMULA_TEXT}))?\)"
    rf"(?:\s*[,:;]?\s*\(?(?P<after>{_FORMULA_TEXT})\)?)?\s*[.:]?\s*$"
)
_FORMULA_AT_END = lazy(rf"[\s,:;(]+(?P<formula>{_FORMULA_TEXT})\)?\s*[.:]?\s*$")
# "\b" before the word, checked behind its first letter so a search skips along by that letter.
_COMPOUND_WORD = lazy(r"[CcPp](?<!\w.)(?:(?<=[Cc])ompound|(?<=[Pp])roduct)\s+(?P<label>\d{1,3}[a-z]?)\b")
_LABEL_IN_SENTENCE = lazy(
    rf"\((?P<label>\d{{1,3}}[a-z]?)(?:\s*[;,]\s*(?P<inner>{_FORMULA_TEXT}))?\)"
    rf"(?:\s*[,:;]?\s*\(?(?P<after>{_FORMULA_TEXT})\)?(?![\w(]))?"
)
_MAX_TITLE = 160


def compound_of(text: str, floor: int, start: int, index: LineIndex, analyses=()):
    """``(compound, compound_span, formula)`` for a block starting at ``start``, from the text
    since ``floor`` (the previous block's end); the formula falls back to the block's EA."""
    found = _compound_before(text[floor:start])
    formula = found.formula if found else None
    if formula is None and analyses and analyses[0].formula:
        formula = analyses[0].formula
    if found is None:
        return None, None, formula
    return found.name, index.span(floor + found.start, floor + found.end), formula


class _Found:
    __slots__ = ("name", "start", "end", "formula")

    def __init__(self, name: str, start: int, end: int, formula: str | None = None):
        self.name, self.start, self.end, self.formula = name, start, end, formula


def _compound_before(before: str) -> _Found | None:
    """The nearest heading or label before a block; offsets are in ``before``."""
    for m in reversed(list(_HEADING.finditer(before))):
        title = m.group("title").rstrip(" \t")
        if len(title) > _MAX_TITLE:
            continue
        label = _LABEL_AT_END.search(title)
        if label:
            start = m.start("title") + label.start("label")
            formula = label.group("inner") or label.group("after")
            return _Found(label.group("label"), start, start + len(label.group("label")), formula)
        if before[m.start() : m.end()].lstrip().startswith("#"):
            return _titled(title, m.start("title"))
    word = None
    for word in _COMPOUND_WORD.finditer(before):  # noqa: B007 (the last match is the one wanted)
        pass
    if word:
        return _Found(word.group("label"), word.start("label"), word.end("label"))
    sentence = None
    for sentence in _LABEL_IN_SENTENCE.finditer(before):  # noqa: B007 (the last match is wanted)
        pass
    if sentence:
        formula = sentence.group("inner") or sentence.group("after")
        label = sentence.group("label")
        return _Found(label, sentence.start("label"), sentence.end("label"), formula)
    return _standalone_title(before)


def _titled(title: str, start: int) -> _Found:
    """A heading without a label: its title is the name, less a formula written after it."""
    formula = None
    at_end = _FORMULA_AT_END.search(title)
    if at_end and at_end.start() > 0:
        formula = at_end.group("formula")
        title = title[: at_end.start()]
    name = title.rstrip(" .:;,")
    return _Found(name, start, start + len(name), formula)


def _standalone_title(before: str) -> _Found | None:
    """The line right before the block when it reads as a title: short, alone in its
    paragraph (a blank line or nothing above it), no sentence-ending full stop."""
    stripped = before.rstrip(" \t")
    if not stripped.endswith("\n"):
        return None  # the block starts mid-line: no title line right before it
    body = stripped[:-1].rstrip("\r")
    line_start = max(body.rfind("\n") + 1, 0)
    line = body[line_start:]
    above = body[:line_start]
    if above.strip() and not re.search(r"\n[ \t\r]*\n[ \t\r]*$", above):
        return None  # part of a longer paragraph
    title = line.strip()
    if not title or len(title) > _MAX_TITLE or title.endswith((".", ";")):
        return None
    if not re.search(r"[A-Za-z]{3}", title):
        return None
    return _titled(title, line_start + (len(line) - len(line.lstrip())))
