"""Where the compounds' structures come from, and what RDKit reads in them.

Two sources:

* a line written in the document near a compound, ``SMILES: CCOC(=O)c1ccccc1`` or
  ``InChI=1S/…``, in the text between the previous data block and the end of this one;
* a side file (``check --structures FILE``): CSV/TSV ``label,smiles``; an SD file whose records
  carry the label in a property (``label``, ``name``, ``id``, ``compound``) or in the title line;
  or a folder of ``.mol`` files named by label (``4b.mol``).

Labels are matched to the compounds the document names (``4b``, ``compound 12``, ``(S)-7``);
:func:`match_structures` reports the labels left over on both sides.  An unreadable structure
is kept with a message for people (RDKit's own wording translated, its stderr log silenced);
it never raises.  RDKit is imported only when a structure is actually read.
"""

from __future__ import annotations

import csv
import functools
import io
import os
import re
from typing import NamedTuple

_INLINE = re.compile(r"(?:\bSMILES\s*[:=]\s*(?P<smiles>[^\s,;]+)|(?P<inchi>\bInChI=[^\s,;]+))")
_LABEL_PROPS = ("label", "name", "id", "compound", "compound_id")


class Structure(NamedTuple):
    """One structure as written: its text, where it was written, and the label it carries."""

    text: str            # SMILES, InChI or a molblock
    kind: str            # "smiles" | "inchi" | "molblock"
    label: str | None    # the label it was given (side files), or None (inline)
    origin: str          # "document" or "FILE:LINE" / "FILE#RECORD" / "FOLDER/4b.mol"
    span: object = None  # Span in the document for inline structures

    @property
    def mol(self):
        """The RDKit molecule, or None when it cannot be read (see :attr:`error`)."""
        return _read(self.kind, self.text)[0]

    @property
    def error(self) -> str | None:
        """Why the structure cannot be read, in words for people; None when it can."""
        return _read(self.kind, self.text)[1]


class StructureFileError(Exception):
    """A side file that cannot be read at all; ``str()`` is a message for people."""


class Matching(NamedTuple):
    """The side file's structures matched to blocks, and what was left over on each side."""

    by_block: dict           # block index → Structure
    unmatched_labels: list   # Structures whose label names no compound in the document
    unmatched_compounds: list  # (block index, compound label) with no structure in the file
    invalid: list            # Structures in the file that RDKit cannot read


# -- reading with RDKit -------------------------------------------------------------------------
@functools.lru_cache(maxsize=4096)
def _read(kind: str, text: str):
    """(mol or None, message or None); cached so each distinct structure is parsed once."""
    from rdkit import Chem

    log = _RDKitLog()
    with log:
        if kind == "smiles":
            mol = Chem.MolFromSmiles(text)
        elif kind == "inchi":
            mol = Chem.MolFromInchi(text)
        else:
            mol = Chem.MolFromMolBlock(text)
    if mol is None:
        return None, _translate(kind, text, log.text)
    return mol, None


class _RDKitLog:
    """Collects what RDKit writes to the error stream while a structure is read: its C++ log
    goes to file descriptor 2, so that descriptor is pointed at a temporary file meanwhile."""

    text = ""

    def __enter__(self):
        import sys
        import tempfile

        sys.stderr.flush()
        self._file = tempfile.TemporaryFile()
        self._saved = os.dup(2)
        os.dup2(self._file.fileno(), 2)
        return self

    def __exit__(self, *exc):
        os.dup2(self._saved, 2)
        os.close(self._saved)
        self._file.seek(0)
        self.text = self._file.read().decode("utf-8", "replace")
        self._file.close()
        return False


_CAUSES = (
    (re.compile(r"Explicit valence for atom # ?(\d+) (\w+)(?:, (\d+))?"),
     lambda m: f"atom {int(m.group(1)) + 1} ({m.group(2)}) has more bonds than its valence allows"),
    (re.compile(r"Can't kekulize mol"), lambda m: "an aromatic ring cannot be written with alternating double bonds (check the lowercase atoms and [nH])"),
    (re.compile(r"unclosed ring"), lambda m: "a ring-closure digit is opened but never closed"),
    (re.compile(r"extra open parentheses"), lambda m: "a branch '(' is never closed"),
    (re.compile(r"extra close parentheses"), lambda m: "a ')' closes no branch"),
    (re.compile(r"syntax error while parsing"), lambda m: "the text is not valid SMILES"),
    (re.compile(r"non-ring atom \d+ marked aromatic"), lambda m: "a lowercase (aromatic) atom is not in a ring"),
)


