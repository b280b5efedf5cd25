"""Molecular formulas and ion types (peakproof.formula)."""

import re
import subprocess
import sys

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from peakproof.formula import (
    Formula,
    FormulaError,
    Ion,
    ion_formula,
    neutral_from_ion,
    parse_formula,
    parse_ion,
)

# Elements the package has masses for (isotopes.json), used by the generators below.
ELEMENTS = [
    "H", "Li", "B", "C", "N", "O", "F", "Na", "Mg", "Al", "Si", "P", "S", "Cl", "K", "Ca",
    "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ge", "As", "Se", "Br", "Rb", "Sr", "Y",
    "Zr", "Mo", "Ru", "Rh", "Pd", "Ag", "Cd", "In", "Sn", "Sb", "Te", "I", "Cs", "Ba", "W",
    "Os", "Ir", "Pt", "Au", "Hg", "Tl", "Pb", "Bi",
]  # fmt: skip
ISOTOPES = ["D", "T", "13C", "15N", "18O", "6Li", "10B", "29Si", "34S", "37Cl", "81Br"]


def written(symbol: str) -> str:
    return f"[{symbol}]" if symbol[0].isdigit() else symbol


def counts_text(counts: dict[str, int]) -> str:
    return "".join(written(s) + (str(n) if n != 1 else "") for s, n in counts.items())


# --- what the grammar must read ------------------------------------------------------------

