"""Spectrum simulation: spin systems, first-order and exact lines, line shapes.

Importing this package imports numpy (the exact simulator and the line shapes need it);
``import peakproof`` alone does not.
"""

from __future__ import annotations

from .first_order import first_order_spectrum, multiplet
from .lineshape import ppm_grid, spectrum_on_grid
from .quantum import composite_spins, quantum_spectrum
from .spin_system import (
    Line,
    Simulation,
    SpinGroup,
    SpinSystem,
    SpinSystemError,
    m_distribution,
    spin_of,
)

__all__ = [
    "Line",
    "Simulation",
    "SpinGroup",
    "SpinSystem",
    "SpinSystemError",
    "composite_spins",
    "first_order_spectrum",
    "m_distribution",
    "multiplet",
    "ppm_grid",
    "quantum_spectrum",
    "simulate",
    "spectrum_on_grid",
    "spin_of",
]

METHODS = ("quantum", "first-order")


def simulate(system: SpinSystem, method: str = "quantum", **options) -> Simulation:
    """Lines of ``system``: ``method="quantum"`` (exact, default) or ``"first-order"``.

    ``options`` go to :func:`quantum_spectrum` (max_spins, weak_ratio, reduce_equivalent).
    """
    if method == "quantum":
        return quantum_spectrum(system, **options)
    if method == "first-order":
        unknown = sorted(set(options) - {"tolerance_hz"})
        if unknown:
            raise SpinSystemError(
                f"option(s) {', '.join(unknown)} apply to the quantum method only"
            )
        return first_order_spectrum(system, **options)
    raise SpinSystemError(
        f"unknown simulation method {method!r}: use one of {', '.join(METHODS)}"
    )
