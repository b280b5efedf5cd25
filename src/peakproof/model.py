"""The parsed model: document → blocks → spectra → signals → couplings.

Small frozen classes holding plain data (named tuples compared by class, see ``records.py``;
``_replace`` makes changed copies); every node keeps its exact :class:`Span`
in the original text.  ``to_json()`` gives the published JSON shape (see
``schema/parse.schema.json``); ``data()`` gives the same without positions, which
is what "the same data" means for round trips and the formatter's safety check.
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any, NamedTuple

from .records import compared_by_class
from .span import Diagnostic, Span

#: Number of equivalent spin-½ partners each first-order letter stands for (n in n+1).
PARTNERS = {"d": 1, "t": 2, "q": 3, "quint": 4, "sext": 5, "sept": 6, "oct": 7, "non": 8}


@compared_by_class
class Coupling(NamedTuple):
    """One coupling constant as written: ``J = 8.4``, ``3J(H,H) = 7.1``, ``2JC–F = 21``."""

    value: float
    span: Span
    text: str = ""  # the number as written, e.g. "8.40" (keeps its decimals)
    nuclei: tuple[str, ...] | None = None  # ("H", "F") when written
    bonds: int | None = None  # 3 in 3J
    label: str | None = None  # "1" in J1, "AB" in JAB

    @property
    def decimals(self) -> int:
        return _decimals(self.text)

    @property
    def heteronuclear(self) -> bool:
        return bool(self.nuclei) and len(set(self.nuclei or ())) > 1

    def to_json(self) -> dict[str, Any]:
        return {
            "value": self.value,
            "text": self.text,
            "nuclei": list(self.nuclei) if self.nuclei else None,
            "bonds": self.bonds,
            "label": self.label,
            "span": self.span.to_json(),
        }

    def data(self) -> tuple:
        return (self.text, self.nuclei, self.bonds, self.label)


@compared_by_class
class Multiplicity(NamedTuple):
    """The apparent multiplet pattern, normalised.

    ``name`` is the normalised text (``"dd"``, ``"br s"``, ``"app t"``, ``"m"``,
    ``"ABq"``); ``components`` the first-order letters in order
    (``("t", "d")`` for td); ``written`` the author's text.
    """

    name: str
    span: Span
    written: str = ""
    components: tuple[str, ...] = ()
    broad: bool = False
    apparent: bool = False
    kind: str = "first-order"  # first-order | singlet | multiplet | AB | broad
    multiplier: int = 1  # the 2 in "2 × d"

    @property
    def expected_j_count(self) -> int | None:
        """How many J values the letters call for; None when any number fits."""
        if self.kind in ("multiplet", "broad"):
            return None
        if self.kind == "singlet":
            return 0
        if self.kind == "AB":
            return 1
        return len(self.components)

    @property
    def partner_counts(self) -> tuple[int, ...]:
        """n (equivalent spin-½ partners) for each component, in letter order."""
        return tuple(PARTNERS[c] for c in self.components)

    def to_json(self) -> str:
        return self.name

    def data(self) -> tuple:
        return (self.name, self.multiplier)


@compared_by_class
class Signal(NamedTuple):
    """One reported resonance: a shift or range with its details."""

    span: Span
    shift: float | None = None
    range: tuple[float, float] | None = None  # bounds in the order written
    shift_text: str = ""  # as written, e.g. "7.36–7.28" or "7.26"
    shift_span: Span | None = None
    multiplicity: Multiplicity | None = None
    couplings: tuple[Coupling, ...] = ()
    count: float | None = None  # type: ignore[assignment]  # a field, though tuple has count(); nuclei: 2H → 2, 2 × 3H → 6
    count_nucleus: str | None = None  # "H", "C", "F", …
    count_text: str = ""
    count_span: Span | None = None
    assignment: str | None = None
    notes: tuple[str, ...] = ()
    details_span: Span | None = None  # the parenthesised part, brackets included
    group: int = 0  # >0 links signals written together ("7.30, 7.26 (2 × d, 1H each)")

    @property
    def j_hz(self) -> tuple[float, ...]:
        return tuple(c.value for c in self.couplings)

    @property
    def position(self) -> float:
        """The shift, or the centre of the range."""
        if self.shift is not None:
            return self.shift
        assert self.range is not None
        return (self.range[0] + self.range[1]) / 2

    @property
    def decimals(self) -> int:
        return _shift_decimals(self.shift_text)

    def to_json(self) -> dict[str, Any]:
        return {
            "shift": self.shift,
            "range": list(self.range) if self.range else None,
            "shift_text": self.shift_text,
            "multiplicity": self.multiplicity.name if self.multiplicity else None,
            "multiplicity_written": self.multiplicity.written if self.multiplicity else None,
            "j_hz": list(self.j_hz),
            "couplings": [c.to_json() for c in self.couplings],
            "count": self.count,
            "count_nucleus": self.count_nucleus,
            "assignment": self.assignment,
            "notes": list(self.notes),
            "span": self.span.to_json(),
        }

    def data(self) -> tuple:
        return (
            self.shift,
            self.range,
            self.multiplicity.data() if self.multiplicity else None,
            tuple(c.value for c in self.couplings),
            tuple(c.data()[1:] for c in self.couplings),
            self.count,
            self.count_nucleus,
            self.assignment,
            self.notes,
        )


@compared_by_class
class Spectrum(NamedTuple):
    """One NMR spectrum's header and signal list."""

    span: Span
    nucleus: str  # "1H", "13C", "19F", …
    signals: tuple[Signal, ...] = ()
    decoupled: tuple[str, ...] = ()  # ("1H",) for 13C{1H}
    frequency_mhz: float | None = None
    frequency_span: Span | None = None
    solvent: str | None = None  # as written
    solvent_normalized: str | None = None  # canonical key, e.g. "DMSO-d6"
    solvent_span: Span | None = None
    temperature_k: float | None = None
    reference: str | None = None
    conditions: tuple[str, ...] = ()  # other header notes, as written
    header_span: Span | None = None
    header_text: str = ""
    nucleus_span: Span | None = None

    @property
    def element(self) -> str:
        return self.nucleus.lstrip("0123456789")

    def to_json(self) -> dict[str, Any]:
        return {
            "nucleus": self.nucleus,
            "decoupled": list(self.decoupled),
            "frequency_mhz": self.frequency_mhz,
            "solvent": {"written": self.solvent, "normalized": self.solvent_normalized}
            if self.solvent
            else None,
            "temperature_k": self.temperature_k,
            "reference": self.reference,
            "conditions": list(self.conditions),
            "signals": [s.to_json() for s in self.signals],
            "span": self.span.to_json(),
        }

    def data(self) -> tuple:
        return (
            self.nucleus,
            self.decoupled,
            self.frequency_mhz,
            self.solvent_normalized,
            self.temperature_k,
            self.reference,
            tuple(s.data() for s in self.signals),
        )


