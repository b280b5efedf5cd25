"""Structures from the document and from side files, checked with real RDKit."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

pytest.importorskip("rdkit")
from rdkit import Chem
from rdkit.Chem import rdMolDescriptors

import peakproof
from peakproof import api
from peakproof.structures import (
    Structure,
    facts,
    inline_structures,
    label_key,
    match_structures,
)

SRC = os.path.join(os.path.dirname(__file__), os.pardir, "src")


def _facts(smiles):
    return facts("smiles", smiles)


# Symmetry-distinct carbons of textbook molecules (common practice: the number of 13C signals
# taught for these molecules in introductory spectroscopy courses).
@pytest.mark.parametrize("smiles, classes", [
    ("CCOC(=O)c1ccccc1", 7),       # ethyl benzoate
    ("Cc1ccc(C)cc1", 3),           # p-xylene
    ("Cc1ccccc1", 5),              # toluene
    ("CC(C)c1ccccc1", 6),          # cumene (isopropyl: two methyls one class)
    ("CC(C)(C)O", 2),              # tert-butanol
    ("FC(F)(F)c1ccc(C)cc1", 6),    # 4-methylbenzotrifluoride
    ("O=C(C)OCC", 4),              # ethyl acetate
    ("c1ccccc1", 1),               # benzene
])
def test_carbon_classes_of_textbook_molecules(smiles, classes):
    assert _facts(smiles)["carbon_classes"] == classes


def test_formula_and_hydrogens_agree_with_rdkit_as_oracle():
    for smiles in ("CCOC(=O)c1ccccc1", "[2H]C([2H])([2H])OC(=O)c1ccccc1", "C[N+](C)(C)C", "OC(=O)c1ccc(F)cc1"):
        mol = Chem.MolFromSmiles(smiles)
        f = _facts(smiles)
        assert f["formula"] == rdMolDescriptors.CalcMolFormula(mol, True, True)
        assert f["carbons"] == sum(a.GetSymbol() == "C" for a in mol.GetAtoms())
    assert _facts("[2H]C([2H])([2H])OC(=O)c1ccccc1")["protium"] == 5  # D not seen in 1H
    assert _facts("OC(=O)c1ccc(F)cc1")["exchangeable"] == 1


@pytest.mark.parametrize("smiles, words", [
    ("c1cccc1", "alternating double bonds"),
    ("C1CC", "ring-closure digit"),
    ("CC(C)(C)(C)(C)C", "more bonds than its valence"),
    ("CCO)", "closes no branch"),
])
def test_invalid_smiles_give_a_message_for_people(smiles, words, capfd):
    s = Structure(smiles, "smiles", None, "document")
    assert s.mol is None and words in s.error and smiles in s.error
    assert capfd.readouterr().err == ""  # RDKit's own log silenced


def test_inline_smiles_belongs_to_the_next_block_and_invalid_is_a_finding_at_it():
    text = ("Ethyl benzoate (4b). SMILES: CCOC(=O)c1ccccc1\n"
            "13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 60.9, 14.3.\n\n"
            "Broken (5). SMILES: CCOC(=O)c1cccc1\n"
            "13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 60.9, 14.3.\n")
    doc = peakproof.parse(text)
    found = inline_structures(doc)
    assert found[0].text == "CCOC(=O)c1ccccc1" and found[1].text == "CCOC(=O)c1cccc1"
    findings = api.check(doc).diagnostics
    (bad,) = [d for d in findings if d.rule == "structure-unreadable"]
    assert text[bad.span.start:bad.span.end] == "CCOC(=O)c1cccc1"
    assert not [d for d in findings if d.rule.startswith("structure-") and d.span.start < bad.span.start]


DOC = ("Ethyl benzoate (4b).\n"
       "13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, 129.5, 128.3, 127.9, 60.9, 14.3.\n\n"
       "Tolyl trifluoride (compound 12).\n"
       "13C{1H} NMR (101 MHz, CDCl3) δ 141.9, 129.3, 127.7, 125.2, 124.4, 21.4.\n\n"
       "p-Xylene (7).\n"
       "1H NMR (400 MHz, CDCl3) δ 7.05 (s, 4H), 2.31 (s, 6H).\n")


def _write_side_files(tmp_path):
    (tmp_path / "s.csv").write_text("label,smiles\n4b,CCOC(=O)c1ccccc1\ncompound 12,FC(F)(F)c1ccc(C)cc1\n99,CCO\n")
    (tmp_path / "s.tsv").write_text("4b\tCCOC(=O)c1ccccc1\n12\tFC(F)(F)c1ccc(C)cc1\n99\tCCO\n")
    sd = ""
    for label, smi in (("4b", "CCOC(=O)c1ccccc1"), ("12", "FC(F)(F)c1ccc(C)cc1"), ("99", "CCO")):
        mol = Chem.MolFromSmiles(smi)
        mol.SetProp("label", label)
        sd += Chem.MolToMolBlock(mol) + f">  <label>\n{label}\n\n$$$$\n"
    (tmp_path / "s.sdf").write_text(sd)
    folder = tmp_path / "mols"
    folder.mkdir()
    for label, smi in (("4b", "CCOC(=O)c1ccccc1"), ("12", "FC(F)(F)c1ccc(C)cc1"), ("99", "CCO")):
        (folder / f"{label}.mol").write_text(Chem.MolToMolBlock(Chem.MolFromSmiles(smi)))
    return ["s.csv", "s.tsv", "s.sdf", "mols"]


def test_every_side_file_format_matches_the_same_compounds(tmp_path):
    doc = peakproof.parse(DOC)
    for name in _write_side_files(tmp_path):
        matching = api.match_structures(doc, str(tmp_path / name))
        assert set(matching.by_block) == {0, 1}, name
        got = Chem.MolToSmiles(matching.by_block[1].mol)
        assert got == Chem.MolToSmiles(Chem.MolFromSmiles("FC(F)(F)c1ccc(C)cc1")), name
        assert [s.label for s in matching.unmatched_labels] == ["99"], name
        assert [label for _, label in matching.unmatched_compounds] == ["7"], name
        rules = {d.rule for d in api.check(doc, structures=matching).diagnostics}
        assert {"structure-carbon-classes", "structure-cf-splitting"} <= rules, name


def test_labels_match_with_words_parentheses_and_stereodescriptors():
    assert label_key("Compound 12") == "12" and label_key("(4b)") == "4b"
    doc = peakproof.parse("Alcohol (7).\n1H NMR (400 MHz, CDCl3) δ 7.05 (s, 4H), 2.31 (s, 6H).\n")
    matching = match_structures(doc, [Structure("Cc1ccc(C)cc1", "smiles", "(S)-7", "x:1")])
    assert 0 in matching.by_block and not matching.unmatched_labels


def test_rules_formula_carbons_protons():
    text = ("SMILES: CCOC(=O)c1ccccc1\n"
            "13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 130.5, 129.5, 60.9, 14.3.\n"
            "Anal. Calcd for C9H10O3: C, 65.05; H, 6.07. Found: C, 65.01; H, 6.10.")
    findings = {d.rule: d for d in api.check(peakproof.parse(text)).diagnostics}
    assert findings["structure-formula"].data["stated"] == "C9H10O3"
    assert findings["structure-carbon-classes"].severity == "note"  # 5 signals for 7 classes
    ok = "SMILES: OCC\n1H NMR (400 MHz, CDCl3) δ 3.69 (q, J = 7.0 Hz, 2H), 1.22 (t, J = 7.0 Hz, 3H)."
    assert "structure-proton-count" not in {d.rule for d in api.check(peakproof.parse(ok)).diagnostics}
    short = "SMILES: OCC\n1H NMR (400 MHz, CDCl3) δ 3.69 (q, J = 7.0 Hz, 2H), 1.22 (t, J = 7.0 Hz, 1H)."
    assert "structure-proton-count" in {d.rule for d in api.check(peakproof.parse(short)).diagnostics}


def test_two_c_marks_count_one_signal_each():
    text = ("SMILES: CCOC(=O)c1ccccc1\n13C{1H} NMR (101 MHz, CDCl3) δ 166.6, 132.8, 130.5, "
            "129.5 (2C), 128.3 (2C), 60.9, 14.3.")
    rules = {d.rule for d in api.check(peakproof.parse(text)).diagnostics}
    assert "structure-carbon-classes" not in rules


def test_cli_structures_reports_unmatched_and_bad_file(tmp_path):
    _write_side_files(tmp_path)
    (tmp_path / "doc.txt").write_text(DOC)
    env = {**os.environ, "PYTHONPATH": os.path.abspath(SRC)}
    run = subprocess.run([sys.executable, "-m", "peakproof", "check", "doc.txt", "--structures", "s.csv"],
                         cwd=tmp_path, env=env, capture_output=True, text=True, check=False)
    assert "structure-carbon-classes" in run.stdout
    assert "'99' matches no compound" in run.stderr and "'7' has no structure" in run.stderr and "Traceback" not in run.stderr
    missing = subprocess.run([sys.executable, "-m", "peakproof", "check", "doc.txt", "--structures", "nope.csv"],
                             cwd=tmp_path, env=env, capture_output=True, text=True, check=False)
    assert missing.returncode == 2 and "nope.csv: no such file" in missing.stderr


def test_rdkit_not_imported_when_no_structure_is_given():
    code = ("import sys, peakproof\n"
            "doc = peakproof.parse('13C{1H} NMR (101 MHz, CDCl3) δ 171.1, 60.5, 21.0, 14.2.')\n"
            "peakproof.check(doc)\nprint('rdkit' in sys.modules)")
    env = {**os.environ, "PYTHONPATH": os.path.abspath(SRC)}
    out = subprocess.run([sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
