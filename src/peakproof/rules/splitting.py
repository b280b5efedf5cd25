"""The n+1 rule read from both sides of a coupling.

``reciprocity-count`` asks of each multiplet whether the signals that carry its J can hold the
partners its letters imply. A coupling has two ends, though: a 2H ``q`` whose only possible
partner with J = 7.1 Hz is a 3H signal couples to that signal for certain, so that signal is
split by those two protons and cannot be a ``d``. This rule draws those conclusions.

For every first-order letter of a 1H signal (``t`` of a ``td`` …) it forms the *slot* "n
equivalent partners with J ≈ j" and its candidates: the other signals with a J within the
coupling tolerance, and the multiplets written without J (``m``), which may hide any J. Then:

1. **Certain partners.** When every combination of candidates whose integrations give n
   (or f·n for f equivalent groups) contains a signal P, P is a certain partner; P, in turn,
   is split by this signal's protons. A signal whose certain partners hold more protons than
   its own letters allow is reported (the ethyl CH3 written ``d``; a propyl CH2 written ``q``).
2. **Excluded partners.** A slot that can be met excludes the candidates in none of its
   combinations; with those removed, a slot of two or more partners that nothing can meet is
   reported (an isobutyl CH3 written ``t`` beside its CH2 ``d``), as is one that the J-less
   multiplets cannot meet (an isobutyl CH2 written ``t`` beside its CH ``m``).

Doublets are never reported by step 2 alone: para-disubstituted rings and other AA′XX′ pairs
are written as two 2H doublets by convention. Cases ``reciprocity-count`` already reports are
left to it (one finding per cause).
"""

from __future__ import annotations

from bisect import bisect_left, bisect_right
from itertools import combinations
from typing import NamedTuple

from ..model import PARTNERS
from ..network import homonuclear
from . import Rule
from ._util import fmt, signal_label

#: Slots with more candidates than this are not searched (2^12 subsets at most).
_MAX_CANDIDATES = 12

#: Only signals below this shift take part. The arithmetic holds for groups of equivalent
#: protons that couple as a group (CH3, CH2 and CH of alkyl chains); a 2H aromatic "d" or "t" is
#: two protons, each with its own neighbours, and a phenyl's ortho/meta/para pattern does not add
#: up by integrations (common practice).
_GROUP_REGION_PPM = 6.0


def _in_group_region(signal) -> bool:
    return (signal.shift is not None or signal.range is not None) and signal.position < _GROUP_REGION_PPM


class _Slot(NamedTuple):
    signal: int  # index in the spectrum
    j: float
    needed: int  # partners the letters imply for this J
    coupling: int  # index of the first coupling of the slot, for the finding's span


def _slots(spectrum, tol: float) -> list[_Slot]:
    """One slot per distinct homonuclear J of every first-order 1H signal with known count."""
    element = spectrum.element
    out = []
    for k, s in enumerate(spectrum.signals):
        m = s.multiplicity
        if m is None or m.kind != "first-order" or m.multiplier != 1 or s.count is None:
            continue
        if not _in_group_region(s):
            continue
        if not m.components or len(m.components) != len(s.couplings):
            continue
        if any(c not in PARTNERS for c in m.components):
            continue
        done: set[int] = set()
        for ci, c in enumerate(s.couplings):
            if ci in done or not homonuclear(c, element):
                continue
            same = [cj for cj in range(ci, len(s.couplings))
                    if homonuclear(s.couplings[cj], element) and abs(s.couplings[cj].value - c.value) <= tol]
            done.update(same)
            out.append(_Slot(k, c.value, sum(PARTNERS[m.components[cj]] for cj in same), ci))
    return out


def _group_factors(own: float, others: list[float]) -> list[int]:
    """f equivalent groups: the signal and its partners are f copies of one fragment (two OEt
    groups: a 4H q beside a 6H t), so each count divides by f."""
    return [f for f in range(1, 5)
            if f == 1 or all(abs(n / f - round(n / f)) < 1e-6 and n / f >= 2 for n in (own, *others))]


def _combinations(counts: dict[int, float], needed: int, own: float) -> list[frozenset[int]]:
    """The sets of candidates whose integrations give ``needed`` (or f·needed)."""
    items = list(counts)
    found = []
    for size in range(1, len(items) + 1):
        for combo in combinations(items, size):
            total = sum(counts[o] for o in combo)
            if any(abs(total - needed * f) < 0.01 and abs(own / f - round(own / f)) < 1e-6
                   and (f == 1 or own / f >= 2) for f in range(1, 5)):
                found.append(frozenset(combo))
    return found


class _Conflict(NamedTuple):
    slot: _Slot  # the slot that cannot be met
    involved: frozenset[int]  # signals whose letters take part (the slot's own included)
    load: float | None  # protons certain partners impose, for an overloaded slot


