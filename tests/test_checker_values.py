"""Checker thresholds against values from outside the project, each cited beside it."""

from __future__ import annotations

import molmass
from hypothesis import given, settings
from hypothesis import strategies as st

import peakproof
from peakproof.checker import check


def rules_fired(text, **kw):
    return {d.rule for d in check(peakproof.parse(text), **kw)}


HEADER_1H = "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); "

# --- spectrometer frequencies (Harris et al., Pure Appl. Chem. 2001, 73, 1795, Table 2:
#     Ξ(13C) = 25.145020 %, Ξ(19F) = 94.094011 %, Ξ(31P) = 40.480742 %) -----------------------


def test_frequency_pairs_from_iupac_ratios_pass():
    for nucleus, mhz, shift in (("13C", 100.6, "55.3"), ("19F", 376.4, "−63.2"), ("31P", 161.9, "25.1")):
        text = HEADER_1H + f"{nucleus} NMR ({mhz} MHz, CDCl3) δ {shift}."
        fired = rules_fired(text)
        assert not fired & {"frequency-mismatch", "proton-frequency-on-heteronucleus"}, (nucleus, fired)


def test_13c_at_125_mhz_beside_400_mhz_is_a_warning_with_the_iupac_value():
    text = HEADER_1H + "13C NMR (125 MHz, CDCl3) δ 55.3."
    [d] = [d for d in check(peakproof.parse(text)) if d.rule == "frequency-mismatch"]
    assert d.severity == "warning"
    # 400 × 0.25145020 = 100.58 MHz (Harris et al. 2001)
    assert abs(d.data["expected_mhz"] - 100.58) < 0.01
    assert text[d.span.start : d.span.end] == "125 MHz"


# --- residual solvent and water (Gottlieb, Kotlyar, Nudelman, J. Org. Chem. 1997, 62, 7512,
#     Table 1: CHCl3 7.26, H2O 1.56 in CDCl3; DMSO-d5 2.50, H2O 3.33 in DMSO-d6; 13C CDCl3 77.16)


def test_residual_and_water_peaks_are_named():
    cases = [
        ("1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H), 3.81 (s, 3H).", "CHCl3"),  # Gottlieb 1997: 7.26
        ("1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 1.56 (s, 2H).", "water"),  # Gottlieb 1997: 1.56
        ("1H NMR (400 MHz, DMSO-d6) δ 7.81 (s, 1H), 3.33 (s, 2H).", "water"),  # Gottlieb 1997: 3.33
        ("13C NMR (101 MHz, CDCl3) δ 171.1, 77.16, 55.3.", "CDCl3"),  # Gottlieb 1997: 77.16
    ]
    for text, word in cases:
        found = [d for d in check(peakproof.parse(text)) if d.rule == "solvent-coincidence"]
        assert found and word in found[0].message, (text, [d.message for d in found])


def test_dichloromethane_singlet_is_an_impurity():
    # Gottlieb 1997, Table 1: CH2Cl2 in CDCl3 at 5.30 (s)
    found = [d for d in check(peakproof.parse("1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 5.30 (s, 2H)."))
             if d.rule == "solvent-coincidence"]
    assert found and "dichloromethane" in found[0].message.lower()


# --- HRMS: AME2020 masses (Wang et al., Chin. Phys. C 2021, 45, 030003, table mass_1.mas20):
#     1H 1.007825031898, 16O 15.99491461926, 23Na 22.98976928195, 12C 12 exactly; electron
#     5.48579909065e-4 u (CODATA 2018). (The AME2016 values 1.00782503223, 15.99491461957 and
#     22.9897692820 round to the same 4-decimal m/z.) -------------------------------------
H, O, NA, E = 1.007825031898, 15.99491461926, 22.98976928195, 5.48579909065e-4


def test_hrms_sodium_adduct_value_from_ame2020_and_codata():
    calcd = 12 * 12 + 14 * H + 3 * O + NA - E  # [C12H14O3Na]+
    assert f"{calcd:.4f}" == "229.0835"
    ok = f"HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na {calcd:.4f}, found 229.0838."
    assert "hrms-calcd" not in rules_fired(ok)
    no_electron = f"HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na {calcd + E:.4f}, found 229.0838."
    [d] = [d for d in check(peakproof.parse(no_electron)) if d.rule == "hrms-calcd"]
    assert "without the electron mass" in d.message
    assert d.suggestion["replace"][0]["text"] == "229.0835"


