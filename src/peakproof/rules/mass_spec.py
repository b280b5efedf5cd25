"""HRMS: calcd m/z recomputed (electron mass included), found vs calcd, ion formula vs adduct."""

from __future__ import annotations

import functools

from ..formula import FormulaError, ion_formula, neutral_from_ion
from ..masses import MassError, calcd_matches, formula_is_neutral_then_ion, mz, mz_without_electron, ppm_error
from . import Rule, _util, suggestion
from ._util import fmt


def _decimals(text: str) -> int:
    return len(text) - text.index(".") - 1 if "." in text else 0


def intended_ion(ms, ctx):
    if not ms.formula:
        return None
    calcd = ms.calcd if ms.calcd is not None and ms.calcd_text else None
    decimals = _decimals(ms.calcd_text) if calcd is not None else 0
    return _intended_ion(ms.formula, ms.ion, ctx.independent_formula, calcd, decimals)


@functools.lru_cache(maxsize=4096)
def _intended_ion(formula_text, ion_text, independent, calcd=None, decimals=0):
    """What the ion formula was meant to be: (ion Formula with charge, z, charge assumed?,
    problem, neutral reading?).

    ``problem`` says why the written formula is not the ion (adduct missing, or the neutral
    compound's formula written); the returned formula is then the corrected one, so the calcd
    and found checks judge the numbers against the ion the author meant. When the calcd value
    shows the formula was written as the neutral compound's, followed by the ion type (a
    convention, not a slip), the ion is that formula plus the adduct and there is no problem.
    """
    try:
        written = _util.formula(formula_text)
    except FormulaError:
        return None
    ion = None
    if ion_text:
        try:
            ion = _util.ion_type(ion_text)
        except FormulaError:
            ion = None
    if ion is not None and calcd is not None and \
            formula_is_neutral_then_ion(formula_text, ion_text, calcd, decimals):
        intended = ion_formula(written.neutral(), ion)
        return intended.with_charge(ion.charge), ion.charge, False, None, True
    problem = None
    intended = written
    if ion is not None:
        try:
            neutral_from_ion(written, ion)
        except FormulaError as exc:
            problem = f"cannot hold the adduct ({exc})"
        if problem is None and independent is not None and written.neutral() == independent.neutral() \
                and ion_formula(independent, ion).neutral() != written.neutral():
            problem = "is the neutral compound's formula"
        if problem is not None:
            try:
                intended = ion_formula((independent or written).neutral(), ion)
            except FormulaError:
                return None
    z, assumed = written.charge, False
    if not z and ion is not None:
        z = ion.charge
    if not z:
        z, assumed = (intended.charge or 1), not intended.charge
    return intended.with_charge(z), z, assumed, problem, False


def _fits_written_formula(ms, decimals: int, z: int) -> bool:
    try:
        return calcd_matches(ms.calcd, decimals, _util.formula(ms.formula), z)
    except FormulaError:
        return False


_util.RULE_CACHES.append(_intended_ion)


