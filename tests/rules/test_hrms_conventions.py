"""HRMS lines as chemists write them: every shape of an ion formula ending in a count before its
charge must keep that count (issue 12 item 8).

Expected m/z values come from molmass (outside oracle) minus one electron mass, 5.48579909065e-4 u
(CODATA 2018). One value is also worked out by hand from AME2020 atomic masses (Wang et al.,
Chin. Phys. C 45 (2021) 030003), so the oracle itself is checked.
"""

from __future__ import annotations

import molmass
import pytest

import peakproof
from peakproof.checker import check

E = 5.48579909065e-4  # electron mass in u, CODATA 2018
MASS_RULES = {"hrms-calcd", "hrms-found", "hrms-formula-mismatch", "hrms-h-count", "hrms-adduct"}

# AME2020 atomic masses (Wang et al. 2021), in u: 1H 1.00782503190, 12C 12 exactly, 16O 15.99491461926
_AME2020 = {"H": 1.00782503190, "C": 12.0, "O": 15.99491461926}


def ion_mz(neutral: str) -> float:
    """m/z of the singly charged cation of ``neutral`` (molmass oracle, minus one electron)."""
    return molmass.Formula(neutral).monoisotopic_mass - E


def test_oracle_agrees_with_ame2020_for_c12h15o3():
    by_hand = 12 * _AME2020["C"] + 15 * _AME2020["H"] + 3 * _AME2020["O"] - E
    assert abs(ion_mz("C12H15O3") - by_hand) < 2e-6  # 207.1015705 u


def ms_records(text):
    return [item for block in peakproof.parse(text).blocks for item in block.items
            if type(item).__name__ == "MassSpec"]


def mass_findings(text):
    return [d for d in check(peakproof.parse(text)) if d.rule.startswith("hrms")]


# Every way an ion formula ends in a count before its charge.
SHAPES = [
    ("[M + H]+ calcd for C12H15O3+ {calcd}; found {found}", "C12H15O3"),
    ("calcd for C10H13O3^+ {calcd}; found {found}", "C10H13O3"),
    ("calcd for [C10H13O3]+ {calcd}, found {found}", "C10H13O3"),
    ("calcd for C12H15O3⁺ {calcd}; found {found}", "C12H15O3"),
    ("calcd for C12H15O3•+ {calcd}; found {found}", "C12H15O3"),
    ("calcd for C12H15O3+• {calcd}; found {found}", "C12H15O3"),
    ("[M + Na]+ calcd for C12H14O3Na+ {calcd}; found {found}", "C12H14O3Na"),
    ("[M + H]+ calcd for C9H11N2+ {calcd}; found {found}", "C9H11N2"),
]


@pytest.mark.parametrize("template,formula", SHAPES)
def test_last_count_is_kept_and_correct_line_is_quiet(template, formula):
    calcd = ion_mz(formula)
    text = "HRMS (ESI) m/z: " + template.format(calcd=f"{calcd:.4f}", found=f"{calcd + 0.0003:.4f}") + "."
    [ms] = ms_records(text)
    assert ms.formula is not None
    assert peakproof.formula.parse_formula(ms.formula).neutral() == peakproof.formula.parse_formula(formula)
    assert mass_findings(text) == [], text


@pytest.mark.parametrize("template,formula", SHAPES)
def test_a_changed_calcd_value_is_flagged_once(template, formula):
    calcd = ion_mz(formula)
    text = "HRMS (ESI) m/z: " + template.format(calcd=f"{calcd + 0.0150:.4f}", found=f"{calcd + 0.0003:.4f}") + "."
    fired = [d.rule for d in mass_findings(text)]
    assert fired.count("hrms-calcd") == 1, (text, fired)


# Isotope labels inside a formula are masses of those isotopes, not counts (issue 17 item 3).
# molmass writes a nuclide as [15N]; the oracle formula is given beside the written one.
LABELLED = [
    ("C9H9D3NO2+", "C9H9[2H]3NO2"),
    ("C6H5(15N)O2+", "C6H5[15N]O2"),
    ("C6H7(13C)O+", "C6H7[13C]O"),
    ("C2H3D3O+", "C2H3[2H]3O"),
]


