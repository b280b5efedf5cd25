"""Nuclear properties and frequency ratios (peakproof.nuclei)."""

from fractions import Fraction

import pytest

from peakproof.nuclei import (
    NUCLEUS_FOR_ELEMENT,
    Nucleus,
    UnknownNucleus,
    all_nuclei,
    expected_frequency,
    normalize_symbol,
    nucleus,
    proton_frequency,
)

IUPAC_2001 = "Harris et al., Pure Appl. Chem. 2001, 73, 1795 (IUPAC Recommendations 2001)"


@pytest.mark.parametrize(
    "symbol, xi",
    [
        ("1H", 100.0),  # 1H of TMS defines the scale: IUPAC 2001
        ("13C", 25.145020),  # IUPAC 2001
        ("19F", 94.094011),  # IUPAC 2001
        ("31P", 40.480742),  # IUPAC 2001
        ("2H", 15.350609),  # IUPAC 2001
        ("29Si", 19.867187),  # IUPAC 2001
        ("15N", 10.136767),  # IUPAC 2001 (CH3NO2 reference)
        ("11B", 32.083974),  # IUPAC 2001
        ("195Pt", 21.496784),  # IUPAC 2001
        ("119Sn", 37.290632),  # IUPAC 2001
    ],
)
def test_frequency_ratio(symbol, xi):
    """Ξ values match the IUPAC 2001 table to all printed digits."""
    assert nucleus(symbol).xi == pytest.approx(xi, abs=5e-7)


@pytest.mark.parametrize(
    "proton_mhz, expected",
    [
        # trade.md, computed from the IUPAC 2001 Ξ values
        (400, {"13C": 100.6, "19F": 376.4, "31P": 161.9}),
        (500, {"13C": 125.7, "19F": 470.5, "31P": 202.4}),
        (600, {"13C": 150.9, "19F": 564.6, "31P": 242.9}),
    ],
)
def test_expected_frequency_on_common_magnets(proton_mhz, expected):
    """Heteronuclear frequencies of 400/500/600 MHz instruments round as chemists write them."""
    for symbol, mhz in expected.items():
        assert round(expected_frequency(symbol, proton_mhz), 1) == mhz


def test_proton_frequency_inverts_expected_frequency():
    """proton_frequency undoes expected_frequency."""
    for item in all_nuclei():
        assert proton_frequency(item.symbol, expected_frequency(item.symbol, 400.0)) == (
            pytest.approx(400.0)
        )
    # 100.6 MHz carbon belongs to a ~400 MHz magnet (trade.md)
    assert round(proton_frequency("13C", 100.6)) == 400


@pytest.mark.parametrize(
    "symbol, spin",
    [
        ("1H", Fraction(1, 2)),  # IUPAC 2001
        ("2H", Fraction(1)),  # IUPAC 2001
        ("14N", Fraction(1)),  # IUPAC 2001
        ("11B", Fraction(3, 2)),  # IUPAC 2001
        ("10B", Fraction(3)),  # IUPAC 2001
        ("17O", Fraction(5, 2)),  # IUPAC 2001
        ("27Al", Fraction(5, 2)),  # IUPAC 2001
        ("6Li", Fraction(1)),  # IUPAC 2001
    ],
)
def test_spin(symbol, spin):
    """Spins are exact fractions from the IUPAC 2001 table."""
    assert nucleus(symbol).spin == spin
    assert isinstance(nucleus(symbol).spin, Fraction)


def test_abundances():
    """Natural abundances (percent) follow IUPAC 2001."""
    assert nucleus("1H").abundance == pytest.approx(99.9885)  # IUPAC 2001
    assert nucleus("13C").abundance == pytest.approx(1.07)  # IUPAC 2001
    assert nucleus("19F").abundance == pytest.approx(100.0)  # IUPAC 2001
    assert nucleus("29Si").abundance == pytest.approx(4.6832)  # IUPAC 2001


def test_deuterium_lines():
    """Two deuterium nuclei give 2nI + 1 = 5 lines, three give 7 (common practice)."""
    deuterium = nucleus("2H")
    assert deuterium.multiplet_lines(1) == 3
    assert deuterium.multiplet_lines(2) == 5
    assert deuterium.multiplet_lines(3) == 7
    assert nucleus("19F").multiplet_lines(3) == 4


