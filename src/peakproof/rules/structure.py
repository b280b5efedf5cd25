"""The data against the compound's structure (a SMILES/InChI line, or ``check --structures``).

These rules run only where a structure is known (``ctx.structure``); the chemistry (formula,
symmetry classes, distances to F) is RDKit's, worked out once per structure in
``peakproof.structures.facts``.
"""

from __future__ import annotations

from . import Rule
from ._util import fmt
from .carbon import carbon_signals


def _facts(ctx):
    s = ctx.structure
    if s is None or s.error:
        return None
    from ..structures import facts

    return facts(s.kind, s.text)


def _where(block, ctx):
    """The structure's own span when it is written in the document, else the block's."""
    return ctx.structure.span if ctx.structure.span is not None else block.span


def _origin(ctx) -> str:
    s = ctx.structure
    return "the structure written here" if s.origin == "document" else f"the structure of {s.label!r} ({s.origin})"


class StructureUnreadable(Rule):
    """A structure RDKit cannot read; nothing else can be checked against it."""

    name = "structure-unreadable"
    code = "PP951"
    severity = "error"
    message = "{reason}; the checks against the structure are skipped for this compound"
    rationale = ("A SMILES, InChI or molfile that does not describe a valid molecule (an unclosed "
                 "ring, an atom with too many bonds, an aromatic ring that cannot be kekulized) "
                 "gives nothing to compare the data with, and is itself a mistake in the SI.")
    source = "Daylight SMILES theory manual; RDKit's sanitization rules"
    examples = (
        ("fail", "SMILES: CCOC(=O)c1cccc1\n13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 60.9, 14.3."),
        ("pass", "SMILES: CCOC(=O)c1ccccc1\n13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 60.9, 14.3."),
    )

    def check(self, block, ctx):
        s = ctx.structure
        if s is not None and s.error:
            yield self.finding(_where(block, ctx), reason=s.error,
                               data={"structure": s.text[:200], "origin": s.origin})


class StructureFormula(Rule):
    """The structure's molecular formula against the formulas the text states."""

    name = "structure-formula"
    code = "PP952"
    severity = "error"
    message = "{origin} is {structure} but the {source} gives {written}"
    rationale = ("The drawn structure, the HRMS ion (its adduct taken away), the elemental "
                 "analysis and the stated formula must all describe one compound; a mismatch means "
                 "a wrong structure, a wrong formula, or data of another compound. Isotopes (D, 13C) "
                 "and charge come from the structure as written.")
    source = "common practice (ACS and RSC author guidelines: characterization must match the structure)"
    examples = (
        ("fail", "SMILES: CCCOC(C)=O\nAnal. Calcd for C4H8O2: C, 54.53; H, 9.15. Found: C, 54.50; H, 9.11."),
        ("pass", "SMILES: CCOC(C)=O\nAnal. Calcd for C4H8O2: C, 54.53; H, 9.15. Found: C, 54.50; H, 9.11."),
    )

    def check(self, block, ctx):
        facts = _facts(ctx)
        if facts is None:
            return
        from ..formula import FormulaError, parse_formula
        from ._util import neutral_of

        own = parse_formula(facts["formula"]).neutral()
        stated = []
        if ctx.config.formula:
            stated.append(("--formula", parse_formula(ctx.config.formula).neutral(), _where(block, ctx)))
        for ms in block.mass_spec:
            if ms.formula and ms.ion:
                try:
                    stated.append(("HRMS ion", neutral_of(ms.formula, ms.ion), ms.formula_span or ms.span))
                except FormulaError:
                    continue
        for analysis in block.analyses:
            if analysis.formula:
                try:
                    stated.append(("elemental analysis", parse_formula(analysis.formula).neutral(),
                                   analysis.formula_span or analysis.span))
                except FormulaError:
                    continue
        for source, formula, span in stated:
            if dict(formula.counts) != dict(own.counts):
                yield self.finding(span or block.span, origin=_origin(ctx), structure=facts["formula"],
                                   source=source, written=formula.hill(),
                                   data={"structure_formula": facts["formula"], "stated": formula.hill(),
                                         "source": source})


class StructureCarbonClasses(Rule):
    """13C signals against the structure's symmetry-distinct carbons."""

    name = "structure-carbon-classes"
    code = "PP953"
    severity = "warning"
    message = "{signals} carbon signals are listed; {origin} has {classes} symmetry-distinct carbons ({carbons} C): {explanation}"
    rationale = (
        "Carbons related by the molecule's topological symmetry (RDKit canonical ranks without "
        "tie-breaking, stereo included) give one signal; each other carbon gives its own. Fewer "
        "signals than distinct carbons is common (overlap) and only worth a note; more signals "
        "than distinct carbons but not more than carbons suggests an impurity, rotamers or a "
        "split C–F/C–P doublet listed as two. Diastereotopic carbons (two methyls of an isopropyl "
        "next to a stereocentre) are counted as one class here although they may show two signals."
    )
    source = "common practice; symmetry classes by RDKit CanonicalRankAtoms(breakTies=False)"
    examples = (
        ("fail", "SMILES: CCOC(=O)c1ccccc1\n13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 127.9, 60.9, 14.3."),
        ("pass", "SMILES: CCOC(=O)c1ccccc1\n13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 60.9, 14.3."),
    )

    def check(self, block, ctx):
        facts = _facts(ctx)
        if facts is None:
            return
        classes, carbons = facts["carbon_classes"], facts["carbons"]
        for spectrum in block.spectra:
            if spectrum.nucleus != "13C" or not spectrum.signals:
                continue
            listed = len(spectrum.signals)  # "128.3 (2C)" is one signal for two equivalent carbons
            counted = carbon_signals(spectrum)
            data = {"signals": listed, "carbons_counted": counted, "carbon_classes": classes,
                    "structure_carbons": carbons}
            if listed > carbons:
                if ctx.formula is None:  # otherwise carbon-count-excess says it already
                    yield self.finding(spectrum.span, severity="error", signals=listed, origin=_origin(ctx),
                                       classes=classes, carbons=carbons, data=data,
                                       explanation="more signals than carbons cannot all belong to this compound")
            elif listed > classes:
                yield self.finding(spectrum.span, signals=listed, origin=_origin(ctx), classes=classes,
                                   carbons=carbons, data=data,
                                   explanation="the extra signals are likely an impurity, rotamers or a C–F doublet listed as two shifts")
            elif listed < classes:
                yield self.finding(spectrum.span, severity="note", signals=listed, origin=_origin(ctx),
                                   classes=classes, carbons=carbons, data=data,
                                   explanation=f"{classes - listed} likely overlapped or not observed (quaternary carbons are often weak)")


