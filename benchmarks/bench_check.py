"""Parse and check throughput on one large generated document, measured in the same run.

The document (fixed seed) has blocks with coupled 1H lists (partners, near misses, equal J),
13C lists, HRMS and elemental analysis, so every rule family has work. Checking must not cost
more than parsing: the script prints both throughputs (medians of REPEAT runs) and their ratio.

Run: python benchmarks/bench_check.py [blocks]
"""

from __future__ import annotations

import random
import statistics
import sys
import time

import peakproof
from peakproof.checker import check
from peakproof.masses import mass_percentages, mz
from peakproof.rules._util import clear_caches

REPEAT = 5
SEED = 20261207


def _block(rng: random.Random, i: int) -> str:
    c, h, o = rng.randint(8, 24), 0, rng.randint(1, 4)
    signals = []
    shift = 8.2
    pairs = rng.randint(1, 3)
    for _ in range(pairs):  # aromatic AA'XX' doublets
        j = round(rng.uniform(7.8, 8.9), 1)
        signals.append((shift, f"d, J = {j} Hz, 2H"))
        signals.append((shift - rng.uniform(0.3, 1.0), f"d, J = {j + rng.choice((0.0, 0.0, 0.5)):.1f} Hz, 2H"))
        shift -= 1.2
        h += 4
    j = round(rng.uniform(6.9, 7.6), 1)
    signals.append((4.15 - rng.uniform(0, 0.2), f"q, J = {j} Hz, 2H"))
    signals.append((3.80 + rng.uniform(0, 0.05), "s, 3H"))
    signals.append((2.50 - rng.uniform(0, 0.3), f"dd, J = {j}, {j - rng.choice((0.1, 1.5)):.1f} Hz, 1H"))
    signals.append((1.25 + rng.uniform(0, 0.05), f"t, J = {j} Hz, 3H"))
    signals.append((1.60 - rng.uniform(0, 0.5), "m, 4H"))
    h += 13
    signals.sort(key=lambda s: -s[0])
    h_list = ", ".join(f"{s:.2f} ({d})" for s, d in signals)
    carbons = ", ".join(f"{rng.uniform(10, 200):.1f}" for _ in range(rng.randint(c - 4, c)))
    formula = f"C{c}H{h}O{o}"
    ion = f"C{c}H{h}O{o}Na"
    calcd = mz(ion + "+")
    pct = mass_percentages(formula)
    return (
        f"Compound {i} was obtained as a colourless oil (81%). "
        f"1H NMR (400 MHz, CDCl3) δ {h_list}; "
        f"13C NMR ({rng.choice(('101', '101', '126'))} MHz, CDCl3) δ {carbons}; "
        f"HRMS (ESI) m/z [M + Na]+ calcd for {ion} {calcd:.4f}, found {calcd + rng.uniform(-0.002, 0.002):.4f}. "
        f"Anal. Calcd for {formula}: C, {pct['C']:.2f}; H, {pct['H']:.2f}. "
        f"Found: C, {pct['C'] + rng.uniform(-0.5, 0.5):.2f}; H, {pct['H'] + rng.uniform(-0.3, 0.3):.2f}."
    )


def document(blocks: int, seed: int = SEED) -> str:
    rng = random.Random(seed)
    return "\n\n".join(_block(rng, i) for i in range(blocks)) + "\n"


def median(fn, before=lambda: None) -> tuple[float, object]:
    times, result = [], None
    for _ in range(REPEAT):
        before()
        t0 = time.process_time()
        result = fn()
        times.append(time.process_time() - t0)
    return statistics.median(times), result


def main() -> None:
    blocks = int(sys.argv[1]) if len(sys.argv) > 1 else 400
    text = document(blocks)
    check(peakproof.parse(text))  # build the parser and import the rule families once
    parse_s, doc = median(lambda: peakproof.parse(text))
    # formula caches are cleared before each run, so every repetition starts cold
    check_s, findings = median(lambda: check(doc), before=clear_caches)
    mb = len(text.encode("utf-8")) / 1e6
    print(f"document: {blocks} blocks, {mb:.2f} MB, {len(findings)} findings")
    print(f"parse: {parse_s:.3f} s  ({blocks / parse_s:.0f} blocks/s, {mb / parse_s:.2f} MB/s)")
    print(f"check: {check_s:.3f} s  ({blocks / check_s:.0f} blocks/s, {mb / check_s:.2f} MB/s)")
    print(f"check/parse time ratio: {check_s / parse_s:.2f} (must be ≤ 1)")


if __name__ == "__main__":
    main()
