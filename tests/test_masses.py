"""Masses, m/z and elemental-analysis percentages (peakproof.masses)."""

import json
from pathlib import Path

import molmass
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from peakproof.formula import Formula, ion_formula, parse_formula
from peakproof.masses import (
    ELECTRON_MASS,
    MassError,
    average_mass,
    isotope_mass,
    mass_percentages,
    monoisotopic_mass,
    mz,
    mz_without_electron,
    ppm_error,
)

DATA = Path(__file__).resolve().parents[1] / "src" / "peakproof" / "data"
ISOTOPES = json.loads((DATA / "isotopes.json").read_text(encoding="utf-8"))
WEIGHTS = json.loads((DATA / "atomic_weights.json").read_text(encoding="utf-8"))
ELEMENTS = sorted(WEIGHTS["weights"])
#: Elements whose CIAAW standard atomic weight is an interval; the package uses CIAAW's
#: conventional value, molmass its own representative value, so these differ by design.
INTERVAL = {el for el, entry in WEIGHTS["weights"].items() if entry["kind"] == "conventional"}


# --- literal values with their sources ------------------------------------------------------


@pytest.mark.parametrize(
    "symbol,mass",
    [
        ("1H", 1.007825031898),  # AME2020 (the older AME2016 value 1.00782503223 is superseded)
        ("D", 2.014101777844),  # AME2020
        ("12C", 12.0),  # exact by definition of the unified atomic mass unit
        ("13C", 13.00335483534),  # AME2020
        ("14N", 14.00307400425),  # AME2020
        ("16O", 15.99491461926),  # AME2020 (AME2016: 15.99491461957)
        ("23Na", 22.98976928195),  # AME2020 (22.9897692820 rounded)
        ("35Cl", 34.968852694),  # AME2020
        ("79Br", 78.918337574),  # AME2020
        ("195Pt", 194.9647917),  # NIST AWIC; CIAAW's platinum table gives 194.964 792(6)
        ("127I", 126.9044719),  # NIST AWIC; CIAAW's iodine page gives 126.904 47(3)
    ],
)
def test_isotope_masses_pinned(symbol, mass):
    assert isotope_mass(symbol) == pytest.approx(mass, abs=1e-9)


def test_electron_mass_is_codata_2018():
    assert ELECTRON_MASS == 5.48579909065e-4  # CODATA 2018 recommended value, in u
    assert ISOTOPES["electron_mass"] == ELECTRON_MASS


@pytest.mark.parametrize(
    "element,weight",
    [
        # CIAAW 2021 (Prohaska et al., Pure Appl. Chem. 2022, 94, 573): conventional values
        ("H", 1.008),
        ("C", 12.011),
        ("N", 14.007),
        ("O", 15.999),
        ("Cl", 35.45),
        # single-valued standard atomic weights
        ("Na", 22.98976928),
        ("F", 18.998403162),
        ("Pt", 195.084),  # also on CIAAW's platinum page: 195.084(9)
    ],
)
def test_atomic_weights_pinned(element, weight):
    assert average_mass(element) == pytest.approx(weight, abs=1e-9)


def test_data_files_carry_their_sources():
    assert "AME2020" in ISOTOPES["source"] and "030003" in ISOTOPES["source"]
    assert "CIAAW" in WEIGHTS["source"] and "2021" in WEIGHTS["source"]
    assert {entry["element"] for entry in ISOTOPES["isotopes"].values()} == set(ELEMENTS)


@pytest.mark.parametrize("element", ELEMENTS)
def test_abundances_of_each_element_sum_to_at_most_one(element):
    total = sum(e["abundance"] for e in ISOTOPES["isotopes"].values() if e["element"] == element)
    assert 0 < total <= 1.0 + 1e-9


def test_hrms_worked_example_from_the_trade_guide():
    # [C12H14O3Na]+: calcd 229.0835 with the electron mass, 229.0841 without (2.4 ppm apart);
    # see shared/guide/trade.md (electron mass CODATA 2018).
    ion = parse_formula("[C12H14O3Na]+")
    assert round(mz(ion), 4) == 229.0835
    assert round(mz_without_electron(ion), 4) == 229.0841
    assert ppm_error(mz_without_electron(ion), mz(ion)) == pytest.approx(2.39, abs=0.01)
    # The same number from the neutral compound and the ion type, or from the uncharged
    # formula as written after "calcd for" with an explicit charge.
    assert mz(ion_formula("C12H14O3", "[M+Na]+")) == pytest.approx(mz(ion), abs=1e-12)
    assert mz("C12H14O3Na", charge=1) == pytest.approx(mz(ion), abs=1e-12)


def test_mz_of_multiply_charged_and_negative_ions():
    m = monoisotopic_mass("C12H14O3")
    h = isotope_mass("1H")
    expected = (m + 2 * h - 2 * ELECTRON_MASS) / 2
    assert mz(ion_formula("C12H14O3", "[M+2H]2+")) == pytest.approx(expected)
    assert mz(ion_formula("C12H14O3", "[M-H]-")) == pytest.approx(m - h + ELECTRON_MASS)


def test_mz_needs_a_charge():
    with pytest.raises(MassError, match="no charge"):
        mz("C12H14O3")
    with pytest.raises(MassError):
        mz_without_electron("C12H14O3")


