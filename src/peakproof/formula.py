"""Molecular formulas and mass-spectrometry ion types as chemists write them.

``parse_formula("C12H14O3Na")``, ``parse_formula("[C12H14O3Na]+")`` and
``parse_formula("CuSO4·5H2O")`` read a formula (grammar in ``grammar/formula.lark``);
``parse_ion("[M + Na]+")`` reads an ion type; ``ion_formula`` and ``neutral_from_ion`` go
between the two.

Isotopes keep their own symbol in ``Formula.counts``: ``"D"``, ``"T"`` and mass-number symbols
such as ``"13C"``.  ``²H``/``2H`` are stored as ``"D"`` and ``³H``/``3H`` as ``"T"``, so one
labelled compound has one spelling.  A few group abbreviations that are not element symbols
(Ph, Me, Et, Bu, Bn, Cy) are expanded, so ``[Pd(PPh3)4]`` reads as written.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from functools import lru_cache
from pathlib import Path
from types import MappingProxyType
from typing import Any

__all__ = [
    "ELEMENT_SYMBOLS",
    "Formula",
    "FormulaError",
    "Ion",
    "ion_formula",
    "neutral_from_ion",
    "parse_formula",
    "parse_ion",
]

#: All element symbols, in order of atomic number (IUPAC).
ELEMENT_SYMBOLS: tuple[str, ...] = tuple(
    """H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As
    Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb
    Dy Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk
    Cf Es Fm Md No Lr Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og""".split()
)
_ELEMENTS = frozenset(ELEMENT_SYMBOLS)
#: Hydrogen isotopes with symbols of their own.
_HYDROGEN_ISOTOPES = {"D": 2, "T": 3}
#: Group abbreviations that cannot be mistaken for an element symbol (common practice).
_ABBREVIATIONS = {
    "Ph": {"C": 6, "H": 5},
    "Me": {"C": 1, "H": 3},
    "Et": {"C": 2, "H": 5},
    "Bu": {"C": 4, "H": 9},
    "Bn": {"C": 7, "H": 7},
    "Cy": {"C": 6, "H": 11},
}
_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻", "0123456789+-")
_TO_SUPERSCRIPT = str.maketrans("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹")
_SUBSCRIPTS = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")
_ISOTOPE_SYMBOL = re.compile(r"^(\d+)([A-Z][a-z]?)$")

_GRAMMAR_DIR = Path(__file__).parent / "grammar"
_parser: Any = None  # the Lark parser, built on first use


#: An element count longer than this is refused (one million atoms of an element is beyond any
#: molecule characterised by NMR; the bound keeps counts far from int's string-length limit).
MAX_COUNT_DIGITS = 6


class FormulaError(ValueError):
    """A formula or ion type that cannot be read, or arithmetic that makes no sense.

    ``position`` is the 0-based offset of the offending character in ``text`` (None when the
    problem is not at one place, e.g. subtracting atoms that are not there).
    """

    def __init__(self, message: str, text: str = "", position: int | None = None):
        self.message = message
        self.text = text
        self.position = position
        super().__init__(self._render())

    def _render(self) -> str:
        if self.position is None or not self.text:
            return self.message
        line = self.text.replace("\n", " ")
        return f"{self.message}\n  {line}\n  {' ' * self.position}^"


def _number(value: float) -> int | float:
    """Counts are ints when whole (so ``C12`` stays ``12``), floats only from solvates."""
    if isinstance(value, int):
        return value
    rounded = round(value)
    return int(rounded) if abs(value - rounded) < 1e-9 else float(value)


def isotope_parts(symbol: str) -> tuple[str, int | None]:
    """``"13C"`` → ``("C", 13)``, ``"D"`` → ``("H", 2)``, ``"C"`` → ``("C", None)``."""
    if symbol in _HYDROGEN_ISOTOPES:
        return "H", _HYDROGEN_ISOTOPES[symbol]
    match = _ISOTOPE_SYMBOL.match(symbol)
    if match:
        return match.group(2), int(match.group(1))
    return symbol, None


@lru_cache(maxsize=4096)
def _element_totals(key) -> dict[str, int | float]:
    """Element → atoms with isotopes folded in, for a formula's (counts, charge) key (the checker
    asks the same formula many times)."""
    totals: dict[str, float] = {}
    for symbol, number in key[0]:
        parent = isotope_parts(symbol)[0]
        totals[parent] = totals.get(parent, 0) + number
    return {element: _number(total) for element, total in totals.items()}


class Formula:
    """An immutable elemental composition with a charge.

    Equality and hashing use the counts and the charge only; ``text`` keeps the formula as
    written and ``radical`` whether a radical dot was written.
    """

    __slots__ = ("_counts", "charge", "text", "radical", "_key", "_totals")

    def __init__(
        self,
        counts: Mapping[str, float] | Iterable[tuple[str, float]] = (),
        charge: int = 0,
        text: str = "",
        radical: bool = False,
    ):
        merged: dict[str, float] = {}
        items = counts.items() if isinstance(counts, Mapping) else counts
        for symbol, number in items:
            merged[symbol] = merged.get(symbol, 0) + number
        clean = {}
        for symbol, number in merged.items():
            if number < -1e-9:
                raise FormulaError(f"negative count {number:g} for {symbol}", text)
            if abs(number) > 1e-9:
                clean[symbol] = _number(number)
        object.__setattr__(self, "_counts", MappingProxyType(dict(sorted(clean.items()))))
        object.__setattr__(self, "charge", int(charge))
        object.__setattr__(self, "text", text or "")
        object.__setattr__(self, "radical", bool(radical))
        key = (tuple(sorted(clean.items())), int(charge))
        object.__setattr__(self, "_key", key)
        object.__setattr__(self, "_totals", None)  # element totals, looked up on first use

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError("Formula is immutable")

    def __delattr__(self, name: str) -> None:
        raise AttributeError("Formula is immutable")

    @property
    def counts(self) -> Mapping[str, int | float]:
        """Symbol → count, isotopes under their own symbol ("D", "13C")."""
        return self._counts

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Formula):
            return NotImplemented
        return self._key == other._key

    def __hash__(self) -> int:
        return hash(self._key)

    def __repr__(self) -> str:
        return f"Formula({self.hill()!r})"

    def __str__(self) -> str:
        return self.hill()

    def __bool__(self) -> bool:
        return bool(self._counts)

    def element_count(self, element: str, include_isotopes: bool = True) -> int | float:
        """Atoms of ``element``; with ``include_isotopes`` H counts D and T, C counts 13C."""
        if not include_isotopes:
            return _number(self._counts.get(element, 0))
        totals = self._totals
        if totals is None:
            totals = _element_totals(self._key)
            object.__setattr__(self, "_totals", totals)
        return totals.get(element, 0)

    def elements(self) -> tuple[str, ...]:
        """Elements present (isotopes folded into their element), in Hill order."""
        present = {isotope_parts(symbol)[0] for symbol in self._counts}
        return tuple(_hill_order(present))

    def hill(self) -> str:
        """Hill-order text: C, H, then alphabetical (alphabetical throughout without C).

        Isotopes follow their element (``C5[13C]H12``, ``C6D6``). Fractional counts, which only
        solvates produce, are written as extra solvate parts (``C10H12O2·0.5C``) so the text
        reads back to the same counts; the charge comes last (``C12H15O3+``, ``C6H6²⁺``).
        """
        by_element: dict[str, list[tuple[int, str]]] = {}
        for symbol in self._counts:
            parent, mass_number = isotope_parts(symbol)
            by_element.setdefault(parent, []).append((mass_number or 0, symbol))
        whole: list[str] = []
        fractions: list[str] = []
        for element in _hill_order(by_element):
            for _, symbol in sorted(by_element[element]):
                number = self._counts[symbol]
                written = _written_symbol(symbol)
                integer = int(number // 1)
                rest = number - integer
                if integer:
                    whole.append(written + (str(integer) if integer != 1 else ""))
                if rest > 1e-12:
                    fractions.append(f"{rest!r}{written}")
        text = "·".join((["".join(whole)] if whole else []) + fractions)
        if self.charge and re.fullmatch(r"\[\w+\]\d+", text):
            text = text[1:].replace("]", "")  # "[13C]2+" would read as charge 2+; "13C2+" does not
        return text + _charge_text(self.charge, self.radical, bracketed=False)

    # Adduct arithmetic: charges add, counts add or subtract.
    def __add__(self, other: Formula) -> Formula:
        if not isinstance(other, Formula):
            return NotImplemented
        counts = dict(self._counts)
        for symbol, number in other._counts.items():
            counts[symbol] = counts.get(symbol, 0) + number
        return Formula(counts, self.charge + other.charge)

    def __sub__(self, other: Formula) -> Formula:
        if not isinstance(other, Formula):
            return NotImplemented
        counts = dict(self._counts)
        missing = []
        for symbol, number in other._counts.items():
            have = counts.get(symbol, 0)
            if number > have + 1e-9:
                missing.append(
                    f"{_written_symbol(symbol)} ({_fmt(number)} needed, {_fmt(have)} present)"
                )
            counts[symbol] = have - number
        if missing:
            raise FormulaError(
                f"cannot remove {other.hill() or 'nothing'} from {self.hill() or 'nothing'}: "
                f"not enough {', '.join(missing)}",
                self.text,
            )
        return Formula(counts, self.charge - other.charge)

    def __mul__(self, factor: float) -> Formula:
        if not isinstance(factor, (int, float)) or factor < 0:
            return NotImplemented
        return Formula({s: n * factor for s, n in self._counts.items()}, int(self.charge * factor))

    __rmul__ = __mul__

    def with_charge(self, charge: int, radical: bool = False) -> Formula:
        charge, radical = int(charge), bool(radical)
        if charge == self.charge and radical == self.radical:
            return self  # immutable, so the formula itself is the copy
        # the counts are already clean and sorted: share them instead of cleaning them again
        other = object.__new__(Formula)
        for name, value in (("_counts", self._counts), ("charge", charge), ("text", self.text),
                            ("radical", radical), ("_key", (self._key[0], charge)), ("_totals", self._totals)):
            object.__setattr__(other, name, value)
        return other

    def neutral(self) -> Formula:
        return self.with_charge(0)


def _fmt(number: float) -> str:
    return f"{number:g}"


def _written_symbol(symbol: str) -> str:
    return f"[{symbol}]" if symbol[0].isdigit() else symbol


def _hill_order(elements: Iterable[str]) -> list[str]:
    present = set(elements)
    if "C" in present:
        rest = sorted(present - {"C", "H"})
        return ["C"] + (["H"] if "H" in present else []) + rest
    return sorted(present)


def _charge_text(charge: int, radical: bool, bracketed: bool) -> str:
    if not charge:
        return "•" if radical else ""
    sign = "+" if charge > 0 else "-"
    magnitude = abs(charge)
    if magnitude == 1:
        text = sign
    elif bracketed:
        text = f"{magnitude}{sign}"
    else:  # superscripts read back unambiguously after a count: C6H6²⁺
        text = str(magnitude).translate(_TO_SUPERSCRIPT) + ("⁺" if charge > 0 else "⁻")
    return text + ("•" if radical else "")


# ---------------------------------------------------------------------------------------------
# Parsing formulas

#: Human names for the grammar's terminals, used in error messages.
_EXPECTED_NAMES = {
    "ELEMENT": "an element symbol",
    "PREFIXED_ISOTOPE": "an isotope such as 13C",
    "SUP_ISOTOPE": "an isotope such as ¹³C",
    "COUNT": "a count",
    "COEFF": "a number of solvate molecules",
    "DECIMAL": "a decimal number such as 0.5",
    "SEP": "'·' before a solvate",
    "SIGN": "a charge (+ or −)",
    "CHARGE_N": "a charge such as 2+",
    "SUP_CHARGE": "a charge such as ⁺",
    "RADICAL": "a radical dot •",
    "LPAR": "'('",
    "RPAR": "')'",
    "LSQB": "'['",
    "RSQB": "']'",
    "$END": "the end of the formula",
}


def _get_parser() -> Any:
    global _parser
    if _parser is None:
        from lark import Lark

        grammar = (_GRAMMAR_DIR / "formula.lark").read_text(encoding="utf-8")
        _parser = Lark(grammar, parser="lalr", lexer="contextual", propagate_positions=False)
    return _parser


def _expected_text(names: Iterable[str]) -> str:
    wanted = sorted({_EXPECTED_NAMES.get(n, repr(n)) for n in names if not n.startswith("__")})
    if not wanted:
        return ""
    if len(wanted) == 1:
        return f"expected {wanted[0]}"
    return "expected " + ", ".join(wanted[:-1]) + " or " + wanted[-1]


_SIMPLE_FORMULA = re.compile(r"(?:[A-Z][a-z]?\d*)+")
_ELEMENT_COUNT = re.compile(r"([A-Z][a-z]?)(\d*)")


def parse_formula(text: str) -> Formula:
    """Read a molecular formula; raises :class:`FormulaError` for anything unreadable."""
    if not isinstance(text, str):
        raise FormulaError(f"a formula must be text, not {type(text).__name__}")
    if not text.strip():
        raise FormulaError("empty formula: write one such as C12H14O3Na", text, 0)
    simple = _SIMPLE_FORMULA.fullmatch(text)
    if simple is not None:  # "C12H14O3Na": element and count pairs only, read without the parser
        counts: dict[str, int] = {}
        for symbol, digits in _ELEMENT_COUNT.findall(text):
            if symbol not in _ELEMENTS or symbol in ("D", "T") or digits.startswith("0"):
                break  # unknown symbols, isotopes, zero counts: the grammar reads (or explains) it
            if len(digits) > MAX_COUNT_DIGITS:
                raise FormulaError(f"the count of {symbol} has {len(digits)} digits; no molecule "
                                   f"has more than {MAX_COUNT_DIGITS}: check the formula", text,
                                   text.find(digits))  # fmt: skip
            counts[symbol] = counts.get(symbol, 0) + (int(digits) if digits else 1)
        else:
            return Formula(counts, 0, text, False)
    from lark.exceptions import LarkError, UnexpectedCharacters, UnexpectedInput, UnexpectedToken

    try:
        tree = _get_parser().parse(text)
    except UnexpectedCharacters as exc:
        position = exc.pos_in_stream
        char = text[position] if position < len(text) else ""
        allowed = _expected_text(exc.allowed or ())
        message = f"unexpected character {char!r} in formula"
        raise FormulaError(message + (f": {allowed}" if allowed else ""), text, position) from None
    except UnexpectedToken as exc:
        token = exc.token
        at_end = token.type == "$END"
        position = len(text.rstrip()) if at_end else token.start_pos
        what = "formula ends too early" if at_end else f"unexpected {str(token)!r} in formula"
        allowed = _expected_text(exc.expected or ())
        raise FormulaError(what + (f": {allowed}" if allowed else ""), text, position) from None
    except UnexpectedInput:  # UnexpectedEOF and future kinds
        raise FormulaError("formula ends too early", text, len(text)) from None
    except LarkError as exc:  # pragma: no cover - grammar bugs, still reported politely
        raise FormulaError(f"cannot read formula ({exc.__class__.__name__})", text, 0) from None
    return _build(tree, text)


def _build(tree: Any, text: str) -> Formula:
    charge = 0
    radical = False
    if tree.data == "charged_bracket":
        sequence, charge_token, *rad = tree.children
        counts = _sequence(sequence, text)
        charge = _charge_value(str(charge_token))
        radical = bool(rad)
    else:
        body, *rest = tree.children
        counts = _body(body, text)
        if rest:
            tokens = [str(t) for t in rest[0].children]
            charge = _charge_value(tokens[0])
            radical = len(tokens) > 1
    return Formula(counts, charge, text, radical)


def _charge_value(token: str) -> int:
    token = token.translate(_SUPERSCRIPTS).replace("−", "-").replace("–", "-")
    sign = -1 if token.endswith("-") else 1
    digits = token[:-1]
    return sign * (int(digits) if digits else 1)


def _body(body: Any, text: str) -> dict[str, float]:
    children = list(body.children)
    lead = 1.0
    if getattr(children[0], "type", None) == "DECIMAL":
        token = children.pop(0)
        lead = float(str(token))
        if lead <= 0:
            raise FormulaError("a leading number must be positive", text, token.start_pos)
    counts = {s: n * lead for s, n in _sequence(children[0], text).items()}
    for child in children[1:]:
        if getattr(child, "data", None) != "part":
            continue  # the SEP token
        factor = 1.0
        parts = child.children
        if len(parts) == 2:
            factor = float(str(parts[0]))
            if factor <= 0:
                raise FormulaError("a solvate needs a positive number", text, parts[0].start_pos)
        for symbol, number in _units(parts[-1].children, text).items():
            counts[symbol] = counts.get(symbol, 0) + number * factor
    return counts


def _sequence(node: Any, text: str) -> dict[str, float]:
    children = list(node.children)
    counts: dict[str, float] = {}
    if node.data == "prefixed_sequence":
        token = children.pop(0)
        number = 1
        if children and getattr(children[0], "type", None) == "COUNT":
            number = _count(children.pop(0), text)
        symbol = _isotope(str(token), token.start_pos, text)
        counts[symbol] = number
    for symbol, number in _units(children, text).items():
        counts[symbol] = counts.get(symbol, 0) + number
    return counts


def _units(units: Iterable[Any], text: str) -> dict[str, float]:
    counts: dict[str, float] = {}
    for unit in units:
        for symbol, number in _unit(unit, text).items():
            counts[symbol] = counts.get(symbol, 0) + number
    return counts


def _unit(unit: Any, text: str) -> dict[str, float]:
    children = unit.children
    multiplier = 1
    if len(children) > 1 and getattr(children[-1], "type", None) == "COUNT":
        multiplier = _count(children[-1], text)
        children = children[:-1]
    if unit.data == "group":
        inner = _sequence(children[0], text)
    else:
        token = children[0]
        inner = _atom(str(token), token.start_pos, text)
    return {symbol: number * multiplier for symbol, number in inner.items()}


def _count(token: Any, text: str) -> int:
    number = int(str(token).translate(_SUBSCRIPTS))
    if number == 0:
        message = "a count of 0 is not a count: leave the element out"
        raise FormulaError(message, text, token.start_pos)
    return number


def _atom(symbol: str, position: int, text: str) -> dict[str, float]:
    if symbol[0] in "⁰¹²³⁴⁵⁶⁷⁸⁹":
        return {_isotope(symbol.translate(_SUPERSCRIPTS), position, text): 1}
    if symbol in _ELEMENTS or symbol in _HYDROGEN_ISOTOPES:
        return {symbol: 1}
    if symbol in _ABBREVIATIONS:
        return dict(_ABBREVIATIONS[symbol])
    hint = _symbol_hint(symbol)
    raise FormulaError(f"unknown element symbol {symbol!r}{hint}", text, position)


def _symbol_hint(symbol: str) -> str:
    if len(symbol) == 2 and symbol[0] in _ELEMENTS:
        second = symbol[1].upper()
        if second in _ELEMENTS:
            return f": write {symbol[0]}{second} for {symbol[0]} and {second}"
    return ""


def _isotope(symbol: str, position: int, text: str) -> str:
    match = _ISOTOPE_SYMBOL.match(symbol)
    if not match:  # pragma: no cover - the grammar only lets these shapes through
        raise FormulaError(f"cannot read isotope {symbol!r}", text, position)
    mass_number, element = int(match.group(1)), match.group(2)
    if element not in _ELEMENTS:
        raise FormulaError(f"unknown element symbol {element!r} in isotope", text, position)
    if mass_number == 0:
        raise FormulaError("a mass number of 0 is not an isotope", text, position)
    if element == "H" and mass_number in (2, 3):
        return "D" if mass_number == 2 else "T"
    return f"{mass_number}{element}"


# ---------------------------------------------------------------------------------------------
# Ion types: [M+Na]+, [M−H]−, [2M+Na]+, [M]+•, M+•, [M+H−H2O]+ …

_ION_DASHES = str.maketrans(
    {"−": "-", "–": "-", "—": "-", "⁺": "+", "⁻": "-", "∙": "•", "·": "•"}
)
_ION_SUPERSCRIPT_DIGITS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")


class Ion:
    """An ion type such as ``[M+Na]+``: ``multimer`` M's plus ``added`` minus ``removed``."""

    __slots__ = ("multimer", "added", "removed", "charge", "radical", "text", "terms")

    def __init__(
        self,
        multimer: int,
        terms: tuple[tuple[int, int, Formula], ...],
        charge: int,
        radical: bool = False,
        text: str = "",
    ):
        added = Formula()
        removed = Formula()
        for sign, coefficient, formula in terms:
            part = formula * coefficient
            if sign > 0:
                added = added + part
            else:
                removed = removed + part
        object.__setattr__(self, "multimer", multimer)
        object.__setattr__(self, "terms", terms)
        object.__setattr__(self, "added", added)
        object.__setattr__(self, "removed", removed)
        object.__setattr__(self, "charge", charge)
        object.__setattr__(self, "radical", radical)
        object.__setattr__(self, "text", text)

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError("Ion is immutable")

    @property
    def normalized(self) -> str:
        """Canonical text: ``[M+Na]+``, ``[M-H]-``, ``[2M+Na]+``, ``[M+2H]2+``, ``[M]+•``."""
        inside = ("" if self.multimer == 1 else str(self.multimer)) + "M"
        for sign, coefficient, formula in self.terms:
            inside += ("+" if sign > 0 else "-") + ("" if coefficient == 1 else str(coefficient))
            inside += re.sub(r"\s+", "", formula.text) or formula.hill()
        return f"[{inside}]" + _charge_text(self.charge, self.radical, bracketed=True)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Ion):
            return NotImplemented
        return self.normalized == other.normalized

    def __hash__(self) -> int:
        return hash(self.normalized)

    def __repr__(self) -> str:
        return f"Ion({self.normalized!r})"

    def __str__(self) -> str:
        return self.normalized


