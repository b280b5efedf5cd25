"""Elemental analysis: calculated percentages recomputed (CIAAW weights), found within ±0.4 %."""

from __future__ import annotations

from ..formula import FormulaError
from ..masses import MassError
from . import Rule, suggestion
from ._util import fmt, percentages


def _percentages(analysis):
    if not analysis.formula:
        return None
    try:
        return percentages(analysis.formula)
    except (FormulaError, MassError):
        return None


def _number_span(ctx, span, value_text):
    return ctx.number_span(span, value_text)


class AnalysisCalcd(Rule):
    """The calculated percentages must follow from the formula and standard atomic weights."""

    name = "ea-calcd"
    code = "PP701"
    severity = "error"
    message = "calcd {element} {written} % for {formula} should be {expected} %"
    rationale = "Calculated mass percentages follow from the formula and the standard atomic weights."
    source = "CIAAW standard atomic weights 2021 (IUPAC)"
    examples = (
        ("fail", "Anal. Calcd for C12H14O3: C, 69.98; H, 6.84. Found: C, 69.70; H, 6.90."),
        ("pass", "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.70; H, 6.90."),
    )

    def check(self, block, ctx):
        for a in block.analyses:
            perc = _percentages(a)
            if perc is None:
                continue
            for k, (element, value) in enumerate(a.calcd):
                expected = perc.get(element, 0.0)
                if abs(value - expected) <= 0.01 + 1e-9:
                    continue
                span = a.calcd_spans[k] if k < len(a.calcd_spans) else a.span
                text = f"{value:.2f}"
                target = _number_span(ctx, span, text)
                yield self.finding(
                    target, element=element, written=text, formula=a.formula, expected=f"{expected:.2f}",
                    data={"element": element, "calcd": value, "recomputed": round(expected, 4)},
                    suggestion=suggestion("the recomputed percentage", (target.start, target.end, f"{expected:.2f}"))
                    if target is not span else None,
                )


class AnalysisFound(Rule):
    """Found percentages within the tolerance (±0.4 % absolute by default) of the calculated ones."""

    name = "ea-found"
    code = "PP702"
    severity = "warning"
    message = "found {element} {found} % differs from calcd {calcd} % by {diff} (beyond ±{tol}); the sample is likely impure or solvated, or a value is mistyped"
    rationale = (
        "Agreement within ±0.4 % absolute is the long-standing criterion for purity by combustion "
        "analysis; some journals use ±0.3 or ±0.5, so the tolerance is a setting."
    )
    source = "common journal practice; Kuveke et al., ACS Cent. Sci. 2022, 8, 855"
    examples = (
        ("fail", "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.21; H, 6.90."),
        ("pass", "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.70; H, 6.90."),
    )

    def check(self, block, ctx):
        tol = ctx.config.ea_tolerance
        for a in block.analyses:
            perc = _percentages(a) or {}
            calcd = dict(a.calcd)
            for k, (element, value) in enumerate(a.found):
                reference = perc.get(element, calcd.get(element))
                if reference is None or abs(value - reference) <= tol + 1e-9:
                    continue
                span = a.found_spans[k] if k < len(a.found_spans) else a.span
                yield self.finding(
                    _number_span(ctx, span, f"{value:.2f}"), element=element, found=f"{value:.2f}",
                    calcd=f"{reference:.2f}", diff=f"{value - reference:+.2f}", tol=fmt(tol, 2),
                    data={"element": element, "found": value, "calcd": round(reference, 4), "tolerance": tol},
                )
