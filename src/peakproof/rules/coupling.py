"""Coupling partners: every H–H J should recur in another signal; heteronuclear J across spectra."""

from __future__ import annotations

from ..network import homonuclear
from . import Rule
from ._util import block_has_element, fmt, number_edit_span, signal_label


def _unreported_partner_possible(spectrum, skip: int) -> bool:
    """A multiplet without J values (m, br, ABX…) may hide any partner."""
    for k, s in enumerate(spectrum.signals):
        if k == skip or s.couplings:
            continue
        m = s.multiplicity
        if m is not None and m.kind in ("multiplet", "broad", "AB", "first-order"):
            return True
    return False


def _hetero_match(block, spectrum, value: float, tol: float) -> bool:
    """Whether ``value`` recurs in another nucleus's list of the block (an H–F or H–P coupling)."""
    for other in block.spectra:
        if other is spectrum or other.element == spectrum.element:
            continue
        for s in other.signals:
            if any(abs(c.value - value) <= tol for c in s.couplings):
                return True
    return False


def _hetero_unlisted(block, ctx) -> bool:
    """F or P in the compound while no 19F/31P list gives J values: an H–X partner is expected."""
    for element, nucleus in (("F", "19F"), ("P", "31P")):
        if block_has_element(block, ctx, element) and not any(
            s.couplings for sp in block.spectra if sp.nucleus == nucleus for s in sp.signals
        ):
            return True
    return False


def _unmatched_homonuclear(block, ctx):
    """(spectrum, index, signal, coupling index) for 1H J values with no partner in the network
    (made once per block: coupling-near-miss and coupling-no-partner both go through them)."""
    return ctx.shared("unmatched-homonuclear", block, lambda: list(_find_unmatched(block, ctx)))


def _find_unmatched(block, ctx):
    for spectrum in block.spectra:
        if spectrum.nucleus != "1H":
            continue
        net = ctx.network(spectrum)
        for k, signal in enumerate(spectrum.signals):
            if not signal.couplings:
                continue
            ab = signal.multiplicity is not None and signal.multiplicity.kind == "AB"
            for ci, c in enumerate(signal.couplings):
                if (c.nuclei and not homonuclear(c, "H")) or net.has_partner(k, ci) or (ab and _within_ab(signal, ci)):
                    continue
                yield spectrum, k, signal, ci


def _within_ab(signal, ci: int) -> bool:
    """The J of an AB quartet joins its own two halves, so it needs no partner elsewhere."""
    m = signal.multiplicity
    if m is None or m.kind != "AB":
        return False
    c = signal.couplings[ci]
    return ci == 0 or (c.label or "").upper() == "AB"


def _nearest(spectrum, k: int, value: float):
    best = None
    for m, s in enumerate(spectrum.signals):
        if m == k:
            continue
        for cj, c in enumerate(s.couplings):
            if not homonuclear(c, "H"):
                continue
            diff = abs(c.value - value)
            if best is None or diff < best[0]:
                best = (diff, m, cj)
    return best


class CouplingNearMiss(Rule):
    """A J value that almost, but not quite, matches one in another signal."""

    name = "coupling-near-miss"
    code = "PP201"
    severity = "warning"
    message = "J = {j} Hz at {here} and J = {other_j} Hz at {there} differ by {diff} Hz (more than {tol} Hz); if they are partners one value is likely mistyped"
    rationale = (
        "A coupling is shared by the two nuclei it joins, so the same J appears in both signals; "
        "values that differ by more than the digital resolution suggest a typing or reading error."
    )
    source = "common practice (J is a property of the pair of nuclei)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.5 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.2 Hz, 3H)."),
    )

    def check(self, block, ctx):
        tol, near = ctx.config.coupling_tolerance, ctx.config.near_miss
        reported: set[frozenset] = set()
        orphans = _unmatched_homonuclear(block, ctx)
        orphan_keys = {(id(sp), k, ci) for sp, k, _, ci in orphans}
        for spectrum, k, signal, ci in orphans:
            c = signal.couplings[ci]
            best = _nearest(spectrum, k, c.value)
            if best is None or not (tol < best[0] <= near + 1e-9):
                continue
            _, m, cj = best
            # both values must lack a partner, and no multiplet without J may hide the real one
            if (id(spectrum), m, cj) not in orphan_keys or _unreported_partner_possible(spectrum, k):
                continue
            pair = frozenset({(id(spectrum), k, ci), (id(spectrum), m, cj)})
            if pair in reported:
                continue
            reported.add(pair)
            other = spectrum.signals[m]
            oc = other.couplings[cj]
            # pair findings point at the later-listed member, naming the earlier one
            where = number_edit_span(ctx, c if k > m else oc)
            if k < m:
                signal, other, c, oc = other, signal, oc, c
            yield self.finding(
                where,
                j=c.text or fmt(c.value, 2),
                here=signal_label(signal),
                other_j=oc.text or fmt(oc.value, 2),
                there=signal_label(other),
                diff=fmt(best[0], 2),
                tol=fmt(tol, 2),
                data={"j_hz": c.value, "partner_j_hz": oc.value, "partner_shift": other.position,
                      "difference_hz": round(best[0], 4), "tolerance_hz": tol},
            )


