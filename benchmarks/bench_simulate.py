"""Time the exact simulator on 6-, 8- and 10-spin systems against a 1-second budget.

Each system is one strongly coupled cluster of distinct shifts (so no reduction applies):
an aromatic ring fragment (ortho ≈ 7.5–8 Hz, meta ≈ 1.5–2 Hz, para ≈ 0.5 Hz) joined to an
aliphatic chain (vicinal ≈ 7 Hz, geminal ≈ −14 Hz) — couplings as in common practice.

Run: python benchmarks/bench_simulate.py
"""

from __future__ import annotations

import statistics
import time

from peakproof.simulate import SpinGroup, SpinSystem, quantum_spectrum

BUDGET_S = 1.0
RUNS = 7


def test_system(spins: int) -> SpinSystem:
    aromatic = [7.32, 7.18, 7.25, 7.08, 6.95]
    aliphatic = [3.12, 2.98, 2.61, 2.47, 1.73]
    count_aromatic = min(5, spins // 2 + 1)
    shifts = aromatic[:count_aromatic] + aliphatic[: spins - count_aromatic]
    groups = tuple(SpinGroup(f"H{k + 1}", shift, 1) for k, shift in enumerate(shifts))
    couplings: dict[tuple[int, int], float] = {}
    for k in range(count_aromatic - 1):
        couplings[(k, k + 1)] = 7.9 - 0.2 * k  # ortho
        if k + 2 < count_aromatic:
            couplings[(k, k + 2)] = 1.6  # meta
        if k + 3 < count_aromatic:
            couplings[(k, k + 3)] = 0.6  # para
    chain = list(range(count_aromatic, spins))
    for a, b in zip(chain[0::2], chain[1::2]):
        couplings[(a, b)] = -14.2  # geminal pair (diastereotopic CH2)
    for a, b in zip(chain, chain[2:]):
        couplings[(a, b)] = 7.1  # vicinal
    if chain:
        couplings[(0, chain[0])] = 0.7  # benzylic 4J
    return SpinSystem(groups, couplings, field_mhz=400.0)


def median_time(system: SpinSystem) -> tuple[float, int]:
    times = []
    lines = 0
    for _ in range(RUNS):
        start = time.perf_counter()
        result = quantum_spectrum(system)
        times.append(time.perf_counter() - start)
        lines = len(result.lines)
    return statistics.median(times), lines


def main() -> None:
    print(f"exact simulation, median of {RUNS} runs, budget {BUDGET_S:.1f} s")
    for spins in (6, 8, 10):
        system = test_system(spins)
        assert len(system.strong_clusters()) == 1, "benchmark system must be one cluster"
        seconds, lines = median_time(system)
        print(f"{spins:2d} spins: {seconds * 1000:8.1f} ms  ({lines} lines)  "
              f"ratio to budget {seconds / BUDGET_S:.3f}")


if __name__ == "__main__":
    main()