@pytest.mark.parametrize("written,oracle", LABELLED)
def test_isotope_labels_are_isotope_masses(written, oracle):
    calcd = molmass.Formula(oracle).monoisotopic_mass - E
    good = f"HRMS (EI) m/z: calcd for {written} {calcd:.4f}; found {calcd * (1 - 1e-6):.4f}."
    assert mass_findings(good) == [], good
    # the same line computed as if the label were the natural element must be flagged once
    natural = molmass.Formula(oracle.replace("[2H]", "H").replace("[15N]", "N").replace("[13C]", "C"))
    wrong = natural.monoisotopic_mass - E
    bad = f"HRMS (EI) m/z: calcd for {written} {wrong:.4f}; found {calcd * (1 - 1e-6):.4f}."
    assert [d.rule for d in mass_findings(bad)].count("hrms-calcd") == 1, bad


# The neutral formula followed by the ion type: a convention, read by the value it gives.
# Expected m/z: molmass monoisotopic mass of the ion (outside oracle) ∓ the electron mass.
NEUTRAL_THEN_ION = [  # neutral formula, ion type, formula of the ion (what molmass weighs), z
    ("C14H21O3P", "[M + H]+", "C14H22O3P", 1),
    ("C12H14O3", "[M + Na]+", "C12H14O3Na", 1),
    ("C10H12O2", "[M + K]+", "C10H12O2K", 1),
    ("C9H10O3", "[M + NH4]+", "C9H14NO3", 1),
    ("C11H13NO2", "[M + H]+", "C11H14NO2", 1),
    ("C8H8O3", "[M − H]−", "C8H7O3", -1),
    ("C13H18O2", "[M + Na]+", "C13H18O2Na", 1),
    ("C7H5BrO2", "[M + H]+", "C7H6BrO2", 1),
]


def _value(ion_formula: str, z: int) -> float:
    return molmass.Formula(ion_formula).monoisotopic_mass - z * E


@pytest.mark.parametrize("neutral, ion, ion_formula, z", NEUTRAL_THEN_ION)
def test_neutral_formula_then_ion_is_read_by_its_value(neutral, ion, ion_formula, z):
    calcd = _value(ion_formula, z)
    line = f"HRMS (ESI) m/z calcd for {neutral} {ion} {calcd:.4f}, found {calcd + 0.0003:.4f}."
    found = mass_findings(line)
    assert [d.rule for d in found] == ["hrms-neutral-formula"], [d.message for d in found]
    assert found[0].severity == "note"


@pytest.mark.parametrize("neutral, ion, ion_formula, z", NEUTRAL_THEN_ION)
def test_neutral_reading_with_a_wrong_value_is_flagged_once(neutral, ion, ion_formula, z):
    calcd = _value(ion_formula, z) + 0.0100  # a typing error in the calcd value
    line = f"HRMS (ESI) m/z calcd for {neutral} {ion} {calcd:.4f}, found {calcd - 0.0098:.4f}."
    errors = [d for d in mass_findings(line) if d.severity in ("error", "warning")]
    assert len(errors) == 1, [d.message for d in errors]


def test_neutral_reading_gives_the_block_its_neutral_formula():
    """The H count of the integrations is judged against the neutral formula, not one H less."""
    calcd = _value("C12H17O3", 1)
    text = ("1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.6 Hz, 2H), 6.84 (d, J = 8.6 Hz, 2H), "
            "4.12 (q, J = 7.1 Hz, 2H), 3.79 (s, 3H), 2.88 (t, J = 7.6 Hz, 2H), 2.58 (t, J = 7.6 Hz, 2H), "
            f"1.23 (t, J = 7.1 Hz, 3H); HRMS (ESI) m/z calcd for C12H16O3 [M + H]+ {calcd:.4f}, "
            f"found {calcd + 0.0002:.4f}.")
    rules = {d.rule for d in check(peakproof.parse(text))}
    assert "integration-h-count" not in rules and "hrms-calcd" not in rules


def test_wrong_species_is_one_finding():
    """Calcd computed for the formula as written although the ion has an adduct: hrms-adduct
    says so once; no second error for the same slip."""
    wrong = _value("C12H14O3", 1)
    line = f"HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3 {wrong:.4f}, found 229.0838."
    assert [d.rule for d in mass_findings(line)] == ["hrms-adduct"]
