"""Exact (quantum-mechanical) spectra of small spin systems.

The Hamiltonian, in Hz and in the rotating frame of the observed nucleus, is

    H = Σ_k ν_k I_zk + Σ_{k<l} J_kl I_k·I_l

in the product basis.  It commutes with the total F_z, so each M block is built and
diagonalised on its own (numpy.linalg.eigh).  Lines are the ΔM = −1 transitions of F⁻
summed over the observed spins, with intensity |⟨f|F⁻|i⟩|².

Two reductions keep the matrices small:

* *Weak partners.*  Heteronuclear spins, and homonuclear groups cut off at a weak coupling,
  keep I_z as a good quantum number: each combination of their total M shifts the
  frequencies of the strongly coupled spins by Σ J·M (the X approximation).  For
  heteronuclear partners and isolated groups this is exact to about J²/Δν; a partner that
  is itself strongly coupled to others has mixed states, and lines that see it through a
  cut coupling J can move by up to about J/2 (the note on the result says so).
* *Magnetic equivalence.*  n equivalent spins combine into composite spins S with known
  multiplicities (A2 → S=1 once and S=0 once; A3 → 3/2 once, 1/2 twice); each combination
  of composite spins is simulated and added with its weight.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from .first_order import multiplet
from .spin_system import Line, Simulation, SpinSystem, m_distribution, merge_lines

#: Transitions weaker than this fraction of a sub-spectrum's strongest are not kept.
_INTENSITY_FLOOR = 1e-10
#: Merged lines weaker than this fraction of the strongest line are dropped (combination
#: lines of weakly coupled systems, ~(J/Δν)⁴, nothing a spectrum would show).
_LINE_FLOOR = 1e-7


def composite_spins(count: int, spin: float) -> list[tuple[float, int]]:
    """Total spins S (with multiplicities) that ``count`` equivalent spins ``spin`` form.

    The multiplicity of S is the number of product states with M = S minus the number
    with M = S + 1 (the usual angular-momentum counting).
    """
    states = dict(m_distribution(count, spin))
    result = []
    for total, number in states.items():
        if total < 0:
            continue
        multiplicity = number - states.get(total + 1, 0)
        if multiplicity:
            result.append((total, multiplicity))
    return sorted(result, reverse=True)


@dataclass
class _Block:
    """One M block of a composite-spin Hamiltonian: what does not depend on the shifts."""

    states: np.ndarray  # product-state codes in this block
    m: np.ndarray  # (states, spins) m values
    coupling_diag: np.ndarray  # Σ J m m for each state
    off_diagonal: np.ndarray  # dense, zero diagonal
    lowering: np.ndarray | None  # F⁻ from this block to the block with M − 1 (rows there)


class _Structure:
    """Basis, blocks and F⁻ of one set of spins (S values, coupling matrix, observed flags)."""

    def __init__(self, spins: list[float], couplings: np.ndarray, observed: list[bool]):
        self.spins = np.asarray(spins, dtype=float)
        levels = np.rint(2 * self.spins).astype(int) + 1
        radix = np.ones(len(spins), dtype=np.int64)
        for k in range(len(spins) - 2, -1, -1):
            radix[k] = radix[k + 1] * levels[k + 1]
        dimension = int(np.prod(levels))
        codes = np.arange(dimension, dtype=np.int64)
        digits = (codes[:, None] // radix[None, :]) % levels[None, :]
        m = digits - self.spins[None, :]
        total = m.sum(axis=1)
        keys = np.rint(2 * total).astype(int)
        order = np.lexsort((codes, -keys))  # blocks from highest M down
        sorted_keys = keys[order]
        boundaries = np.flatnonzero(np.diff(sorted_keys)) + 1
        starts = np.concatenate(([0], boundaries))
        stops = np.concatenate((boundaries, [dimension]))
        block_of = np.empty(dimension, dtype=int)
        local = np.empty(dimension, dtype=int)
        block_keys = []
        for b, (start, stop) in enumerate(zip(starts, stops)):
            block_of[order[start:stop]] = b
            local[order[start:stop]] = np.arange(stop - start)
            block_keys.append(int(sorted_keys[start]))

        coupling_diag = 0.5 * np.einsum("sk,kl,sl->s", m, couplings, m)
        sizes = stops - starts
        off = [np.zeros((n, n)) for n in sizes]
        s_times = self.spins * (self.spins + 1)
        for k, l in zip(*np.nonzero(np.triu(couplings, 1))):
            # ½ J (I+_k I−_l + I−_k I+_l): raise k, lower l, same M block
            can = (digits[:, k] < levels[k] - 1) & (digits[:, l] > 0)
            source = codes[can]
            target = source + radix[k] - radix[l]
            mk, ml = m[can, k], m[can, l]
            value = (0.5 * couplings[k, l] * np.sqrt(s_times[k] - mk * (mk + 1))
                     * np.sqrt(s_times[l] - ml * (ml - 1)))
            for b in np.unique(block_of[source]):
                here = block_of[source] == b
                rows, cols = local[target[here]], local[source[here]]
                off[b][rows, cols] += value[here]
                off[b][cols, rows] += value[here]

        lowering = [None] * len(sizes)
        for b in range(len(sizes) - 1):
            if block_keys[b + 1] != block_keys[b] - 2:
                continue
            matrix = np.zeros((sizes[b + 1], sizes[b]))
            members = order[starts[b]:stops[b]]
            for k in np.flatnonzero(observed):
                can = members[digits[members, k] > 0]
                mk = m[can, k]
                matrix[local[can - radix[k]], local[can]] += np.sqrt(s_times[k] - mk * (mk - 1))
            lowering[b] = matrix
        self.blocks = [
            _Block(order[s:e], m[order[s:e]], coupling_diag[order[s:e]], off[b], lowering[b])
            for b, (s, e) in enumerate(zip(starts, stops))
        ]

    def transitions(self, offsets_hz: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Frequencies and raw intensities for the spins' offsets (Hz) in this basis."""
        energies, vectors = [], []
        for block in self.blocks:
            hamiltonian = block.off_diagonal.copy()
            hamiltonian[np.diag_indices_from(hamiltonian)] += block.m @ offsets_hz
            hamiltonian[np.diag_indices_from(hamiltonian)] += block.coupling_diag
            e, v = np.linalg.eigh(hamiltonian)
            energies.append(e)
            vectors.append(v)
        freqs, intensities = [], []
        for b, block in enumerate(self.blocks):
            if block.lowering is None:
                continue
            amplitude = vectors[b + 1].T @ block.lowering @ vectors[b]
            strength = amplitude**2
            keep = strength > _INTENSITY_FLOOR * max(strength.max(initial=0.0), 1e-300)
            rows, cols = np.nonzero(keep)
            freqs.append(energies[b][cols] - energies[b + 1][rows])
            intensities.append(strength[rows, cols])
        if not freqs:
            return np.zeros(0), np.zeros(0)
        return np.concatenate(freqs), np.concatenate(intensities)