class _Net:
    """The slots of one spectrum and their possible partners, with the two tests of the module
    docstring; ``free`` signals are those whose letters are set aside (a hypothesis of error)."""

    def __init__(self, signals, slots, candidates, combos, hidden, tol):
        self.signals, self.slots, self.candidates = signals, slots, candidates
        self.combos, self.hidden, self.tol = combos, hidden, tol
        self.by_signal: dict[int, list[_Slot]] = {}
        for slot in slots:
            self.by_signal.setdefault(slot.signal, []).append(slot)

    def _matching(self, signal, j):
        return [s for s in self.by_signal.get(signal, ()) if abs(s.j - j) <= self.tol]

    def conflicts(self, free: frozenset[int]) -> list[_Conflict]:
        signals, out = self.signals, []
        active = [s for s in self.slots if s.signal not in free]
        imposed: dict[_Slot, dict[int, float]] = {}
        excluded: dict[_Slot, set[int]] = {}
        for slot in active:
            found = self.combos[slot]
            if not found:
                continue
            # a doublet's partner may be one of two overlapping protons: only n ≥ 2 imposes
            for partner in frozenset.intersection(*found) if slot.needed >= 2 else ():
                for theirs in self._matching(partner, slot.j):
                    if theirs.signal not in free:
                        imposed.setdefault(theirs, {})[slot.signal] = signals[slot.signal].count
            for other in self.candidates[slot] - frozenset.union(*found):
                for theirs in self._matching(other, slot.j):
                    excluded.setdefault(theirs, set()).add(slot.signal)
        for slot, sources in imposed.items():
            own, load = signals[slot.signal].count, sum(sources.values())
            capacity = max(slot.needed * f for f in _group_factors(own, list(sources.values())))
            if load > capacity + 0.01:
                out.append(_Conflict(slot, frozenset({slot.signal, *sources}), load))
        for slot in active:
            if slot.needed < 2:
                continue  # doublets: AA'XX' pairs are written as doublets by convention
            gone = frozenset(excluded.get(slot, ()))
            pool = {o: signals[o].count for o in (self.candidates[slot] | self.hidden) - gone
                    if o != slot.signal}
            if not _combinations(pool, slot.needed, signals[slot.signal].count):
                out.append(_Conflict(slot, frozenset({slot.signal, *gone}), None))
        return out

    def explains(self, signal: int, group) -> bool:
        """Whether setting aside ``signal``'s letters removes the group's conflicts while each of
        its J values keeps a possible partner (one that could count it among its own)."""
        remaining = self.conflicts(frozenset({signal}))
        if any(c.involved & frozenset().union(*(g.involved for g in group)) for c in remaining):
            return False
        return all(self._possible_partners(slot) for slot in self.by_signal.get(signal, ()))

    def _possible_partners(self, slot) -> set[int]:
        out = set(self.hidden) - {slot.signal}
        for o in self.candidates[slot]:
            theirs = self._matching(o, slot.j)
            if not theirs or any(any(slot.signal in c for c in self.combos[t]) for t in theirs):
                out.add(o)
        return out

    def partner_protons(self, signal: int) -> float:
        """Protons of the smallest possible partner of each J: the simpler splitting is preferred
        when setting aside either of two signals' letters would do."""
        total = 0.0
        for slot in self.by_signal.get(signal, ()):
            partners = self._possible_partners(slot)
            total += min((self.signals[o].count for o in partners), default=0.0)
        return total

    def first_slot(self, signal: int) -> _Slot:
        return self.by_signal[signal][0]


def _groups(conflicts: list[_Conflict]) -> list[list[_Conflict]]:
    """Conflicts that share a signal, together (one finding per cause)."""
    groups: list[list[_Conflict]] = []
    for c in conflicts:
        joined = [g for g in groups if any(c.involved & other.involved for other in g)]
        merged = [c]
        for g in joined:
            merged.extend(g)
            groups.remove(g)
        groups.append(merged)
    groups.sort(key=lambda g: min(c.slot.signal for c in g))
    return groups


