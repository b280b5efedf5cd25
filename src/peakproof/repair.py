"""Repair the damage PDFs and word processors do to data text, and say what was repaired.

Every repair keeps a map from the repaired text back to the original offsets, so positions
reported later still point at what the user sees.
"""

from __future__ import annotations

import re
from typing import NamedTuple

from .lazyre import lazy
from .records import compared_by_class

# One-for-one substitutions: no offset shift.
_SPACES = "\u00a0\u2000\u2001\u2002\u2003\u2004\u2005\u2006\u2007\u2008\u2009\u200a\u202f\u205f\u3000"
_SAME_LENGTH = str.maketrans({**{c: " " for c in _SPACES}, "\u2010": "-", "\u2011": "-", "\t": " "})
_DELETED = "\u00ad\u200b\u200c\u200d\u2060\ufeff"
_LIGATURES = {"ﬀ": "ff", "ﬁ": "fi", "ﬂ": "fl", "ﬃ": "ffi", "ﬄ": "ffl", "ﬅ": "st", "ﬆ": "st"}
# Anything repair() might change: an odd character, a stray "d" for δ, or "J )" for "J =".  Written
# as one character class first, then what must follow a "d" or a "J", so the search skips along
# the text by the class alone (several times faster than the plain alternation on clean blocks).
_NEEDS_WORK = re.compile(
    "[" + _SPACES + _DELETED + "".join(_LIGATURES) + "\u2010\u2011\t\n\r¼dJ]"
    "(?:(?<=d)(?<![A-Za-z]d)(?=[ HC]?\\s?[=(]|\\s+[-−]?\\d)|(?<=J)\\s?\\)\\s?\\d|(?<![dJ]))"
)

# "J ¼ 7.1" — the equals sign came out as the ¼ glyph.
_QUARTER = lazy(r"¼")
# "J ) 7.1" — the equals sign came out as a parenthesis.
_PAREN_EQ = lazy(r"(J[A-Za-z(),–\-]{0,6}\s?)\)(\s?\d)")
# A stray "d" for δ: after the header's parenthesis or colon, or as "dH (…".
_STRAY_DELTA = lazy(
    r"(NMR\s*(?:\([^()]*(?:\([^()]*\)[^()]*)*\))?\s*:?\s*)d(\s*(?:\(ppm\))?\s*[=:]?\s*[-−+]?\d)"
    r"|(NMR\s*)d(\s?\()"
    r"|((?:^|[;.]\s)\s*)d([HCF]\s?\()"
)


@compared_by_class
class Repair(NamedTuple):
    """One kind of repair made in a block: where (original offsets) and what."""

    kind: str
    start: int
    end: int
    message: str


class Repaired:
    """Repaired text plus a map from its offsets to offsets in the original text."""

    __slots__ = ("text", "offsets", "repairs")

    def __init__(self, text: str, offsets: list[int] | None, repairs: list[Repair]):
        self.text = text
        self.offsets = offsets  # None: identity
        self.repairs = repairs

    def original(self, i: int) -> int:
        if self.offsets is None:
            return i
        if i >= len(self.offsets):
            return self.offsets[-1] + (i - len(self.offsets) + 1)
        return self.offsets[i]

    def original_end(self, i: int) -> int:
        """Original offset just after repaired character ``i - 1``."""
        if i <= 0:
            return self.original(0)
        return self.original(i - 1) + 1


def normalize_for_locating(text: str) -> Repaired:
    """Remove invisible characters and expand ligatures document-wide, so the locator sees words
    whole ("Elem\u00adental analysis"); the offset map leads back to the original."""
    if not any(c in text for c in _DELETED) and not any(c in text for c in _LIGATURES):
        return Repaired(text, None, [])
    chars: list[str] = []
    offsets: list[int] = []
    for i, ch in enumerate(text):
        if ch in _DELETED:
            continue
        rep = _LIGATURES.get(ch, ch)
        for r in rep:
            chars.append(r)
            offsets.append(i)
    return Repaired("".join(chars), offsets, [])


def repair(text: str) -> Repaired:
    """Repair one block of text.  Fast path: nothing to do, nothing copied."""
    if not _NEEDS_WORK.search(text):
        return Repaired(text, None, [])
    repairs: list[Repair] = []
    offsets: list[int] | None = None
    out = text

    # Deletions and expansions change length: build the offset map.
    if any(c in text for c in _DELETED) or any(c in text for c in _LIGATURES):
        chars: list[str] = []
        offsets = []
        soft = lig = 0
        first_soft = first_lig = -1
        for i, ch in enumerate(text):
            if ch in _DELETED:
                soft += 1
                first_soft = i if first_soft < 0 else first_soft
                continue
            rep = _LIGATURES.get(ch)
            if rep:
                lig += 1
                first_lig = i if first_lig < 0 else first_lig
                for r in rep:
                    chars.append(r)
                    offsets.append(i)
                continue
            chars.append(ch)
            offsets.append(i)
        out = "".join(chars)
        if soft:
            repairs.append(Repair("invisible-characters", first_soft, first_soft + 1,
                                  f"removed {soft} soft hyphen(s) or zero-width character(s)"))
        if lig:
            repairs.append(Repair("ligature", first_lig, first_lig + 1,
                                  f"expanded {lig} typographic ligature(s) (ﬁ → fi)"))

    def where(i: int) -> int:
        return offsets[i] if offsets is not None else i

    # Same-length substitutions.
    translated = out.translate(_SAME_LENGTH)
    if translated != out:
        n = sum(1 for a, b in zip(out, translated) if a != b and a != "\t")
        if n:
            first = next(i for i, (a, b) in enumerate(zip(out, translated)) if a != b and a != "\t")
            repairs.append(Repair("special-spaces", where(first), where(first) + 1,
                                  f"normalised {n} non-breaking/thin space(s) or hyphen glyph(s)"))
        out = translated
    if "\n" in out or "\r" in out:
        out = out.replace("\r", " ").replace("\n", " ")

    if "¼" in out:
        hits = [m.start() for m in _QUARTER.finditer(out)]
        out = out.replace("¼", "=")
        repairs.append(Repair("equals-glyph", where(hits[0]), where(hits[0]) + 1,
                              f"read {len(hits)} '¼' as '=' (a PDF font artefact)"))
    m = _PAREN_EQ.search(out)
    if m:
        hits = []
        def fix(mm):
            hits.append(mm.start(0) + len(mm.group(1)))
            return mm.group(1) + "=" + mm.group(2)
        out = _PAREN_EQ.sub(fix, out)
        repairs.append(Repair("equals-glyph", where(hits[0]), where(hits[0]) + 1,
                              f"read {len(hits)} ')' after J as '=' (a PDF font artefact)"))
    if "d" in out:
        hits = []
        def fix_delta(mm):
            for g in (1, 3, 5):
                if mm.group(g) is not None:
                    hits.append(mm.start(g) + len(mm.group(g)))
                    return mm.group(g) + "δ" + mm.group(g + 1)
            return mm.group(0)
        new = _STRAY_DELTA.sub(fix_delta, out)
        if hits:
            out = new
            repairs.append(Repair("delta-glyph", where(hits[0]), where(hits[0]) + 1,
                                  f"read {len(hits)} stray 'd' as 'δ' (a PDF font artefact)"))
    return Repaired(out, offsets, repairs)
