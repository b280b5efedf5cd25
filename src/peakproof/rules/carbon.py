"""Carbon count: 13C signals (counting "(2C)") against the formula's carbons."""

from __future__ import annotations

from . import Rule
from ._util import fmt


def carbon_signals(spectrum) -> float:
    return sum(s.count if (s.count_nucleus == "C" and s.count) else 1 for s in spectrum.signals)


class _Carbon(Rule):
    def _pairs(self, block, ctx):
        if ctx.formula is None:
            return
        carbons = ctx.formula.element_count("C")
        for spectrum in block.spectra:
            if spectrum.nucleus == "13C" and spectrum.signals:
                yield spectrum, carbon_signals(spectrum), carbons


class CarbonCountExcess(_Carbon):
    """More carbon signals than the formula has carbons cannot all belong to the compound."""

    name = "carbon-count-excess"
    code = "PP311"
    severity = "error"
    message = "{signals} carbon signals are listed but {formula} has {carbons} C; C–F doublets listed as two carbons or an impurity are likely"
    rationale = (
        "Each carbon gives at most one signal in a 13C{1H} spectrum; more signals than carbons "
        "means impurity peaks, a split C–F or C–P doublet counted twice, or the wrong formula."
    )
    source = "common practice"
    examples = (
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 60.5, 21.0, 14.2, 12.0.", "C4H8O2"),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 60.5, 21.0, 14.2.", "C4H8O2"),
    )

    def check(self, block, ctx):
        for spectrum, signals, carbons in self._pairs(block, ctx):
            if signals > carbons:
                yield self.finding(spectrum.span, signals=fmt(signals, 1), carbons=carbons, formula=ctx.formula.hill(),
                                   data={"signals": signals, "formula_carbons": carbons,
                                         "formula_source": ctx.formula_source})


class CarbonCountDeficit(_Carbon):
    """Far fewer carbon signals than carbons: symmetry or overlap (say so with "(2C)")."""

    name = "carbon-count-deficit"
    code = "PP312"
    severity = "note"
    message = "{signals} carbon signals are listed for {carbons} C in {formula}; symmetry or overlap may explain it (mark equivalent carbons with '(2C)')"
    rationale = "Symmetry-equivalent and overlapping carbons share a signal; counting them '(2C)' lets a reader verify the list."
    source = "common practice"
    examples = (
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 130.2, 60.5, 14.2.", "C12H14O3"),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 159.2, 130.2 (2C), 126.0, 114.0 (2C), 60.5, 55.3, 41.0, 14.2, 12.0.", "C12H14O3"),
    )

    def check(self, block, ctx):
        for spectrum, signals, carbons in self._pairs(block, ctx):
            if signals < carbons * (1 - ctx.config.carbon_deficit):
                yield self.finding(spectrum.span, signals=fmt(signals, 1), carbons=carbons, formula=ctx.formula.hill(),
                                   data={"signals": signals, "formula_carbons": carbons,
                                         "threshold": ctx.config.carbon_deficit})