class CouplingNoPartner(Rule):
    """A J value with no partner among the other signals."""

    name = "coupling-no-partner"
    code = "PP202"
    severity = "note"
    message = "J = {j} Hz at {here} recurs in no other signal; the partner is likely a heteronucleus or an exchangeable proton not listed"
    rationale = (
        "Each H–H coupling should appear in two signals. A J with no partner points to a "
        "heteronuclear coupling (19F, 31P), an exchangeable proton, or a typing error."
    )
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 3.40 (d, J = 5.5 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 3.40 (d, J = 5.5 Hz, 2H), 2.10 (m, 1H), 1.25 (t, J = 7.1 Hz, 3H)."),
    )

    def check(self, block, ctx):
        tol, near = ctx.config.coupling_tolerance, ctx.config.near_miss
        for spectrum, k, signal, ci in _unmatched_homonuclear(block, ctx):
            c = signal.couplings[ci]
            best = _nearest(spectrum, k, c.value)
            if best is not None and best[0] <= near + 1e-9:
                continue  # a near miss, reported by coupling-near-miss
            if signal.multiplicity is not None and signal.multiplicity.kind == "singlet":
                continue  # singlet-with-j reports it
            if _hetero_match(block, spectrum, c.value, tol) or _unreported_partner_possible(spectrum, k):
                continue
            if _hetero_unlisted(block, ctx):
                continue
            yield self.finding(
                number_edit_span(ctx, c),
                j=c.text or fmt(c.value, 2),
                here=signal_label(signal),
                data={"j_hz": c.value, "tolerance_hz": tol},
            )


class LargeHHCoupling(Rule):
    """An H–H coupling above 20 Hz with no F or P in the compound to explain it."""

    name = "large-hh-coupling"
    code = "PP203"
    severity = "warning"
    message = "J = {j} Hz is larger than H–H couplings usually are (≤ 20 Hz); two singlets written as a doublet, or a coupling to F or P, is likely"
    rationale = (
        "Geminal and vicinal H–H couplings rarely exceed about 20 Hz; much larger splittings come "
        "from 19F or 31P, or are two separate singlets read as a doublet."
    )
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.95 (d, J = 60.0 Hz, 1H), 2.10 (d, J = 60.0 Hz, 1H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.55 (d, J = 47.5 Hz, 2H), 2.20 (s, 3H).", "C3H5FO"),
    )

    def check(self, block, ctx):
        if block_has_element(block, ctx, "F") or block_has_element(block, ctx, "P"):
            return
        for spectrum in block.spectra:
            if spectrum.nucleus != "1H":
                continue
            for signal in spectrum.signals:
                for c in signal.couplings:
                    if c.value > 20.0 and homonuclear(c, "H"):
                        yield self.finding(number_edit_span(ctx, c), j=c.text or fmt(c.value, 2),
                                           data={"j_hz": c.value, "limit_hz": 20.0})


class HeteronuclearMismatch(Rule):
    """A J(H,F), J(H,P) or J(C,F) written in one list has no match in the partner nucleus's list."""

    name = "hetero-coupling-mismatch"
    code = "PP204"
    severity = "warning"
    message = "{label} = {j} Hz in the {here} list has no match in the {there} list (nearest {nearest}); one of the values is likely wrong"
    rationale = (
        "A heteronuclear coupling is seen in the spectra of both nuclei (unless one is decoupled), "
        "so J(H,F) in the 1H list must recur in the 19F list, J(H,P) in the 31P list."
    )
    source = "common practice (J is a property of the pair of nuclei)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.55 (d, JHF = 47.5 Hz, 2H), 2.20 (s, 3H); 19F NMR (376 MHz, CDCl3) δ −230.1 (t, JFH = 46.0 Hz)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.55 (d, JHF = 47.5 Hz, 2H), 2.20 (s, 3H); 19F NMR (376 MHz, CDCl3) δ −230.1 (t, JFH = 47.5 Hz)."),
    )

    def check(self, block, ctx):
        tol = ctx.config.coupling_tolerance + 1e-9
        for spectrum in block.spectra:
            mine = spectrum.element
            for signal in spectrum.signals:
                for c in signal.couplings:
                    if not c.nuclei or len(set(c.nuclei)) < 2:
                        continue
                    others = [n.lstrip("0123456789") for n in c.nuclei if n.lstrip("0123456789") != mine]
                    if not others:
                        continue
                    x = others[0]
                    for partner in block.spectra:
                        if partner.element != x or any(d.lstrip("0123456789") == mine for d in partner.decoupled):
                            continue
                        values = [pc.value for ps in partner.signals for pc in ps.couplings
                                  if (pc.nuclei and mine in {n.lstrip("0123456789") for n in pc.nuclei})
                                  or (not pc.nuclei and mine == "H")]
                        if not values or any(abs(v - c.value) <= tol for v in values):
                            continue
                        nearest = min(values, key=lambda v: abs(v - c.value))
                        yield self.finding(
                            number_edit_span(ctx, c),
                            label=f"J({mine},{x})",
                            j=c.text or fmt(c.value, 2),
                            here=spectrum.nucleus,
                            there=partner.nucleus,
                            nearest=f"{fmt(nearest, 2)} Hz",
                            data={"j_hz": c.value, "partner_values_hz": values, "tolerance_hz": ctx.config.coupling_tolerance},
                        )
