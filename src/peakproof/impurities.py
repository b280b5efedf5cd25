"""Residual solvent, water and trace-impurity shifts in deuterated NMR solvents.

Data come from ``data/impurities.json``: Gottlieb, Kotlyar, Nudelman (J. Org. Chem. 1997) for
the seven classic solvents and Fulmer et al. (Organometallics 2010) for THF-d8 and the other
solvents it added. Each value carries its citation; values written from memory say so in
``note``. Solvent keys are canonical ("CDCl3", "DMSO-d6", …); normalising what an author wrote
to such a key is the caller's job.
"""

from __future__ import annotations

import difflib
import functools
import json
from dataclasses import dataclass
from importlib import resources

from peakproof.nuclei import normalize_symbol

__all__ = [
    "ImpurityPeak",
    "ReferenceMatch",
    "ReferencePeak",
    "UnknownSolvent",
    "accepted_references",
    "impurity_groups",
    "known_solvents",
    "match",
    "residual_peaks",
    "water_peak",
]

_TABULATED_NUCLEI = ("1H", "13C")


class UnknownSolvent(KeyError):
    """A solvent key that is not in the tables."""

    def __init__(self, message: str, solvent: str, suggestions: tuple[str, ...] = ()):
        super().__init__(message, solvent, suggestions)
        self.message = message
        self.solvent = solvent
        self.suggestions = suggestions

    def __str__(self) -> str:
        return self.message


@dataclass(frozen=True, slots=True)
class ReferencePeak:
    """A solvent's own signal (residual protio species, its 13C signal, or water)."""

    shift: float
    multiplicity: str
    label: str
    source: str
    note: str | None = None


@dataclass(frozen=True, slots=True)
class ImpurityPeak:
    """One group of a common impurity in one solvent."""

    compound: str
    group: str
    shift: float
    multiplicity: str | None
    protons: int | None
    source: str
    note: str | None = None


@dataclass(frozen=True, slots=True)
class ReferenceMatch:
    """A tabulated peak near a reported shift, as found by ``match``."""

    kind: str  # "residual", "water" or "impurity"
    compound: str  # "solvent", "water" or the impurity's name
    group: str
    shift: float
    multiplicity: str | None
    distance: float
    source: str
    note: str | None = None


@functools.cache
def _data() -> dict:
    text = resources.files("peakproof").joinpath("data/impurities.json").read_text("utf-8")
    return json.loads(text)


def known_solvents() -> tuple[str, ...]:
    """Canonical keys of every solvent in the tables."""
    return tuple(_data()["solvents"])


def _solvent(key: str) -> dict:
    solvents = _data()["solvents"]
    if key in solvents:
        return solvents[key]
    folded = {name.casefold(): name for name in solvents}
    if isinstance(key, str) and key.casefold() in folded:
        return solvents[folded[key.casefold()]]
    suggestions = tuple(difflib.get_close_matches(str(key), list(solvents), n=3, cutoff=0.4))
    message = f"unknown solvent {key!r}"
    if suggestions:
        message += f"; did you mean {', '.join(suggestions)}?"
    message += f" Known solvents: {', '.join(solvents)}"
    raise UnknownSolvent(message, str(key), suggestions)


def _canonical_key(key: str) -> str:
    solvents = _data()["solvents"]
    if key in solvents:
        return key
    _solvent(key)  # raises with a helpful message when unknown
    return next(name for name in solvents if name.casefold() == key.casefold())


def _nucleus(symbol: str) -> str:
    """Canonical nucleus spelling ("¹H", "H1" → "1H"); raises UnknownNucleus if unreadable."""
    return normalize_symbol(symbol)


def _citation(code: str) -> str:
    return _data()["sources"][code]


def _reference_peak(entry: dict) -> ReferencePeak:
    return ReferencePeak(
        shift=entry["shift"],
        multiplicity=entry["multiplicity"],
        label=entry["label"],
        source=_citation(entry["source"]),
        note=entry.get("note"),
    )


