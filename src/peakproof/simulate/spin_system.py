"""Spin systems: groups of equivalent nuclei, their shifts and the couplings between them.

A :class:`SpinGroup` is a set of magnetically equivalent nuclei (a CH3, an AA' pair that
couples identically to everything else); a :class:`SpinSystem` joins groups with coupling
constants between groups, in Hz.  Nothing here needs numpy.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from fractions import Fraction

# Nuclear spins used when peakproof.nuclei is not available (common practice, from memory;
# the nuclei module carries the cited table).
_FALLBACK_SPINS = {
    "1H": 0.5,
    "2H": 1.0,
    "13C": 0.5,
    "19F": 0.5,
    "31P": 0.5,
    "14N": 1.0,
    "11B": 1.5,
}


class SpinSystemError(ValueError):
    """A spin system that cannot be simulated as given (the message says why and what to do)."""


def spin_of(nucleus: str) -> float:
    """The nuclear spin quantum number of ``nucleus`` ("1H", "2H", "13C", …) as a float."""
    try:
        from peakproof.nuclei import nucleus as lookup  # written in parallel; may be absent

        return float(Fraction(lookup(nucleus).spin))
    except Exception:  # absent module or unknown name: fall back to the small table
        pass
    try:
        return _FALLBACK_SPINS[nucleus]
    except KeyError:
        known = ", ".join(sorted(_FALLBACK_SPINS))
        raise SpinSystemError(
            f"unknown nucleus {nucleus!r}: give its spin explicitly (spin=...) "
            f"or use one of {known}"
        ) from None


def _check_spin(spin: float, where: str) -> float:
    doubled = 2 * float(spin)
    if doubled <= 0 or abs(doubled - round(doubled)) > 1e-9:
        raise SpinSystemError(f"{where}: spin must be a positive multiple of 1/2, got {spin!r}")
    return round(doubled) / 2


@dataclass(frozen=True, slots=True)
class SpinGroup:
    """``count`` magnetically equivalent nuclei with one chemical shift.

    ``spin`` defaults to the spin of ``nucleus`` (½ for 1H); ``observed=False`` keeps the
    group in the Hamiltonian but leaves its lines out of the spectrum.
    """

    label: str
    shift_ppm: float
    count: int = 1
    spin: float | None = None
    nucleus: str = "1H"
    observed: bool = True

    def __post_init__(self) -> None:
        if isinstance(self.count, bool) or int(self.count) != self.count or self.count < 1:
            raise SpinGroupCountError(self.label, self.count)
        object.__setattr__(self, "count", int(self.count))
        spin = spin_of(self.nucleus) if self.spin is None else self.spin
        object.__setattr__(self, "spin", _check_spin(spin, f"group {self.label!r}"))


class SpinGroupCountError(SpinSystemError):
    def __init__(self, label: str, count: object) -> None:
        super().__init__(
            f"group {label!r}: count must be a whole number of nuclei (1 or more), got {count!r}",
            label,
            count,
        )


def _pair(i: int, j: int) -> tuple[int, int]:
    return (i, j) if i < j else (j, i)


@dataclass(frozen=True)
class SpinSystem:
    """Groups with couplings ``{(i, j): J_Hz}`` between group indices.

    ``field_mhz`` is the spectrometer frequency of the observed ``nucleus`` (100.6 for
    13C on a 400 MHz magnet).  Groups of another nucleus are heteronuclear partners.
    """

    groups: tuple[SpinGroup, ...]
    couplings: Mapping[tuple[int, int], float] = field(default_factory=dict)
    field_mhz: float = 400.0
    nucleus: str = "1H"

    def __post_init__(self) -> None:
        groups = tuple(self.groups)
        object.__setattr__(self, "groups", groups)
        if self.field_mhz <= 0:
            raise SpinSystemError(f"field_mhz must be positive, got {self.field_mhz!r}")
        normalised: dict[tuple[int, int], float] = {}
        for key, value in dict(self.couplings).items():
            i, j = key
            if i == j or not (0 <= i < len(groups) and 0 <= j < len(groups)):
                raise SpinSystemError(
                    f"coupling {key!r}: indices must name two different groups "
                    f"(0 to {len(groups) - 1})"
                )
            pair = _pair(i, j)
            if pair in normalised and normalised[pair] != float(value):
                raise SpinSystemError(f"coupling {key!r} is given twice with different values")
            if float(value) != 0.0:
                normalised[pair] = float(value)
        object.__setattr__(self, "couplings", normalised)

    def __hash__(self) -> int:
        return hash((self.groups, tuple(sorted(self.couplings.items())), self.field_mhz,
                     self.nucleus))

    # -- queries ---------------------------------------------------------------------------

    def j(self, i: int, j: int) -> float:
        """The coupling between groups ``i`` and ``j`` in Hz (0 when none is given)."""
        return self.couplings.get(_pair(i, j), 0.0)

    def is_homonuclear(self, i: int) -> bool:
        """True when group ``i`` is of the observed nucleus."""
        return self.groups[i].nucleus == self.nucleus

    def frequency_hz(self, i: int) -> float:
        """Offset of group ``i`` from 0 ppm in Hz (rotating frame of the observed nucleus)."""
        return self.groups[i].shift_ppm * self.field_mhz

    def coupling_ratio(self, i: int, j: int) -> float:
        """|Δν/J| for a coupled pair; infinite for heteronuclear or uncoupled pairs."""
        coupling = self.j(i, j)
        if coupling == 0.0 or not (self.is_homonuclear(i) and self.is_homonuclear(j)):
            return float("inf")
        return abs(self.frequency_hz(i) - self.frequency_hz(j)) / abs(coupling)

    def partners(self, i: int) -> list[int]:
        """Indices of the groups coupled to group ``i``."""
        return sorted(b if a == i else a for (a, b) in self.couplings if i in (a, b))

    @property
    def spin_count(self) -> int:
        return sum(g.count for g in self.groups)

    # -- splitting -------------------------------------------------------------------------

    def components(self) -> list[tuple[int, ...]]:
        """Group indices of each connected component (couplings as edges)."""
        return _components(range(len(self.groups)), self.couplings)

    def strong_clusters(
        self, weak_ratio: float | None = None, within: Iterable[int] | None = None
    ) -> list[tuple[int, ...]]:
        """Homonuclear groups split into strongly coupled clusters.

        Heteronuclear couplings never join a cluster.  With ``weak_ratio``, homonuclear
        couplings with |Δν/J| ≥ ``weak_ratio`` do not join one either.
        """
        members = [i for i in (range(len(self.groups)) if within is None else within)
                   if self.is_homonuclear(i)]
        edges = {
            pair
            for pair in self.couplings
            if pair[0] in members
            and pair[1] in members
            and (weak_ratio is None or self.coupling_ratio(*pair) < weak_ratio)
        }
        return _components(members, edges)

    def subsystem(self, indices: Iterable[int]) -> tuple[SpinSystem, list[int]]:
        """The system restricted to ``indices``, and the original index of each new group."""
        kept = sorted(set(indices))
        position = {old: new for new, old in enumerate(kept)}
        couplings = {
            (position[a], position[b]): value
            for (a, b), value in self.couplings.items()
            if a in position and b in position
        }
        sub = SpinSystem(tuple(self.groups[i] for i in kept), couplings, self.field_mhz,
                         self.nucleus)
        return sub, kept

    def reordered(self, order: Iterable[int]) -> SpinSystem:
        """The same system with its groups listed in ``order`` (a permutation)."""
        order = list(order)
        if sorted(order) != list(range(len(self.groups))):
            raise SpinSystemError(f"{order!r} is not a permutation of the group indices")
        position = {old: new for new, old in enumerate(order)}
        couplings = {(position[a], position[b]): v for (a, b), v in self.couplings.items()}
        return SpinSystem(tuple(self.groups[i] for i in order), couplings, self.field_mhz,
                          self.nucleus)


def _components(nodes: Iterable[int], edges: Iterable[tuple[int, int]]) -> list[tuple[int, ...]]:
    parent = {n: n for n in nodes}

    def root(n: int) -> int:
        while parent[n] != n:
            parent[n] = parent[parent[n]]
            n = parent[n]
        return n

    for a, b in edges:
        if a in parent and b in parent:
            parent[root(a)] = root(b)
    found: dict[int, list[int]] = {}
    for n in parent:
        found.setdefault(root(n), []).append(n)
    return sorted((tuple(sorted(c)) for c in found.values()), key=lambda c: c[0])


def m_distribution(count: int, spin: float) -> list[tuple[float, int]]:
    """How many of the (2I+1)^n product states of ``count`` spins ``spin`` have each total M.

    Returns ``[(M, states), …]`` from M = −nI up; the counts are the first-order multiplet
    pattern (1:2:1 for two spin-½, 1:2:3:2:1 for two deuterons).
    """
    levels = int(round(2 * spin)) + 1
    counts = [1]
    for _ in range(count):
        widened = [0] * (len(counts) + levels - 1)
        for start, value in enumerate(counts):
            for step in range(levels):
                widened[start + step] += value
        counts = widened
    top = count * spin
    return [(-top + k, c) for k, c in enumerate(counts)]


@dataclass(frozen=True, slots=True)
class Line:
    """One transition: frequency (Hz from 0 ppm), shift (ppm) and intensity."""

    freq_hz: float
    ppm: float
    intensity: float


@dataclass(frozen=True)
class Simulation:
    """Lines of a simulated spectrum, the system they came from, how, and any caveats.

    ``method`` is ``"quantum"`` or ``"first-order"``; ``notes`` say where approximations
    were made (a cluster too large, a weak coupling cut).
    """

    lines: tuple[Line, ...]
    system: SpinSystem
    method: str
    notes: tuple[str, ...] = ()

    @property
    def total_intensity(self) -> float:
        return sum(line.intensity for line in self.lines)


def merge_lines(
    pairs: Iterable[tuple[float, float]], tolerance_hz: float = 1e-4, floor: float = 1e-9
) -> list[tuple[float, float]]:
    """Sort (freq, intensity) pairs and merge those closer than ``tolerance_hz``.

    Merged lines sit at the intensity-weighted mean; lines weaker than ``floor`` times the
    strongest are dropped (numerical dust from the diagonalisation).
    """
    ordered = sorted(pairs)
    if not ordered:
        return []
    strongest = max(abs(i) for _, i in ordered)
    merged: list[list[float]] = []
    for freq, intensity in ordered:
        if merged and freq - merged[-1][2] <= tolerance_hz:
            total = merged[-1][1] + intensity
            if total > 0:
                merged[-1][0] = (merged[-1][0] * merged[-1][1] + freq * intensity) / total
            merged[-1][1] = total
            merged[-1][2] = freq
        else:
            merged.append([freq, intensity, freq])
    return [(f, i) for f, i, _ in merged if abs(i) > floor * strongest]