_ION_CHARGE = re.compile(r"^(?P<rad1>•?)(?P<num>\d*)(?P<sign>[+-])(?P<num2>\d*)(?P<rad2>•?)$")
_ION_TERM = re.compile(r"\s*([+-])\s*(\d*)\s*([^+\-\s][^+\-]*?)\s*(?=[+-]|$)")


def parse_ion(text: str) -> Ion:
    """Read an ion type such as ``[M + Na]+`` or ``(M+H)+``; raises :class:`FormulaError`."""
    if not isinstance(text, str):
        raise FormulaError(f"an ion type must be text, not {type(text).__name__}")
    clean = text.translate(_ION_DASHES).translate(_ION_SUPERSCRIPT_DIGITS)
    stripped = clean.strip()
    if not stripped:
        raise FormulaError("empty ion type: write one such as [M+Na]+", text, 0)
    offset = len(clean) - len(clean.lstrip())
    opener = stripped[0]
    if opener in "[(":
        closer = "]" if opener == "[" else ")"
        end = stripped.rfind(closer)
        if end < 0:
            raise FormulaError(f"ion type has no closing {closer!r}", text, offset + len(stripped))
        inside, inside_at = stripped[1:end], offset + 1
        tail, tail_at = stripped[end + 1 :], offset + end + 1
    else:
        # Unbracketed: only M (or nM) followed by its charge, e.g. M+ or M+•.
        match = re.match(r"^(\d*M)\s*(.*)$", stripped)
        if not match:
            raise FormulaError("ion type should look like [M+Na]+ or M+•", text, offset)
        inside, inside_at = match.group(1), offset
        tail, tail_at = match.group(2), offset + match.start(2)
    charge, radical = _ion_charge(tail, text, tail_at)
    multimer, terms = _ion_inside(inside, text, inside_at)
    return Ion(multimer, terms, charge, radical, text)