def residual_peaks(solvent_key: str, nucleus: str) -> list[ReferencePeak]:
    """Signals of the solvent itself for ``nucleus`` ("1H": residual protio, "13C": solvent)."""
    solvent = _solvent(solvent_key)
    entries = solvent["residual"].get(_nucleus(nucleus), [])
    return [_reference_peak(entry) for entry in entries]


def water_peak(solvent_key: str) -> ReferencePeak | None:
    """The 1H signal of dissolved water (H2O or HOD), or None when not tabulated."""
    entry = _solvent(solvent_key).get("water")
    return _reference_peak(entry) if entry else None


def accepted_references(solvent_key: str, nucleus: str) -> list[ReferencePeak]:
    """Shifts accepted for referencing to this solvent: the tabulated value and older ones.

    CDCl3 13C, for example, is 77.16 in the current tables, while 77.0 and 77.23 are still
    used; a checker should accept all three.
    """
    solvent = _solvent(solvent_key)
    canonical = _nucleus(nucleus)
    extra = solvent.get("accepted_references", {}).get(canonical)
    if extra is not None:
        return [_reference_peak(entry) for entry in extra]
    return residual_peaks(solvent_key, canonical)


def impurity_groups(solvent_key: str, nucleus: str) -> list[ImpurityPeak]:
    """Every tabulated impurity group in this solvent for ``nucleus``, in table order."""
    key = _canonical_key(solvent_key)
    canonical = _nucleus(nucleus)
    if canonical not in _TABULATED_NUCLEI:
        return []
    found = []
    for compound in _data()["impurities"]:
        for group in compound[canonical]:
            if key not in group["shifts"]:
                continue
            source_code = group.get("sources", {}).get(key, compound["source"])
            notes = []
            if key in group.get("from_memory", ()):
                notes.append("from memory")
            if compound.get("note"):
                notes.append(compound["note"])
            found.append(
                ImpurityPeak(
                    compound=compound["compound"],
                    group=group["group"],
                    shift=group["shifts"][key],
                    multiplicity=group.get("multiplicity"),
                    protons=group.get("protons"),
                    source=_citation(source_code),
                    note="; ".join(notes) or None,
                )
            )
    return found


def match(solvent_key: str, nucleus: str, shift: float, tolerance: float) -> list[ReferenceMatch]:
    """Tabulated solvent, water and impurity peaks within ``tolerance`` ppm of ``shift``.

    Results are sorted nearest first, so a checker can say "7.27 coincides with CHCl3 (7.26)".
    """
    if tolerance < 0:
        raise ValueError(f"tolerance must be zero or positive, got {tolerance!r} ppm")
    canonical = _nucleus(nucleus)
    candidates: list[ReferenceMatch] = []
    for peak in residual_peaks(solvent_key, canonical):
        candidates.append(_as_match("residual", "solvent", peak, shift))
    if canonical == "1H":
        water = water_peak(solvent_key)
        if water is not None:
            candidates.append(_as_match("water", "water", water, shift))
    for group in impurity_groups(solvent_key, canonical):
        candidates.append(
            ReferenceMatch(
                kind="impurity",
                compound=group.compound,
                group=group.group,
                shift=group.shift,
                multiplicity=group.multiplicity,
                distance=abs(group.shift - shift),
                source=group.source,
                note=group.note,
            )
        )
    # A tiny allowance keeps 7.27 vs 7.26 within 0.01 despite binary rounding.
    close = [item for item in candidates if item.distance <= tolerance + 1e-9]
    return sorted(close, key=lambda item: (item.distance, item.shift))


def _as_match(kind: str, compound: str, peak: ReferencePeak, shift: float) -> ReferenceMatch:
    return ReferenceMatch(
        kind=kind,
        compound=compound,
        group=peak.label,
        shift=peak.shift,
        multiplicity=peak.multiplicity,
        distance=abs(peak.shift - shift),
        source=peak.source,
        note=peak.note,
    )