class HrmsCalcd(Rule):
    """The calculated m/z must be the ion formula's monoisotopic mass minus z electrons, over |z|."""

    name = "hrms-calcd"
    code = "PP601"
    severity = "error"
    message = "calcd m/z {written} for {formula} (z = {z}) should be {expected}{extra}"
    rationale = (
        "m/z of an ion is (M − z·mₑ)/|z| with M the monoisotopic mass of its formula: a cation "
        "has lost electrons, so e.g. [C12H14O3Na]+ is 229.0835, not 229.0841."
    )
    source = "AME2020 atomic masses (Wang et al., Chin. Phys. C 2021, 45, 030003); CODATA 2018 electron mass"
    examples = (
        ("fail", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0841, found 229.0838."),
        ("fail", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0935, found 229.0838."),
        ("pass", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0838."),
    )

    def check(self, block, ctx):
        for ms in block.mass_spec:
            ion = intended_ion(ms, ctx)
            if ion is None or ms.calcd is None or not ms.calcd_text:
                continue
            formula, z, assumed = ion[:3]
            try:
                right, wrong = mz(formula, z), mz_without_electron(formula, z)
            except MassError:
                continue
            d = _decimals(ms.calcd_text)
            if ion[3] is not None and _fits_written_formula(ms, d, z):
                continue  # computed for the formula as written: hrms-adduct names that one cause
            allowed = 0.5 * 10 ** -d + 1e-5  # rounding, plus slack for other mass tables
            if abs(ms.calcd - right) <= allowed:
                continue
            extra = ""
            if abs(ms.calcd - wrong) <= allowed:
                extra = "; the value given is the mass without the electron mass (a common slip)"
            if assumed:
                extra += "; charge +1 assumed as none is written"
            expected = f"{right:.{max(d, 4)}f}"
            yield self.finding(
                ms.calcd_span or ms.span,
                written=ms.calcd_text, formula=formula.hill(), z=f"{z:+d}", expected=expected, extra=extra,
                data={"calcd": ms.calcd, "recomputed": round(right, 6), "without_electron": round(wrong, 6),
                      "charge": z, "difference": round(ms.calcd - right, 6)},
                suggestion=suggestion("the recomputed m/z", (ms.calcd_span.start, ms.calcd_span.end, expected))
                if ms.calcd_span else None,
            )


class HrmsFound(Rule):
    """Found m/z within the accuracy the method claims (5 ppm by default, or a fixed m/z window)."""

    name = "hrms-found"
    code = "PP602"
    severity = "warning"
    message = "found m/z {found} differs from {calcd} by {ppm} ppm ({delta} m/z), beyond the {limit} allowed; a typing error or a different ion is likely"
    rationale = (
        "High-resolution measurements are expected within a few ppm of the calculated m/z (5 ppm "
        "is common; 0.003 m/z units is another published criterion), so the tolerance is a setting."
    )
    source = "Brenton & Godfrey, J. Am. Soc. Mass Spectrom. 2010, 21, 1821; common journal practice"
    examples = (
        ("fail", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0883."),
        ("pass", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0838."),
    )

    def check(self, block, ctx):
        for ms in block.mass_spec:
            if ms.found is None:
                continue
            reference = ms.calcd
            ion = intended_ion(ms, ctx)
            if ion is not None:
                try:
                    reference = mz(ion[0], ion[1])
                except MassError:
                    pass
            if reference is None:
                continue
            ppm = ppm_error(ms.found, reference)
            delta = ms.found - reference
            if ctx.config.hrms_mz is not None:
                bad, limit = abs(delta) > ctx.config.hrms_mz + 1e-12, f"{fmt(ctx.config.hrms_mz, 4)} m/z"
            else:
                bad, limit = abs(ppm) > ctx.config.hrms_ppm + 1e-9, f"{fmt(ctx.config.hrms_ppm, 2)} ppm"
            if bad:
                yield self.finding(
                    ms.found_span or ms.span,
                    found=ms.found_text or fmt(ms.found, 4), calcd=f"{reference:.4f}", ppm=f"{ppm:.1f}",
                    delta=f"{delta:+.4f}", limit=limit,
                    data={"found": ms.found, "calcd": round(reference, 6), "ppm": round(ppm, 3),
                          "delta_mz": round(delta, 6), "tolerance": limit},
                )


class HrmsAdduct(Rule):
    """The ion formula must be the neutral formula plus the stated adduct."""

    name = "hrms-adduct"
    code = "PP603"
    severity = "error"
    message = "the ion formula {written} {problem} for {ion}; the ion is likely {expected}"
    rationale = (
        "'calcd for' names the ion, adduct included: [M+Na]+ of C12H14O3 is C12H14NaO3+. A "
        "formula without the adduct means the calcd value was computed for the wrong species."
    )
    source = "common practice; Brenton & Godfrey, J. Am. Soc. Mass Spectrom. 2010, 21, 1821"
    examples = (
        ("fail", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3 206.0937, found 229.0838."),
        ("fail", "HRMS (ESI) m/z [M + H]+ calcd for C12H14O3 206.0937, found 207.1012.", "C12H14O3"),
        ("pass", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3 229.0835, found 229.0838."),
        ("pass", "HRMS (ESI) m/z [M + H]+ calcd for C12H15O3 207.1016, found 207.1012.", "C12H14O3"),
    )

    def check(self, block, ctx):
        for ms in block.mass_spec:
            if not ms.ion:
                continue
            ion = intended_ion(ms, ctx)
            if ion is None or ion[3] is None:
                continue
            expected = ion[0].neutral().hill()
            fix = suggestion("the ion's formula", (ms.formula_span.start, ms.formula_span.end, expected)) \
                if ms.formula_span else None
            name = _util.ion_type(ms.ion).normalized
            yield self.finding(
                ms.formula_span or ms.span, written=ms.formula, problem=ion[3], ion=name,
                expected=expected, data={"written": ms.formula, "ion": name, "expected": expected},
                suggestion=fix,
            )


class HrmsNeutralFormula(Rule):
    """The formula after 'calcd for' is the neutral compound's; the value is its ion's."""

    name = "hrms-neutral-formula"
    code = "PP604"
    severity = "note"
    message = ("calcd for {written} {ion} is read as the neutral formula followed by the ion: the value "
               "{calcd} is that of {ion_formula}; writing the ion's formula makes it unambiguous")
    rationale = (
        "Authors write 'calcd for C14H21O3P [M + H]+ 269.1301' (the neutral formula, then the ion) "
        "as often as 'calcd for C14H22O3P+ 269.1301' (the ion's formula). Both are correct when the "
        "number fits; the value decides which reading was meant, and only the form is noted."
    )
    source = "common practice"
    examples = (
        ("fail", "HRMS (ESI) m/z calcd for C12H14O3 [M + H]+ 207.1016, found 207.1012."),
        ("pass", "HRMS (ESI) m/z calcd for C12H15O3 [M + H]+ 207.1016, found 207.1012."),
        ("pass", "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0838."),
    )

    def check(self, block, ctx):
        for ms in block.mass_spec:
            if not ms.ion:
                continue
            ion = intended_ion(ms, ctx)
            if ion is None or not ion[4]:
                continue
            name = _util.ion_type(ms.ion).normalized
            yield self.finding(
                ms.formula_span or ms.span, written=ms.formula, ion=name, calcd=ms.calcd_text,
                ion_formula=ion[0].hill(),
                data={"written": ms.formula, "ion": name, "ion_formula": ion[0].hill()},
            )
