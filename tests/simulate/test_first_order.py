"""First-order multiplets: Pascal's triangle, 2nI+1 patterns, normalisation, merging."""

from math import comb

import pytest
from numpy.polynomial import polynomial

from peakproof.simulate import SpinGroup, SpinSystem, SpinSystemError, first_order_spectrum, m_distribution, multiplet


def _relative(lines):
    smallest = min(i for _, i in lines)
    return [round(i / smallest, 9) for _, i in lines]


@pytest.mark.parametrize("n", range(1, 8))
def test_spin_half_partners_give_binomial_coefficients(n):
    """n equivalent spin-½ partners give n+1 lines in the ratios C(n, k) (common practice)."""
    lines = multiplet(1000.0, [(7.0, n, 0.5)])
    assert [comb(n, k) for k in range(n + 1)] == _relative(lines)
    assert [1000.0 + 7.0 * (k - n / 2) for k in range(n + 1)] == pytest.approx(
        [f for f, _ in lines]
    )


@pytest.mark.parametrize("n", range(1, 8))
@pytest.mark.parametrize("spin", [1.0, 1.5])
def test_spin_i_partners_give_2ni_plus_1_lines(n, spin):
    """n spin-I partners give 2nI+1 lines weighted as (1 + x + … + x^2I)^n (common practice)."""
    expected = polynomial.polypow([1] * int(2 * spin + 1), n)  # oracle: numpy's polynomials
    lines = multiplet(500.0, [(2.2, n, spin)])
    assert int(2 * n * spin + 1) == len(lines)
    assert [round(c) for c in expected] == _relative(lines)


@pytest.mark.parametrize(
    "n, pattern",
    [(1, [1, 1, 1]), (2, [1, 2, 3, 2, 1]), (3, [1, 3, 6, 7, 6, 3, 1])],
)
def test_deuterium_patterns(n, pattern):
    """CHD2-type patterns: one D 1:1:1, two D 1:2:3:2:1, three D 1:3:6:7:6:3:1 (common practice)."""
    assert pattern == _relative(multiplet(0.0, [(2.0, n, 1)]))


def test_intensities_sum_to_count():
    """A multiplet's lines add up to the number of nuclei it stands for."""
    lines = multiplet(1200.0, [(7.1, 2, 0.5), (1.2, 3, 0.5), (2.0, 1, 1)], count=3)
    assert 3.0 == pytest.approx(sum(i for _, i in lines))


def test_coincident_lines_merge():
    """A dd with J1 = J2 is a 1:2:1 triplet: the two middle lines merge."""
    lines = multiplet(100.0, [(6.0, 1, 0.5), (6.0, 1, 0.5)])
    assert [94.0, 0.25, 100.0, 0.5, 106.0, 0.25] == pytest.approx([x for line in lines for x in line])


def test_td_pattern():
    """A td (J = 7.5, 1.5 Hz) has six lines 1:1:2:2:1:1 (common practice)."""
    lines = multiplet(0.0, [(7.5, 2, 0.5), (1.5, 1, 0.5)])
    assert [1, 1, 2, 2, 1, 1] == _relative(lines)


def test_m_distribution_counts_states():
    """Three spin-1 nuclei have 27 states, spread 1:3:6:7:6:3:1 over M = −3 … 3."""
    assert [(-3, 1), (-2, 3), (-1, 6), (0, 7), (1, 6), (2, 3), (3, 1)] == m_distribution(3, 1.0)


def test_bad_partner_is_explained():
    """A partner that is not (J, n, I) gives a message naming it."""
    with pytest.raises(SpinSystemError, match="partner 1"):
        multiplet(0.0, [(7.0, 2)])
    with pytest.raises(SpinSystemError, match="multiple of 1/2"):
        multiplet(0.0, [(7.0, 1, 0.3)])


def test_first_order_spectrum_of_ethyl():
    """Ethyl: CH3 triplet 1:2:1 (3H) and CH2 quartet 1:3:3:1 (2H) at 400 MHz."""
    system = SpinSystem((SpinGroup("CH2", 3.60, 2), SpinGroup("CH3", 1.20, 3)), {(0, 1): 7.0})
    lines = first_order_spectrum(system).lines
    methyl = [line for line in lines if line.ppm < 2]
    methylene = [line for line in lines if line.ppm > 2]
    assert [0.75, 1.5, 0.75] == pytest.approx([line.intensity for line in methyl])
    assert [0.25, 0.75, 0.75, 0.25] == pytest.approx([line.intensity for line in methylene])
    assert [473.0, 480.0, 487.0] == pytest.approx([line.freq_hz for line in methyl])
    assert 1.2 == pytest.approx(methyl[1].ppm)
