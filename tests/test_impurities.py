"""Residual solvent, water and impurity tables (peakproof.impurities)."""

import pytest

from peakproof.impurities import (
    ImpurityPeak,
    ReferencePeak,
    UnknownSolvent,
    accepted_references,
    impurity_groups,
    known_solvents,
    match,
    residual_peaks,
    water_peak,
)
from peakproof.nuclei import UnknownNucleus

CANONICAL = {
    "CDCl3", "acetone-d6", "DMSO-d6", "C6D6", "CD3CN", "CD3OD", "D2O", "THF-d8", "CD2Cl2",
    "toluene-d8", "C6D5Cl", "pyridine-d5", "DMF-d7", "TFA-d", "CD3CO2D", "TFE-d3",
}
GOTTLIEB_SOLVENTS = ("CDCl3", "acetone-d6", "DMSO-d6", "C6D6", "CD3CN", "CD3OD", "D2O")


def shifts(peaks):
    return [peak.shift for peak in peaks]


def group_shift(solvent, nucleus, compound, group):
    found = [
        peak.shift
        for peak in impurity_groups(solvent, nucleus)
        if peak.compound == compound and peak.group == group
    ]
    assert found, f"{compound} {group} missing in {solvent} {nucleus}"
    return found


@pytest.mark.parametrize(
    "solvent, proton, carbon",
    [
        ("CDCl3", 7.26, 77.16),  # Gottlieb 1997 / Fulmer 2010 (trade.md)
        ("DMSO-d6", 2.50, 39.52),  # Gottlieb 1997 / Fulmer 2010 (trade.md)
        ("CD3OD", 3.31, 49.00),  # Gottlieb 1997 / Fulmer 2010 (trade.md)
        ("C6D6", 7.16, 128.06),  # Gottlieb 1997 / Fulmer 2010 (trade.md)
        ("CD3CN", 1.94, 1.32),  # Gottlieb 1997 / Fulmer 2010
    ],
)
def test_residual_solvent_peaks(solvent, proton, carbon):
    """Residual 1H and solvent 13C signals match the published tables."""
    assert proton in shifts(residual_peaks(solvent, "1H"))
    assert carbon in shifts(residual_peaks(solvent, "13C"))


def test_d2o_residual_and_water():
    """HOD in D2O is 4.79 (Gottlieb 1997 / Fulmer 2010, trade.md)."""
    assert shifts(residual_peaks("D2O", "1H")) == [4.79]
    assert water_peak("D2O").shift == 4.79
    assert residual_peaks("D2O", "13C") == []


@pytest.mark.parametrize(
    "solvent, water",
    [
        ("CDCl3", 1.56),  # Gottlieb 1997 (trade.md)
        ("acetone-d6", 2.84),  # Gottlieb 1997
        ("DMSO-d6", 3.33),  # Gottlieb 1997
        ("C6D6", 0.40),  # Gottlieb 1997
        ("CD3CN", 2.13),  # Gottlieb 1997
        ("CD3OD", 4.87),  # Gottlieb 1997
        ("THF-d8", 2.46),  # Fulmer 2010
    ],
)
def test_water_peak(solvent, water):
    """Water signals match the published tables."""
    assert water_peak(solvent).shift == water


def test_deuterated_methyl_multiplicities():
    """CHD2 is a quintet and CD3 a septet: 2nI + 1 with I = 1 (common practice)."""
    assert residual_peaks("DMSO-d6", "1H")[0].multiplicity == "quint"
    assert residual_peaks("acetone-d6", "1H")[0].multiplicity == "quint"
    assert residual_peaks("DMSO-d6", "13C")[0].multiplicity == "sept"
    assert residual_peaks("CDCl3", "13C")[0].multiplicity == "t"
    assert residual_peaks("CDCl3", "1H")[0].multiplicity == "s"


