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
