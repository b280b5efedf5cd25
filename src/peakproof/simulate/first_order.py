"""First-order multiplets by repeated convolution (no numpy needed).

Each set of n equivalent partners of spin I splits every line into 2nI+1 lines spaced by J,
with the weights of :func:`~peakproof.simulate.spin_system.m_distribution` (Pascal's
triangle for spin ½; 1:1:1, 1:2:3:2:1, … for deuterium) — common practice.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence

from .spin_system import (
    Line,
    Simulation,
    SpinSystem,
    SpinSystemError,
    _check_spin,
    m_distribution,
    merge_lines,
)

#: A partner set: (J in Hz, number of equivalent partners, their spin).
Partner = tuple[float, int, float]


def multiplet(
    center_hz: float,
    partners: Sequence[Partner] | Iterable[Partner],
    count: float = 1.0,
    tolerance_hz: float = 1e-4,
) -> list[tuple[float, float]]:
    """Lines ``(frequency_hz, intensity)`` of a first-order multiplet, low to high frequency.

    The intensities add up to ``count`` (the number of observed nuclei); lines that fall
    within ``tolerance_hz`` of each other are merged.
    """
    lines = [(float(center_hz), 1.0)]
    for position, partner in enumerate(partners):
        try:
            coupling, n, spin = partner
        except (TypeError, ValueError):
            raise SpinSystemError(
                f"partner {position + 1}: expected (J_Hz, count, spin), got {partner!r}"
            ) from None
        if int(n) != n or n < 0:
            raise SpinSystemError(f"partner {position + 1}: count must be a whole number, got {n!r}")
        spin = _check_spin(spin, f"partner {position + 1}")
        pattern = m_distribution(int(n), spin)
        states = sum(c for _, c in pattern)
        lines = merge_lines(
            ((freq + float(coupling) * m, weight * c / states)
             for freq, weight in lines for m, c in pattern),
            tolerance_hz,
            floor=0.0,
        )
    return [(freq, weight * count) for freq, weight in lines]


def first_order_spectrum(system: SpinSystem, tolerance_hz: float = 1e-4) -> Simulation:
    """Every observed group as a first-order multiplet from all its coupling partners."""
    pairs: list[tuple[float, float]] = []
    for index, group in enumerate(system.groups):
        if not (group.observed and system.is_homonuclear(index)):
            continue
        partners = [
            (system.j(index, other), system.groups[other].count, system.groups[other].spin)
            for other in system.partners(index)
        ]
        pairs.extend(multiplet(system.frequency_hz(index), partners, group.count, tolerance_hz))
    lines = merge_lines(pairs, tolerance_hz, floor=0.0)
    return Simulation(
        tuple(Line(f, f / system.field_mhz, i) for f, i in lines), system, "first-order"
    )
