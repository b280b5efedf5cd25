"""A large invented document for benchmarks: many characterization blocks, fixed seed."""

from __future__ import annotations

import random

_MULTS = [("s", 0), ("d", 1), ("t", 1), ("q", 1), ("dd", 2), ("td", 2), ("dt", 2), ("m", 0), ("br s", 0)]


def block(rng: random.Random, i: int) -> str:
    signals = []
    shift = 8.5
    for _ in range(rng.randint(4, 9)):
        shift -= rng.uniform(0.2, 1.2)
        if shift < 0.5:
            break
        mult, nj = rng.choice(_MULTS)
        parts = [mult]
        if nj:
            js = sorted((round(rng.uniform(1.0, 16.0), 1) for _ in range(nj)), reverse=True)
            parts.append("J = " + ", ".join(f"{j:.1f}" for j in js) + " Hz")
        parts.append(f"{rng.randint(1, 3)}H")
        signals.append(f"{shift:.2f} ({', '.join(parts)})")
    carbons = ", ".join(f"{rng.uniform(10, 200):.1f}" for _ in range(rng.randint(5, 12)))
    mz = rng.uniform(150, 600)
    return (
        f"Compound {i} was obtained as a white solid (85%). "
        f"1H NMR (400 MHz, CDCl3) δ {', '.join(signals)}; "
        f"13C NMR (101 MHz, CDCl3) δ {carbons}; "
        f"HRMS (ESI) m/z [M + H]+ calcd for C12H15O3 {mz:.4f}, found {mz + 0.0003:.4f}."
    )


def document(n_blocks: int, seed: int = 20261201) -> str:
    rng = random.Random(seed)
    return "\n\n".join(block(rng, i) for i in range(n_blocks)) + "\n"
