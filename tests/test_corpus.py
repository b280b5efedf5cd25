"""The hand-written corpus: every block parses to its expected projection, clean and damaged."""

from __future__ import annotations

import re

import pytest
from corpus import load_corpus, project
from corpus.damage import REPAIRED_KINDS, damage

ENTRIES = load_corpus()
DAMAGED = [e for e in ENTRIES if damage(e.text, e.id).needs_repair]

#: Variants the corpus must keep covering (tags from the entries' ``covers`` lines).
REQUIRED_COVERS = {
    "nucleus-1H", "nucleus-superscript-1H", "nucleus-1H-NMR-hyphen", "nucleus-spaced-1-H",
    "nucleus-13C-decoupled", "nucleus-13C-superscript-decoupled", "nucleus-19F",
    "nucleus-19F-decoupled", "nucleus-31P-decoupled", "nucleus-2H", "nucleus-11B",
    "nucleus-15N", "nucleus-29Si", "nucleus-77Se", "nucleus-119Sn-decoupled", "nucleus-195Pt",
    "freq-first", "solvent-first", "freq-decimal", "temperature-kelvin", "temperature-celsius",
    "reference-Me4Si", "reference-TMS", "delta-plain", "delta-equals", "delta-subscript-H",
    "delta-subscript-C", "delta-ppm-parenthesised", "colon-no-delta", "trailing-ppm",
    "solvent-mixture-ratio", "solvent-mixture-no-ratio", "solvent-d6-DMSO-spelling",
    "solvent-(CD3)2SO-spelling", "solvent-DMSO-D6-uppercase", "solvent-methanol-d4",
    "solvent-MeOD", "solvent-D2O", "solvent-acetone-d6", "solvent-(CD3)2CO-spelling",
    "solvent-benzene-d6-spelling", "solvent-CD2Cl2", "solvent-acetonitrile-d3",
    "solvent-THF-d8", "solvent-toluene-d8", "solvent-pyridine-d5", "solvent-DMF-d7",
    "solvent-TFA-d", "solvent-CD3CO2D",
    "shift-negative-unicode-minus", "shift-plus-sign", "decimal-comma-shift",
    "range-hyphen", "range-en-dash", "range-em-dash", "range-to", "range-ascending",
    "mult-dd", "mult-dt", "mult-td", "mult-ddd", "mult-dddd", "mult-tt", "mult-qd", "mult-dq",
    "mult-tq", "mult-ddt", "mult-dquint", "mult-p", "mult-pent", "mult-quin", "mult-quintet",
    "mult-h", "mult-sextet", "mult-hept", "mult-septet", "mult-oct", "mult-non",
    "mult-word-doublet", "mult-word-dd", "mult-br-s", "mult-br.-s", "mult-brs", "mult-bs",
    "mult-broad-s", "mult-broad-singlet", "mult-ls-locale", "mult-br-d", "mult-br-m",
    "mult-br-alone", "mult-app-t", "mult-app.-t", "mult-apparent-t", "mult-pseudo-hyphen-t",
    "mult-pseudo-space-t", "mult-ABq", "mult-AB-q", "mult-AB-quartet", "mult-AB-system",
    "mult-AB-pattern", "mult-2x-d",
    "j-equals-list", "j-no-equals", "j-numbered-J1-J2", "j-typed-3JHH", "j-typed-3J(HH)",
    "j-typed-J(HF)", "j-typed-2JC–F", "j-bare-hz", "j-missing-hz", "decimal-comma-J",
    "count-spaced", "count-fractional", "count-2x3H", "count-1H-each", "carbon-count-2C",
    "count-first", "assignment-last", "assignment-multiple-items", "note-rotamer",
    "note-exchangeable", "note-exch-with-D2O", "note-overlapped", "details-any-order",
    "hrms-calc-dot", "hrms-Calcd-dot", "found-colon", "ion-round-brackets", "ion-after-formula",
    "hrms-hyphen-method", "m/z-colon", "hrms-esi-plus", "hrms-esi-tof", "ion-M-H-unicode-minus",
    "ea-anal-calcd", "ea-percent-sign", "ea-solvate-formula", "ea-elemental-analysis-phrase",
    "other-IR", "other-mp", "other-Rf", "other-rotation", "other-yield", "other-MS-low-res",
    "other-UV", "other-bp", "prose-before", "prose-after", "prose-only-no-block",
    "line-breaks-inside-block", "two-blocks",
}