READS = [
    # (text, counts, charge)
    ("C12H14O3Na", {"C": 12, "H": 14, "O": 3, "Na": 1}, 0),
    ("NaO3H14C12", {"C": 12, "H": 14, "O": 3, "Na": 1}, 0),  # any element order
    ("C6D6", {"C": 6, "D": 6}, 0),
    ("CT4", {"C": 1, "T": 4}, 0),
    ("13CH4", {"13C": 1, "H": 4}, 0),
    ("[13C]H4", {"13C": 1, "H": 4}, 0),
    ("[13C]6H6", {"13C": 6, "H": 6}, 0),
    ("C5[13C]H12", {"C": 5, "13C": 1, "H": 12}, 0),
    ("²H2O", {"D": 2, "O": 1}, 0),  # ²H is stored as D
    ("¹³CH3OH", {"13C": 1, "H": 4, "O": 1}, 0),
    ("15NH3", {"15N": 1, "H": 3}, 0),
    ("[2H]3CCl", {"D": 3, "C": 1, "Cl": 1}, 0),
    ("(CH3)3CBr", {"C": 4, "H": 9, "Br": 1}, 0),
    ("C6H5(CH2)2OH", {"C": 8, "H": 10, "O": 1}, 0),
    ("[Pd(PPh3)4]", {"Pd": 1, "P": 4, "C": 72, "H": 60}, 0),
    ("Pd[P(C6H5)3]4", {"Pd": 1, "P": 4, "C": 72, "H": 60}, 0),
    ("CuSO4·5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0),
    ("CuSO4•5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0),
    ("CuSO4.5H2O", {"Cu": 1, "S": 1, "O": 9, "H": 10}, 0),  # "." then 5 × H2O, not O4.5
    ("C10H12O2·H2O", {"C": 10, "H": 14, "O": 3}, 0),
    ("C10H12O2.H2O", {"C": 10, "H": 14, "O": 3}, 0),
    ("C10H12O2·2 H2O", {"C": 10, "H": 16, "O": 4}, 0),
    ("C10H12O2 × H2O", {"C": 10, "H": 14, "O": 3}, 0),
    ("C10H12O2·0.5CH2Cl2", {"C": 10.5, "H": 13, "O": 2, "Cl": 1}, 0),
    ("C20H24O4·H2O·0.25C6H14", {"C": 21.5, "H": 29.5, "O": 5}, 0),
    ("C₁₂H₁₄O₃", {"C": 12, "H": 14, "O": 3}, 0),
    ("C12H15O3+", {"C": 12, "H": 15, "O": 3}, 1),  # O3 and +, not 3+
    ("[C12H14O3Na]+", {"C": 12, "H": 14, "O": 3, "Na": 1}, 1),
    ("[C12H14O3Na]⁺", {"C": 12, "H": 14, "O": 3, "Na": 1}, 1),
    ("C12H14O3Na⁺", {"C": 12, "H": 14, "O": 3, "Na": 1}, 1),
    ("C7H5O2−", {"C": 7, "H": 5, "O": 2}, -1),  # U+2212 minus
    ("C7H5O2-", {"C": 7, "H": 5, "O": 2}, -1),
    ("C7H5O2⁻", {"C": 7, "H": 5, "O": 2}, -1),
    ("[Co(NH3)6]3+", {"Co": 1, "N": 6, "H": 18}, 3),  # after a bracket, 3+ is the charge
    ("[Co(NH3)6]³⁺", {"Co": 1, "N": 6, "H": 18}, 3),
    ("[C6H6]2+", {"C": 6, "H": 6}, 2),
    ("[Fe(CN)6]4−", {"Fe": 1, "C": 6, "N": 6}, -4),
    ("[Pd(PPh3)4]2", {"Pd": 2, "P": 8, "C": 144, "H": 120}, 0),  # a multiplier, no sign
    ("C8H10O+•", {"C": 8, "H": 10, "O": 1}, 1),
    ("Co", {"Co": 1}, 0),
    ("CO", {"C": 1, "O": 1}, 0),
    (" C2H6O ", {"C": 2, "H": 6, "O": 1}, 0),
]


@pytest.mark.parametrize("text,counts,charge", READS)
def test_reads_formulas_as_written(text, counts, charge):
    formula = parse_formula(text)
    assert dict(formula.counts) == counts
    assert formula.charge == charge
    assert formula.text == text


def test_radical_dot_is_kept_but_not_part_of_equality():
    radical = parse_formula("C8H10O+•")
    assert radical.radical
    assert radical == parse_formula("C8H10O+")


def test_counts_are_ints_unless_a_solvate_makes_them_fractional():
    assert type(parse_formula("C12H14O3").counts["C"]) is int
    assert parse_formula("C2H6O·0.5H2O").counts["H"] == 7
    assert type(parse_formula("C2H6O·0.5H2O").counts["H"]) is int
    assert parse_formula("C2H6O·0.5H2O").counts["O"] == 1.5


def test_element_count_with_and_without_isotopes():
    f = parse_formula("C5[13C]H10D2")
    assert f.element_count("H") == 12
    assert f.element_count("H", include_isotopes=False) == 10
    assert f.element_count("C") == 6
    assert f.element_count("C", include_isotopes=False) == 5
    assert f.element_count("N") == 0


def test_elements_in_hill_order():
    assert parse_formula("NaO3H14C12").elements() == ("C", "H", "Na", "O")
    assert parse_formula("H2SO4").elements() == ("H", "O", "S")
    assert parse_formula("C6D6").elements() == ("C", "H")


HILL = [
    # Hill system: C, H, then alphabetical; without C, all alphabetical (common practice,
    # as in CAS indexes; E. A. Hill, J. Am. Chem. Soc. 1900, 22, 478).
    ("NaO3H14C12", "C12H14NaO3"),
    ("H2SO4", "H2O4S"),
    ("BrCH3", "CH3Br"),
    ("NH3", "H3N"),
    ("C6D6", "C6D6"),
    ("C5[13C]H12", "C5[13C]H12"),
    ("15NH3", "H3[15N]"),
    ("[C12H14O3Na]+", "C12H14NaO3+"),
    ("[Co(NH3)6]3+", "CoH18N6³⁺"),
    ("C7H5O2−", "C7H5O2-"),
    ("C10H12O2·0.5CH2Cl2", "C10H13ClO2·0.5C"),
]


@pytest.mark.parametrize("text,hill", HILL)
def test_hill_order(text, hill):
    assert parse_formula(text).hill() == hill
    assert str(parse_formula(text)) == hill


def test_equality_by_counts_and_charge():
    assert parse_formula("C12H14O3Na") == parse_formula("NaC12O3H14")
    assert parse_formula("C12H14O3Na") != parse_formula("[C12H14O3Na]+")
    assert parse_formula("CH3CH2OH") == parse_formula("C2H6O")
    assert hash(parse_formula("CH3CH2OH")) == hash(parse_formula("C2H6O"))
    assert parse_formula("C6D6") != parse_formula("C6H6")


def test_formula_is_frozen():
    f = parse_formula("C2H6O")
    with pytest.raises(AttributeError):
        f.charge = 1
    with pytest.raises(TypeError):
        f.counts["C"] = 3


def test_adduct_arithmetic():
    m = parse_formula("C12H14O3")
    assert m + parse_formula("Na") == parse_formula("C12H14O3Na")
    assert m - parse_formula("H2O") == parse_formula("C12H12O2")
    assert (m + parse_formula("H+")).charge == 1


def test_subtracting_missing_atoms_raises_formula_error():
    with pytest.raises(FormulaError, match="not enough"):
        parse_formula("CH4") - parse_formula("H2O")
    with pytest.raises(FormulaError):
        parse_formula("C6H6") - parse_formula("C7")


# --- errors ---------------------------------------------------------------------------------

ERRORS = [
    # (text, position of the bad character, words expected in the message)
    ("C12H14Xx3", 6, "unknown element symbol 'Xx'"),
    ("C12H14O3Na)", 10, "unexpected ')'"),
    ("Ch4", 0, "write CH"),
    ("(CH3", 4, "ends too early"),
    ("C12H14O3$", 8, "unexpected character '$'"),
    ("C0H4", 1, "count of 0"),
    ("·H2O", 0, "unexpected"),
    ("C12H14O3Na++", 11, "unexpected '+'"),
    ("[C12H14O3Na", 11, "ends too early"),
    ("C6H6&H2O", 4, "unexpected character '&'"),
    ("[13Q]H4", 1, "unknown element symbol 'Q'"),
]


@pytest.mark.parametrize("text,position,words", ERRORS)
def test_errors_point_at_the_bad_character(text, position, words):
    with pytest.raises(FormulaError) as info:
        parse_formula(text)
    error = info.value
    assert error.position == position
    assert error.text == text
    assert words in str(error)
    # The message shows the formula and a caret under the bad character.
    lines = str(error).splitlines()
    assert lines[1].strip() == text.strip()
    assert lines[2].index("^") - 2 == position


def test_error_message_says_what_was_expected():
    with pytest.raises(FormulaError) as info:
        parse_formula("(CH3")
    assert "expected ')'" in str(info.value)


@pytest.mark.parametrize("garbage", ["", "   ", None, 12, "🙂", "\x00", "[]", "()", "+", "2+"])
def test_garbage_raises_formula_error(garbage):
    with pytest.raises(FormulaError):
        parse_formula(garbage)


@settings(max_examples=400, deadline=None)
@given(st.text(max_size=30))
def test_arbitrary_text_raises_only_formula_error(text):
    try:
        parse_formula(text)
    except FormulaError as error:
        assert error.position is None or 0 <= error.position <= len(text)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="CHNOSPFClBrNaK()[]·.+-−0123456789 ²³⁺⁻•D", max_size=25))
