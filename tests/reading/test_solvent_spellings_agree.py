"""The grammar's solvent terminal and the vocabulary's solvent table name the same spellings.

``_SOLV`` in ``grammar/peaks.lark`` decides what the reader takes for a solvent; the table in
``vocabulary.py`` says which canonical solvent each spelling is. A spelling in one and not the
other is either never read or read and never recognised.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

import peakproof
from peakproof import vocabulary

GRAMMAR = Path(__file__).resolve().parents[2] / "grammar" / "peaks.lark"
CANONICAL = set(vocabulary._SOLVENT_KEYS.values())


def _solvent_pattern() -> str:
    line = next(l for l in GRAMMAR.read_text("utf-8").splitlines() if l.startswith("_SOLV:"))
    return line.split(":", 1)[1].strip().strip("/")


def _alternatives() -> list[str]:
    inner = re.match(r"^\(\?i:(.*)\)\(\?!", _solvent_pattern()).group(1)
    return [re.sub(r"\\(.)", r"\1", a) for a in inner.split("|")]


def test_every_table_spelling_is_read_by_the_grammar():
    pattern = re.compile(_solvent_pattern())
    missing = [k for k in vocabulary._SOLVENT_KEYS if not pattern.fullmatch(k)]
    assert not missing


def test_every_grammar_spelling_has_a_canonical_solvent():
    unknown = [a for a in _alternatives() if vocabulary.solvent_key(a) not in CANONICAL
               and a not in ("CHCl3", "CH2Cl2", "C6H6", "DMSO-h6", "CD3OD/D2O")]
    assert not unknown


@pytest.mark.parametrize("written, canonical", [
    ("Chloroform-d", "CDCl3"), ("d-DMSO", "DMSO-d6"), ("CD3SOCD3", "DMSO-d6"),
    ("Methanol-d4", "CD3OD"), ("(CD3)2CO", "acetone-d6"), ("dmso-d6", "DMSO-d6"),
    ("CD₃SOCD₃", "DMSO-d6"), ("Toluene-d8", "toluene-d8"),
])
def test_other_spellings_and_cases_are_read_as_their_solvent(written, canonical):
    spectrum = peakproof.parse(f"1H NMR (400 MHz, {written}) δ 7.10 (s, 1H).").blocks[0].spectra[0]
    assert spectrum.solvent == written and spectrum.solvent_normalized == canonical
