"""Decoupled 13C lists: multiplets need a heteronucleus that survives 1H decoupling; no integrals."""

from __future__ import annotations

from . import Rule, suggestion

#: Nuclei whose couplings to 13C survive 1H decoupling and are routinely resolved: 19F, 31P, 2H,
#: and 100 %-abundant or common spin-½ metals (103Rh, 195Pt satellites, 117/119Sn, 77Se…).
SURVIVING = ("F", "P", "D", "Rh", "Pt", "Sn", "Se", "Hg", "Cd", "Ag", "Y", "W", "Tl", "Pb", "Te")


def _decoupled_13c(spectrum) -> bool:
    return spectrum.nucleus == "13C" and (not spectrum.decoupled or "1H" in spectrum.decoupled)


class DecoupledMultiplet(Rule):
    """A d, t or q in a 13C{1H} list needs F, P or D (or a similar nucleus) in the formula."""

    name = "decoupled-multiplet"
    code = "PP321"
    severity = "warning"
    message = "'{letters}' in a 1H-decoupled 13C list needs a coupling to F, P or D, but {formula} has none; the splitting is likely two signals or a typing error"
    rationale = (
        "Proton decoupling removes C–H splittings; only couplings to other magnetic nuclei (19F, "
        "31P, 2H…) remain, so a multiplet needs such a nucleus in the compound."
    )
    source = "common practice"
    examples = (
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 60.5 (d, J = 12.0 Hz), 21.0, 14.2.", "C4H8O2"),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 161.2 (d, JC–F = 244.0 Hz), 133.9 (d, JC–F = 3.1 Hz), 130.5 (d, JC–F = 7.8 Hz), 115.0 (d, JC–F = 21.1 Hz), 20.9.", "C7H7F"),
    )

    def check(self, block, ctx):
        f = ctx.formula
        if f is None or any(f.counts.get(x, 0) if x == "D" else f.element_count(x) for x in SURVIVING):
            return
        for spectrum in block.spectra:
            if not _decoupled_13c(spectrum):
                continue
            for s in spectrum.signals:
                m = s.multiplicity
                if m is not None and m.kind == "first-order" and m.components:
                    yield self.finding(m.span, letters=m.name, formula=f.hill(),
                                       data={"multiplicity": m.name, "formula": f.hill(), "j_hz": list(s.j_hz)})


class CarbonIntegration(Rule):
    """Routine 13C spectra are not quantitative, so proton-style integrals do not belong there."""

    name = "carbon-integration"
    code = "PP322"
    severity = "warning"
    message = "an integration '{count}' in a 13C list is likely copied from the 1H list; routine 13C spectra are not integrated"
    rationale = (
        "NOE and relaxation make routine 13C{1H} intensities unreliable; equivalent carbons are "
        "marked '(2C)', never with H counts."
    )
    source = "common practice"
    examples = (
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 60.5 (2H), 21.0, 14.2."),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 128.5 (2C), 21.0, 14.2."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            if spectrum.nucleus != "13C":
                continue
            for s in spectrum.signals:
                if s.count is None or s.count_nucleus == "C" or s.count_span is None:
                    continue
                fix = None
                details = s.details_span and ctx.document.text[s.details_span.start : s.details_span.end]
                if details and details.strip("() ") == s.count_text and s.shift_span is not None:
                    fix = suggestion("remove the integration", (s.shift_span.end, s.details_span.end, ""))
                yield self.finding(s.count_span, count=s.count_text,
                                   data={"count": s.count, "count_nucleus": s.count_nucleus}, suggestion=fix)