@compared_by_class
class MassSpec(NamedTuple):
    """A high-resolution mass-spectrometry record."""

    span: Span
    method: str | None = None  # "ESI", "EI", "ESI-TOF"
    ion: str | None = None  # "[M+Na]+" as normalised text
    ion_written: str | None = None
    formula: str | None = None  # the ion's formula as written after "calcd for"
    formula_span: Span | None = None
    calcd: float | None = None
    calcd_text: str = ""
    calcd_span: Span | None = None
    found: float | None = None
    found_text: str = ""
    found_span: Span | None = None
    ion_span: Span | None = None

    def to_json(self) -> dict[str, Any]:
        return {
            "method": self.method,
            "ion": self.ion,
            "formula": self.formula,
            "calcd": self.calcd,
            "found": self.found,
            "span": self.span.to_json(),
        }

    def data(self) -> tuple:
        return (self.method, self.ion, self.formula, self.calcd_text, self.found_text)


@compared_by_class
class ElementalAnalysis(NamedTuple):
    """``Anal. Calcd for C10H12O2: C, 73.15; H, 7.37. Found: C, 73.02; H, 7.41.``"""

    span: Span
    formula: str | None = None
    formula_span: Span | None = None
    calcd: tuple[tuple[str, float], ...] = ()
    found: tuple[tuple[str, float], ...] = ()
    calcd_spans: tuple[Span, ...] = ()
    found_spans: tuple[Span, ...] = ()

    def to_json(self) -> dict[str, Any]:
        return {
            "formula": self.formula,
            "calcd": dict(self.calcd),
            "found": dict(self.found),
            "span": self.span.to_json(),
        }

    def data(self) -> tuple:
        return (self.formula, self.calcd, self.found)


