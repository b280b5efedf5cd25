"""Carbon count: 13C signals (counting "(2C)") against the formula's carbons."""

from __future__ import annotations

from . import Rule
from ._util import fmt


def carbon_signals(spectrum) -> float:
    return sum(s.count if (s.count_nucleus == "C" and s.count) else 1 for s in spectrum.signals)


def symmetry_savings(block) -> int:
    """Carbons that symmetry visible in the block's 1H list lets share a 13C signal: each
    aromatic 2H signal is a pair of equivalent CH (a para ring's two doublets, a phenyl's ortho
    and meta pairs), a 5H aromatic multiplet a phenyl (two pairs), and an aliphatic singlet or
    doublet of 3k protons k equivalent methyls (isopropyl 6H d, tert-butyl 9H s) (common
    practice). An estimate used only to keep the deficit note quiet, never to raise a finding."""
    saved = 0
    for spectrum in block.spectra:
        if spectrum.nucleus != "1H":
            continue
        for sig in spectrum.signals:
            n = sig.count
            if n is None or abs(n - round(n)) > 1e-6 or (sig.shift is None and sig.range is None):
                continue
            n, where = round(n), sig.position
            name = sig.multiplicity.name if sig.multiplicity is not None else None
            if 6.3 <= where <= 8.6:
                if n == 2:
                    saved += 1
                elif n == 5 and sig.multiplicity is not None and sig.multiplicity.kind == "multiplet":
                    saved += 2
            elif where < 4.5 and n >= 6 and n % 3 == 0 and name in ("s", "d"):
                saved += n // 3 - 1
    return saved


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
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 157.7, 141.0, 127.2, 113.8, 55.2, 33.3, 24.2.", "C10H14O"),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 159.2, 130.2 (2C), 126.0, 114.0 (2C), 60.5, 55.3, 41.0, 14.2, 12.0.", "C12H14O3"),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.14 (d, J = 8.6 Hz, 2H), 6.84 (d, J = 8.6 Hz, 2H), 3.79 (s, 3H), "
                 "2.86 (sept, J = 6.9 Hz, 1H), 1.23 (d, J = 6.9 Hz, 6H); 13C{1H} NMR (101 MHz, CDCl3) δ 157.7, "
                 "141.0, 127.2, 113.8, 55.2, 33.3, 24.2.", "C10H14O"),
    )

    def check(self, block, ctx):
        saved = None
        for spectrum, signals, carbons in self._pairs(block, ctx):
            if signals >= carbons * (1 - ctx.config.carbon_deficit):
                continue
            if saved is None:
                saved = symmetry_savings(block)
            distinct = max(carbons - saved, 1)
            if signals >= distinct * (1 - ctx.config.carbon_deficit):
                continue  # the symmetry the 1H list shows accounts for the shortfall
            yield self.finding(spectrum.span, signals=fmt(signals, 1), carbons=carbons, formula=ctx.formula.hill(),
                               data={"signals": signals, "formula_carbons": carbons,
                                     "symmetry_shared": saved, "threshold": ctx.config.carbon_deficit})
