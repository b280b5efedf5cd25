"""Normalised exports for curators: JSON (the parse shape), JSON Lines and CSV records.

``records(doc, per="signal")`` gives one flat dict per NMR signal, ``per="spectrum"`` one per
spectrum (with its signals nested for JSON Lines, or summarised for CSV).  Records carry the
file, block and compound they came from and the line and column of their text.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Iterable
from typing import Any

from .model import Document, Signal, Spectrum

SIGNAL_COLUMNS = (
    "file", "block", "compound", "nucleus", "decoupled", "frequency_mhz", "solvent",
    "temperature_k", "shift", "range_from", "range_to", "shift_text", "multiplicity",
    "j_hz", "count", "count_nucleus", "assignment", "notes", "line", "column",
)  # fmt: skip
SPECTRUM_COLUMNS = (
    "file", "block", "compound", "nucleus", "decoupled", "frequency_mhz", "solvent",
    "temperature_k", "reference", "conditions", "signal_count", "shifts", "line", "column",
)  # fmt: skip
PER = ("signal", "spectrum")
FORMATS = ("json", "jsonl", "csv")


def _spectrum_fields(doc: Document, block, spectrum: Spectrum) -> dict[str, Any]:
    return {
        "file": doc.path,
        "block": block.index,
        "compound": block.compound,
        "nucleus": spectrum.nucleus,
        "decoupled": list(spectrum.decoupled),
        "frequency_mhz": spectrum.frequency_mhz,
        "solvent": spectrum.solvent_normalized,
        "temperature_k": spectrum.temperature_k,
    }


def _signal_record(base: dict[str, Any], signal: Signal) -> dict[str, Any]:
    return {
        **base,
        "shift": signal.shift,
        "range_from": signal.range[0] if signal.range else None,
        "range_to": signal.range[1] if signal.range else None,
        "shift_text": signal.shift_text,
        "multiplicity": signal.multiplicity.name if signal.multiplicity else None,
        "j_hz": list(signal.j_hz),
        "count": signal.count,
        "count_nucleus": signal.count_nucleus,
        "assignment": signal.assignment,
        "notes": list(signal.notes),
        "line": signal.span.line,
        "column": signal.span.column,
    }


def records(doc: Document, per: str = "signal") -> Iterable[dict[str, Any]]:
    """One record per NMR signal or per spectrum, in text order."""
    if per not in PER:
        raise ValueError(f"per must be one of {PER}, not {per!r}")
    for block in doc.blocks:
        for spectrum in block.spectra:
            base = _spectrum_fields(doc, block, spectrum)
            if per == "signal":
                for signal in spectrum.signals:
                    yield _signal_record(base, signal)
                continue
            yield {
                **base,
                "reference": spectrum.reference,
                "conditions": list(spectrum.conditions),
                "signal_count": len(spectrum.signals),
                "signals": [_signal_record({}, s) for s in spectrum.signals],
                "line": spectrum.span.line,
                "column": spectrum.span.column,
            }


def _cell(value: Any) -> Any:
    if value is None:
        return ""
    if isinstance(value, list):
        return "; ".join(_cell(v) if not isinstance(v, float) else f"{v:g}" for v in value)
    if isinstance(value, float):
        return f"{value:g}"
    return value


def to_csv(docs: list[Document], per: str = "signal") -> str:
    """Flat columns; lists joined with '; ' (J values, notes, shifts of a spectrum)."""
    columns = SIGNAL_COLUMNS if per == "signal" else SPECTRUM_COLUMNS
    out = io.StringIO()
    writer = csv.DictWriter(out, fieldnames=columns, extrasaction="ignore", lineterminator="\n")
    writer.writeheader()
    for doc in docs:
        for record in records(doc, per):
            if per == "spectrum":
                record["shifts"] = [s["shift_text"] for s in record["signals"]]
            writer.writerow({k: _cell(record.get(k)) for k in columns})
    return out.getvalue()


def to_jsonl(docs: list[Document], per: str = "signal") -> str:
    return "".join(
        json.dumps(record, ensure_ascii=False) + "\n" for doc in docs for record in records(doc, per)
    )


def to_json(docs: list[Document]) -> str:
    """The parse JSON shape (``Document.to_json``); several files as ``{"documents": […]}``."""
    payload = docs[0].to_json() if len(docs) == 1 else {"documents": [d.to_json() for d in docs]}
    return json.dumps(payload, ensure_ascii=False, indent=1) + "\n"


def export(docs: list[Document], to: str = "json", per: str = "signal") -> str:
    if to == "json":
        return to_json(docs)
    if to == "jsonl":
        return to_jsonl(docs, per)
    if to == "csv":
        return to_csv(docs, per)
    raise ValueError(f"export format must be one of {FORMATS}, not {to!r}")