def test_formula_like_text_raises_only_formula_error(text):
    try:
        parse_formula(text)
    except FormulaError:
        pass


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="[]()M+-−•⁺2HNaKClO ", max_size=20))
def test_ion_like_text_raises_only_formula_error(text):
    try:
        parse_ion(text)
    except FormulaError:
        pass


# --- round trips on generated formulas ------------------------------------------------------

counts_strategy = st.dictionaries(
    st.sampled_from(ELEMENTS + ISOTOPES), st.integers(1, 40), min_size=1, max_size=6
)


def small_counts(largest):
    return st.dictionaries(
        st.sampled_from(ELEMENTS), st.integers(1, largest), min_size=1, max_size=3
    )


@st.composite
def formula_texts(draw):
    """A formula text with parentheses and hydrates, and the counts it stands for."""
    main = draw(counts_strategy)
    text = counts_text(main)
    expected = dict(main)
    if draw(st.booleans()):
        group = draw(small_counts(5))
        times = draw(st.integers(1, 4))
        bracket = draw(st.sampled_from(["()", "[]"]))
        text += bracket[0] + counts_text(group) + bracket[1] + (str(times) if times > 1 else "")
        for s, n in group.items():
            expected[s] = expected.get(s, 0) + n * times
    for _ in range(draw(st.integers(0, 2))):
        solvate = draw(small_counts(6))
        amount = draw(st.sampled_from([1, 2, 3, 0.5, 0.25, 1.5]))
        separator = draw(st.sampled_from(["·", "•", ".", " × ", "·"]))
        text += separator + ("" if amount == 1 else str(amount)) + counts_text(solvate)
        for s, n in solvate.items():
            expected[s] = expected.get(s, 0) + n * amount
    charge = draw(st.sampled_from([0, 0, 1, -1]))
    if re.fullmatch(r"\[\w+\]\d+", text):
        # "[13C]2+" means charge 2+ (as in [Co(NH3)6]3+), so write this charge as a superscript.
        text += {0: "", 1: "⁺", -1: "⁻"}[charge]
    else:
        text += {0: "", 1: "+", -1: "−"}[charge]
    return text, expected, charge