class SplittingFromPartners(Rule):
    """A signal's letters against the splitting its certain partners impose on it."""

    name = "splitting-from-partners"
    code = "PP212"
    severity = "warning"
    message = "{letter} with J = {j} Hz implies {needed} equivalent partner(s), but {reason}"
    rationale = (
        "A coupling joins two signals: a 2H quartet whose only possible partner with that J is a "
        "3H signal couples to it for certain, so that signal is split by two protons and is a "
        "triplet, not a doublet. The n+1 rule holds at both ends of every coupling; multiplets "
        "written without J count as possible partners. Para-disubstituted rings written as two "
        "doublets are a convention and stay quiet."
    )
    source = "n+1 rule applied to both coupled groups (common practice)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (d, J = 7.1 Hz, 3H)."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.40 (t, J = 7.0 Hz, 2H), 1.60 (q, J = 7.2 Hz, 2H), "
                 "0.95 (t, J = 7.4 Hz, 3H)."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.20 (d, J = 6.7 Hz, 2H), 1.90 (m, 1H), 0.92 (t, J = 6.7 Hz, 6H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.20 (d, J = 6.7 Hz, 2H), 1.90 (m, 1H), 0.92 (d, J = 6.7 Hz, 6H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.30 (d, J = 8.4 Hz, 2H), 6.90 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H)."),
    )

    def check(self, block, ctx):
        tol = ctx.config.coupling_tolerance + 1e-9
        for spectrum in block.spectra:
            if spectrum.nucleus != "1H" or len(spectrum.signals) < 2:
                continue
            yield from self._spectrum(block, spectrum, tol)

    def _spectrum(self, block, spectrum, tol):
        signals = spectrum.signals
        slots = _slots(spectrum, tol)
        if not slots:
            return
        hidden = {k for k, s in enumerate(signals)
                  if not s.couplings and s.count is not None and s.multiplicity is not None
                  and s.multiplicity.kind in ("multiplet", "broad", "AB") and _in_group_region(s)}
        # every homonuclear J of the list, sorted, for the candidates of a slot by bisection
        index = sorted((c.value, k) for k, s in enumerate(signals) for c in s.couplings
                       if homonuclear(c, spectrum.element) and _in_group_region(s))
        values = [v for v, _ in index]
        if _other_lists_share(block, spectrum, values, tol):
            return  # part of the splitting may be from 19F or 31P: reciprocity-count's exemption
        candidates = {}
        for slot in slots:
            lo, hi = bisect_left(values, slot.j - tol), bisect_right(values, slot.j + tol)
            candidates[slot] = {k for _, k in index[lo:hi] if k != slot.signal and signals[k].count is not None}
            if len(candidates[slot]) + len(hidden) > _MAX_CANDIDATES:
                return
        combos = {}
        for slot in slots:
            pool = {o: signals[o].count for o in candidates[slot] | hidden if o != slot.signal}
            combos[slot] = _combinations(pool, slot.needed, signals[slot.signal].count)
        # what reciprocity-count reports (J partners alone cannot hold n ≥ 2, no J-less multiplet)
        left_to_other_rule = set() if hidden else {
            slot.signal for slot in slots
            if slot.needed >= 2 and not _subset_exists(candidates[slot], signals, slot)}
        net = _Net(signals, slots, candidates, combos, hidden, tol)
        conflicts = [c for c in net.conflicts(frozenset())
                     if not (c.involved & left_to_other_rule)]
        for group in _groups(conflicts):
            involved = frozenset().union(*(c.involved for c in group))
            culprits = [c for c in sorted(involved) if c not in hidden and net.explains(c, group)]
            if culprits:
                blamed = min(culprits, key=lambda c: (net.partner_protons(c), -c))
                conflict = next((c for c in group if c.slot.signal == blamed), None)
                slot = conflict.slot if conflict is not None else net.first_slot(blamed)
            else:
                conflict, slot = group[0], group[0].slot
            others = sorted(involved - {slot.signal})
            names = ", ".join(signal_label(signals[o]) for o in others)
            if conflict is not None and conflict.load is not None:
                reason = (f"{names} with the same J can couple to nothing else, so this signal is "
                          f"split by {fmt(conflict.load, 1)} H")
            else:
                reason = ("no combination of the signals with that J or written as multiplets "
                          f"holds {slot.needed} H")
                if names:
                    reason += f" once {names} is counted with its own partners"
            yield self._finding(signals[slot.signal], slot, reason,
                                {"needed": slot.needed, "involved": others})

    def _finding(self, signal, slot, reason, data):
        m = signal.multiplicity
        c = signal.couplings[slot.coupling]
        return self.finding(m.span, letter=f"'{m.name}'", j=c.text or fmt(c.value, 2), needed=slot.needed,
                            reason=reason, data=data)


def _subset_exists(partners, signals, slot) -> bool:
    counts = {o: signals[o].count for o in partners}
    return bool(_combinations(counts, slot.needed, signals[slot.signal].count))


def _other_lists_share(block, spectrum, values, tol) -> bool:
    """Whether another nucleus's list of the block carries one of these J values."""
    for other in block.spectra:
        if other.element == spectrum.element:
            continue
        for s in other.signals:
            for c in s.couplings:
                i = bisect_left(values, c.value - tol)
                if i < len(values) and values[i] <= c.value + tol:
                    return True
    return False
