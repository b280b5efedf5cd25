"""Small helpers shared by the rule families (no rules here)."""

from __future__ import annotations

import functools
import re

#: Assignments that name an exchangeable proton (OH, NH, NH2, CO2H, COOH, SH).
EXCHANGEABLE = re.compile(r"(?<![A-Za-z])(?:O-?H|N-?H2?|NH3\+?|CO2H|COOH|S-?H)(?![a-z])")


def spectra_of(block, nucleus: str):
    return [s for s in block.spectra if s.nucleus == nucleus]


def fmt(value: float, decimals: int = 2) -> str:
    text = f"{value:.{decimals}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


def element_count(formula, element: str) -> int:
    if formula is None:
        return 0
    return formula.element_count(element)


def has_element(formula, symbol: str) -> bool:
    """Whether the formula holds ``symbol``; "D" means deuterium only, not all hydrogen."""
    if formula is None:
        return False
    if symbol == "D":
        return formula.counts.get("D", 0) > 0
    return formula.element_count(symbol) > 0


def block_has_element(block, ctx, symbol: str) -> bool:
    """Whether the compound holds ``symbol``: in its formula, or evident from the block itself
    (a spectrum of that element, or a coupling written with it, e.g. 19F NMR or J(C,F))."""
    if has_element(ctx.formula, symbol):
        return True
    return symbol in ctx.shared("evident elements", block, lambda: _evident_elements(block))


def _evident_elements(block) -> set[str]:
    """Elements of the block's spectra and of the nuclei its couplings name."""
    found = set()
    for spectrum in block.spectra:
        found.add(spectrum.element)
        for signal in spectrum.signals:
            for c in signal.couplings:
                if c.nuclei:
                    found.update(n.lstrip("0123456789") for n in c.nuclei)
    return found


def signal_label(signal) -> str:
    """How a message names a signal: "δ 7.31 (d)"."""
    mult = f" ({signal.multiplicity.name})" if signal.multiplicity else ""
    return f"δ {signal.shift_text}{mult}"


def number_edit_span(ctx, coupling):
    """The span of a coupling's number (its span may include "J = ")."""
    return ctx.number_span(coupling.span, coupling.text or fmt(coupling.value, 2))


# Formulas and ion types recur across blocks and rules; they are immutable, so parse each once.
@functools.lru_cache(maxsize=4096)
def formula(text: str):
    from ..formula import parse_formula

    return parse_formula(text)


@functools.lru_cache(maxsize=512)
def ion_type(text: str):
    from ..formula import parse_ion

    return parse_ion(text)


@functools.lru_cache(maxsize=4096)
def neutral_of(formula_text: str, ion_text: str):
    from ..formula import neutral_from_ion

    return neutral_from_ion(formula(formula_text), ion_type(ion_text))


@functools.lru_cache(maxsize=4096)
def percentages(formula_text: str):
    from ..masses import mass_percentages

    return mass_percentages(formula(formula_text))


#: Caches of rule modules that :func:`clear_caches` empties too (each module adds its own, so
#: this module needs to import none of them).
RULE_CACHES: list = []


def clear_caches() -> None:
    """Forget parsed formulas and their masses (benchmarks measure a cold start with this)."""
    from ..masses import _monoisotopic

    for cached in (formula, ion_type, neutral_of, percentages, _monoisotopic, *RULE_CACHES):
        cached.cache_clear()