@pytest.mark.parametrize(
    "spelling", ["13C", "¹³C", "C13", "13 C", "c13", "13c", "C-13", " 13C "]
)
def test_spellings(spelling):
    """Usual ways of writing a nucleus all find 13C."""
    found = nucleus(spelling)
    assert found.symbol == "13C"
    assert found.element == "C"
    assert found.mass_number == 13


def test_letter_aliases_and_two_letter_elements():
    """D and T stand for 2H and 3H; two-letter elements keep their case."""
    assert nucleus("D").symbol == "2H"
    assert normalize_symbol("T") == "3H"
    assert nucleus("195pt").symbol == "195Pt"
    assert nucleus("Sn119").symbol == "119Sn"
    assert nucleus("²⁹Si").symbol == "29Si"


def test_required_nuclei_present():
    """The table covers the nuclei chemists report."""
    wanted = (
        "1H 2H 3H 6Li 7Li 10B 11B 13C 14N 15N 17O 19F 23Na 27Al 29Si 31P 33S 35Cl 37Cl 39K "
        "77Se 103Rh 107Ag 109Ag 111Cd 113Cd 117Sn 119Sn 125Te 129Xe 183W 195Pt 199Hg 205Tl 207Pb"
    ).split()
    have = {item.symbol for item in all_nuclei()}
    assert set(wanted) <= have


def test_table_is_consistent():
    """Every entry has a plausible spin, abundance and Ξ, and symbols match their parts."""
    for item in all_nuclei():
        assert isinstance(item, Nucleus)
        assert item.symbol == f"{item.mass_number}{item.element}"
        assert item.spin > 0 and (2 * item.spin).denominator == 1
        assert 0 <= item.abundance <= 100
        assert 0 < item.xi <= 110
        if item.gamma is not None:
            # |γ| / γ(1H) tracks Ξ / 100 to within chemical-shielding differences (< 2 %)
            ratio = abs(item.gamma) / nucleus("1H").gamma
            assert ratio == pytest.approx(item.xi / 100, rel=0.02), item.symbol


def test_usual_isotope_for_element():
    """Element letters map to the isotope usually observed (common practice)."""
    assert NUCLEUS_FOR_ELEMENT["H"] == "1H"
    assert NUCLEUS_FOR_ELEMENT["C"] == "13C"
    assert NUCLEUS_FOR_ELEMENT["F"] == "19F"
    assert NUCLEUS_FOR_ELEMENT["P"] == "31P"
    assert NUCLEUS_FOR_ELEMENT["D"] == "2H"
    assert NUCLEUS_FOR_ELEMENT["B"] == "11B"
    assert NUCLEUS_FOR_ELEMENT["N"] == "15N"
    assert NUCLEUS_FOR_ELEMENT["Si"] == "29Si"
    assert NUCLEUS_FOR_ELEMENT["Se"] == "77Se"
    assert NUCLEUS_FOR_ELEMENT["Sn"] == "119Sn"
    assert NUCLEUS_FOR_ELEMENT["Pt"] == "195Pt"
    for symbol in NUCLEUS_FOR_ELEMENT.values():
        nucleus(symbol)  # every target is in the table


def test_unknown_nucleus_message_lists_close_matches():
    """An unknown isotope names the isotopes of that element that do exist."""
    with pytest.raises(UnknownNucleus) as caught:
        nucleus("12C")
    assert isinstance(caught.value, KeyError)
    message = str(caught.value)
    assert "12C" in message and "13C" in message
    assert "13C" in caught.value.suggestions


def test_unreadable_nucleus_message_says_how_to_write_it():
    """Text that is not a nucleus at all gets a hint on the expected form."""
    with pytest.raises(UnknownNucleus) as caught:
        nucleus("carbon")
    assert "'13C'" in str(caught.value)
    with pytest.raises(UnknownNucleus):
        nucleus(13)


def test_nucleus_is_frozen():
    """Nucleus records cannot be changed."""
    with pytest.raises(AttributeError):
        nucleus("1H").xi = 1.0
