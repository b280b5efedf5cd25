"""Second-order effects of a coupled pair, against the AB closed form of NMR textbooks."""

import math

import pytest

from peakproof.simulate.verdict import second_order_effect


@pytest.mark.parametrize("shift_a, shift_b, j_hz, field", [
    (7.64, 7.57, 8.6, 400.0),
    (7.30, 7.26, 8.0, 300.0),
    (6.90, 6.10, 15.5, 600.0),
])
def test_ab_matches_closed_form(shift_a, shift_b, j_hz, field):
    effect = second_order_effect(shift_a, shift_b, j_hz, field)
    # AB closed form (common NMR textbooks): lines at ν₀ ± ½(D ± J), D = √(Δν² + J²),
    # intensities ∝ 1 ∓ J/D (inner lines stronger).
    dnu = (shift_a - shift_b) * field
    d = math.hypot(dnu, j_hz)
    nu0 = (shift_a + shift_b) / 2 * field
    assert [ln.freq_hz for ln in effect.exact] == pytest.approx(
        [nu0 - (d + j_hz) / 2, nu0 - (d - j_hz) / 2, nu0 + (d - j_hz) / 2, nu0 + (d + j_hz) / 2])
    # First-order doublets sit at ν_A ± J/2: every line moves by (D − Δν)/2.
    assert effect.max_line_shift_hz == pytest.approx((d - dnu) / 2, abs=1e-9)
    assert effect.roof_ratio_a == pytest.approx((1 + j_hz / d) / (1 - j_hz / d), rel=1e-9)
    assert effect.roof_ratio_b == pytest.approx(effect.roof_ratio_a, rel=1e-9)
    assert effect.extra_lines == 0
    assert effect.delta_nu_hz == pytest.approx(dnu)
    assert effect.ratio == pytest.approx(dnu / j_hz)


def test_ab_numbers_worked_by_hand():
    # Δν = 28 Hz, J = 8.6 Hz: D = √(784 + 73.96) = 29.2910 Hz (hand-worked from the formula);
    # shift (D − Δν)/2 = 0.6455 Hz; inner/outer = (1 + 0.29360)/(1 − 0.29360) = 1.8313.
    effect = second_order_effect(7.64, 7.57, 8.6, 400.0)
    assert effect.max_line_shift_hz == pytest.approx(0.6455, abs=1e-4)
    assert effect.roof_ratio == pytest.approx(1.8313, abs=1e-4)
    assert effect.visible()
    text = effect.describe()
    assert "0.65 Hz" in text and "1.83" in text and "Δν/J = 3.3" in text


def test_weak_coupling_is_not_visible():
    effect = second_order_effect(3.60, 1.20, 7.0, 400.0, n_a=2, n_b=3)
    assert effect.ratio > 100
    assert effect.max_line_shift_hz < 0.05
    assert effect.roof_ratio < 1.05
    assert effect.extra_lines == 0
    assert not effect.visible()


def test_a2b_shows_extra_lines_when_strongly_coupled():
    # A2B first order: d (2 lines) + t (3 lines); exact A2B has up to 9 lines (textbooks).
    effect = second_order_effect(2.00, 1.98, 7.0, 400.0, n_a=2, n_b=1)
    assert len(effect.first_order) == 5
    assert effect.extra_lines >= 2
    assert effect.visible()
    assert effect.to_json()["visible"] is True


def test_higher_field_makes_the_pair_more_first_order():
    low = second_order_effect(7.30, 7.20, 8.0, 300.0)
    high = second_order_effect(7.30, 7.20, 8.0, 800.0)
    assert high.max_line_shift_hz < low.max_line_shift_hz
    assert 1 < high.roof_ratio < low.roof_ratio
