"""NMR properties of nuclei: spin, natural abundance and the IUPAC frequency ratio Ξ.

The table lives in ``data/nuclei.json`` with its citation (IUPAC Recommendations 2001).
Ξ is the resonance frequency of a nucleus in its reference compound as a percentage of the
1H frequency of TMS in the same field, so frequencies of one instrument go together:
``expected_frequency("13C", 400.0)`` is about 100.6 MHz.
"""

from __future__ import annotations

import difflib
import functools
import json
import re
from dataclasses import dataclass
from fractions import Fraction
from importlib import resources

__all__ = [
    "NUCLEUS_FOR_ELEMENT",
    "Nucleus",
    "UnknownNucleus",
    "all_nuclei",
    "expected_frequency",
    "normalize_symbol",
    "nucleus",
    "proton_frequency",
]

_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_MASS_FIRST = re.compile(r"^(\d{1,3})([A-Za-z]{1,2})$")
_ELEMENT_FIRST = re.compile(r"^([A-Za-z]{1,2})(\d{1,3})$")
# Bare hydrogen-isotope letters that chemists write instead of a mass number.
_LETTER_ALIASES = {"D": "2H", "T": "3H"}


class UnknownNucleus(KeyError):
    """A nucleus symbol that is not in the table (or cannot be read as a nucleus)."""

    def __init__(self, message: str, symbol: str, suggestions: tuple[str, ...] = ()):
        super().__init__(message, symbol, suggestions)
        self.message = message
        self.symbol = symbol
        self.suggestions = suggestions

    def __str__(self) -> str:  # KeyError would quote the whole message
        return self.message


@dataclass(frozen=True, slots=True)
class Nucleus:
    """One nuclide as tabulated by IUPAC (2001)."""

    symbol: str  # "13C"
    element: str  # "C"
    mass_number: int
    spin: Fraction  # nuclear spin quantum number I
    abundance: float  # natural abundance, percent
    xi: float  # frequency ratio Ξ, percent
    gamma: float | None = None  # magnetogyric ratio, 1e7 rad s-1 T-1
    note: str | None = None

    @property
    def quadrupolar(self) -> bool:
        return self.spin > Fraction(1, 2)

    def multiplet_lines(self, count: int = 1) -> int:
        """Lines produced by ``count`` equivalent nuclei of this kind: 2nI + 1."""
        return int(2 * count * self.spin + 1)


@functools.cache
def _table() -> dict:
    text = resources.files("peakproof").joinpath("data/nuclei.json").read_text("utf-8")
    return json.loads(text)


@functools.cache
def _nuclei() -> dict[str, Nucleus]:
    table = {}
    for entry in _table()["nuclei"]:
        item = Nucleus(
            symbol=entry["symbol"],
            element=entry["element"],
            mass_number=entry["mass_number"],
            spin=Fraction(entry["spin"]),
            abundance=entry["abundance"],
            xi=entry["xi"],
            gamma=entry.get("gamma"),
            note=entry.get("note"),
        )
        table[item.symbol] = item
    return table


def _usual_isotopes() -> dict[str, str]:
    mapping = _table()["usual_isotope"]
    return {element: symbol for element, symbol in mapping.items() if not element.startswith("_")}


NUCLEUS_FOR_ELEMENT: dict[str, str] = _usual_isotopes()
"""The isotope usually observed for an element ("C" → "13C"; common practice)."""


def all_nuclei() -> tuple[Nucleus, ...]:
    """Every tabulated nucleus, in table order."""
    return tuple(_nuclei().values())


def normalize_symbol(symbol: str) -> str:
    """Spell a nucleus the canonical way: "¹³C", "C13", "13 C", "c-13" → "13C".

    Raises UnknownNucleus when the text cannot be read as a nucleus at all; the result is
    not checked against the table (``nucleus`` does that).
    """
    if not isinstance(symbol, str):
        raise UnknownNucleus(
            f"nucleus must be written as text such as '13C', got {symbol!r}", str(symbol)
        )
    compact = re.sub(r"[\s\-_]", "", symbol.translate(_SUPERSCRIPTS))
    if compact.upper() in _LETTER_ALIASES:
        return _LETTER_ALIASES[compact.upper()]
    match = _MASS_FIRST.match(compact)
    if match:
        mass, element = match.groups()
    else:
        match = _ELEMENT_FIRST.match(compact)
        if not match:
            raise UnknownNucleus(_message(symbol, ()), symbol)
        element, mass = match.groups()
    return f"{int(mass)}{element[0].upper()}{element[1:].lower()}"


#: spelling → Nucleus for spellings already looked up (the checker asks for the same few often)
_BY_SPELLING: dict[str, Nucleus] = {}


def nucleus(symbol: str) -> Nucleus:
    """Look a nucleus up by any usual spelling ("13C", "¹³C", "C13", "13 C")."""
    known = _BY_SPELLING.get(symbol) if isinstance(symbol, str) else None
    if known is not None:
        return known
    table = _nuclei()
    canonical = normalize_symbol(symbol)
    if canonical in table:
        if len(_BY_SPELLING) < 1024:
            _BY_SPELLING[symbol] = table[canonical]
        return table[canonical]
    suggestions = _close_matches(canonical)
    raise UnknownNucleus(_message(symbol, suggestions), symbol, suggestions)


def expected_frequency(symbol: str, proton_mhz: float) -> float:
    """Observe frequency (MHz) of ``symbol`` on a magnet where 1H resonates at ``proton_mhz``."""
    return proton_mhz * nucleus(symbol).xi / 100.0


def proton_frequency(symbol: str, mhz: float) -> float:
    """1H frequency (MHz) of the magnet on which ``symbol`` resonates at ``mhz``."""
    return mhz * 100.0 / nucleus(symbol).xi


def _close_matches(canonical: str) -> tuple[str, ...]:
    symbols = list(_nuclei())
    element = canonical.lstrip("0123456789")
    same_element = [s for s in symbols if s.lstrip("0123456789") == element]
    similar = difflib.get_close_matches(canonical, symbols, n=4, cutoff=0.5)
    return tuple(dict.fromkeys(same_element + similar))[:5]


def _message(symbol: str, suggestions: tuple[str, ...]) -> str:
    text = f"unknown nucleus {symbol!r}"
    if suggestions:
        text += f"; did you mean {', '.join(suggestions)}?"
    else:
        text += "; write it as mass number and element, e.g. '13C' or '19F'"
    return text
