"""The trade's vocabulary: how written words map to normalised values.

Multiplicity letters, solvent names, coupling labels, numbers.  Pure functions on strings,
shared by the transformer, the checker and the formatter.
"""

from __future__ import annotations

import re
from functools import lru_cache

from .lazyre import lazy

SUPERSCRIPT_DIGITS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
SUBSCRIPT_DIGITS = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")


def number(text: str) -> float:
    """A written number as a float: Unicode minus and decimal comma allowed."""
    try:
        return float(text)  # the common case, without copying the text three times
    except ValueError:
        return float(text.replace("\u2212", "-").replace(",", ".").replace(" ", ""))


# ---- multiplicity ------------------------------------------------------------------------
_LETTER = {
    "d": "d",
    "t": "t",
    "q": "q",
    "p": "quint",
    "quint": "quint",
    "quin": "quint",
    "pent": "quint",
    "h": "sext",
    "sext": "sext",
    "sept": "sept",
    "hept": "sept",
    "oct": "oct",
    "non": "non",
}
_WORD = {
    "singlet": "s",
    "doublet": "d",
    "triplet": "t",
    "quartet": "q",
    "quintet": "quint",
    "sextet": "sext",
    "septet": "sept",
    "heptet": "sept",
    "multiplet": "m",
    "doublets": "d",
    "triplets": "t",
    "quartets": "q",
}
_LETTERS_RE = re.compile(r"quint|quin|pent|sext|sept|hept|oct|non|d|t|q|p|h")
# "2 × d", "2x d", and "2d" (two doublets) where a digit stands before a lone d or t
_MULTIPLIER_RE = re.compile(r"^(\d)(?:\s?[×x]\s?|(?=[dt]$))")
_BROAD_RE = re.compile(r"^(?:br(?:oad)?\.?\s?|b\s?(?=s$)|l(?=s$))")
# "app t", "apparent t", "pseudo-t", "ψt", and "at" / "adt" (a letter a before the letters)
_APPARENT_RE = re.compile(r"^(?:app(?:arent|\.)?\s?|pseudo[\s\-]?|ψ[\s\-]?|a(?=[dtq]{1,3}$))")


@lru_cache(maxsize=512)
def multiplicity_parts(written: str) -> tuple[str, tuple[str, ...], bool, bool, str, int]:
    """Normalise a written multiplicity.

    Returns ``(name, components, broad, apparent, kind, multiplier)``.
    """
    text = " ".join(written.split())
    multiplier = 1
    m = _MULTIPLIER_RE.match(text)
    if m:
        multiplier = int(m.group(1))
        text = text[m.end() :]
    if text.startswith("AB"):
        rest = text[2:].strip()
        if rest.startswith("q"):
            return "ABq", (), False, False, "AB", multiplier
        return "AB", (), False, False, "AB", multiplier
    broad = apparent = False
    lowered = text
    if any(w in lowered for w in _WORD):
        broad = lowered.startswith("broad ")
        words = [w for w in re.split(r"\s+", lowered) if w in _WORD]
        base = "".join(_WORD[w] for w in words)
        components = tuple(_LETTERS_RE.findall(base)) if base not in ("s", "m") else ()
        base = "".join(_LETTER.get(c, c) for c in components) if components else base
        components = tuple(_LETTER[c] for c in components)
    else:
        m = _BROAD_RE.match(lowered)
        if m:
            broad = True
            lowered = lowered[m.end() :]
        m = _APPARENT_RE.match(lowered)
        if m:
            apparent = True
            lowered = lowered[m.end() :]
        base = lowered.strip()
        if base in ("", "."):
            return "br", (), True, apparent, "broad", multiplier
        if base in ("s", "m"):
            components = ()
        elif len(base) > 1 and base.endswith("m"):  # "dm", "tm": resolved letters, then a multiplet
            components = tuple(_LETTER[c] for c in _LETTERS_RE.findall(base[:-1]))
            name = ("br " if broad else "") + ("app " if apparent else "") + "".join(components) + "m"
            return name, components, broad, apparent, "multiplet", multiplier
        else:
            components = tuple(_LETTER[c] for c in _LETTERS_RE.findall(base))
            base = "".join(components)
    kind = {"s": "singlet", "m": "multiplet"}.get(base, "first-order")
    name = ("br " if broad else "") + ("app " if apparent else "") + base
    return name, components, broad, apparent, kind, multiplier


# ---- coupling labels -----------------------------------------------------------------------
ELEMENTS = frozenset(
    "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se "
    "Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy "
    "Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn D T".split()
)
_JLABEL_RE = lazy(
    r"^(?P<bonds>[1-6¹²³⁴⁵⁶])?\s?J\s?_?\{?\(?\s?(?P<rest>.*?)\s?\)?\}?$", re.DOTALL
)
_PAIR_RE = lazy(r"^([A-Z][a-z]?)\s?[,\-–−]?\s?([A-Z][a-z]?)$")


@lru_cache(maxsize=512)
def coupling_label(written: str) -> tuple[int | None, tuple[str, ...] | None, str | None]:
    """``3JHH`` → (3, ("H", "H"), None); ``J1`` → (None, None, "1"); ``JAB`` → (None, None, "AB")."""
    m = _JLABEL_RE.match(written.strip())
    if not m:
        return None, None, None
    bonds = int(m.group("bonds").translate(SUPERSCRIPT_DIGITS)) if m.group("bonds") else None
    rest = m.group("rest").strip().strip("(){}_ ")
    if not rest:
        return bonds, None, None
    pair = _PAIR_RE.match(rest)
    if pair and pair.group(1) in ELEMENTS and pair.group(2) in ELEMENTS:
        return bonds, (pair.group(1), pair.group(2)), None
    if rest in ELEMENTS:
        return bonds, None, rest
    return bonds, None, rest