@pytest.mark.parametrize(
    "solvent, compound, group, nucleus, expected",
    [
        ("CDCl3", "acetone", "CH3", "1H", 2.17),  # Gottlieb 1997 Table 1
        ("CDCl3", "dichloromethane", "CH2", "1H", 5.30),  # Gottlieb 1997 Table 1
        ("DMSO-d6", "dichloromethane", "CH2", "1H", 5.76),  # Gottlieb 1997 Table 1
        ("C6D6", "chloroform", "CH", "1H", 6.15),  # Gottlieb 1997 Table 1
        ("CD3OD", "tert-butyl alcohol", "CH3", "1H", 1.40),  # Gottlieb 1997 Table 1
        ("CDCl3", "diethyl ether", "CH2", "1H", 3.48),  # Gottlieb 1997 Table 1
        ("CDCl3", "ethyl acetate", "CH2CH3", "1H", 4.12),  # Gottlieb 1997 Table 1
        ("DMSO-d6", "acetic acid", "CH3", "1H", 1.91),  # Gottlieb 1997 Table 1
        ("THF-d8", "dichloromethane", "CH2", "1H", 5.51),  # Fulmer 2010 Table 1
        ("CDCl3", "acetone", "CO", "13C", 207.07),  # Gottlieb 1997 Table 2
        ("DMSO-d6", "acetic acid", "CO", "13C", 171.93),  # Gottlieb 1997 Table 2
        ("CDCl3", "ethyl acetate", "CO", "13C", 171.36),  # Gottlieb 1997 Table 2
        ("D2O", "acetonitrile", "CN", "13C", 119.68),  # Gottlieb 1997 Table 2
        ("CDCl3", "methanol", "CH3", "13C", 50.41),  # Gottlieb 1997 Table 2
        ("THF-d8", "acetone", "CO", "13C", 204.19),  # Fulmer 2010 Table 2
    ],
)
def test_confirmed_impurity_values(solvent, compound, group, nucleus, expected):
    """Impurity shifts checked against copies of the published tables."""
    assert expected in group_shift(solvent, nucleus, compound, group)


def test_impurity_group_fields():
    """Groups carry multiplicity, proton count and the citation."""
    (ethyl_ch2,) = [
        peak
        for peak in impurity_groups("CDCl3", "1H")
        if peak.compound == "ethyl acetate" and peak.multiplicity == "q"
    ]
    assert isinstance(ethyl_ch2, ImpurityPeak)
    assert ethyl_ch2.protons == 2
    assert "Gottlieb" in ethyl_ch2.source and "1997" in ethyl_ch2.source
    thf_d8 = [p for p in impurity_groups("THF-d8", "1H") if p.compound == "acetone"]
    assert "Organometallics 2010" in thf_d8[0].source


def test_required_impurities_present_in_cdcl3():
    """The common contaminants are all tabulated for CDCl3."""
    wanted = {
        "acetic acid", "acetone", "acetonitrile", "benzene", "tert-butyl alcohol", "chloroform",
        "cyclohexane", "1,2-dichloroethane", "dichloromethane", "diethyl ether", "DMF", "DMSO",
        "dioxane", "ethanol", "ethyl acetate", "ethylene glycol", "grease", "n-hexane", "HMPA",
        "methanol", "nitromethane", "n-pentane", "2-propanol", "pyridine", "silicone grease",
        "tetrahydrofuran", "toluene", "triethylamine",
    }
    have_1h = {peak.compound for peak in impurity_groups("CDCl3", "1H")}
    have_13c = {peak.compound for peak in impurity_groups("CDCl3", "13C")}
    assert wanted <= have_1h
    assert wanted <= have_13c


def test_unconfirmed_values_are_marked():
    """Values written from memory say so; confirmed ones do not."""
    benzene_13c = [p for p in impurity_groups("CDCl3", "13C") if p.compound == "benzene"]
    assert "from memory" in benzene_13c[0].note
    acetone_1h = [p for p in impurity_groups("CDCl3", "1H") if p.compound == "acetone"]
    assert acetone_1h[0].note is None


def test_match_sorts_by_distance_and_finds_solvent_peaks():
    """A reported 7.27 in CDCl3 coincides first with CHCl3 at 7.26."""
    found = match("CDCl3", "1H", 7.27, 0.02)
    assert found[0].kind == "residual"
    assert found[0].shift == 7.26
    assert found == sorted(found, key=lambda item: item.distance)
    assert all(item.distance <= 0.02 + 1e-9 for item in found)


