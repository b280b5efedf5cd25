"""The coupling network of one spectrum: signals as nodes, matching J values as edges.

Two signals are joined when a homonuclear J of one equals a J of the other within the
tolerance (0.3 Hz by default).  Each edge keeps the matched J (the mean of the two), Δν in Hz
from the shift difference and the spectrometer frequency (Δν = Δδ × MHz) and Δν/J, the
first-order criterion.  The data are plain so a simulator can turn them into a spin system.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

DEFAULT_TOLERANCE_HZ = 0.3


@dataclass(frozen=True, slots=True)
class Node:
    index: int  # position of the signal in the spectrum's list
    shift_ppm: float
    count: float | None
    multiplicity: str | None
    j_hz: tuple[float, ...]  # homonuclear J values only, as written

    def to_json(self) -> dict[str, Any]:
        return {
            "index": self.index,
            "shift_ppm": self.shift_ppm,
            "count": self.count,
            "multiplicity": self.multiplicity,
            "j_hz": list(self.j_hz),
        }


@dataclass(frozen=True, slots=True)
class Edge:
    i: int
    j: int
    j_hz: float
    delta_nu_hz: float | None  # None when the spectrum states no frequency
    i_coupling: int  # which of node i's couplings matched (index into Signal.couplings)
    j_coupling: int

    @property
    def ratio(self) -> float | None:
        """Δν/J; None without a frequency."""
        if self.delta_nu_hz is None or self.j_hz == 0:
            return None
        return self.delta_nu_hz / self.j_hz

    def to_json(self) -> dict[str, Any]:
        return {
            "i": self.i,
            "j": self.j,
            "j_hz": round(self.j_hz, 4),
            "delta_nu_hz": None if self.delta_nu_hz is None else round(self.delta_nu_hz, 3),
            "delta_nu_over_j": None if self.ratio is None else round(self.ratio, 3),
        }


@dataclass(frozen=True, slots=True)
class CouplingNetwork:
    nucleus: str
    frequency_mhz: float | None
    tolerance_hz: float
    nodes: tuple[Node, ...]
    edges: tuple[Edge, ...]

    def partners(self, index: int, coupling: int | None = None) -> list[tuple[int, Edge]]:
        """(other node, edge) pairs of node ``index``, optionally only through one coupling."""
        out = []
        for e in self.edges:
            if e.i == index and (coupling is None or e.i_coupling == coupling):
                out.append((e.j, e))
            elif e.j == index and (coupling is None or e.j_coupling == coupling):
                out.append((e.i, e))
        return out

    def to_json(self) -> dict[str, Any]:
        return {
            "nucleus": self.nucleus,
            "frequency_mhz": self.frequency_mhz,
            "tolerance_hz": self.tolerance_hz,
            "nodes": [n.to_json() for n in self.nodes],
            "edges": [e.to_json() for e in self.edges],
        }


def homonuclear(coupling, element: str) -> bool:
    """Whether a coupling can join two signals of the same spectrum (unlabelled counts as yes)."""
    nuclei = coupling.nuclei
    if not nuclei:
        return True
    return all(n.lstrip("0123456789") == element for n in nuclei)


def build_network(spectrum, tolerance: float = DEFAULT_TOLERANCE_HZ) -> CouplingNetwork:
    """The coupling network of ``spectrum`` with J values matched within ``tolerance`` Hz."""
    element = spectrum.element
    mhz = spectrum.frequency_mhz
    nodes = []
    usable: list[list[tuple[int, float]]] = []
    for k, s in enumerate(spectrum.signals):
        pairs = [(ci, c.value) for ci, c in enumerate(s.couplings) if homonuclear(c, element)]
        usable.append(pairs)
        nodes.append(
            Node(
                index=k,
                shift_ppm=s.position,
                count=s.count,
                multiplicity=s.multiplicity.name if s.multiplicity else None,
                j_hz=tuple(v for _, v in pairs),
            )
        )
    edges = []
    limit = tolerance + 1e-9
    for a in range(len(nodes)):
        if not usable[a]:
            continue
        for b in range(a + 1, len(nodes)):
            if not usable[b]:
                continue
            for ci, va in usable[a]:
                best = None
                for cj, vb in usable[b]:
                    diff = abs(va - vb)
                    if diff <= limit and (best is None or diff < best[0]):
                        best = (diff, cj, vb)
                if best is None:
                    continue
                _, cj, vb = best
                delta = abs(nodes[a].shift_ppm - nodes[b].shift_ppm) * mhz if mhz else None
                edges.append(Edge(a, b, (va + vb) / 2, delta, ci, cj))
    return CouplingNetwork(spectrum.nucleus, mhz, tolerance, tuple(nodes), tuple(edges))


__all__ = ["CouplingNetwork", "DEFAULT_TOLERANCE_HZ", "Edge", "Node", "build_network", "homonuclear"]