def _parse():
    from peakproof import parse  # imported here so a missing parser fails tests, not collection

    return parse


class TestCorpusFile:
    def test_has_enough_entries(self):
        """The corpus holds at least 150 blocks."""
        assert len(ENTRIES) >= 150

    def test_ids_unique(self):
        """Entry ids are unique, so test ids name one entry."""
        ids = [e.id for e in ENTRIES]
        assert sorted(set(ids)) == sorted(ids)

    def test_every_entry_lists_what_it_covers(self):
        """Each entry names the variants it covers."""
        assert [e.id for e in ENTRIES if not e.covers] == []

    def test_required_variants_are_covered(self):
        """Every variant the brief asks for appears in some entry."""
        covered = {c for e in ENTRIES for c in e.covers}
        assert sorted(REQUIRED_COVERS - covered) == []

    def test_expected_signals_are_well_formed(self):
        """Each expected signal has exactly one of shift and range, and float counts."""
        bad = []
        for e in ENTRIES:
            for block in e.expected:
                for spectrum in block["spectra"]:
                    for s in spectrum["signals"]:
                        if (s["shift"] is None) == (s["range"] is None):
                            bad.append(e.id)
                        if s["count"] is not None and not isinstance(s["count"], float):
                            bad.append(e.id)
        assert bad == []


@pytest.mark.parametrize("entry", ENTRIES, ids=lambda e: e.id)
def test_entry_parses_to_expected(entry):
    """The clean block reads back as its hand-written projection."""
    doc = _parse()(entry.text)
    assert entry.expected == project(doc)


class TestDamage:
    def test_deterministic(self):
        """The same seed gives the same twin."""
        assert [damage(e.text, e.id) for e in ENTRIES] == [damage(e.text, e.id) for e in ENTRIES]

    def test_changes_most_entries(self):
        """Nearly all entries offer a place for a repair-requiring change."""
        assert len(DAMAGED) >= 0.8 * len(ENTRIES)

    @pytest.mark.parametrize("entry", DAMAGED, ids=lambda e: e.id)
    def test_keeps_the_digits(self, entry):
        """Damage never touches a digit, so the data written stays the same."""
        twin = damage(entry.text, entry.id)
        assert re.findall(r"\d", entry.text) == re.findall(r"\d", twin.text)
        assert twin.text != entry.text
        assert REPAIRED_KINDS.intersection(twin.kinds)

    def test_every_kind_occurs(self):
        """Across the corpus every kind of damage is exercised."""
        kinds = {k for e in ENTRIES for k in damage(e.text, e.id).kinds}
        assert kinds == REPAIRED_KINDS | {"ligatures", "soft-hyphens", "odd-spaces", "line-breaks"}

    def test_example_twin(self):
        """A known block gets the typical PDF glyphs."""
        twin = damage("13C{1H} NMR (101 MHz, CDCl3) δ 162.8 (d, J = 248.1 Hz).", "x")
        assert "¼" in twin.text or "d 162.8" in twin.text or "13 C" in twin.text


@pytest.mark.parametrize("entry", DAMAGED, ids=lambda e: e.id)
def test_damaged_twin_parses_the_same(entry):
    """The PDF-damaged twin gives the same projection, and the parser notes a repair."""
    twin = damage(entry.text, entry.id)
    doc = _parse()(twin.text)
    assert entry.expected == project(doc)
    notes = [d for d in doc.diagnostics if d.severity == "note"]
    assert notes, f"no repair note for damage {twin.kinds}"


# --- The demo supporting information and its list of planted errors -------------------------

import tomllib  # noqa: E402
from pathlib import Path  # noqa: E402

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
FAMILIES = {
    "multiplicity-j-count", "j-on-singlet", "equal-j", "j-order", "partner-mismatch",
    "reciprocity", "second-order", "integration", "carbon-count", "decoupled-multiplet",
    "frequency", "impurity", "hrms-electron", "hrms-tolerance", "hrms-adduct", "ea-tolerance",
    "form-order", "form-range-dash", "form-decimals", "form-missing-hz", "formula-mismatch",
}


