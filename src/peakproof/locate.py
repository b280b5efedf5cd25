"""Find the data blocks in running prose.

A block starts at an NMR header, a subscripted δ, an HRMS or elemental-analysis item (reaching back
over items such as mp or Rf written just before it in the same sentence) and runs to the end of
the last data item: a blank line, a heading, or a full stop followed by a sentence of prose.
"""

from __future__ import annotations

import re
from typing import NamedTuple

from .records import compared_by_class

_SUP = "\u00b9\u00b2\u00b3\u2070\u2074-\u2079"
# Each alternative's first character is consumed by one leading class (so a search skips along
# the text by that class alone), and what must come before it is checked behind it:
# "(?<![\w.].)" after one character says what "(?<![\w.])" said before it.
CORE_START = re.compile(
    rf"[\d{_SUP}δdHAEM](?:"
    rf"(?<![\w.].)(?:(?<=\d)\d{{0,2}}|(?<=[{_SUP}])[{_SUP}]{{0,2}})\s?[A-Z][a-z]?\s?(?:\{{[^{{}}()]{{1,30}}\}}|\[[^\[\]]{{1,30}}\])?\s?(?:-\s?)?NMR(?![A-Za-z])"
    r"|(?<!\w.)(?<=[δd])\s?_?\{?[HCF]\}?\s?\((?=[^()]{0,60}MHz)"
    r"|(?<!\w.)(?<=H)(?:R|igh[\s\-]resolution\s)\s?-?\s?(?:(?:ESI|EI|CI|APCI|APPI|FAB|MALDI|DART|FD)\s?-?\s?)?(?:Q-?TOF\s?-?\s?|TOF\s?-?\s?)?MS(?![A-Za-z])"
    r"|(?<!\w.)(?<=A)nal(?:ysis)?\.\s*(?:[Cc]alc|[Ff]ound)"
    r"|(?<!\w.)(?:(?<=E)lemental\s+[Aa]nalysis|(?<=M)icroanalysis)\b"
    r")"
)
OTHER_START = re.compile(
    r"(?:^|(?<=\n)|(?<=[;,.]\s)|(?<=[;,]))[ \t]*"
    r"(?:(?:IR|FT-?IR|ATR-?IR|FTIR|mp|m\.p\.|Mp|M\.p\.|M\.P\.|MP|bp|b\.p\.|Rf|R_f|TLC|UV(?:[/\-]vis)?|LRMS|MS|GC-?MS|LC-?MS|HPLC|Yield|Optical rotation|Specific rotation)(?![A-Za-z])|\[α\]|ν(?:max)?|λmax)"
)
_SENTENCE_BREAK = re.compile(
    r"\.\s+|\n[ \t]*\n\s*|\n(?=[ \t]*(?:" + OTHER_START.pattern[OTHER_START.pattern.index("(?:(?:"):] + "))"
)
_CONTINUE_WORDS = re.compile(
    r"(?:Found|Calcd|Calc|Anal|Elemental|HRMS|HR|IR|FT|ATR|Rf|R_f|UV|MS|LRMS|Mp|M\.p|MP|TLC|HPLC|Microanalysis|Optical|Specific)(?![a-z])"
)
_HEADING_LINE = re.compile(r"\n[ \t]*(?:#{1,6}\s|\\(?:sub)*section|\*\*[A-Z0-9])")
_LOOKS_LIKE_DATA = re.compile(r".{0,120}?(?:[δ=]|\bd\s*[-−+]?\d|[-−+]?\d+(?:[.,]\d+)?\s*(?:\(|,|;|$))", re.S)
MARKER = re.compile(r"peakproof:\s*ignore\s+([A-Za-z0-9_\-]+(?:\s*,\s*[A-Za-z0-9_\-]+)*)")


@compared_by_class
class Located(NamedTuple):
    """A block's offsets in the document, and what the writer said about it."""

    start: int
    end: int
    suppressed: tuple[str, ...] = ()


def iter_locate(text: str):
    """Yield the data blocks of ``text`` one by one (constant memory on long texts)."""
    pos = 0
    n = len(text)
    previous_end = 0
    while pos < n:
        m = CORE_START.search(text, pos)
        if not m:
            break
        if m.group(0).endswith("NMR") and not _LOOKS_LIKE_DATA.match(text, m.end()):
            pos = m.end()
            continue  # "the 1H NMR spectrum showed…": prose, not data
        start = _reach_back(text, m.start(), previous_end)
        end = _block_end(text, m.start())
        if end <= m.start():
            pos = m.end()
            continue
        yield Located(start, end, _markers(text, previous_end, end))
        previous_end = end
        pos = end


def _reach_back(text: str, core: int, floor: int) -> int:
    """Include other items (mp, Rf, IR…) written before the core item: earlier in its sentence,
    or as whole sentences of their own just before it ("Rf 0.31 (…); mp 77–79 °C. 1H NMR …")."""
    start = core
    while True:
        window_start = max(floor, start - 400)
        sentence_start = window_start
        for m in _SENTENCE_BREAK.finditer(text, window_start, max(window_start, start - 1)):
            sentence_start = m.end()
        first = None
        for m in OTHER_START.finditer(text, sentence_start, start):
            first = m.start() + (len(m.group(0)) - len(m.group(0).lstrip()))
            break
        if first is None:
            return start
        if text[sentence_start:first].strip() or first == start:
            return first  # prose, then items: the block starts at the first item
        start = first  # a whole sentence of items: look at the sentence before it too
        if start <= floor:
            return start


# From a position to the next character that matters for a block's end: everything else is
# passed in one possessive step, including a bracketed group without brackets or line breaks
# inside (it leaves the depth as it was) and a full stop followed by anything but white space
# (a decimal point, "m.p."), which never ends a block.
_NEXT_SIGNIFICANT = re.compile(
    r"(?:[^()\[\]{}\n.]+|\.(?=\S)|\([^()\[\]{}\n]*\)|\[[^()\[\]{}\n]*\]|\{[^()\[\]{}\n]*\})*+"
    r"([()\[\]{}\n.])"
)


def _block_end(text: str, start: int) -> int:
    """Where the block that starts at ``start`` ends (jumping between the characters that matter)."""
    depth = 0
    n = len(text)
    stop = n
    pos = start
    next_significant = _NEXT_SIGNIFICANT.match
    while (m := next_significant(text, pos)) is not None:
        i = m.start(1)
        pos = i + 1
        ch = text[i]
        if ch in "([{":
            depth += 1
        elif ch in ")]}":
            depth = max(0, depth - 1)
        elif ch == "\n":
            j = i + 1
            while j < n and text[j] in " \t\r":
                j += 1
            if j < n and text[j] == "\n" or _HEADING_LINE.match(text, i):
                stop = i
                break
        elif depth == 0:  # a full stop
            j = i + 1
            if j >= n:
                return n
            if text[j] in " \t\r\n":
                k = j
                while k < n and text[k] in " \t\r\n":
                    k += 1
                if k >= n:
                    return i + 1
                if text[k].isupper() and not (CORE_START.match(text, k) or _CONTINUE_WORDS.match(text, k)):
                    return i + 1
    return len(text[:stop].rstrip()) if stop > start else start


def _markers(text: str, floor: int, end: int) -> tuple[str, ...]:
    names: list[str] = []
    for m in MARKER.finditer(text, floor, end):
        names.extend(n.strip() for n in m.group(1).split(","))
    return tuple(names)
