"""The coupling network of one spectrum: signals as nodes, matching J values as edges.

Two signals are joined when a homonuclear J of one equals a J of the other within the
tolerance (0.3 Hz by default).  Each edge keeps the matched J (the mean of the two), Δν in Hz
from the shift difference and the spectrometer frequency (Δν = Δδ × MHz) and Δν/J, the
first-order criterion.  The data are plain so a simulator can turn them into a spin system.
"""

from __future__ import annotations

from typing import Any, NamedTuple

from .records import compared_by_class

DEFAULT_TOLERANCE_HZ = 0.3


# Nodes and edges are named tuples (compared by class): a check builds one node per signal, and
# a tuple is built several times faster than a frozen dataclass.
@compared_by_class
class Node(NamedTuple):
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


@compared_by_class
class Edge(NamedTuple):
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


class CouplingNetwork:
    """Nodes and edges of one spectrum (immutable; compared, hashed and shown by its five fields).

    ``nodes`` may be None with ``spectrum`` given instead: the rules read only the edges, so the
    node records are made from the spectrum on first use (the JSON report reads them).
    """

    __slots__ = ("nucleus", "frequency_mhz", "tolerance_hz", "_nodes", "edges", "_by_end", "_spectrum")

    def __init__(self, nucleus: str, frequency_mhz: float | None, tolerance_hz: float,
                 nodes: tuple[Node, ...] | None, edges: tuple[Edge, ...], *, spectrum=None,
                 _by_end: dict | None = None):
        setattr_ = object.__setattr__
        setattr_(self, "nucleus", nucleus)
        setattr_(self, "frequency_mhz", frequency_mhz)
        setattr_(self, "tolerance_hz", tolerance_hz)
        setattr_(self, "_nodes", nodes)
        setattr_(self, "_spectrum", spectrum)  # where ``nodes`` come from while they are None
        setattr_(self, "edges", edges)
        # (node, coupling or None) → its (other node, edge) pairs in edge order
        setattr_(self, "_by_end", _by_end)

    @property
    def nodes(self) -> tuple[Node, ...]:
        nodes = self._nodes
        if nodes is None:
            nodes = _nodes_of(self._spectrum)
            object.__setattr__(self, "_nodes", nodes)
            object.__setattr__(self, "_spectrum", None)
        return nodes

    def __setattr__(self, name, value):
        raise AttributeError(f"CouplingNetwork is immutable (cannot set {name!r})")

    __delattr__ = __setattr__

    def _fields(self) -> tuple:
        return (self.nucleus, self.frequency_mhz, self.tolerance_hz, self.nodes, self.edges)

    def __eq__(self, other: object) -> bool:
        if other.__class__ is not self.__class__:
            return NotImplemented
        return self._fields() == other._fields()

    def __hash__(self) -> int:
        return hash(self._fields())

    def __repr__(self) -> str:
        return (f"CouplingNetwork(nucleus={self.nucleus!r}, frequency_mhz={self.frequency_mhz!r}, "
                f"tolerance_hz={self.tolerance_hz!r}, nodes={self.nodes!r}, edges={self.edges!r})")

    def partners(self, index: int, coupling: int | None = None) -> list[tuple[int, Edge]]:
        """(other node, edge) pairs of node ``index``, optionally only through one coupling."""
        return list(self._ends().get((index, coupling), ()))

    def has_partner(self, index: int, coupling: int | None = None) -> bool:
        """Whether ``partners(index, coupling)`` is not empty."""
        return (index, coupling) in self._ends()

    def _ends(self) -> dict:
        by_end = self._by_end
        if by_end is None:
            by_end = {}
            for e in self.edges:
                _add_ends(by_end, e)
            object.__setattr__(self, "_by_end", by_end)
        return by_end

    def to_json(self) -> dict[str, Any]:
        return {
            "nucleus": self.nucleus,
            "frequency_mhz": self.frequency_mhz,
            "tolerance_hz": self.tolerance_hz,
            "nodes": [n.to_json() for n in self.nodes],
            "edges": [e.to_json() for e in self.edges],
        }


def _add_ends(by_end: dict, e: Edge) -> None:
    for key in ((e.i, e.i_coupling), (e.i, None)):
        by_end.setdefault(key, []).append((e.j, e))
    for key in ((e.j, e.j_coupling), (e.j, None)):
        by_end.setdefault(key, []).append((e.i, e))


def homonuclear(coupling, element: str) -> bool:
    """Whether a coupling can join two signals of the same spectrum (unlabelled counts as yes)."""
    nuclei = coupling.nuclei
    if not nuclei:
        return True
    return all(n.lstrip("0123456789") == element for n in nuclei)


def _nodes_of(spectrum) -> tuple[Node, ...]:
    """One node per signal of ``spectrum``: its shift (or position), count, letters, H–H J values."""
    element = spectrum.element
    nodes = []
    new = tuple.__new__  # a record's fields in order, without the keyword-handling constructor
    for k, s in enumerate(spectrum.signals):
        m = s.multiplicity
        shift = s.shift if s.shift is not None else s.position
        j_hz = tuple([c.value for c in s.couplings if not c.nuclei or homonuclear(c, element)])
        nodes.append(new(Node, (k, shift, s.count, m.name if m else None, j_hz)))
    return tuple(nodes)


def build_network(spectrum, tolerance: float = DEFAULT_TOLERANCE_HZ) -> CouplingNetwork:
    """The coupling network of ``spectrum`` with J values matched within ``tolerance`` Hz."""
    element = spectrum.element
    mhz = spectrum.frequency_mhz
    coupled = []  # (node, shift, its usable (coupling, J) pairs, lowest J, highest J)
    for k, s in enumerate(spectrum.signals):
        couplings = s.couplings
        if not couplings:
            continue
        pairs = [(ci, c.value) for ci, c in enumerate(couplings) if not c.nuclei or homonuclear(c, element)]
        if not pairs:
            continue
        if len(pairs) == 1:
            low = high = pairs[0][1]
        else:
            values = [v for _, v in pairs]
            low, high = min(values), max(values)
        coupled.append((k, s.shift if s.shift is not None else s.position, pairs, low, high))
    edges = []
    by_end: dict = {}
    new = tuple.__new__  # a record's fields in order, without the keyword-handling constructor
    limit = tolerance + 1e-9
    for x, (a, shift_a, pairs_a, low_a, high_a) in enumerate(coupled):
        for b, shift_b, pairs_b, low_b, high_b in coupled[x + 1:]:
            if low_b - high_a > limit or low_a - high_b > limit:
                continue  # every J of one is further than the tolerance from every J of the other
            for ci, va in pairs_a:
                best = None
                for cj, vb in pairs_b:
                    diff = abs(va - vb)
                    if diff <= limit and (best is None or diff < best[0]):
                        best = (diff, cj, vb)
                if best is None:
                    continue
                _, cj, vb = best
                delta = abs(shift_a - shift_b) * mhz if mhz else None
                edge = new(Edge, (a, b, (va + vb) / 2, delta, ci, cj))
                edges.append(edge)
                for key, other in (((a, ci), b), ((a, None), b), ((b, cj), a), ((b, None), a)):
                    held = by_end.get(key)
                    if held is None:
                        by_end[key] = [(other, edge)]
                    else:
                        held.append((other, edge))
    return CouplingNetwork(spectrum.nucleus, mhz, tolerance, None, tuple(edges), spectrum=spectrum, _by_end=by_end)


__all__ = ["CouplingNetwork", "DEFAULT_TOLERANCE_HZ", "Edge", "Node", "build_network", "homonuclear"]