def _demo_paragraphs() -> dict[str, str]:
    """Compound label → its text from the heading to the next heading."""
    text = (EXAMPLES / "demo_si.txt").read_text(encoding="utf-8")
    out = {}
    for chunk in text.split("\n## ")[1:]:
        heading = chunk.splitlines()[0]
        label = re.search(r"\(([0-9]+[a-z]?)\)\s*$", heading)
        if label:
            out[label.group(1)] = chunk
    return out


def _planted() -> list[dict]:
    return tomllib.loads((EXAMPLES / "planted_errors.toml").read_text(encoding="utf-8"))["error"]


def _families_of(label: str) -> set[str]:
    return {e["family"] for e in _planted() if e["compound"] == label}


class TestDemoSI:
    def test_at_least_twelve_compounds(self):
        """The demo holds at least 12 compound paragraphs."""
        assert len(_demo_paragraphs()) >= 12

    def test_every_family_planted(self):
        """Each check family has at least one planted error."""
        assert FAMILIES == {e["family"] for e in _planted()}

    def test_one_or_two_errors_per_compound(self):
        """Every compound carries one or two planted errors."""
        labels = [e["compound"] for e in _planted()]
        assert {k: labels.count(k) for k in _demo_paragraphs()} == {
            k: min(max(labels.count(k), 1), 2) for k in _demo_paragraphs()
        }

    @pytest.mark.parametrize("error", _planted(), ids=lambda e: f"{e['compound']}:{e['family']}")
    def test_excerpt_unique_in_paragraph(self, error):
        """Each excerpt occurs exactly once in its compound's paragraph."""
        assert _demo_paragraphs()[error["compound"]].count(error["excerpt"]) == 1

    @pytest.mark.parametrize("label", sorted(_demo_paragraphs()))
    def test_clean_parts_are_clean(self, label):
        """Outside the planted errors, H and C counts, HRMS and EA agree with molmass."""
        from molmass import Formula  # oracle: monoisotopic masses and mass fractions

        para = _demo_paragraphs()[label]
        planted = _families_of(label)
        ms = re.search(
            r"(\[M \+ Na\]\+|\[M \+ H\]\+|\[M\]\+•) calcd for (\w+) (\d+\.\d{4}), found (\d+\.\d{4})",
            para,
        )
        assert ms, "every demo compound has an HRMS record"
        ion, formula, calcd, found = ms.groups()
        if "hrms-adduct" not in planted:
            exact = Formula(f"[{formula}]+").monoisotopic_mass  # electron mass subtracted
            if "hrms-electron" not in planted:
                assert f"{exact:.4f}" == calcd
            ppm = (float(found) - exact) / exact * 1e6
            assert ("hrms-tolerance" in planted) == (abs(ppm) > 5)
            neutral = Formula(formula).composition()
            hydrogens = neutral["H"].count - (1 if ion == "[M + H]+" else 0)
            carbons = neutral["C"].count
            proton_list = para.split("1H NMR", 1)[1].split("13C{1H}", 1)[0]
            counted = sum(int(n) for n in re.findall(r"\b(\d+)H[),]", proton_list))
            assert ("integration" in planted) == (counted != hydrogens)
            carbon_list = para.split("13C{1H} NMR", 1)[1].split(";", 1)[0].split(") δ", 1)[1]
            signals = re.findall(r"(\d+\.\d)(?: \((?:[^()]*?(\d)C)?[^()]*\))?", carbon_list)
            listed = sum(int(n) if n else 1 for _, n in signals)
            assert ("carbon-count" in planted) == (listed != carbons)
        ea = re.search(r"Anal\. Calcd for (\w+): (.*?)\. Found: ((?:[A-Z][a-z]?, \d+\.\d+(?:; )?)+)", para)
        if ea:
            composition = Formula(ea.group(1)).composition()
            calcd = dict((s, float(v)) for s, v in re.findall(r"([A-Z][a-z]?), (\d+\.\d+)", ea.group(2)))
            found = dict((s, float(v)) for s, v in re.findall(r"([A-Z][a-z]?), (\d+\.\d+)", ea.group(3)))
            for symbol, value in calcd.items():
                assert f"{composition[symbol].fraction * 100:.2f}" == f"{value:.2f}"
            worst = max(abs(found[s] - calcd[s]) for s in calcd)
            assert ("ea-tolerance" in planted) == (worst > 0.4)