def _ion_charge(tail: str, text: str, at: int) -> tuple[int, bool]:
    compact = re.sub(r"\s+", "", tail)
    if not compact:
        raise FormulaError("ion type needs a charge after the bracket, e.g. ]+ or ]-", text, at)
    match = _ION_CHARGE.match(compact)
    if not match or (match.group("num") and match.group("num2")):
        lead = len(tail) - len(tail.lstrip())
        raise FormulaError(
            f"cannot read the ion charge {tail.strip()!r}: expected +, -, 2+ or +•",
            text,
            at + lead,
        )
    magnitude = int(match.group("num") or match.group("num2") or 1)
    if magnitude == 0:
        raise FormulaError("an ion's charge cannot be 0", text, at)
    sign = 1 if match.group("sign") == "+" else -1
    return sign * magnitude, bool(match.group("rad1") or match.group("rad2"))


_Term = tuple[int, int, Formula]  # (sign, coefficient, formula)


def _ion_inside(inside: str, text: str, at: int) -> tuple[int, tuple[_Term, ...]]:
    match = re.match(r"^\s*(\d*)\s*M", inside)
    if not match:
        lead = len(inside) - len(inside.lstrip())
        raise FormulaError("ion type should start with M (or 2M for a dimer)", text, at + lead)
    multimer = int(match.group(1) or 1)
    if multimer == 0:
        raise FormulaError("0M is not an ion type", text, at + match.start(1))
    rest_at = match.end()
    rest = inside[rest_at:]
    terms: list[tuple[int, int, Formula]] = []
    position = 0
    while position < len(rest):
        if rest[position:].strip() == "":
            break
        term = _ION_TERM.match(rest, position)
        if not term:
            bad = position + len(rest[position:]) - len(rest[position:].lstrip())
            raise FormulaError(
                "expected + or - and a formula after M, as in [M+Na]+", text, at + rest_at + bad
            )
        sign = 1 if term.group(1) == "+" else -1
        coefficient = int(term.group(2) or 1)
        formula_text = term.group(3)
        formula_at = at + rest_at + term.start(3)
        try:
            formula = parse_formula(formula_text)
        except FormulaError as exc:
            inner = exc.position if exc.position is not None else 0
            message = exc.message + " (in the ion type)"
            raise FormulaError(message, text, formula_at + inner) from None
        if formula.charge:
            raise FormulaError(
                "write the ion's charge after the bracket, not inside it", text, formula_at
            )
        terms.append((sign, coefficient, Formula(formula.counts, 0, formula_text)))
        position = term.end()
    return multimer, tuple(terms)


