"""The splitting rules: a multiplet's letters against the nuclei that carry its J (n+1, 2nI+1)."""

from __future__ import annotations

from ..model import PARTNERS
from ..network import homonuclear
from ..nuclei import UnknownNucleus, nucleus
from . import Rule
from ._util import fmt, signal_label

#: symbol in a coupling label → nucleus of the partner
_PARTNER_NUCLEUS = {"D": "2H", "F": "19F", "P": "31P", "H": "1H", "C": "13C", "N": "15N", "Si": "29Si"}


class ReciprocityCount(Rule):
    """A q implies three equivalent partners, a t two: the signals sharing the J must hold that many."""

    name = "reciprocity-count"
    code = "PP211"
    severity = "warning"
    message = "{letter} with J = {j} Hz implies {needed} equivalent partner(s), but {partners}"
    rationale = (
        "n equivalent spin-½ partners split a signal into n+1 lines (2nI+1 for spin I: one "
        "deuterium gives a 1:1:1 triplet). The signals that carry the same J must account for "
        "at least that many nuclei by their integrations, and the formula must contain them."
    )
    source = "n+1 and 2nI+1 rules, Pascal-triangle intensities (common practice)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (d, J = 7.1 Hz, 2H)."),
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 29.6 (d, JC–D = 19.4 Hz)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "13C{1H} NMR (101 MHz, CDCl3) δ 29.6 (t, JC–D = 19.4 Hz)."),
    )

    def check(self, block, ctx):
        tol = ctx.config.coupling_tolerance + 1e-9
        for spectrum in block.spectra:
            net = None  # built when a homonuclear J first needs its partners
            element = spectrum.element
            for k, signal in enumerate(spectrum.signals):
                m = signal.multiplicity
                if m is None or m.kind != "first-order" or m.multiplier != 1:
                    continue
                if len(m.components) != len(signal.couplings) or not m.components:
                    continue
                done: set[int] = set()
                for ci, c in enumerate(signal.couplings):
                    if ci in done:
                        continue
                    lines = PARTNERS[m.components[ci]] + 1
                    if not homonuclear(c, element):
                        x = next(n.lstrip("0123456789") for n in c.nuclei if n.lstrip("0123456789") != element)
                        try:
                            spin = float(nucleus(_PARTNER_NUCLEUS.get(x, x)).spin)
                        except (UnknownNucleus, KeyError):
                            continue
                        needed = (lines - 1) / (2 * spin)
                        if abs(needed - round(needed)) > 1e-9:
                            yield self.finding(
                                m.span, letter=f"'{m.components[ci]}'", j=c.text or fmt(c.value, 2),
                                needed=fmt(needed, 2),
                                partners=f"no whole number of {x} nuclei (I = {fmt(spin, 1)}) gives {lines} lines",
                                data={"lines": lines, "spin": spin, "partner": x},
                            )
                            continue
                        if ctx.formula is None:
                            continue
                        have = ctx.formula.counts.get(x, 0) if x == "D" else ctx.formula.element_count(x)
                        if have < needed:
                            yield self.finding(
                                m.span, letter=f"'{m.components[ci]}'", j=c.text or fmt(c.value, 2),
                                needed=int(needed), partners=f"the formula has {have} {x}",
                                data={"lines": lines, "spin": spin, "partner": x, "needed": needed, "in_formula": have},
                            )
                        continue
                    # equal J values on several letters add up (dt with J = 7, 7 ⇒ 3 partners)
                    if len(signal.couplings) == 1:
                        same = [ci]  # c itself (homonuclear, as the branch above has shown)
                    else:
                        same = [cj for cj in range(ci, len(signal.couplings))
                                if homonuclear(signal.couplings[cj], element)
                                and abs(signal.couplings[cj].value - c.value) <= tol]
                    done.update(same)
                    needed = sum(PARTNERS[m.components[cj]] for cj in same)
                    # A d is exempt: symmetric AA'XX' pairs (2H beside 2H) are written d.
                    if needed < 2:
                        continue
                    if net is None:
                        net = ctx.network(spectrum)
                    nodes = {other for cj in same for other, _ in net.partners(k, cj)}
                    if not nodes:
                        continue  # no partner at all: coupling-no-partner
                    counts = [spectrum.signals[o].count for o in nodes]
                    if any(n is None for n in counts):
                        continue
                    total = sum(counts)
                    # n equivalent partners: some of the signals carrying this J must hold exactly
                    # n nuclei.
                    if _accounted(counts, needed, signal.count) or _hidden_partners(ctx, spectrum, k):
                        continue
                    if _in_other_list(block, spectrum, c.value, tol):
                        continue  # part of the splitting is likely from 19F or 31P
                    names = ", ".join(signal_label(spectrum.signals[o]) for o in sorted(nodes))
                    yield self.finding(
                        m.span, letter=f"'{m.name}'", j=c.text or fmt(c.value, 2), needed=needed,
                        partners=f"no combination of the signals with that J ({names}; {fmt(total, 1)} H in all) holds {needed} H",
                        data={"needed": needed, "partner_count": total, "partners": sorted(nodes)},
                    )


def _accounted(counts, needed: int, own: float | None) -> bool:
    """Some partners hold n nuclei, or f·n when the signal itself is f equivalent groups
    (the CH2 of two equivalent OEt groups integrates 4H beside a 6H CH3)."""
    for f in range(1, 5):
        if f > 1 and (own is None or abs(own / f - round(own / f)) > 1e-6 or own < f):
            continue
        if _subset_sums_to(counts, needed * f):
            return True
    return False


def _subset_sums_to(counts, target: float) -> bool:
    sums = {0.0}
    for n in counts:
        sums |= {s + n for s in sums}
    return any(abs(s - target) < 0.01 for s in sums)


def _in_other_list(block, spectrum, value: float, tol: float) -> bool:
    return any(
        abs(c.value - value) <= tol
        for other in block.spectra if other.element != spectrum.element
        for s in other.signals for c in s.couplings
    )


def _hidden_partners(ctx, spectrum, skip: int) -> bool:
    """Whether a signal other than ``skip`` is a multiplet without J values (m, br, AB)."""
    hidden = ctx.shared("j-less multiplets", spectrum, lambda: [
        k for k, s in enumerate(spectrum.signals)
        if not s.couplings and s.multiplicity is not None and s.multiplicity.kind in ("multiplet", "broad", "AB")
    ])
    return any(k != skip for k in hidden)
