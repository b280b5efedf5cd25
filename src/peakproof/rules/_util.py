"""Small helpers shared by the rule families (no rules here)."""

from __future__ import annotations

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


def signal_label(signal) -> str:
    """How a message names a signal: "δ 7.31 (d)"."""
    mult = f" ({signal.multiplicity.name})" if signal.multiplicity else ""
    return f"δ {signal.shift_text}{mult}"


def number_edit_span(ctx, coupling):
    """The span of a coupling's number (its span may include "J = ")."""
    return ctx.number_span(coupling.span, coupling.text or fmt(coupling.value, 2))