def test_elemental_analysis_of_c10h12o2():
    # C 73.15 %, H 7.37 % from CIAAW conventional weights: 120.110/164.204 and 12.096/164.204.
    percent = mass_percentages("C10H12O2")
    assert round(percent["C"], 2) == 73.15
    assert round(percent["H"], 2) == 7.37
    assert round(percent["O"], 2) == 19.49
    assert sum(percent.values()) == pytest.approx(100.0)
    assert list(percent) == ["C", "H", "O"]


def test_deuterium_is_reported_under_hydrogen_with_its_own_mass():
    percent = mass_percentages("C6D6")
    d = isotope_mass("D")
    assert set(percent) == {"C", "H"}
    assert percent["H"] == pytest.approx(100 * 6 * d / (6 * 12.011 + 6 * d))


def test_monoisotopic_uses_the_most_abundant_isotope():
    # 58Ni (68 %), 63Cu (69 %), 79Br (50.7 %), 35Cl (75.8 %): IUPAC isotopic compositions.
    assert monoisotopic_mass("Ni") == isotope_mass("58Ni")
    assert monoisotopic_mass("Cu") == isotope_mass("63Cu")
    assert monoisotopic_mass("Br") == isotope_mass("79Br")
    assert monoisotopic_mass("Cl") == isotope_mass("35Cl")


def test_explicit_isotopes_keep_their_own_mass():
    expected = isotope_mass("13C") + 4 * isotope_mass("1H")
    assert monoisotopic_mass("[13C]H4") == pytest.approx(expected)
    assert average_mass("CD4") == pytest.approx(12.011 + 4 * isotope_mass("D"))


def test_missing_data_is_a_mass_error():
    with pytest.raises(MassError, match="Ti"):
        monoisotopic_mass("TiCl4")
    with pytest.raises(MassError, match="14C"):
        monoisotopic_mass("[14C]H4")


def test_ppm_error():
    assert ppm_error(229.0838, 229.0835) == pytest.approx(1.3096, abs=1e-4)
    assert ppm_error(100.0, 100.0) == 0
    with pytest.raises(MassError):
        ppm_error(1.0, 0.0)


# --- molmass as an oracle on generated formulas ---------------------------------------------


def molmass_text(counts):
    return "".join(
        (f"[{s}]" if s[0].isdigit() else s) + (str(n) if n != 1 else "") for s, n in counts.items()
    )


def monoisotopic_table_gap(counts):
    """Known gap between our masses (AME2020) and molmass's (NIST, AME2016-based).

    Up to about 1.5e-6 u per atom (52Cr 1.52e-6, 81Br 1.50e-6); zero for the isotopes AME2020 did
    not revise.
    """
    gap = 0.0
    for symbol, number in counts.items():
        ours = monoisotopic_mass(symbol)
        theirs = molmass.Formula(molmass_text({symbol: 1})).monoisotopic_mass
        gap += number * abs(ours - theirs)
    return gap


counts_strategy = st.dictionaries(
    st.sampled_from(ELEMENTS + ["D", "13C", "15N", "18O", "37Cl", "81Br"]),
    st.integers(1, 30),
    min_size=1,
    max_size=6,
)


@settings(max_examples=300, deadline=None)
@given(counts_strategy)
@example({"Cs": 1, "81Br": 19, "Al": 18, "Fe": 30, "Cr": 30})  # 98 atoms: a gap of 1.0e-4 u in all
def test_monoisotopic_mass_agrees_with_molmass(counts):
    text = molmass_text(counts)
    expected = molmass.Formula(text).monoisotopic_mass
    # The tables agree closely: within the per-atom gap above, never more
    assert monoisotopic_table_gap(counts) <= 1.6e-6 * sum(counts.values())
    tolerance = 1e-6 + monoisotopic_table_gap(counts)
    assert monoisotopic_mass(text) == pytest.approx(expected, abs=tolerance)


SINGLE_VALUED = sorted(set(ELEMENTS) - INTERVAL)


@settings(max_examples=300, deadline=None)
@given(st.dictionaries(st.sampled_from(SINGLE_VALUED), st.integers(1, 30), min_size=1, max_size=6))
def test_average_mass_agrees_with_molmass_for_single_valued_elements(counts):
    # Where CIAAW gives one value, molmass (NIST) has the same or a revision within 1e-6 u.
    text = molmass_text(counts)
    gap = sum(n * abs(average_mass(s) - molmass.Formula(s).mass) for s, n in counts.items())
    assert gap < 1e-3 * max(1, sum(counts.values())) / 10
    assert average_mass(text) == pytest.approx(molmass.Formula(text).mass, abs=1e-3)


@settings(max_examples=300, deadline=None)
@given(counts_strategy)
def test_average_mass_agrees_with_molmass_for_all_elements(counts):
    # For interval elements (H, C, N, O, S, Cl …) the two libraries use different
    # representative values (S 32.06 vs 32.0648): they agree to 2e-4 relative.
    text = molmass_text(counts)
    assert average_mass(text) == pytest.approx(molmass.Formula(text).mass, rel=2e-4)


@settings(max_examples=200, deadline=None)
@given(counts_strategy, st.sampled_from([1, 2, 3, -1, -2]))
def test_mz_matches_molmass_with_electron_correction(counts, charge):
    text = molmass_text(counts)
    neutral = molmass.Formula(text).monoisotopic_mass
    expected = (neutral - charge * ELECTRON_MASS) / abs(charge)
    gap = monoisotopic_table_gap(counts) / abs(charge)
    assert mz(Formula(counts, charge)) == pytest.approx(expected, abs=1e-6 + gap)
