"""Reported signals that are the solvent, its water, or a common impurity; referencing values."""

from __future__ import annotations

import functools
import re
from bisect import bisect_left, bisect_right
from typing import Any, NamedTuple

from . import Rule
from ._util import EXCHANGEABLE, fmt


class _Tables(NamedTuple):
    """One solvent's and nucleus's tabulated peaks, arranged for the rule's look-ups."""

    peaks: tuple  # residual solvent signals, then accepted reference values
    water: Any  # ReferencePeak of dissolved water (1H only) or None
    lone: list  # (shift, compound, group) of single-group singlet impurities, by shift
    lone_shifts: list[float]
    several: list  # (compound, groups) of impurities with two or more groups, in table order
    # every tabulated shift the per-signal pass compares with (peaks, water, lone singlets), sorted:
    # a signal with none of them nearby is passed over with two bisections
    candidate_shifts: list[float]


@functools.cache
def _tables(solvent: str, nucleus: str) -> _Tables | None:
    from ..impurities import UnknownSolvent, accepted_references, impurity_groups, residual_peaks, water_peak

    try:
        residual = residual_peaks(solvent, nucleus)
        refs = accepted_references(solvent, nucleus)
        groups = impurity_groups(solvent, nucleus)
        water = water_peak(solvent) if nucleus == "1H" else None
    except (UnknownSolvent, KeyError, ValueError):
        return None
    by_compound: dict[str, list] = {}
    for g in groups:
        by_compound.setdefault(g.compound, []).append(g)
    lone = sorted(((groups[0].shift, compound, groups[0]) for compound, groups in by_compound.items()
                   if len(groups) == 1 and groups[0].multiplicity == "s"), key=lambda t: t[0])
    several = [(compound, groups) for compound, groups in by_compound.items() if len(groups) >= 2]
    peaks = (*residual, *refs)
    candidates = sorted([p.shift for p in peaks] + ([water.shift] if water is not None else [])
                        + [t[0] for t in lone])
    return _Tables(peaks, water, lone, [t[0] for t in lone], several, candidates)


# The bisection windows are this much wider than the exact tests they stand for, so rounding in
# ``shift ± window`` can only let a few extra candidates through to the exact tests, never drop one.
_SLACK = 1e-6


def _compatible(reported, tabulated: str | None) -> bool:
    """Reported multiplicity agrees with the table's (none written, m and br match anything)."""
    if reported is None or tabulated is None or reported.kind in ("multiplet", "broad"):
        return True
    tab = tabulated.replace("br ", "").replace("br", "").strip() or "s"
    name = reported.name.replace("br ", "").replace("app ", "")
    return name == tab or (name == "s" and tab == "s")


def _looks_like_own_group(signal) -> bool:
    """An assigned signal, or a whole-number methyl-sized singlet (≥ 3H, e.g. a methyl ketone at
    2.17), is more likely the compound's own than a single-group impurity (common practice)."""
    if signal.assignment:
        return True
    return signal.count is not None and signal.count >= 3 and abs(signal.count - round(signal.count)) < 1e-6


def _several_protons(signal) -> bool:
    """A whole-number integration of two or more protons: not a residual protio-solvent line
    (CHCl3, C6D5H, CHD2…), whose integral is never reported as the compound's protons; a 4H
    AA′BB′ singlet at 7.26 in CDCl3 is the compound's (common practice)."""
    n = signal.count
    return n is not None and n >= 2 and abs(n - round(n)) < 1e-6


def _integration_names_impurity(signal, group) -> bool:
    """A singlet whose integration equals the protons of a tabulated non-methyl group (benzene's
    6H at 7.36 in CDCl3): the integration itself points to the impurity, even though a several-
    proton singlet is otherwise taken for the compound's own group (common practice)."""
    n = signal.count
    return (n is not None and group.protons is not None and abs(n - group.protons) < 1e-6
            and "CH3" not in group.group and not signal.assignment)