def _translate(kind: str, text: str, log: str) -> str:
    what = {"smiles": "SMILES", "inchi": "InChI", "molblock": "molfile"}[kind]
    for pattern, say in _CAUSES:
        m = pattern.search(log)
        if m:
            return f"{what} {_short(text)} cannot be read: {say(m)}"
    return f"{what} {_short(text)} cannot be read; check it in a structure editor"


def _short(text: str) -> str:
    first = text.strip().splitlines()[0] if text.strip() else ""
    return repr(first if len(first) <= 60 else first[:57] + "…")


# -- where structures are written ---------------------------------------------------------------
def inline_structures(document) -> dict:
    """block index → the last SMILES/InChI written between the previous block's end and this
    block's end (the compound's paragraph and the block itself)."""
    from .span import LineIndex

    text = document.text
    if "SMILES" not in text and "InChI=" not in text:
        return {}
    index = LineIndex(text)
    found = {}
    floor = 0
    for block in document.blocks:
        last = None
        for m in _INLINE.finditer(text, floor, block.span.end):
            last = m
        if last is not None:
            group = "smiles" if last.group("smiles") else "inchi"
            value = last.group(group).rstrip(".")
            start = last.start(group)
            found[block.index] = Structure(value, group, None, "document",
                                           index.span(start, start + len(value)))
        floor = block.span.end
    return found


def load_structures(path) -> list[Structure]:
    """Every structure in a side file or folder (``StructureFileError`` when it cannot be read)."""
    path = os.fspath(path)
    if os.path.isdir(path):
        return _folder(path)
    if not os.path.exists(path):
        raise StructureFileError(f"{path}: no such file")
    try:
        with open(path, encoding="utf-8-sig", errors="strict") as fh:
            content = fh.read()
    except UnicodeDecodeError:
        raise StructureFileError(f"{path}: not a text file (expected CSV/TSV, SD or a folder of .mol files)") from None
    except OSError as exc:
        raise StructureFileError(f"{path}: {exc.strerror or exc}") from None
    lower = path.lower()
    if lower.endswith((".sdf", ".sd")) or "$$$$" in content:
        return _sd(path, content)
    if lower.endswith(".mol"):
        return [Structure(content, "molblock", _stem(path), path)]
    return _table(path, content)


def _folder(path: str) -> list[Structure]:
    out = []
    for name in sorted(os.listdir(path)):
        if name.lower().endswith(".mol"):
            full = os.path.join(path, name)
            with open(full, encoding="utf-8", errors="replace") as fh:
                out.append(Structure(fh.read(), "molblock", _stem(name), full))
    if not out:
        raise StructureFileError(f"{path}: folder holds no .mol files (name them by label, e.g. 4b.mol)")
    return out


def _stem(name: str) -> str:
    return os.path.splitext(os.path.basename(name))[0]


def _table(path: str, content: str) -> list[Structure]:
    delimiter = "\t" if "\t" in content.split("\n", 1)[0] else ","
    rows = list(csv.reader(io.StringIO(content), delimiter=delimiter))
    out = []
    for line, row in enumerate(rows, 1):
        cells = [c.strip() for c in row]
        if not any(cells) or cells[0].startswith("#"):
            continue
        if len(cells) < 2 or not cells[1]:
            raise StructureFileError(f"{path}:{line}: expected 'label{delimiter}structure', found {row!r}")
        label, value = cells[0], cells[1]
        if line == 1 and value.lower() in ("smiles", "inchi", "structure"):
            continue  # a header row
        kind = "inchi" if value.startswith("InChI=") else "smiles"
        out.append(Structure(value, kind, label, f"{path}:{line}"))
    if not out:
        raise StructureFileError(f"{path}: no 'label,smiles' rows found")
    return out


def _sd(path: str, content: str) -> list[Structure]:
    out = []
    # a record's first line is its title (often blank): keep it, split only at "$$$$" lines
    for number, record in enumerate(re.split(r"^\$\$\$\$[^\n]*\n?", content.replace("\r\n", "\n"), flags=re.MULTILINE), 1):
        if not record.strip():
            continue
        molblock, _, props_text = record.partition("M  END")
        props = dict(re.findall(r"^>\s*<([^>]+)>[^\n]*\n([^\n]*)", props_text, re.MULTILINE))
        label = next((props[k].strip() for k in props if k.strip().lower() in _LABEL_PROPS
                      and props[k].strip()), None)
        if label is None:
            label = record.split("\n", 1)[0].strip() or None
        out.append(Structure(molblock + "M  END\n", "molblock", label, f"{path}#{number}"))
    return out