def _cluster_dimension(system: SpinSystem, cluster: tuple[int, ...], reduce: bool) -> int:
    size = 1
    for k in cluster:
        group = system.groups[k]
        size *= (int(round(2 * group.count * group.spin)) + 1 if reduce
                 else (int(round(2 * group.spin)) + 1) ** group.count)
    return size


def _cluster_lines(
    system: SpinSystem, cluster: tuple[int, ...], reduce: bool
) -> list[tuple[float, float]]:
    """Exact lines of one strongly coupled cluster, other partners in the X approximation."""
    inside = set(cluster)
    observed_nuclei = sum(system.groups[k].count for k in cluster if system.groups[k].observed)
    if not observed_nuclei:
        return []
    weak = sorted({p for k in cluster for p in system.partners(k)} - inside)

    # Weak partners: probability of each offset vector (combinations with equal shifts merged).
    base = np.array([system.frequency_hz(k) for k in cluster])
    shift_of = np.array([[system.j(k, w) for w in weak] for k in cluster]).reshape(len(cluster),
                                                                                  len(weak))
    settings: dict[tuple[float, ...], float] = {}
    patterns = [m_distribution(system.groups[w].count, system.groups[w].spin) for w in weak]
    for combination in itertools.product(*patterns):
        states = float(np.prod([c for _, c in combination])) if combination else 1.0
        totals = np.array([mw for mw, _ in combination])
        offsets = base + (shift_of @ totals if len(weak) else 0.0)
        key = tuple(np.round(offsets, 9))
        settings[key] = settings.get(key, 0.0) + states
    weak_states = float(np.prod([sum(c for _, c in p) for p in patterns])) if patterns else 1.0

    # Composite (or individual) spins of each group, with multiplicities.
    choices = []
    for k in cluster:
        group = system.groups[k]
        if reduce:
            options = [(((k, s),) if s > 0 else (), w)
                       for s, w in composite_spins(group.count, group.spin)]
        else:
            options = [(tuple((k, group.spin) for _ in range(group.count)), 1)]
        choices.append(options)

    dimension = _cluster_dimension(system, cluster, reduce=False)
    trace = sum(dimension * system.groups[k].count * (2 / 3) * system.groups[k].spin
                * (system.groups[k].spin + 1) for k in cluster if system.groups[k].observed)
    scale = observed_nuclei / trace
    position = {k: i for i, k in enumerate(cluster)}

    pairs: list[tuple[float, float]] = []
    for combination in itertools.product(*choices):
        spins = [spin for part, _ in combination for spin in part]
        weight = float(np.prod([w for _, w in combination]))
        if not spins:
            continue
        owners = [position[k] for k, _ in spins]
        couplings = np.array([[system.j(cluster[a], cluster[b]) if a != b else 0.0
                               for b in owners] for a in owners])
        observed = [system.groups[cluster[a]].observed for a in owners]
        if not any(observed):
            continue
        structure = _Structure([s for _, s in spins], couplings, observed)
        for offsets, states in settings.items():
            freqs, intensities = structure.transitions(np.asarray(offsets)[owners])
            factor = weight * states / weak_states * scale
            pairs.extend(zip(freqs.tolist(), (intensities * factor).tolist()))
    return pairs


