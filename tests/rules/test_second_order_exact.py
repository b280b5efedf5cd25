"""The second-order finding quotes the exact (quantum) spectrum in Hz."""

import math

import peakproof


def test_ab_finding_quotes_closed_form_numbers():
    """Δν = 16 Hz, J = 8 Hz at 400 MHz: the AB lines sit at ν₀ ± ½(D ± J), D = √(Δν² + J²), with
    intensities ∝ 1 ∓ J/D (the AB closed form of NMR textbooks, e.g. Günther, NMR Spectroscopy —
    from memory), so the lines move by D − Δν… from the first-order ν₀ ± ½(Δν ± J)."""
    text = "1H NMR (400 MHz, CDCl3) δ 7.02 (d, J = 8.0 Hz, 1H), 6.98 (d, J = 8.0 Hz, 1H)."
    doc = peakproof.parse(text)
    (finding,) = [d for d in peakproof.check(doc).diagnostics if d.rule == "second-order-ab"]
    dnu, j = 0.04 * 400, 8.0
    d = math.hypot(dnu, j)
    expected_shift = (d - dnu) / 2  # every line moves outward/inward by ½(D − Δν)
    expected_roof = (1 + j / d) / (1 - j / d)
    exact = finding.data["exact"]
    assert abs(expected_shift - exact["max_line_shift_hz"]) < 1e-6
    assert abs(expected_roof - exact["roof_ratio_a"]) < 1e-6
    assert f"{expected_shift:.2f} Hz" in finding.message