def ion_formula(neutral: Formula | str, ion: Ion | str) -> Formula:
    """The formula of ``ion`` formed from ``neutral`` (``[M+Na]+`` of C12H14O3 → C12H14NaO3+)."""
    neutral = parse_formula(neutral) if isinstance(neutral, str) else neutral
    ion = parse_ion(ion) if isinstance(ion, str) else ion
    base = neutral.neutral() * ion.multimer + ion.added
    try:
        result = base - ion.removed
    except FormulaError:
        raise FormulaError(
            f"{ion.normalized} removes {ion.removed.hill()}, which {neutral.hill()} does not have",
            neutral.text,
        ) from None
    return result.with_charge(ion.charge, ion.radical)


def neutral_from_ion(formula: Formula | str, ion: Ion | str) -> Formula:
    """The neutral M behind an ion formula (the written formula's charge, if any, is ignored)."""
    formula = parse_formula(formula) if isinstance(formula, str) else formula
    ion = parse_ion(ion) if isinstance(ion, str) else ion
    try:
        base = formula.neutral() - ion.added
    except FormulaError:
        raise FormulaError(
            f"{formula.hill()} does not contain the {ion.added.hill()} that {ion.normalized} adds",
            formula.text,
        ) from None
    base = base + ion.removed
    if ion.multimer == 1:
        return base
    counts = {}
    for symbol, number in base.counts.items():
        share = number / ion.multimer
        if abs(share - round(share)) > 1e-9:
            raise FormulaError(
                f"{base.hill()} cannot be split into {ion.multimer} equal molecules", formula.text
            )
        counts[symbol] = share
    return Formula(counts)