class StructureProtonCount(Rule):
    """The sum of 1H integrals against the structure's hydrogens."""

    name = "structure-proton-count"
    code = "PP954"
    severity = "warning"
    message = "the 1H integrals add up to {total} H; {origin} has {hydrogens} H{exchangeable}"
    rationale = (
        "Every proton of the compound integrates in a 1H spectrum, except exchangeable OH, NH and SH "
        "protons, which may be broad or missing (in protic solvents above all). Deuterium written "
        "in the structure ([2H]) is not counted. A total outside that range suggests a wrong "
        "integration, an impurity counted, or a different structure."
    )
    source = "common practice"
    examples = (
        ("fail", "SMILES: Cc1ccc(C)cc1\n1H NMR (400 MHz, CDCl3) δ 7.05 (s, 4H), 2.31 (s, 9H)."),
        ("pass", "SMILES: Cc1ccc(C)cc1\n1H NMR (400 MHz, CDCl3) δ 7.05 (s, 4H), 2.31 (s, 6H)."),
        ("pass", "SMILES: CCO\n1H NMR (400 MHz, CDCl3) δ 3.69 (q, J = 7.0 Hz, 2H), 1.22 (t, J = 7.0 Hz, 3H)."),
    )

    def check(self, block, ctx):
        facts = _facts(ctx)
        if facts is None:
            return
        hydrogens, exchangeable = facts["protium"], facts["exchangeable"]
        for spectrum in block.spectra:
            if spectrum.nucleus != "1H" or not spectrum.signals:
                continue
            if any(s.count is None or s.count_nucleus not in (None, "H") for s in spectrum.signals):
                continue  # an integral not given: no total to compare
            total = sum(s.count for s in spectrum.signals)
            if hydrogens - exchangeable - 0.5 < total < hydrogens + 0.5:
                continue
            yield self.finding(spectrum.span, total=fmt(total, 1), origin=_origin(ctx), hydrogens=hydrogens,
                               exchangeable=f", {exchangeable} of them exchangeable (OH/NH/SH)" if exchangeable else "",
                               data={"total": total, "structure_hydrogens": hydrogens, "exchangeable": exchangeable})


class StructureFluorineSplitting(Rule):
    """A fluorinated structure whose decoupled 13C list shows no C–F splitting at all."""

    name = "structure-cf-splitting"
    code = "PP955"
    severity = "note"
    message = "{origin} has {near} carbons within three bonds of F, but no 13C signal is written with a C–F splitting"
    rationale = (
        "13C{1H} spectra are not decoupled from 19F: a CF3 carbon is a quartet (1J about 270 Hz), "
        "the carbon bearing it a quartet (2J about 30–35 Hz), an aryl C–F a doublet (1J about 245 Hz), "
        "and 2J/3J couplings of a few to 25 Hz reach two and three bonds further. A list that writes "
        "every carbon of a fluorinated compound as a singlet likely lost those multiplicities."
    )
    source = "common practice (C–F coupling ranges as in Pretsch, Structure Determination of Organic Compounds — from memory)"
    examples = (
        ("fail", "SMILES: FC(F)(F)c1ccc(C)cc1\n13C{1H} NMR (101 MHz, CDCl3) δ 141.9, 129.3, 127.7, 125.2, 124.4, 21.4."),
        ("pass", "SMILES: FC(F)(F)c1ccc(C)cc1\n13C{1H} NMR (101 MHz, CDCl3) δ 141.9, 129.3, 127.7 (q, J = 32.3 Hz), 125.2 (q, J = 3.8 Hz), 124.4 (q, J = 271.8 Hz), 21.4."),
    )

    def check(self, block, ctx):
        facts = _facts(ctx)
        if facts is None or not facts["carbons_near_f"]:
            return
        for spectrum in block.spectra:
            if spectrum.nucleus != "13C" or not spectrum.signals:
                continue
            split = any(s.couplings or (s.multiplicity and s.multiplicity.name not in ("s", "br s"))
                        for s in spectrum.signals)
            if not split:
                yield self.finding(spectrum.span, origin=_origin(ctx), near=facts["carbons_near_f"],
                                   data={"carbons_near_f": facts["carbons_near_f"],
                                         "classes_near_f": facts["carbon_classes_near_f"]})