@settings(max_examples=300, deadline=None)
@given(formula_texts())
def test_generated_formulas_parse_to_their_counts_and_round_trip(case):
    text, expected, charge = case
    formula = parse_formula(text)
    assert formula.counts.keys() == {s for s, n in expected.items() if n}
    for symbol, number in expected.items():
        assert formula.counts[symbol] == pytest.approx(number, abs=1e-9)
    assert formula.charge == charge
    again = parse_formula(str(formula))
    assert again == formula
    assert str(again) == str(formula)


@settings(max_examples=200, deadline=None)
@given(counts_strategy, st.sampled_from([0, 1, -1, 2, -3]))
def test_formula_objects_round_trip_through_hill(counts, charge):
    formula = Formula(counts, charge)
    assert parse_formula(formula.hill()) == formula


# --- ion types ------------------------------------------------------------------------------

IONS = [
    # (text, normalized, multimer, added, removed, charge, radical)
    ("[M + Na]+", "[M+Na]+", 1, "Na", "", 1, False),
    ("[M+H]+", "[M+H]+", 1, "H", "", 1, False),
    ("(M+H)+", "[M+H]+", 1, "H", "", 1, False),
    ("[M]+•", "[M]+•", 1, "", "", 1, True),
    ("[M]•+", "[M]+•", 1, "", "", 1, True),
    ("M+", "[M]+", 1, "", "", 1, False),
    ("M+•", "[M]+•", 1, "", "", 1, True),
    ("[M−H]−", "[M-H]-", 1, "", "H", -1, False),
    ("[M-H]-", "[M-H]-", 1, "", "H", -1, False),
    ("[M+2H]2+", "[M+2H]2+", 1, "H2", "", 2, False),
    ("[M+NH4]+", "[M+NH4]+", 1, "NH4", "", 1, False),
    ("[M+H−H2O]+", "[M+H-H2O]+", 1, "H", "H2O", 1, False),
    ("[M+K]+", "[M+K]+", 1, "K", "", 1, False),
    ("[2M+Na]+", "[2M+Na]+", 2, "Na", "", 1, False),
    ("[M+Na]⁺", "[M+Na]+", 1, "Na", "", 1, False),
    ("[M + H]⁺", "[M+H]+", 1, "H", "", 1, False),
    ("[M+Cl]−", "[M+Cl]-", 1, "Cl", "", -1, False),
    ("[M-2H]2-", "[M-2H]2-", 1, "", "H2", -2, False),
    ("[M+2Na-H]+", "[M+2Na-H]+", 1, "Na2", "H", 1, False),
]


