"""Multiplicity letters against their J lists: count, singlets with J, equal J, J order."""

from __future__ import annotations

from ..model import PARTNERS
from . import Rule, suggestion
from ._util import fmt, number_edit_span

LETTER_FOR_PARTNERS = {n: letter for letter, n in PARTNERS.items()}


def _first_order(signal) -> bool:
    m = signal.multiplicity
    return m is not None and m.kind == "first-order" and bool(m.components)


class MultiplicityJCount(Rule):
    """The letters of a first-order multiplet say how many coupling constants it has."""

    name = "multiplicity-j-count"
    code = "PP101"
    severity = "error"
    message = "'{letters}' calls for {expected} J value(s) but {given} {verb} given"
    rationale = (
        "A first-order multiplet is a product of splittings, one per distinct coupling: d, t and q "
        "carry one J, dd, dt and td two, ddd three; an AB quartet one; m any number."
    )
    source = "Hoye, Hanson, Vyvyan, J. Org. Chem. 1994, 59, 4096; NMReDATA, Magn. Reson. Chem. 2018, 56, 703"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.40 (dd, J = 8.4 Hz, 1H), 6.80 (d, J = 8.4 Hz, 1H)."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1, 2.0 Hz, 2H), 2.10 (m, 1H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.36–7.28 (m, 5H), 5.12 (s, 2H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            for signal in spectrum.signals:
                m = signal.multiplicity
                if m is None or m.kind in ("singlet",):
                    continue
                expected = m.expected_j_count
                given = len(signal.couplings)
                if expected is None or expected == given:
                    continue
                yield self.finding(
                    m.span,
                    letters=m.written or m.name,
                    expected=expected,
                    given=given,
                    verb="is" if given == 1 else "are",
                    data={"multiplicity": m.name, "expected_j": expected, "given_j": list(signal.j_hz)},
                )


class SingletWithJ(Rule):
    """A singlet has no resolved coupling, so a J written beside it contradicts the letter."""

    name = "singlet-with-j"
    code = "PP102"
    severity = "warning"
    message = "a singlet is reported with J = {j} Hz; the letter or the coupling is likely wrong"
    rationale = "A singlet shows no resolved splitting; a coupling constant implies a multiplet."
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, J = 1.2 Hz, 3H), 2.10 (m, 1H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            for signal in spectrum.signals:
                m = signal.multiplicity
                if m is not None and m.kind == "singlet" and signal.couplings:
                    yield self.finding(
                        m.span,
                        j=", ".join(fmt(v, 2) for v in signal.j_hz),
                        data={"multiplicity": m.name, "j_hz": list(signal.j_hz)},
                    )


class EqualJInCompoundMultiplet(Rule):
    """Two equal couplings in a dd (or ddd, dt…) give the lines of a simpler multiplet."""

    name = "equal-j-multiplet"
    code = "PP103"
    severity = "note"
    message = "'{letters}' with J = {values} Hz (equal within {tolerance} Hz) appears as '{simpler}'; report it as '{simpler}' or 'app {simpler}'"
    rationale = (
        "Couplings of the same size to n nuclei give an (n+1)-line pattern, so a dd with two equal "
        "J values is seen as a triplet; the apparent pattern is what is reported."
    )
    source = "Hoye, Hanson, Vyvyan, J. Org. Chem. 1994, 59, 4096 (first-order line spacing)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.20 (dd, J = 7.5, 7.4 Hz, 1H), 6.95 (d, J = 7.5 Hz, 2H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.20 (t, J = 7.5 Hz, 1H), 6.95 (d, J = 7.5 Hz, 2H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 6.95 (dd, J = 8.4, 2.1 Hz, 1H), 7.40 (d, J = 8.4 Hz, 1H), 6.80 (d, J = 2.1 Hz, 1H)."),
    )

    def check(self, block, ctx):
        tol = ctx.config.coupling_tolerance + 1e-9
        for spectrum in block.spectra:
            for signal in spectrum.signals:
                if not _first_order(signal) or signal.multiplicity.apparent:
                    continue
                m = signal.multiplicity
                if len(m.components) < 2 or len(m.components) != len(signal.couplings):
                    continue
                clusters: list[list[int]] = []  # indices into couplings, in written order
                for k, c in enumerate(signal.couplings):
                    for cluster in clusters:
                        if abs(signal.couplings[cluster[0]].value - c.value) <= tol:
                            cluster.append(k)
                            break
                    else:
                        clusters.append([k])
                if len(clusters) == len(signal.couplings):
                    continue
                partners = [sum(PARTNERS[m.components[k]] for k in cl) for cl in clusters]
                if any(n not in LETTER_FOR_PARTNERS for n in partners):
                    continue
                simpler = "".join(LETTER_FOR_PARTNERS[n] for n in partners)
                merged = [cl for cl in clusters if len(cl) > 1]
                edits = [(m.span.start, m.span.end, simpler)]
                for cl in clusters:
                    for k in cl[1:]:
                        edits.append((signal.couplings[k - 1].span.end, signal.couplings[k].span.end, ""))
                values = " and ".join(fmt(signal.couplings[k].value, 2) for k in merged[0])
                yield self.finding(
                    m.span,
                    letters=m.name,
                    values=values,
                    tolerance=fmt(ctx.config.coupling_tolerance, 2),
                    simpler=simpler,
                    data={"multiplicity": m.name, "j_hz": list(signal.j_hz), "suggested": simpler},
                    suggestion=suggestion(f"write '{simpler}' with one J per distinct coupling", *edits),
                )


class JOrder(Rule):
    """J values follow the letters, largest first, so 'td, J = 7.5, 1.2' has a 7.5 Hz triplet."""

    name = "j-order"
    code = "PP104"
    severity = "note"
    message = "J values {values} are not listed largest first; with the letters in the same order this reads '{reordered}'"
    rationale = (
        "By convention the letters of a compound multiplet and its J values are both written from "
        "the largest coupling down, so each letter pairs with its J."
    )
    source = "NMReDATA conventions, Pupier et al., Magn. Reson. Chem. 2018, 56, 703; common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.4 Hz, 1H), 6.95 (dd, J = 2.0, 8.4 Hz, 1H), 6.80 (d, J = 2.0 Hz, 1H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.4 Hz, 1H), 6.95 (dd, J = 8.4, 2.0 Hz, 1H), 6.80 (d, J = 2.0 Hz, 1H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            for signal in spectrum.signals:
                if not _first_order(signal):
                    continue
                m, cs = signal.multiplicity, signal.couplings
                if len(m.components) < 2 or len(m.components) != len(cs):
                    continue
                if all(cs[k].value >= cs[k + 1].value for k in range(len(cs) - 1)):
                    continue
                order = sorted(range(len(cs)), key=lambda k: -cs[k].value)
                letters = "".join(m.components[k] for k in order)
                texts = [cs[k].text or fmt(cs[k].value, 2) for k in order]
                reordered = f"{letters}, J = {', '.join(texts)}"
                fix = None
                if len({c.nuclei for c in cs}) == 1:
                    edits = [(m.span.start, m.span.end, letters)] if letters != m.name else []
                    for pos, k in enumerate(order):
                        if k != pos:
                            target = number_edit_span(ctx, cs[pos])
                            edits.append((target.start, target.end, texts[pos]))
                    fix = suggestion("list letters and J values largest first", *edits)
                yield self.finding(
                    m.span,
                    values=", ".join(c.text or fmt(c.value, 2) for c in cs),
                    reordered=reordered,
                    data={"multiplicity": m.name, "j_hz": list(signal.j_hz)},
                    suggestion=fix,
                )