# ---- solvents ------------------------------------------------------------------------------
_SOLVENT_KEYS = {
    "cdcl3": "CDCl3",
    "chcl3-d": "CDCl3",
    "chloroform-d": "CDCl3",
    "d-chloroform": "CDCl3",
    "d-dmso": "DMSO-d6",
    "cd3socd3": "DMSO-d6",
    "d4-methanol": "CD3OD",
    "cd3cocd3": "acetone-d6",
    "dmso-d6": "DMSO-d6",
    "d6-dmso": "DMSO-d6",
    "(cd3)2so": "DMSO-d6",
    "dmso": "DMSO-d6",
    "cd3od": "CD3OD",
    "meod": "CD3OD",
    "meod-d4": "CD3OD",
    "meoh-d4": "CD3OD",
    "methanol-d4": "CD3OD",
    "cd3oh": "CD3OH",
    "d2o": "D2O",
    "acetone-d6": "acetone-d6",
    "(cd3)2co": "acetone-d6",
    "d6-acetone": "acetone-d6",
    "c6d6": "C6D6",
    "benzene-d6": "C6D6",
    "cd2cl2": "CD2Cl2",
    "dichloromethane-d2": "CD2Cl2",
    "dcm-d2": "CD2Cl2",
    "cd3cn": "CD3CN",
    "acetonitrile-d3": "CD3CN",
    "mecn-d3": "CD3CN",
    "thf-d8": "THF-d8",
    "d8-thf": "THF-d8",
    "toluene-d8": "toluene-d8",
    "d8-toluene": "toluene-d8",
    "c7d8": "toluene-d8",
    "pyridine-d5": "pyridine-d5",
    "c5d5n": "pyridine-d5",
    "d5-pyridine": "pyridine-d5",
    "dmf-d7": "DMF-d7",
    "d7-dmf": "DMF-d7",
    "tfa-d": "TFA-d",
    "tfa-d1": "TFA-d",
    "cf3co2d": "TFA-d",
    "cd3co2d": "CD3CO2D",
    "acod-d4": "CD3CO2D",
    "acetic acid-d4": "CD3CO2D",
    "c6d5cl": "C6D5Cl",
    "chlorobenzene-d5": "C6D5Cl",
    "c2d2cl4": "C2D2Cl4",
    "tce-d2": "C2D2Cl4",
    "c6d12": "C6D12",
    "cyclohexane-d12": "C6D12",
    "dioxane-d8": "dioxane-d8",
    "cd3no2": "CD3NO2",
    "h2o": "H2O",
}
_SOLVENT_SPLIT = lazy(r"\s?[/+:–]\s?|\s-\s")


@lru_cache(maxsize=1024)
def solvent_key(written: str) -> str:
    """Canonical key of a written solvent or mixture: ``d6-DMSO`` → ``DMSO-d6``."""
    text = written.translate(SUBSCRIPT_DIGITS).strip()
    ratio = ""
    m = re.search(r"\(?\s?(?:v/v\s?)?(\d+(?:\.\d+)?)\s?:\s?(\d+(?:\.\d+)?)(?:\s?,?\s?v/v)?\s?\)?\s*$", text)
    if m and re.search(r"[A-Za-z]", text[: m.start()]):
        ratio = f"{m.group(1)}:{m.group(2)}"
        text = text[: m.start()].strip()
    parts = [p for p in _SOLVENT_SPLIT.split(text) if p]
    keys = [_SOLVENT_KEYS.get(p.lower(), p) for p in parts]
    key = "/".join(keys)
    return f"{key} {ratio}" if ratio else key


def nucleus_symbol(text: str) -> str:
    """``¹³C`` or ``13 C`` → ``13C``."""
    return re.sub(r"\s+", "", text.translate(SUPERSCRIPT_DIGITS))


#: Nucleus implied by a subscripted δ (δH, δC…).
DELTA_NUCLEUS = {"H": "1H", "C": "13C", "F": "19F", "P": "31P", "B": "11B", "N": "15N"}

_NOTE_RE = lazy(
    r"^(?:(?:\d\s?)?rotamers?|(?:major|minor)(?:\s(?:rotamer|isomer|diastereomer|conformer|tautomer)s?)?"
    r"|exch(?:angeable|\.)?(?:\s(?:with\s)?D2O)?|D2O[\s\-]exch(?:angeable|\.)?|overlap(?:ped|ping)?(?:\s.*)?"
    r"|obscured(?:\s.*)?|partially\s.*|diastereotopic|conformers?|isomers?|tautomers?|br(?:oad)?\.?"
    r"|2\srotamers)$",
    re.IGNORECASE,
)


def is_note(text: str) -> bool:
    """A free item inside the parentheses that describes rather than assigns (``rotamer``)."""
    return bool(_NOTE_RE.match(text.strip()))


_ION_CLEAN = str.maketrans({"−": "-", "–": "-", "⁺": "+", "⁻": "-", "·": "•", "˙": "•", " ": ""})


def ion_text(written: str) -> str:
    """Normalised ion notation: ``(M + H)+`` → ``[M+H]+``, ``M+•`` → ``[M]+•``."""
    text = written.translate(_ION_CLEAN)
    if text.startswith("("):
        close = text.rfind(")")
        text = "[" + text[1:close] + "]" + text[close + 1 :]
    if not text.startswith("["):
        m = re.match(r"^(\d?M)(.*)$", text)
        if m:
            text = f"[{m.group(1)}]{m.group(2)}"
    return text
