"""From a parsed spectrum to the spin system its description implies, and its simulation.

Each reported signal becomes a group of equivalent nuclei (its count) at its shift (or the
centre of its range).  Couplings come from the checker's coupling network (signals whose J
values match), pruned so that each signal keeps only as many partners as its letters call
for.  Where the letters call for more partners than the reported signals supply (a J with
no match, a heteronuclear J(H,F)), an *implicit partner* of the right size and spin is added
as a weakly coupled, unobserved group, so the multiplet still shows as written.

Para-disubstituted rings and the like are written "d, 2H" twice: each nucleus sees one
partner, not two.  Such a pair is simulated as two copies of a 1H + 1H system (AX and A′X′),
which is what the description says; the copies carry primes in their labels.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field

from .spin_system import Line, Simulation, SpinGroup, SpinSystem, SpinSystemError, merge_lines

#: Field assumed when the description states none (common practice in recent work).
DEFAULT_PROTON_MHZ = 400.0
#: Line widths (full width at half height, Hz) used to draw signals.
SHARP_WIDTH_HZ = 1.0
BROAD_WIDTH_HZ = 8.0  # "br s": a typical exchange-broadened OH/NH (common practice)
MULTIPLET_WIDTH_HZ = 6.0  # an "m" without a range or J values
#: Implicit partners are not a real nucleus: a spin-½ "X" outside the observed spectrum.
IMPLICIT_NUCLEUS = "X"
_MAX_CANDIDATES = 10  # partner subsets are enumerated; more candidates than this are cut


@dataclass(frozen=True, slots=True)
class SignalGroups:
    """One reported signal and the spin groups that stand for its nuclei."""

    signal_index: int
    label: str  # the shift as written, e.g. "7.97" or "7.33–7.28"
    shift_ppm: float
    range_ppm: tuple[float, float] | None
    count: int
    multiplicity: str | None
    groups: tuple[int, ...]  # group indices (several when the pattern is copied, AA′XX′)
    width_hz: float = SHARP_WIDTH_HZ
    shape: str = "lorentzian"

    def to_json(self) -> dict:
        return {
            "signal": self.signal_index,
            "label": self.label,
            "shift_ppm": self.shift_ppm,
            "range_ppm": list(self.range_ppm) if self.range_ppm else None,
            "count": self.count,
            "multiplicity": self.multiplicity,
            "groups": list(self.groups),
            "width_hz": self.width_hz,
            "shape": self.shape,
        }


@dataclass(frozen=True)
class ImpliedSpectrum:
    """The spin system one reported spectrum implies, with what was assumed on the way."""

    nucleus: str
    field_mhz: float
    system: SpinSystem
    signals: tuple[SignalGroups, ...]
    notes: tuple[str, ...] = ()
    solvent: str | None = None

    def system_json(self) -> dict:
        return {
            "nucleus": self.nucleus,
            "field_mhz": self.field_mhz,
            "groups": [
                {
                    "index": k,
                    "label": g.label,
                    "shift_ppm": g.shift_ppm,
                    "count": g.count,
                    "spin": g.spin,
                    "nucleus": g.nucleus,
                    "observed": g.observed,
                }
                for k, g in enumerate(self.system.groups)
            ],
            "couplings": [
                {"groups": [a, b], "j_hz": value}
                for (a, b), value in sorted(self.system.couplings.items())
            ],
            "signals": [s.to_json() for s in self.signals],
        }


@dataclass(frozen=True)
class _CouplingClass:
    """Equal J values of one signal towards one kind of partner, and how many partners."""

    value: float
    coupling_indices: tuple[int, ...]
    partner_nucleus: str | None  # None: homonuclear
    partners: int | None  # n from the letters; None when the letters do not say


@dataclass
class _SignalPlan:
    index: int
    label: str
    shift: float
    count: int
    classes: list[_CouplingClass] = field(default_factory=list)


def implied_spectrum(
    spectrum,
    *,
    field_mhz: float | None = None,
    proton_mhz: float | None = None,
    tolerance_hz: float | None = None,
) -> ImpliedSpectrum:
    """The spin system ``spectrum`` (a :class:`peakproof.model.Spectrum`) implies.

    ``field_mhz`` overrides the observe frequency; otherwise the stated one is used, or
    the one ``proton_mhz`` (or 400 MHz) gives through the IUPAC frequency ratio, with a note.
    """
    from peakproof.network import DEFAULT_TOLERANCE_HZ, build_network

    tolerance = DEFAULT_TOLERANCE_HZ if tolerance_hz is None else tolerance_hz
    notes: list[str] = []
    observe = _observe_frequency(spectrum, field_mhz, proton_mhz, notes)
    element = spectrum.element
    plans: dict[int, _SignalPlan] = {}
    for k, signal in enumerate(spectrum.signals):
        if signal.shift is None and signal.range is None:
            notes.append(f"signal {k + 1} has no shift: left out")
            continue
        label = signal.shift_text or f"{signal.position:g}"
        plans[k] = _SignalPlan(k, label, signal.position, _count_of(signal, label, notes))
        plans[k].classes = _coupling_classes(signal, label, element, tolerance, notes)

    network = build_network(spectrum, tolerance)
    chosen = {k: [_choose_partners(plans, network, plan, cls, notes) for cls in plan.classes]
              for k, plan in plans.items()}
    edges = _mutual_edges(plans, chosen, network, notes)
    groups, couplings, signal_groups = _build_groups(plans, edges, spectrum.nucleus, notes)
    widths = {k: _width(spectrum.signals[k], plans[k], edges, observe) for k in plans}
    signals = tuple(
        SignalGroups(
            k,
            plans[k].label,
            plans[k].shift,
            spectrum.signals[k].range,
            plans[k].count,
            spectrum.signals[k].multiplicity.name if spectrum.signals[k].multiplicity else None,
            tuple(signal_groups[k]),
            *widths[k],
        )
        for k in plans
    )
    system = SpinSystem(tuple(groups), couplings, observe, spectrum.nucleus)
    return ImpliedSpectrum(spectrum.nucleus, observe, system, signals, tuple(notes),
                           spectrum.solvent_normalized or spectrum.solvent)


def _observe_frequency(spectrum, field_mhz, proton_mhz, notes) -> float:
    from peakproof.nuclei import expected_frequency

    if field_mhz is not None:
        if field_mhz <= 0:
            raise SpinSystemError(f"the field must be positive, got {field_mhz!r} MHz")
        return float(field_mhz)
    if spectrum.frequency_mhz:
        return float(spectrum.frequency_mhz)
    proton = proton_mhz or DEFAULT_PROTON_MHZ
    try:
        observe = expected_frequency(spectrum.nucleus, proton)
    except Exception:  # an unknown nucleus: no ratio to convert with
        raise SpinSystemError(
            f"{spectrum.nucleus} NMR states no frequency and its frequency ratio is unknown: "
            "give one with --field"
        ) from None
    notes.append(f"no frequency stated: simulated at {observe:.1f} MHz "
                 f"({proton:g} MHz for 1H{'' if proton_mhz else ', assumed'})")
    return observe


def _count_of(signal, label: str, notes: list[str]) -> int:
    if signal.count is None:
        notes.append(f"δ {label}: no number of nuclei given: drawn as 1")
        return 1
    count = max(1, int(round(signal.count)))
    if count != signal.count:
        notes.append(f"δ {label}: {signal.count:g} nuclei is not a whole number: drawn as {count}")
    return count


def _partner_nucleus(coupling, element: str) -> str | None:
    """The partner nucleus of a typed heteronuclear J, or None for a homonuclear one."""
    from peakproof.nuclei import NUCLEUS_FOR_ELEMENT, normalize_symbol

    nuclei = [n for n in (coupling.nuclei or ()) if n.lstrip("0123456789") != element]
    if not coupling.nuclei or not nuclei:
        return None
    name = nuclei[0]
    try:
        return NUCLEUS_FOR_ELEMENT.get(name) or normalize_symbol(name)
    except Exception:
        return None


def _letters_for_couplings(signal, label: str, notes: list[str]) -> list[int | None]:
    """n (number of equivalent spin-½ partners) for each written J, from the letters."""
    mult = signal.multiplicity
    count = len(signal.couplings)
    if not count:
        return []
    if mult is None or mult.kind in ("multiplet", "broad", "AB"):
        return [None] * count
    if mult.kind == "singlet":
        notes.append(f"δ {label}: a singlet with J given: the J is left out")
        return []
    letters = list(mult.partner_counts)
    if len(letters) == count:
        return letters
    if count == 1:
        notes.append(f"δ {label}: '{mult.name}' with one J: read as {len(letters)} equal "
                     f"couplings of {signal.couplings[0].value:g} Hz")
        return [sum(letters)]
    notes.append(f"δ {label}: '{mult.name}' calls for {len(letters)} J value(s) but {count} "
                 "are given: letters and J paired in order")
    return (letters + [1] * count)[:count]


def _coupling_classes(signal, label, element, tolerance, notes) -> list[_CouplingClass]:
    partners = _letters_for_couplings(signal, label, notes)
    classes: list[list] = []  # [value, indices, nucleus, n]
    for index, n in enumerate(partners):
        coupling = signal.couplings[index]
        nucleus = _partner_nucleus(coupling, element)
        for cls in classes:
            if cls[2] == nucleus and abs(cls[0] - coupling.value) <= tolerance + 1e-9:
                cls[1].append(index)
                cls[3] = None if cls[3] is None or n is None else cls[3] + n
                break
        else:
            classes.append([coupling.value, [index], nucleus, n])
    return [_CouplingClass(v, tuple(i), nuc, n) for v, i, nuc, n in classes]


def _choose_partners(plans, network, plan: _SignalPlan, cls: _CouplingClass, notes) -> set[int]:
    """The reported signals that fill this coupling class best (by counts, J, closeness)."""
    if cls.partner_nucleus is not None:
        return set()
    candidates: dict[int, float] = {}
    for ci in cls.coupling_indices:
        for other, edge in network.partners(plan.index, ci):
            if other in plans and other not in candidates:
                candidates[other] = edge.j_hz
    if not candidates:
        return set()
    if cls.partners is None:
        return set(candidates)
    own_values = [cls.partners * d for d in range(1, plan.count + 1) if plan.count % d == 0]
    ordered = sorted(candidates, key=lambda b: abs(plans[b].shift - plan.shift))
    ordered = ordered[:_MAX_CANDIDATES]

    def score(subset):
        total = sum(plans[b].count for b in subset)
        misfit = min(abs(total - target) for target in own_values)
        j_error = sum(abs(candidates[b] - cls.value) for b in subset)
        distance = sum(abs(plans[b].shift - plan.shift) for b in subset) / len(subset)
        return (misfit, j_error, distance, len(subset))

    subsets = [s for r in range(1, len(ordered) + 1) for s in itertools.combinations(ordered, r)]
    best = min(subsets, key=score)
    if score(best)[0]:
        total = sum(plans[b].count for b in best)
        names = ", ".join(f"δ {plans[b].label} ({plans[b].count}H)" for b in best)
        notes.append(f"δ {plan.label}: J = {cls.value:g} Hz calls for {cls.partners} partner(s); "
                     f"the best match among the reported signals, {names}, has {total}")
    return set(best)


def _mutual_edges(plans, chosen, network, notes) -> dict[tuple[int, int], tuple[float, int, int]]:
    """Couplings both signals agree on: (a, b) → (J, class index at a, class index at b)."""
    edges: dict[tuple[int, int], tuple[float, int, int]] = {}
    for a, classes in chosen.items():
        for ca, partners in enumerate(classes):
            for b in sorted(partners):
                cb = next((c for c, back in enumerate(chosen[b]) if a in back), None)
                if cb is None:
                    notes.append(
                            f"δ {plans[a].label}: J = {plans[a].classes[ca].value:g} Hz "
                            f"matches δ {plans[b].label}, whose multiplicity has no room for "
                            "it: not coupled"
                        )
                    continue
                key = (min(a, b), max(a, b))
                value = (plans[a].classes[ca].value + plans[b].classes[cb].value) / 2
                if key in edges:
                    continue
                edges[key] = (value, ca, cb) if a < b else (value, cb, ca)
    return edges


def _components(plans, edges) -> list[list[int]]:
    parent = {k: k for k in plans}

    def root(k):
        while parent[k] != k:
            k = parent[k]
        return k

    for a, b in edges:
        parent[root(a)] = root(b)
    found: dict[int, list[int]] = {}
    for k in plans:
        found.setdefault(root(k), []).append(k)
    return list(found.values())


def _seen_partners(plans, edges, copies: int) -> dict[tuple[int, int], float]:
    """Per (signal, class): partner nuclei each of its nuclei sees, with ``copies`` copies."""
    seen: dict[tuple[int, int], float] = {}
    for (a, b), (_, ca, cb) in edges.items():
        seen[(a, ca)] = seen.get((a, ca), 0) + plans[b].count / copies
        seen[(b, cb)] = seen.get((b, cb), 0) + plans[a].count / copies
    return seen


def _copies_for(plans, component, edges, notes) -> int:
    """Fewest copies such that no signal sees more partners than its letters allow."""
    inner = {key: value for key, value in edges.items() if key[0] in component}
    if not inner:
        return 1
    common = 0
    for k in component:
        common = math.gcd(common, plans[k].count)
    for copies in (d for d in range(1, common + 1) if common % d == 0):
        seen = _seen_partners(plans, inner, copies)
        if all(plans[a].classes[c].partners is None or n <= plans[a].classes[c].partners
               for (a, c), n in seen.items()):
            return copies
    for (a, c), n in _seen_partners(plans, inner, 1).items():
        wanted = plans[a].classes[c].partners
        if wanted is not None and n > wanted:
            notes.append(f"δ {plans[a].label}: its J = {plans[a].classes[c].value:g} Hz "
                         f"partners hold {n:g} nuclei, more than the {wanted} its letters "
                         "call for: the simulated multiplet is wider than written")
    return 1


def _build_groups(plans, edges, observed_nucleus, notes):
    from peakproof.simulate.spin_system import spin_of

    groups: list[SpinGroup] = []
    couplings: dict[tuple[int, int], float] = {}
    signal_groups: dict[int, list[int]] = {k: [] for k in plans}
    for component in _components(plans, edges):
        component = sorted(component)
        copies = _copies_for(plans, component, edges, notes)
        inner = {key: value for key, value in edges.items() if key[0] in component}
        seen = _seen_partners(plans, inner, copies)
        if copies > 1:
            names = ", ".join(f"δ {plans[k].label}" for k in component)
            notes.append(f"{names}: each nucleus couples to one partner per J, as the letters "
                         f"say, so the system is simulated as {copies} identical copies "
                         "(AA′XX′ read as AX + A′X′; primed labels)")
        for copy in range(copies):
            index_of = {}
            for k in component:
                plan = plans[k]
                index_of[k] = len(groups)
                signal_groups[k].append(len(groups))
                groups.append(SpinGroup(plan.label + "′" * copy, plan.shift,
                                        plan.count // copies, nucleus=observed_nucleus))
            for (a, b), (value, _, _) in inner.items():
                couplings[(index_of[a], index_of[b])] = value
            for k in component:
                for c, cls in enumerate(plans[k].classes):
                    if cls.partners is None:
                        continue
                    nucleus = cls.partner_nucleus or IMPLICIT_NUCLEUS
                    spin = 0.5 if cls.partner_nucleus is None else spin_of(nucleus)
                    missing = cls.partners - seen.get((k, c), 0)
                    if missing <= 1e-9:
                        continue
                    size = missing / (2 * spin)
                    if abs(size - round(size)) > 1e-9 or round(size) < 1:
                        notes.append(f"δ {plans[k].label}: {missing:g} line spacing(s) of "
                                     f"J = {cls.value:g} Hz cannot come from spin-{spin:g} "
                                     f"{nucleus} partners: drawn with {max(1, round(size))}")
                    size = max(1, round(size))
                    if copy == 0 and cls.partner_nucleus is None:
                        found = seen.get((k, c), 0)
                        notes.append(
                            f"δ {plans[k].label}: J = {cls.value:g} Hz: {found:g} of its "
                            f"{cls.partners} partners are among the reported signals; the other "
                            f"{size} drawn as implicit spin-½ partner(s)" if found else
                            f"δ {plans[k].label}: J = {cls.value:g} Hz has no match among the "
                            f"reported signals: split by {size} implicit spin-½ partner(s)")
                    couplings[(index_of[k], len(groups))] = cls.value
                    groups.append(SpinGroup(
                        f"{nucleus} partner of δ {plans[k].label}" + "′" * copy, 0.0, size,
                        spin=spin, nucleus=nucleus, observed=False))
    return groups, couplings, signal_groups


def _width(signal, plan, edges, observe_mhz) -> tuple[float, str]:
    """How to draw a signal: sharp, broad, or as an unresolved hump over its range."""
    mult = signal.multiplicity
    coupled = any(plan.index in key for key in edges) or any(
        c.partners is not None for c in plan.classes)
    if mult is not None and mult.broad:
        return BROAD_WIDTH_HZ, "lorentzian"
    if mult is not None and mult.kind == "multiplet" and not coupled:
        if signal.range is not None:
            span_hz = abs(signal.range[0] - signal.range[1]) * observe_mhz
            return max(MULTIPLET_WIDTH_HZ, span_hz), "gaussian"
        return MULTIPLET_WIDTH_HZ, "gaussian"
    return SHARP_WIDTH_HZ, "lorentzian"


# -- simulation -------------------------------------------------------------------------------


@dataclass(frozen=True)
class SimulatedPart:
    """One independent piece of the system (a connected component) and how it is drawn."""

    groups: tuple[int, ...]
    simulation: Simulation
    width_hz: float
    shape: str


@dataclass(frozen=True)
class ImpliedSimulation:
    """The simulated spectrum of an :class:`ImpliedSpectrum`: all lines, and by part."""

    implied: ImpliedSpectrum
    simulation: Simulation
    parts: tuple[SimulatedPart, ...]

    @property
    def method(self) -> str:
        return self.simulation.method

    def curve(self, ppm):
        """The line-shape spectrum on ``ppm`` (numpy array), areas ∝ intensities."""
        import numpy as np

        from .lineshape import spectrum_on_grid

        total = np.zeros(len(ppm))
        for part in self.parts:
            if part.simulation.lines:
                total += _area_scale(part.width_hz, part.shape) * spectrum_on_grid(
                    part.simulation.lines, ppm, self.implied.field_mhz, part.width_hz,
                    part.shape)
        return total


def _area_scale(width_hz: float, shape: str) -> float:
    """Height factor that gives a line the area of a 1 Hz Lorentzian of the same height."""
    reference = math.pi / 2 * SHARP_WIDTH_HZ
    if shape == "gaussian":
        return reference / (math.sqrt(math.pi / (4 * math.log(2))) * width_hz)
    return reference / (math.pi / 2 * width_hz)


def simulate_implied(implied: ImpliedSpectrum, method: str = "quantum") -> ImpliedSimulation:
    """Simulate each independent part of ``implied`` with ``method`` and join the lines."""
    from . import simulate

    system = implied.system
    drawn = {g: (s.width_hz, s.shape) for s in implied.signals for g in s.groups}
    parts: list[SimulatedPart] = []
    notes = list(implied.notes)
    pairs: list[tuple[float, float]] = []
    for component in system.components():
        if not any(system.groups[k].observed and system.is_homonuclear(k) for k in component):
            continue
        sub, _ = system.subsystem(component)
        result = simulate(sub, method)
        notes.extend(result.notes)
        looks = [drawn[k] for k in component if k in drawn]
        width = max(w for w, _ in looks)
        shape = "gaussian" if any(s == "gaussian" for _, s in looks) else "lorentzian"
        parts.append(SimulatedPart(tuple(component), result, width, shape))
        pairs.extend((line.freq_hz, line.intensity) for line in result.lines)
    lines = tuple(Line(f, f / system.field_mhz, i) for f, i in merge_lines(pairs, floor=0.0))
    return ImpliedSimulation(implied, Simulation(lines, system, method, tuple(notes)),
                             tuple(parts))


__all__ = [
    "DEFAULT_PROTON_MHZ",
    "ImpliedSimulation",
    "ImpliedSpectrum",
    "SignalGroups",
    "SimulatedPart",
    "implied_spectrum",
    "simulate_implied",
]
