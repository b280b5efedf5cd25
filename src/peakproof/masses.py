"""Masses of formulas and ions: monoisotopic, average, m/z, elemental-analysis percentages.

Data: ``data/isotopes.json`` (AME2020 atomic masses, IUPAC isotopic compositions) and
``data/atomic_weights.json`` (CIAAW 2021 standard atomic weights); each file names its source.
Monoisotopic means the most abundant isotope of each element (12C, 1H, 35Cl, 79Br, 58Ni …);
isotopes written explicitly (D, 13C, [15N]) count with their own mass in every function.
"""

from __future__ import annotations

import json
from functools import cache, lru_cache
from pathlib import Path
from typing import Any

from .formula import Formula, isotope_parts, parse_formula

__all__ = [
    "ELECTRON_MASS",
    "MassError",
    "average_mass",
    "isotope_mass",
    "mass_percentages",
    "monoisotopic_mass",
    "mz",
    "mz_without_electron",
    "ppm_error",
]

#: Electron mass in u (CODATA 2018 recommended value).
ELECTRON_MASS = 5.48579909065e-4

_DATA = Path(__file__).parent / "data"


class MassError(ValueError):
    """A mass that cannot be computed: no data for an element or isotope, or no charge."""


@cache
def _isotopes() -> dict[str, Any]:
    return json.loads((_DATA / "isotopes.json").read_text(encoding="utf-8"))["isotopes"]


@cache
def _weights() -> dict[str, float]:
    data = json.loads((_DATA / "atomic_weights.json").read_text(encoding="utf-8"))
    return {element: entry["value"] for element, entry in data["weights"].items()}


@cache
def _most_abundant() -> dict[str, float]:
    best: dict[str, tuple[float, float]] = {}
    for entry in _isotopes().values():
        element = entry["element"]
        if element not in best or entry["abundance"] > best[element][0]:
            best[element] = (entry["abundance"], entry["mass"])
    return {element: mass for element, (_, mass) in best.items()}


def _formula(formula: Formula | str) -> Formula:
    return parse_formula(formula) if isinstance(formula, str) else formula


def isotope_mass(symbol: str) -> float:
    """Atomic mass in u of an isotope symbol: ``"13C"``, ``"D"``, ``"T"``, ``"35Cl"``."""
    element, mass_number = isotope_parts(symbol)
    if mass_number is None:
        raise MassError(f"{symbol!r} is an element, not an isotope")
    entry = _isotopes().get(f"{mass_number}{element}")
    if entry is None:
        raise MassError(f"no atomic mass on file for {mass_number}{element}")
    return entry["mass"]


def _atom_mass(symbol: str, table: dict[str, float], what: str) -> float:
    if isotope_parts(symbol)[1] is not None:
        return isotope_mass(symbol)
    try:
        return table[symbol]
    except KeyError:
        raise MassError(f"no {what} on file for element {symbol}") from None


def monoisotopic_mass(formula: Formula | str) -> float:
    """Mass of the neutral atoms, most abundant isotope of each element (electrons included)."""
    return _monoisotopic(_formula(formula))


@lru_cache(maxsize=4096)
def _monoisotopic(f: Formula) -> float:
    """Formulas are immutable and the checker asks for one ion's mass several times."""
    table = _most_abundant()
    return sum(n * _atom_mass(s, table, "isotope mass") for s, n in f.counts.items())


def average_mass(formula: Formula | str) -> float:
    """Molar mass from CIAAW standard atomic weights (conventional values for interval elements)."""
    table = _weights()
    f = _formula(formula)
    return sum(n * _atom_mass(s, table, "atomic weight") for s, n in f.counts.items())


def mz(formula: Formula | str, charge: int | None = None) -> float:
    """m/z of the ion: (M − z·mₑ)/|z| with M the neutral monoisotopic mass.

    ``charge`` defaults to the formula's own charge; a cation has lost z electrons, an anion
    gained |z|, hence the sign of z in the correction.
    """
    f = _formula(formula)
    z = f.charge if charge is None else charge
    if not z:
        raise MassError(f"{f.hill()} has no charge: give one, e.g. [{f.hill()}]+")
    return (monoisotopic_mass(f) - z * ELECTRON_MASS) / abs(z)


def mz_without_electron(formula: Formula | str, charge: int | None = None) -> float:
    """M/|z| without the electron correction: the common mistake, for explaining it."""
    f = _formula(formula)
    z = f.charge if charge is None else charge
    if not z:
        raise MassError(f"{f.hill()} has no charge: give one, e.g. [{f.hill()}]+")
    return monoisotopic_mass(f) / abs(z)


def calcd_matches(calcd: float, decimals: int, formula: Formula, charge: int) -> bool:
    """Whether a calcd m/z written to ``decimals`` places is this ion's value, rounded (or its
    value without the electron mass, the common slip, which is the same ion)."""
    allowed = 0.5 * 10 ** -decimals + 1e-5  # rounding, plus slack for other mass tables
    try:
        return any(abs(calcd - value) <= allowed
                   for value in (mz(formula, charge), mz_without_electron(formula, charge)))
    except MassError:
        return False


@lru_cache(maxsize=4096)
def formula_is_neutral_then_ion(formula_text: str, ion_text: str, calcd: float, decimals: int) -> bool:
    """``calcd for C14H21O3P [M + H]+ 269.1301``: the formula written is the neutral compound's
    and the value is its ion's, a convention as common as writing the ion's formula.

    True when the value fits the neutral-formula reading (formula plus adduct) and not the
    reading of the formula as the ion itself, or, fitting neither, lies within 0.5 u of the
    neutral reading's value and nearer to it (a typing error in the value, not in the formula).
    """
    from .formula import FormulaError, ion_formula, parse_ion

    try:
        written = parse_formula(formula_text)
        ion = parse_ion(ion_text)
        as_neutral = ion_formula(written.neutral(), ion)
    except FormulaError:
        return False
    if not ion.charge:
        return False
    as_written = written.charge or ion.charge
    if calcd_matches(calcd, decimals, written, as_written):
        return False
    if calcd_matches(calcd, decimals, as_neutral, ion.charge):
        return True
    try:
        near_neutral = abs(calcd - mz(as_neutral, ion.charge))
        near_written = abs(calcd - mz(written, as_written))
    except MassError:
        return False
    return near_neutral < 0.5 and near_neutral < near_written


def mass_percentages(formula: Formula | str) -> dict[str, float]:
    """Mass % of each element, for elemental analysis, in Hill order.

    Isotopes are reported under their element, with their own mass: D counts as H (a CHN
    analyser burns it to water like H), 13C as C. The charge is ignored.
    """
    f = _formula(formula)
    weights = _weights()
    by_element: dict[str, float] = {}
    for symbol, number in f.counts.items():
        element = isotope_parts(symbol)[0]
        by_element[element] = by_element.get(element, 0.0) + number * _atom_mass(
            symbol, weights, "atomic weight"
        )
    total = sum(by_element.values())
    if total <= 0:
        raise MassError("an empty formula has no composition")
    return {element: 100.0 * by_element[element] / total for element in f.elements()}


def ppm_error(found: float, calcd: float) -> float:
    """(found − calcd)/calcd in parts per million."""
    if not calcd:
        raise MassError("calcd mass is zero: no ppm error")
    return (found - calcd) / calcd * 1e6
