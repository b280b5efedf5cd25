"""Turn a clean characterization block into the text a PDF extractor typically gives back.

The damage imitates what copying from typeset PDFs does (common practice; see the
"What goes wrong" list in the project's trade guide): the Symbol-font ``=`` comes out as
``¼`` and ``δ`` as ``d``; superscript mass numbers lose their attachment (``13 C NMR``);
ligature glyphs replace ``fi``/``fl``/``ff`` in words; spaces become no-break or thin spaces;
soft hyphens are left in long words; lines break inside the paragraph.

Every change keeps the data: digits, their order and the signs of numbers are untouched, so
a parser that repairs the damage must return the same projection as for the clean text.
"""

from __future__ import annotations

import random
import re
import zlib
from dataclasses import dataclass

#: Kinds of damage that a parser can only read correctly by repairing, and so should note.
REPAIRED_KINDS = frozenset({"equals-as-frac", "delta-as-d", "detached-mass-number"})

_LIGATURES = (("ffi", "\ufb03"), ("ffl", "\ufb04"), ("ff", "\ufb00"), ("fi", "\ufb01"), ("fl", "\ufb02"))
_ODD_SPACES = ("\u00a0", "\u2009", "\u202f")
_HEADER = re.compile(
    r"(?<![\w.])(?P<mass>1|2|11|13|15|19|29|31|77|119|195)(?P<el>H|B|C|N|F|Si|P|Se|Sn|Pt)"
    r"(?P<dec>\{(?P<dmass>1|19)(?P<del>H|F)\})?(?P<tail>\s*-?NMR)"
)
_WORD = re.compile(r"(?<![\w\-])[A-Za-z]+(?![\w\-])")


@dataclass(frozen=True)
class Damaged:
    text: str
    kinds: tuple[str, ...]  # what was done, in the order applied

    @property
    def needs_repair(self) -> bool:
        return bool(REPAIRED_KINDS.intersection(self.kinds))


def _detach_mass_numbers(text: str) -> str:
    def fix(m: re.Match) -> str:
        out = f"{m['mass']} {m['el']}"
        if m["dec"]:
            out += "{" + f"{m['dmass']} {m['del']}" + "}"
        return out + m["tail"]

    return _HEADER.sub(fix, text)


def _ligate(text: str) -> str:
    def fix(m: re.Match) -> str:
        word = m.group(0)
        if len(word) < 4:
            return word
        for plain, glyph in _LIGATURES:
            word = word.replace(plain, glyph)
        return word

    return _WORD.sub(fix, text)


def _soft_hyphens(text: str, rng: random.Random) -> str:
    def fix(m: re.Match) -> str:
        word = m.group(0)
        if len(word) < 7 or rng.random() < 0.4:
            return word
        cut = rng.randint(3, len(word) - 3)
        return word[:cut] + "\u00ad" + word[cut:]

    return _WORD.sub(fix, text)


def _odd_spaces(text: str, rng: random.Random) -> str:
    return "".join(
        rng.choice(_ODD_SPACES) if ch == " " and rng.random() < 0.3 else ch for ch in text
    )


def _line_breaks(text: str, rng: random.Random) -> str:
    # Break after a comma or semicolon that separates items, never inside a number.
    spots = [m.start() + 1 for m in re.finditer(r"[,;] (?=\S)", text)]
    if not spots:
        return text
    chosen = set(rng.sample(spots, k=min(len(spots), rng.randint(1, 3))))
    return "".join("\n" if i in chosen else ch for i, ch in enumerate(text))


def damage(text: str, seed: str) -> Damaged:
    """The PDF-damaged twin of ``text``; the same ``seed`` always gives the same damage.

    At least one repair-requiring change (``REPAIRED_KINDS``) is made whenever the text
    offers a place for one (an ``=``, a ``δ`` or an NMR header).
    """
    rng = random.Random(zlib.crc32(seed.encode("utf-8")))
    kinds: list[str] = []
    strong = []
    if "=" in text:
        strong.append("equals-as-frac")
    if "δ" in text:
        strong.append("delta-as-d")
    if _HEADER.search(text):
        strong.append("detached-mass-number")
    chosen = [k for k in strong if rng.random() < 0.7]
    if strong and not chosen:
        chosen = [rng.choice(strong)]

    out = text
    # Order matters: the header pattern needs the original "NMR" spelling and digits.
    if "detached-mass-number" in chosen:
        out = _detach_mass_numbers(out)
        kinds.append("detached-mass-number")
    if "equals-as-frac" in chosen:
        out = out.replace("=", "¼")
        kinds.append("equals-as-frac")
    if "delta-as-d" in chosen:
        out = out.replace("δ", "d")
        kinds.append("delta-as-d")
    ligated = _ligate(out)
    if ligated != out:
        out = ligated
        kinds.append("ligatures")
    hyphenated = _soft_hyphens(out, rng)
    if hyphenated != out:
        out = hyphenated
        kinds.append("soft-hyphens")
    spaced = _odd_spaces(out, rng)
    if spaced != out:
        out = spaced
        kinds.append("odd-spaces")
    broken = _line_breaks(out, rng)
    if broken != out:
        out = broken
        kinds.append("line-breaks")
    return Damaged(out, tuple(kinds))
