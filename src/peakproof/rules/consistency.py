"""Cross-technique consistency: HRMS, elemental analysis, the compound's formula and --formula."""

from __future__ import annotations

from ..formula import FormulaError
from . import Rule
from ._util import formula as parse_formula
from ._util import neutral_of as neutral_from_ion


class FormulaMismatch(Rule):
    """All formulas given for one compound must describe the same compound."""

    name = "formula-mismatch"
    code = "PP901"
    severity = "warning"
    message = "the {where} formula {formula} differs from {reference} ({reference_source}); the data likely belong to different compounds or one formula is mistyped"
    rationale = (
        "HRMS (after removing the adduct), elemental analysis and the stated molecular formula "
        "describe one compound; disagreement means one of them is wrong."
    )
    source = "common practice"
    examples = (
        ("fail", "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.70; H, 6.90. HRMS (ESI) m/z [M + Na]+ calcd for C12H16O3Na 231.0992, found 231.0990."),
        ("pass", "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.70; H, 6.90. HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0838."),
    )

    def check(self, block, ctx):
        reference = ctx.formula
        if reference is None:
            return
        candidates = []
        if block.formula and ctx.formula_source != "compound" and not any(
                a.formula == block.formula for a in block.analyses):
            try:
                at = block.text.find(block.formula)
                span = ctx.span(block.span.start + at, block.span.start + at + len(block.formula)) if at >= 0 else block.span
                candidates.append(("compound", block.formula, parse_formula(block.formula).neutral(), span))
            except FormulaError:
                pass
        for a in block.analyses:
            if a.formula and not (ctx.formula_source == "elemental analysis" and a.formula_span == ctx.formula_span):
                try:
                    candidates.append(("elemental analysis", a.formula, parse_formula(a.formula).neutral(),
                                       a.formula_span or a.span))
                except FormulaError:
                    pass
        for ms in block.mass_spec:
            if not ms.formula or not ms.ion or ms.formula_span == ctx.formula_span:
                continue
            try:
                neutral = neutral_from_ion(ms.formula, ms.ion)
                if parse_formula(ms.formula).neutral() == reference.neutral():
                    continue  # the adduct was left out: hrms-adduct says so
            except FormulaError:
                continue
            candidates.append(("HRMS (less the adduct)", ms.formula, neutral, ms.formula_span or ms.span))
        for where, written, formula, span in candidates:
            if formula.neutral() != reference.neutral():
                yield self.finding(
                    span, where=where, formula=f"{written} ({formula.hill()})" if written != formula.hill() else written,
                    reference=reference.hill(), reference_source=ctx.formula_source,
                    data={"formula": formula.hill(), "reference": reference.hill(), "reference_source": ctx.formula_source},
                )


class FormulaUnreadable(Rule):
    """A formula after 'calcd for' or in an analysis that cannot be read is said so, once."""

    name = "formula-unreadable"
    code = "PP902"
    severity = "warning"
    message = "the formula {formula} cannot be read ({reason}); the values computed from it are not checked"
    rationale = (
        "HRMS and elemental-analysis values are checked against the formula written with them; "
        "a formula that cannot be read (an unknown element symbol, a count of impossible length) "
        "leaves those values unchecked, which a reader should know rather than take for a pass."
    )
    source = "common practice"
    examples = (
        ("fail", "Anal. Calcd for C12H12Q2: C, 70.6; H, 5.9. Found: C, 70.5; H, 6.0."),
        ("pass", "Anal. Calcd for C12H12O3: C, 70.58; H, 5.92. Found: C, 70.51; H, 5.99."),
    )

    def check(self, block, ctx):
        for item in (*block.mass_spec, *block.analyses):
            if not item.formula:
                continue
            try:
                parse_formula(item.formula)
            except FormulaError as exc:
                shown = item.formula if len(item.formula) <= 40 else item.formula[:37] + "…"
                reason = str(exc).splitlines()[0] if str(exc) else "unreadable"
                yield self.finding(item.formula_span or item.span, formula=shown, reason=reason,
                                   data={"formula": item.formula[:200]})