def test_found_tolerance_in_ppm_and_mz_units():
    # 5 ppm of 229.0835 is 0.0011 m/z; 0.003 m/z is 13 ppm here (trade guide arithmetic)
    text = "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0860."
    assert "hrms-found" in rules_fired(text)
    from peakproof.config import Config

    assert "hrms-found" not in rules_fired(text, config=Config(hrms_mz=0.003))


_ELEMENTS = st.fixed_dictionaries({
    "C": st.integers(1, 40), "H": st.integers(0, 60), "N": st.integers(0, 4), "O": st.integers(0, 8),
    "S": st.integers(0, 2),
})


def _text(counts):
    return "".join(f"{el}{n if n > 1 else ''}" for el, n in counts.items() if n)


@settings(max_examples=60, deadline=None)
@given(_ELEMENTS, st.sampled_from([("[M + H]+", "H"), ("[M + Na]+", "Na"), ("[M + K]+", "K")]))
def test_hrms_calcd_agrees_with_molmass(counts, adduct):
    ion_type, extra = adduct
    neutral = _text(counts)
    ion = neutral + extra
    calcd = molmass.Formula(ion).monoisotopic_mass - E  # molmass oracle, minus one electron (CODATA 2018)
    good = f"HRMS (ESI) m/z {ion_type} calcd for {ion} {calcd:.4f}, found {calcd:.4f}."
    fired = rules_fired(good)
    assert not fired & {"hrms-calcd", "hrms-found", "hrms-adduct"}, (good, fired)
    wrong = f"HRMS (ESI) m/z {ion_type} calcd for {ion} {calcd + 0.0010:.4f}, found {calcd:.4f}."
    assert "hrms-calcd" in rules_fired(wrong)


@settings(max_examples=40, deadline=None)
@given(_ELEMENTS)
def test_ea_calcd_agrees_with_molmass(counts):
    formula = _text(counts)
    fractions = {k: v.fraction * 100 for k, v in molmass.Formula(formula).composition().items()}
    parts = [f"{el}, {fractions[el]:.2f}" for el in ("C", "H", "N") if el in fractions]
    text = f"Anal. Calcd for {formula}: {'; '.join(parts)}. Found: {'; '.join(parts)}."
    fired = rules_fired(text)
    assert not fired & {"ea-calcd", "ea-found"}, (text, fired)


def test_ea_found_beyond_04_is_a_warning():
    # C12H14O3: C 69.89, H 6.84 (CIAAW 2021 weights; molmass agrees); ±0.4 % criterion
    ok = "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.50; H, 6.90."
    bad = "Anal. Calcd for C12H14O3: C, 69.89; H, 6.84. Found: C, 69.48; H, 6.90."
    assert "ea-found" not in rules_fired(ok)
    assert "ea-found" in rules_fired(bad)


# --- splitting patterns (Pascal / 2nI+1, common practice) --------------------------------


def test_two_deuterium_quintet_and_three_deuterium_septet_are_consistent():
    # one D: 1:1:1 t; two D: 1:2:3:2:1 quintet; three D: septet (2nI+1 with I = 1)
    for letter, formula in (("t", "C2H5DO"), ("quint", "C2H4D2O"), ("sept", "C2H3D3O")):
        text = f"13C{{1H}} NMR (101 MHz, CDCl3) δ 29.6 ({letter}, JC–D = 19.4 Hz)."
        assert "reciprocity-count" not in rules_fired(text, formula=formula), letter
    text = "13C{1H} NMR (101 MHz, CDCl3) δ 29.6 (sept, JC–D = 19.4 Hz)."
    assert "reciprocity-count" in rules_fired(text, formula="C2H5DO")  # a septet needs 3 D


def test_second_order_thresholds_from_field():
    # Δν = Δδ × MHz: 0.04 ppm × 400 = 16 Hz, /8 Hz = 2 (< 4); 0.60 × 400 / 8 = 30 (≥ 10)
    close = "1H NMR (400 MHz, CDCl3) δ 7.02 (d, J = 8.0 Hz, 1H), 6.98 (d, J = 8.0 Hz, 1H)."
    [d] = [d for d in check(peakproof.parse(close)) if d.rule == "second-order-ab"]
    assert abs(d.data["ratio"] - 2.0) < 1e-6
    far = "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.0 Hz, 1H), 6.80 (d, J = 8.0 Hz, 1H)."
    assert not rules_fired(far) & {"second-order-ab", "second-order-approximate"}