def _split_to_fit(
    system: SpinSystem, cluster: tuple[int, ...], limit: int, reduce: bool, min_ratio: float
) -> tuple[list[tuple[int, ...]], float | None]:
    """Cut the weakest couplings of ``cluster`` until every piece fits ``limit`` states."""
    ratios = sorted({system.coupling_ratio(a, b) for a in cluster for b in cluster
                     if a < b and system.j(a, b) != 0.0}, reverse=True)
    pieces = [cluster]
    used = None
    for ratio in ratios:
        if ratio < min_ratio:
            break
        pieces = system.strong_clusters(weak_ratio=ratio, within=cluster)
        used = ratio
        if all(_cluster_dimension(system, p, reduce) <= limit for p in pieces):
            break
    return pieces, used


def quantum_spectrum(
    system: SpinSystem,
    *,
    max_spins: int = 12,
    weak_ratio: float | None = None,
    reduce_equivalent: bool = True,
    min_cut_ratio: float = 2.0,
    tolerance_hz: float = 1e-4,
) -> Simulation:
    """Simulate ``system`` exactly, cluster by strongly coupled cluster.

    Args:
        max_spins: largest cluster simulated exactly, as a number of spin-½ (2**max_spins
            product states after the composite-spin reduction).  Larger clusters are cut
            at their weakest couplings (largest |Δν/J|, never below ``min_cut_ratio``);
            a piece that still does not fit is simulated first order.  Each is noted.
        weak_ratio: also treat homonuclear couplings with |Δν/J| ≥ this as weak.
        reduce_equivalent: use composite spins for equivalent groups (same result, faster).
    """
    limit = 2**max_spins
    notes: list[str] = []
    pairs: list[tuple[float, float]] = []
    for cluster in system.strong_clusters(weak_ratio):
        pieces = [cluster]
        if _cluster_dimension(system, cluster, reduce_equivalent) > limit:
            pieces, ratio = _split_to_fit(system, cluster, limit, reduce_equivalent,
                                          min_cut_ratio)
            labels = ", ".join(system.groups[k].label for k in cluster)
            if ratio is not None:
                largest_cut = max(abs(system.j(a, b)) for a in cluster for b in cluster
                                  if a < b and system.j(a, b) != 0.0
                                  and system.coupling_ratio(a, b) >= ratio)
                notes.append(f"cluster {labels} is larger than {max_spins} spins: couplings "
                             f"with |Δν/J| ≥ {ratio:.3g} treated as weak (X approximation; "
                             f"lines may move by up to about {largest_cut / 2:.2g} Hz)")
        for piece in pieces:
            if _cluster_dimension(system, piece, reduce_equivalent) <= limit:
                pairs.extend(_cluster_lines(system, piece, reduce_equivalent))
                continue
            labels = ", ".join(system.groups[k].label for k in piece)
            notes.append(f"groups {labels} are strongly coupled and too many to simulate "
                         f"exactly (limit {max_spins} spins): simulated first order")
            for k in piece:
                group = system.groups[k]
                if group.observed:
                    partners = [(system.j(k, p), system.groups[p].count, system.groups[p].spin)
                                for p in system.partners(k)]
                    pairs.extend(multiplet(system.frequency_hz(k), partners, group.count))
    lines = merge_lines(pairs, tolerance_hz, floor=_LINE_FLOOR)
    return Simulation(
        tuple(Line(f, f / system.field_mhz, i) for f, i in lines),
        system,
        "quantum",
        tuple(notes),
    )
