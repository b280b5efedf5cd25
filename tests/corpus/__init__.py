"""The hand-written corpus of characterization blocks and the projection tests compare against.

Each ``*.corpus`` file holds entries written as::

    ### entry-id
    covers: header-1h, mult-dd, j-equals
    text:
    1H NMR (400 MHz, CDCl3) δ 7.31 (dd, J = 8.4, 2.1 Hz, 1H).
    expect:
    block
    nmr 1H | - | 400 | CDCl3 | -
      7.31 | dd | 8.4, 2.1 | 1 | -

Expectation lines (fields separated by ``|``; ``-`` means none/empty):

* ``block`` starts a new block; an entry with no ``block`` line expects no blocks.
* ``nmr NUCLEUS | DECOUPLED | MHZ | SOLVENT | KELVIN``; ``DECOUPLED`` is a comma list.
* an indented line is a signal: ``SHIFT | MULT | J, J | COUNT | ASSIGNMENT``; trailing
  fields may be left off; ``SHIFT`` is ``7.31`` or a range ``7.36..7.28`` (order as written).
* ``c 170.9, 61.0, 14.2`` is shorthand for bare signals (shift only).
* ``ms METHOD | ION | FORMULA | CALCD | FOUND``.
* ``ea FORMULA | C 73.15, H 7.37 | C 73.02, H 7.41``.
* ``other IR, mp`` lists the kinds of the block's other items in text order.

The expectations are written by hand from the normalisation conventions in the task brief,
never produced by running the parser.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

CORPUS_DIR = Path(__file__).parent


@dataclass(frozen=True)
class Entry:
    id: str
    covers: tuple[str, ...]
    text: str
    expected: list[dict[str, Any]]
    source: str


def project(doc) -> list[dict[str, Any]]:
    """The part of a parsed Document the corpus pins down, as plain data."""
    return [
        {
            "spectra": [
                {
                    "nucleus": s.nucleus,
                    "decoupled": list(s.decoupled),
                    "frequency_mhz": s.frequency_mhz,
                    "solvent": s.solvent_normalized,
                    "temperature_k": s.temperature_k,
                    "signals": [
                        {
                            "shift": g.shift,
                            "range": list(g.range) if g.range else None,
                            "multiplicity": g.multiplicity.name if g.multiplicity else None,
                            "j_hz": list(g.j_hz),
                            "count": g.count,
                            "assignment": g.assignment,
                        }
                        for g in s.signals
                    ],
                }
                for s in b.spectra
            ],
            "mass_spec": [
                {
                    "method": m.method,
                    "ion": m.ion,
                    "formula": m.formula,
                    "calcd": m.calcd,
                    "found": m.found,
                }
                for m in b.mass_spec
            ],
            "elemental_analysis": [
                {"formula": a.formula, "calcd": dict(a.calcd), "found": dict(a.found)}
                for a in b.analyses
            ],
            "other": [o.kind for o in b.others],
        }
        for b in doc.blocks
    ]


class CorpusFormatError(ValueError):
    """A corpus file line that does not follow the entry format."""


def _none(field: str) -> str | None:
    field = field.strip()
    return None if field in ("", "-") else field


def _float(field: str) -> float | None:
    value = _none(field)
    return None if value is None else float(value)


def _floats(field: str) -> list[float]:
    value = _none(field)
    return [] if value is None else [float(part) for part in value.split(",")]


def _signal(line: str) -> dict[str, Any]:
    fields = [f.strip() for f in line.split("|")]
    fields += ["-"] * (5 - len(fields))
    shift_field, mult, js, count, assignment = fields[:5]
    shift: float | None = None
    rng: list[float] | None = None
    if ".." in shift_field[1:]:
        first, second = shift_field.split("..")
        rng = [float(first), float(second)]
    else:
        shift = float(shift_field)
    return {
        "shift": shift,
        "range": rng,
        "multiplicity": _none(mult),
        "j_hz": _floats(js),
        "count": _float(count),
        "assignment": _none(assignment),
    }


def _bare_signal(shift: str) -> dict[str, Any]:
    return _signal(shift)


def _elements(field: str) -> dict[str, float]:
    out: dict[str, float] = {}
    for part in field.split(","):
        symbol, value = part.split()
        out[symbol] = float(value)
    return out


def _expectation(lines: list[str], where: str) -> list[dict[str, Any]]:
    blocks: list[dict[str, Any]] = []
    spectrum: dict[str, Any] | None = None
    for raw in lines:
        if not raw.strip():
            continue
        line = raw.strip()
        if line == "block":
            blocks.append({"spectra": [], "mass_spec": [], "elemental_analysis": [], "other": []})
            spectrum = None
            continue
        if not blocks:
            raise CorpusFormatError(f"{where}: expectation line before any 'block': {raw!r}")
        block = blocks[-1]
        if line.startswith("nmr "):
            nucleus, decoupled, mhz, solvent, kelvin = [
                f.strip() for f in line[4:].split("|")
            ]
            spectrum = {
                "nucleus": nucleus,
                "decoupled": [] if decoupled == "-" else [d.strip() for d in decoupled.split(",")],
                "frequency_mhz": _float(mhz),
                "solvent": _none(solvent),
                "temperature_k": _float(kelvin),
                "signals": [],
            }
            block["spectra"].append(spectrum)
        elif raw[:1].isspace() or line.startswith("c "):
            if spectrum is None:
                raise CorpusFormatError(f"{where}: signal line outside a spectrum: {raw!r}")
            if line.startswith("c "):
                spectrum["signals"].extend(_bare_signal(s) for s in line[2:].split(","))
            else:
                spectrum["signals"].append(_signal(line))
        elif line.startswith("ms "):
            method, ion, formula, calcd, found = [f.strip() for f in line[3:].split("|")]
            block["mass_spec"].append(
                {
                    "method": _none(method),
                    "ion": _none(ion),
                    "formula": _none(formula),
                    "calcd": _float(calcd),
                    "found": _float(found),
                }
            )
            spectrum = None
        elif line.startswith("ea "):
            formula, calcd, found = [f.strip() for f in line[3:].split("|")]
            block["elemental_analysis"].append(
                {"formula": formula, "calcd": _elements(calcd), "found": _elements(found)}
            )
            spectrum = None
        elif line.startswith("other "):
            block["other"].extend(k.strip() for k in line[6:].split(","))
            spectrum = None
        else:
            raise CorpusFormatError(f"{where}: cannot read expectation line {raw!r}")
    return blocks


def _entries_of(path: Path) -> list[Entry]:
    entries: list[Entry] = []
    chunks = path.read_text(encoding="utf-8").split("\n### ")
    for chunk in chunks[1:] if not chunks[0].startswith("### ") else chunks:
        chunk = chunk.removeprefix("### ")
        head, _, rest = chunk.partition("\n")
        entry_id = head.strip()
        where = f"{path.name}:{entry_id}"
        covers_line, _, rest = rest.partition("\n")
        if not covers_line.startswith("covers:"):
            raise CorpusFormatError(f"{where}: second line must be 'covers: …'")
        if not rest.startswith("text:\n") or "\nexpect:\n" not in rest:
            raise CorpusFormatError(f"{where}: needs a 'text:' and an 'expect:' section")
        text, _, expect = rest.removeprefix("text:\n").partition("\nexpect:\n")
        entries.append(
            Entry(
                id=entry_id,
                covers=tuple(c.strip() for c in covers_line[7:].split(",") if c.strip()),
                text=text,
                expected=_expectation(expect.splitlines(), where),
                source=path.name,
            )
        )
    return entries


def load_corpus() -> list[Entry]:
    """All corpus entries, in file then entry order."""
    entries: list[Entry] = []
    for path in sorted(CORPUS_DIR.glob("*.corpus")):
        entries.extend(_entries_of(path))
    return entries