# -- labels ---------------------------------------------------------------------------------------
_WORD = re.compile(r"^(?:compound|product|cpd\.?|no\.?)\s*", re.IGNORECASE)
_STEREO = re.compile(r"^(?:\((?:[RSEZ]\*?|[RS],\s*[RS]|\+|−|-|±)(?:,\s*[RSEZ])*\)|rac|rel|meso|[dl]|cis|trans)-", re.IGNORECASE)


def label_key(label: str) -> str:
    """``"Compound 12"`` → ``"12"``; ``"(4b)"`` → ``"4b"``; stereodescriptors kept."""
    key = _WORD.sub("", label.strip())
    key = key.strip()
    if key.startswith("(") and key.endswith(")") and "(" not in key[1:]:
        key = key[1:-1]
    return key.strip().lower()


def _bare(key: str) -> str:
    return _STEREO.sub("", key)


def match_structures(document, structures: list[Structure]) -> Matching:
    """Side-file structures matched to the document's compounds by label (exact key first,
    then with stereodescriptors such as ``(S)-`` set aside when that is unambiguous)."""
    invalid = [s for s in structures if s.error]
    by_key = {label_key(s.label): s for s in structures if s.label}
    by_bare: dict[str, list] = {}
    for key, s in by_key.items():
        by_bare.setdefault(_bare(key), []).append(s)
    by_block, used, unmatched_compounds = {}, set(), []
    for block in document.blocks:
        if not block.compound:
            continue
        key = label_key(block.compound)
        s = by_key.get(key)
        if s is None:
            candidates = by_bare.get(_bare(key), [])
            s = candidates[0] if len(candidates) == 1 else None
        if s is None:
            unmatched_compounds.append((block.index, block.compound))
            continue
        by_block[block.index] = s
        used.add(id(s))
    unmatched = [s for s in structures if s.label and id(s) not in used]
    return Matching(by_block, unmatched, unmatched_compounds, invalid)


def matching_report(matching: Matching) -> list[str]:
    """Lines for people about a side file: unreadable entries, labels matched to nothing."""
    lines = [f"{s.origin}: {s.error}" for s in matching.invalid]
    for s in matching.unmatched_labels:
        lines.append(f"{s.origin}: structure {s.label!r} matches no compound in the document")
    for _, label in matching.unmatched_compounds:
        lines.append(f"compound {label!r} has no structure in the side file")
    return lines


# -- facts the rules consult ------------------------------------------------------------------------
@functools.lru_cache(maxsize=4096)
def facts(kind: str, text: str):
    """Formula, carbon classes and H counts of a readable structure (cached per structure)."""
    from rdkit import Chem
    from rdkit.Chem import rdMolDescriptors

    mol = _read(kind, text)[0]
    if mol is None:
        return None
    formula = rdMolDescriptors.CalcMolFormula(mol, True, True)
    ranks = list(Chem.CanonicalRankAtoms(mol, breakTies=False))
    carbons = [a.GetIdx() for a in mol.GetAtoms() if a.GetSymbol() == "C"]
    carbon_classes = len({ranks[i] for i in carbons})
    protium = sum(_protium(a) for a in mol.GetAtoms())
    exchangeable = sum(_protium(a) for a in mol.GetAtoms() if a.GetSymbol() in ("O", "N", "S"))
    near_f = set()
    for f in (a for a in mol.GetAtoms() if a.GetSymbol() == "F"):
        dist = Chem.GetDistanceMatrix(mol)[f.GetIdx()]
        near_f.update(i for i in carbons if 1 <= dist[i] <= 3)
    return {"formula": formula, "carbons": len(carbons), "carbon_classes": carbon_classes,
            "protium": protium, "exchangeable": exchangeable,
            "carbons_near_f": len(near_f), "carbon_classes_near_f": len({ranks[i] for i in near_f})}


def _protium(atom) -> int:
    """Hydrogens on ``atom`` that a 1H spectrum sees (implicit H and explicit protium, no D/T)."""
    explicit = sum(1 for n in atom.GetNeighbors() if n.GetSymbol() == "H" and n.GetIsotope() in (0, 1))
    return atom.GetTotalNumHs() + explicit if atom.GetSymbol() != "H" else 0


__all__ = ["Matching", "Structure", "StructureFileError", "facts", "inline_structures", "label_key",
           "load_structures", "match_structures", "matching_report"]