def test_match_finds_water_and_impurities():
    """1.56 in CDCl3 is water; 2.10 is acetic acid or acetonitrile (Gottlieb 1997)."""
    water = match("CDCl3", "1H", 1.56, 0.005)
    assert [item.kind for item in water] == ["water"]
    near = {item.compound for item in match("CDCl3", "1H", 2.10, 0.005)}
    assert near == {"acetic acid", "acetonitrile"}
    assert match("CDCl3", "1H", 9.5, 0.05) == []


def test_match_13c_and_nucleus_spellings():
    """13C matching includes the solvent triplet; nucleus spellings are normalised."""
    found = match("CDCl3", "¹³C", 77.2, 0.1)
    assert 77.16 in [item.shift for item in found]
    assert match("CDCl3", "C13", 77.2, 0.1) == found


def test_match_rejects_negative_tolerance():
    with pytest.raises(ValueError, match="tolerance"):
        match("CDCl3", "1H", 7.26, -0.1)


def test_accepted_references_for_cdcl3_carbon():
    """77.16 is tabulated; 77.0 and 77.23 are older values still in use (trade.md)."""
    accepted = shifts(accepted_references("CDCl3", "13C"))
    assert {77.16, 77.0, 77.23} <= set(accepted)
    assert shifts(accepted_references("DMSO-d6", "13C")) == [39.52]
    assert shifts(accepted_references("CDCl3", "1H")) == [7.26]


def test_solvent_keys_are_canonical():
    """Every key is one of the canonical spellings, and the classic seven are present."""
    keys = set(known_solvents())
    assert keys <= CANONICAL
    assert set(GOTTLIEB_SOLVENTS) <= keys
    assert {"THF-d8", "CD2Cl2", "toluene-d8", "C6D5Cl"} <= keys


def test_every_peak_has_a_source_and_a_plausible_shift():
    """Structural check over the whole table."""
    limits = {"1H": (-1.0, 14.0), "13C": (-5.0, 230.0)}
    for solvent in known_solvents():
        for nucleus, (low, high) in limits.items():
            for peak in residual_peaks(solvent, nucleus) + accepted_references(solvent, nucleus):
                assert isinstance(peak, ReferencePeak)
                assert peak.source, (solvent, peak)
                assert low <= peak.shift <= high, (solvent, peak)
            for peak in impurity_groups(solvent, nucleus):
                assert peak.source, (solvent, peak)
                assert low <= peak.shift <= high, (solvent, peak)
                assert peak.group
        water = water_peak(solvent)
        if water is not None:
            assert water.source and 0.0 <= water.shift <= 5.5


def test_classic_solvents_have_full_tables():
    """The seven Gottlieb solvents have residual peaks, water and impurities."""
    for solvent in GOTTLIEB_SOLVENTS:
        assert residual_peaks(solvent, "1H")
        assert water_peak(solvent) is not None
        assert len(impurity_groups(solvent, "1H")) >= 20


def test_other_nuclei_have_no_impurity_tables():
    """Only 1H and 13C are tabulated."""
    assert impurity_groups("CDCl3", "19F") == []
    assert residual_peaks("CDCl3", "19F") == []


def test_unknown_solvent_message_suggests_keys():
    """A misspelt solvent names close canonical keys."""
    with pytest.raises(UnknownSolvent) as caught:
        residual_peaks("DMSO-d5", "1H")
    assert isinstance(caught.value, KeyError)
    assert "DMSO-d6" in str(caught.value)
    assert "DMSO-d6" in caught.value.suggestions


def test_solvent_key_case_is_forgiven():
    """Case differences in a key still find the solvent."""
    assert shifts(residual_peaks("cdcl3", "1H")) == [7.26]
    assert impurity_groups("dmso-d6", "1H") == impurity_groups("DMSO-d6", "1H")


def test_unreadable_nucleus_raises():
    with pytest.raises(UnknownNucleus):
        residual_peaks("CDCl3", "proton")
