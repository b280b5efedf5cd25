"""Integrations against the formula: Σ 1H integrals vs H, Σ 19F integrals vs F."""

from __future__ import annotations

from . import Rule
from ._util import EXCHANGEABLE, fmt


def _total(spectrum, element: str) -> float | None:
    total = 0.0
    for s in spectrum.signals:
        if s.count is None or (s.count_nucleus not in (None, element)):
            return None
        total += s.count
    return total if spectrum.signals else None


def _exchangeable_room(formula, spectrum) -> int:
    """At most one H per O and two per N may be exchangeable and go unobserved (an upper bound)."""
    room = formula.element_count("O") + 2 * formula.element_count("N") + formula.element_count("S")
    seen = sum(s.count or 0 for s in spectrum.signals if s.assignment and EXCHANGEABLE.search(s.assignment))
    return max(0, int(room - seen))


class _Integration(Rule):
    nucleus = ""
    element = ""

    def check(self, block, ctx):
        f = ctx.formula
        if f is None:
            return
        expected = f.counts.get(self.element, 0)  # D is not seen in a 1H spectrum
        for spectrum in block.spectra:
            if spectrum.nucleus != self.nucleus:
                continue
            total = _total(spectrum, self.element)
            if total is None or abs(total - expected) < 0.5:
                continue
            deficit = expected - total
            severity = None
            explanation = "more than the formula holds" if deficit < 0 else "a deficit that exchangeable protons cannot explain"
            if self.element == "H" and deficit > 0:
                room = _exchangeable_room(f, spectrum)
                if deficit <= room + 0.5:
                    severity = "note"
                    explanation = "exchangeable OH/NH/CO2H protons that were not observed likely explain the deficit"
            yield self.finding(
                spectrum.span,
                severity=severity,
                nucleus=self.nucleus,
                total=fmt(total, 1),
                element=self.element,
                expected=expected,
                formula=f.hill(),
                source=ctx.formula_source,
                explanation=explanation,
                data={"integration_sum": total, "formula_count": expected, "formula": f.hill(),
                      "formula_source": ctx.formula_source},
            )


# methyl propanoate, C4H8O2
_ESTER = "1H NMR (400 MHz, CDCl3) δ 3.67 (s, {n}H), 2.32 (q, J = 7.6 Hz, 2H), 1.14 (t, J = 7.6 Hz, 3H)."


class IntegrationHydrogen(_Integration):
    """The 1H integrations should add up to the hydrogen count of the formula."""

    name = "integration-h-count"
    code = "PP301"
    severity = "warning"
    nucleus, element = "1H", "H"
    message = "the {nucleus} integrations add up to {total} {element} but {formula} (from {source}) has {expected}: {explanation}"
    rationale = (
        "Every non-exchanging proton appears in the 1H spectrum, so the integrations sum to the "
        "formula's H count; OH, NH and CO2H protons may be broad or exchanged away (a note)."
    )
    source = "common practice"
    examples = (
        ("fail", _ESTER.format(n=5), "C4H8O2"),
        ("pass", _ESTER.format(n=3), "C4H8O2"),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.90 (d, J = 8.8 Hz, 2H), 6.88 (d, J = 8.8 Hz, 2H).", "C7H6O3"),
    )


class IntegrationFluorine(_Integration):
    """The 19F integrations should add up to the fluorine count of the formula."""

    name = "integration-f-count"
    code = "PP302"
    severity = "warning"
    nucleus, element = "19F", "F"
    message = "the {nucleus} integrations add up to {total} {element} but {formula} (from {source}) has {expected}: {explanation}"
    rationale = "Every fluorine appears in the 19F spectrum, so its integrations sum to the formula's F count."
    source = "common practice"
    examples = (
        ("fail", "19F NMR (376 MHz, CDCl3) δ −63.2 (s, 6F).", "C8H5F3O"),
        ("pass", "19F NMR (376 MHz, CDCl3) δ −63.2 (s, 3F).", "C8H5F3O"),
    )