def as_formula(text):
    return parse_formula(text) if text else Formula()


@pytest.mark.parametrize("text,normalized,multimer,added,removed,charge,radical", IONS)
def test_ion_types(text, normalized, multimer, added, removed, charge, radical):
    ion = parse_ion(text)
    assert isinstance(ion, Ion)
    assert ion.normalized == normalized
    assert ion.multimer == multimer
    assert ion.added == as_formula(added)
    assert ion.removed == as_formula(removed)
    assert ion.charge == charge
    assert ion.radical is radical
    assert parse_ion(ion.normalized) == ion


ION_ERRORS = [
    ("[M+Na]", 6, "needs a charge"),
    ("[M+Q]+", 3, "unknown element symbol 'Q'"),
    ("[X+H]+", 1, "start with M"),
    ("[M+H+", 5, "no closing"),
    ("[M+H]2", 5, "ion charge"),
    ("", 0, "empty"),
]


@pytest.mark.parametrize("text,position,words", ION_ERRORS)
def test_ion_errors(text, position, words):
    with pytest.raises(FormulaError) as info:
        parse_ion(text)
    assert info.value.position == position
    assert words in str(info.value)


def test_ion_formula_and_back():
    neutral = parse_formula("C12H14O3")
    sodiated = ion_formula(neutral, "[M+Na]+")
    # The ion formula written as "calcd for C12H14O3Na" (no charge) or "[C12H14O3Na]+".
    assert sodiated == parse_formula("[C12H14O3Na]+")
    assert sodiated.neutral() == parse_formula("C12H14O3Na")
    assert neutral_from_ion("C12H14O3Na", "[M+Na]+") == neutral
    assert neutral_from_ion("[C12H14O3Na]+", "[M+Na]+") == neutral
    assert ion_formula(neutral, "[M-H]-") == parse_formula("C12H13O3-")
    assert ion_formula(neutral, "[M+H-H2O]+") == parse_formula("C12H13O2+")
    assert ion_formula(neutral, "[2M+Na]+") == parse_formula("[C24H28O6Na]+")
    assert neutral_from_ion("C24H28O6Na", "[2M+Na]+") == neutral
    assert ion_formula(neutral, "[M+2H]2+").charge == 2
    assert ion_formula(neutral, "[M]+•").radical


def test_ion_formula_errors():
    with pytest.raises(FormulaError, match="does not have"):
        ion_formula("CCl4", "[M-H]-")
    with pytest.raises(FormulaError, match="does not contain"):
        neutral_from_ion("C12H14O3", "[M+Na]+")  # the adduct is missing from the formula
    with pytest.raises(FormulaError, match="equal molecules"):
        neutral_from_ion("C25H28O6Na", "[2M+Na]+")


@settings(max_examples=200, deadline=None)
@given(
    counts_strategy,
    st.sampled_from(["[M+H]+", "[M+Na]+", "[M+K]+", "[M+NH4]+", "[2M+Na]+", "[M+2H]2+", "[M]+•"]),
)
def test_neutral_from_ion_inverts_ion_formula(counts, ion_text):
    neutral = Formula(counts)
    assert neutral_from_ion(ion_formula(neutral, ion_text), ion_text) == neutral


def test_import_is_cheap():
    code = (
        "import sys, peakproof.formula; "
        "bad = [m for m in ('numpy', 'lark', 'matplotlib') if m in sys.modules]; "
        "print(','.join(bad))"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    )
    assert result.stdout.strip() == ""