@compared_by_class
class OtherItem(NamedTuple):
    """A non-NMR item of the paragraph (IR, mp, Rf, yield, rotation…), kept as text."""

    span: Span
    kind: str
    text: str

    def to_json(self) -> dict[str, Any]:
        return {"kind": self.kind, "text": self.text, "span": self.span.to_json()}

    def data(self) -> tuple:
        return (self.kind, " ".join(self.text.split()))


@compared_by_class
class Block(NamedTuple):
    """One characterization paragraph (usually one compound)."""

    span: Span
    text: str  # the block's original text
    spectra: tuple[Spectrum, ...] = ()
    mass_spec: tuple[MassSpec, ...] = ()
    analyses: tuple[ElementalAnalysis, ...] = ()
    others: tuple[OtherItem, ...] = ()
    compound: str | None = None  # label or name of the compound, when found
    compound_span: Span | None = None
    formula: str | None = None  # neutral formula written near the compound, when found
    index: int = 0  # type: ignore[assignment]  # a field, though tuple has index()
    suppressed: tuple[str, ...] = ()  # rules silenced for this block by an inline marker

    @property
    def items(self) -> tuple:
        """All items in text order."""
        return tuple(
            sorted(
                (*self.spectra, *self.mass_spec, *self.analyses, *self.others),
                key=lambda item: item.span.start,
            )
        )

    def to_json(self) -> dict[str, Any]:
        return {
            "index": self.index,
            "compound": self.compound,
            "formula": self.formula,
            "span": self.span.to_json(),
            "spectra": [s.to_json() for s in self.spectra],
            "mass_spec": [m.to_json() for m in self.mass_spec],
            "elemental_analysis": [a.to_json() for a in self.analyses],
            "other": [o.to_json() for o in self.others],
        }

    def data(self) -> tuple:
        return (
            tuple(s.data() for s in self.spectra),
            tuple(m.data() for m in self.mass_spec),
            tuple(a.data() for a in self.analyses),
            tuple(o.data() for o in self.others),
        )


@compared_by_class
class Document(NamedTuple):
    """A whole text with its blocks and the diagnostics met while reading it."""

    text: str
    blocks: tuple[Block, ...] = ()
    diagnostics: tuple[Diagnostic, ...] = ()
    path: str | None = None

    def to_json(self) -> dict[str, Any]:
        return {
            "schema": "peakproof-parse/1",
            "path": self.path,
            "blocks": [b.to_json() for b in self.blocks],
            "diagnostics": [d.to_json() for d in self.diagnostics],
        }

    def data(self) -> tuple:
        return tuple(b.data() for b in self.blocks)


@lru_cache(maxsize=4096)
def _shift_decimals(shift_text: str) -> int:
    """Decimals of a written shift or of a range's first bound."""
    first = shift_text.replace("−", "-")
    for sep in ("–", "—", " to ", "-"):
        if sep in first[1:]:
            first = first[: first.index(sep, 1)]
            break
    return _decimals(first)


def _decimals(number_text: str) -> int:
    text = number_text.strip().replace(",", ".")
    if "." not in text:
        return 0
    return len(text) - text.index(".") - 1


__all__ = [
    "Block",
    "Coupling",
    "Diagnostic",
    "Document",
    "ElementalAnalysis",
    "MassSpec",
    "Multiplicity",
    "OtherItem",
    "PARTNERS",
    "Signal",
    "Span",
    "Spectrum",
]