def _single_shift(signal):
    return signal.shift is not None and signal.range is None


class SolventCoincidence(Rule):
    """A listed signal at the residual solvent, water or a common impurity's shift."""

    name = "solvent-coincidence"
    code = "PP501"
    severity = "warning"
    message = "δ {shift} coincides with {what} ({table} in {solvent}); it is likely not a signal of the compound"
    rationale = (
        "Residual protio solvent, dissolved water and common laboratory solvents appear at "
        "tabulated shifts; a reported peak there is likely one of them. Impurities with several "
        "groups are reported only when all their groups are listed; single-group ones (acetone, "
        "dichloromethane…) when a singlet falls within 0.01 ppm. The integration is read both "
        "ways: a singlet of two or more protons is not the residual solvent line (a 4H singlet at "
        "7.26 in CDCl3), and a singlet with the protons of a tabulated non-methyl group (benzene's "
        "6H at 7.36) is that impurity although several-proton singlets are otherwise the compound's."
    )
    source = "Gottlieb, Kotlyar, Nudelman, J. Org. Chem. 1997, 62, 7512; Fulmer et al., Organometallics 2010, 29, 2176"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 1.56 (s, 2H)."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 5.30 (s, 2H), 3.81 (s, 3H)."),
        ("fail", "13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 77.2, 55.3."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.36 (s, 6H), 3.81 (s, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 1.62 (s, 2H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.26 (s, 4H), 2.35 (s, 6H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.26 (t, J = 7.1 Hz, 3H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            if not spectrum.solvent_normalized or spectrum.nucleus not in ("1H", "13C"):
                continue
            tables = _tables(spectrum.solvent_normalized, spectrum.nucleus)
            if tables is None:
                continue
            proton = spectrum.nucleus == "1H"
            tol = ctx.config.solvent_tolerance_1h if proton else ctx.config.solvent_tolerance_13c
            near, water_near = tol + 1e-9, max(tol, 0.05) + 1e-9
            water, lone, lone_shifts = tables.water, tables.lone, tables.lone_shifts
            candidates = tables.candidate_shifts
            reach = max(near, water_near if water is not None else 0.0, 0.01 + 1e-9 if proton else 0.0) + _SLACK
            flagged: set[int] = set()
            single = []  # (shift, index) of the signals with one shift, for the several-group pass
            for k, s in enumerate(spectrum.signals):
                if s.shift is None or s.range is not None:
                    continue
                shift = s.shift
                single.append((shift, k))
                if bisect_left(candidates, shift - reach) == bisect_right(candidates, shift + reach):
                    continue  # no tabulated shift within any window of the tests below
                hit = None
                several_protons = proton and _several_protons(s)
                for peak in () if several_protons else tables.peaks:
                    if abs(shift - peak.shift) <= near and _compatible(s.multiplicity, peak.multiplicity):
                        hit = ("the residual solvent signal", f"{peak.label} {fmt(peak.shift, 2)}", peak.shift)
                        break
                if hit is None and water is not None and abs(shift - water.shift) <= water_near:
                    # an OH/NH assigned near water gets the benefit of the doubt unless it sits on it
                    exchangeable = bool(s.assignment and EXCHANGEABLE.search(s.assignment))
                    window = tol if exchangeable else max(tol, 0.05)
                    # a methyl-sized singlet or a group assigned to carbon (e.g. gem-dimethyl at
                    # 1.59 in CDCl3) is the compound's own, not water
                    own_group = _looks_like_own_group(s) and not exchangeable
                    if not own_group and abs(shift - water.shift) <= window + 1e-9 and _compatible(s.multiplicity, "s"):
                        hit = ("dissolved water", f"{water.label} {fmt(water.shift, 2)}", water.shift)
                if hit is None and proton and s.multiplicity is not None and s.multiplicity.name == "s":
                    lo = bisect_left(lone_shifts, shift - 0.01 - 1e-9)
                    hi = bisect_right(lone_shifts, shift + 0.01 + 1e-9)
                    if lo < hi:  # the nearest tabulated singlet within 0.01 ppm
                        tab, compound, group = min(lone[lo:hi], key=lambda t: abs(t[0] - shift))
                        if not _looks_like_own_group(s) or _integration_names_impurity(s, group):
                            hit = (compound, f"{compound} {fmt(tab, 2)}", tab)
                if hit is not None:
                    flagged.add(k)
                    yield self._hit(s, hit[0], hit[1], hit[2], spectrum.solvent_normalized)
            # several-group impurities: every group listed (within tolerance, compatible letters);
            # the listed shifts are sorted once so each group looks only at its neighbours
            if not single:
                continue
            single.sort()
            shifts = [x for x, _ in single]
            signals = spectrum.signals
            for compound, groups in tables.several:
                matched = []
                for g in groups:
                    lo = bisect_left(shifts, g.shift - tol - 1e-9)
                    top = g.shift + tol + 1e-9
                    if lo == len(shifts) or shifts[lo] > top:
                        break  # no listed signal near this group
                    hi = bisect_right(shifts, top, lo)
                    k = min((single[i][1] for i in range(lo, hi) if single[i][1] not in flagged
                             and _compatible(signals[single[i][1]].multiplicity, g.multiplicity)), default=None)
                    if k is None:
                        break
                    matched.append((k, g))
                else:
                    for k, g in matched:
                        flagged.add(k)
                        s = signals[k]
                        yield self._hit(s, compound, f"{compound} {g.group} {fmt(g.shift, 2)}", g.shift,
                                        spectrum.solvent_normalized)

    def _hit(self, s, what, table, shift, solvent):
        return self.finding(s.shift_span or s.span, shift=s.shift_text, what=what, table=table, solvent=solvent,
                            data={"shift": s.shift, "tabulated": shift, "matched": what, "solvent": solvent})


_REF_NUMBER = re.compile(r"[-−]?\d+(?:\.\d+)?")


class ReferenceInconsistent(Rule):
    """One document referencing the same solvent and nucleus to different values."""

    name = "reference-inconsistent"
    code = "PP502"
    severity = "note"
    scope = "document"
    message = "{solvent} {nucleus} is referenced to {value} here but to {first} earlier in the document; one referencing value is expected throughout"
    rationale = (
        "Within one report each solvent should be referenced the same way (e.g. CDCl3 at 7.26 / "
        "77.16, or the older 77.0); mixed values shift one compound against another."
    )
    source = "Harris et al., Pure Appl. Chem. 2008, 80, 59 (IUPAC referencing); Fulmer et al., Organometallics 2010, 29, 2176"
    examples = (
        ("fail", "13C NMR (101 MHz, CDCl3, ref 77.16) δ 171.1, 55.3.\n\n13C NMR (101 MHz, CDCl3, ref 77.0) δ 170.8, 55.1."),
        ("pass", "13C NMR (101 MHz, CDCl3, ref 77.16) δ 171.1, 55.3.\n\n13C NMR (101 MHz, CDCl3, ref 77.16) δ 170.8, 55.1."),
    )

    def check_document(self, document, ctx):
        first: dict[tuple[str, str], float] = {}
        for block in document.blocks:
            for s in block.spectra:
                if not s.reference or not s.solvent_normalized:
                    continue
                m = _REF_NUMBER.search(s.reference)
                if m is None:
                    continue
                value = float(m.group(0).replace("−", "-"))
                key = (s.solvent_normalized, s.nucleus)
                if key not in first:
                    first[key] = value
                elif abs(first[key] - value) > 1e-6:
                    yield self.finding(s.header_span or s.span, solvent=key[0], nucleus=key[1], value=fmt(value, 3),
                                       first=fmt(first[key], 3),
                                       data={"value": value, "first_value": first[key]})
