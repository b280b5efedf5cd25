"""From parsed descriptions (invented compounds) to spin systems and their spectra."""

import math

import pytest

import peakproof
from peakproof.simulate import first_order_spectrum, quantum_spectrum
from peakproof.simulate.from_model import implied_spectrum, simulate_implied


def _implied(text, nucleus="1H"):
    doc = peakproof.parse(text)
    spectrum = next(s for b in doc.blocks for s in b.spectra if s.nucleus == nucleus)
    return implied_spectrum(spectrum)


def _observed(implied):
    return [g for g in implied.system.groups if g.observed]


def _pattern(lines):
    """(centroid Hz, intensity) of lines grouped within 0.2 Hz, low to high frequency."""
    groups = []
    for line in sorted(lines, key=lambda ln: ln.freq_hz):
        if groups and line.freq_hz - groups[-1][2] < 0.2:
            groups[-1][0] += line.freq_hz * line.intensity
            groups[-1][1] += line.intensity
            groups[-1][2] = line.freq_hz
        else:
            groups.append([line.freq_hz * line.intensity, line.intensity, line.freq_hz])
    return [(weighted / total, total) for weighted, total, _ in groups]


ETHYL = ("Ethyl ester 21: 1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), "
         "1.25 (t, J = 7.1 Hz, 3H).")


def test_ethyl_gives_a2x3_and_qm_agrees_with_first_order():
    implied = _implied(ETHYL)
    assert [(g.shift_ppm, g.count) for g in implied.system.groups] == [(4.12, 2), (1.25, 3)]
    assert implied.system.couplings == {(0, 1): 7.1}
    exact = quantum_spectrum(implied.system)
    first = first_order_spectrum(implied.system)
    # Δν/J = 2.87 × 400 / 7.1 ≈ 162: first order holds; each first-order line has an exact
    # counterpart within 0.05 Hz carrying the same intensity.
    exact_lines = _pattern(exact.lines)
    assert len(exact_lines) == len(first.lines) == 7
    for (freq, intensity), line in zip(exact_lines, first.lines):
        assert abs(freq - line.freq_hz) < 0.05
        assert intensity == pytest.approx(line.intensity, rel=0.02)  # roofing ~ 2J/Δν ≈ 1 %
    # Binomial weights (common practice): t 1:2:1 of 3H, q 1:3:3:1 of 2H.
    weights = [line.intensity for line in first.lines]
    assert weights == pytest.approx([0.75, 1.5, 0.75, 0.25, 0.75, 0.75, 0.25])


def test_para_disubstituted_pair_is_two_ab_systems_with_closed_form_lines():
    implied = _implied("Nitrile 22: 1H NMR (400 MHz, CDCl3) δ 7.64 (d, J = 8.6 Hz, 2H), "
                       "7.57 (d, J = 8.6 Hz, 2H).")
    groups = _observed(implied)
    assert [g.count for g in groups] == [1, 1, 1, 1]  # AX + A′X′, not A2X2 (that gives t)
    assert sorted(implied.system.couplings.values()) == [8.6, 8.6]
    assert any("copies" in note for note in implied.notes)
    lines = _pattern(simulate_implied(implied).simulation.lines)
    # AB closed form (NMR textbooks): lines at ν₀ ± ½(D ± J), D = √(Δν² + J²),
    # intensities ∝ 1 ∓ J/D.
    nu0, dnu, j = (7.64 + 7.57) / 2 * 400, 0.07 * 400, 8.6
    d = math.hypot(dnu, j)
    expected = [(nu0 - (d + j) / 2, 1 - j / d), (nu0 - (d - j) / 2, 1 + j / d),
                (nu0 + (d - j) / 2, 1 + j / d), (nu0 + (d + j) / 2, 1 - j / d)]
    assert len(lines) == 4
    for (freq, intensity), (want_freq, want_intensity) in zip(lines, expected):
        assert freq == pytest.approx(want_freq, abs=1e-6)
        assert intensity == pytest.approx(want_intensity, rel=1e-6)


def test_chf_doublet_from_typed_h_f_coupling():
    implied = _implied("Fluoride 23: 1H NMR (400 MHz, CDCl3) δ 6.25 (d, 2J(H,F) = 56.0 Hz, 1H).")
    partner = [g for g in implied.system.groups if not g.observed]
    assert [(g.nucleus, g.spin, g.count) for g in partner] == [("19F", 0.5, 1)]
    lines = simulate_implied(implied).simulation.lines
    assert [round(ln.freq_hz - 6.25 * 400, 6) for ln in lines] == [-28.0, 28.0]
    assert [ln.intensity for ln in lines] == pytest.approx([0.5, 0.5])


def test_deuterium_partners_give_quintet_of_two_spin_1_nuclei():
    # CHD2 of CD3OD residual: quintet at 3.31 (Gottlieb et al., J. Org. Chem. 1997, 62, 7512);
    # J(H,D) = 1.7 Hz from memory.  Two deuterons (I = 1): 1:2:3:2:1 (2nI + 1 lines).
    implied = _implied("Solvent 24: 1H NMR (400 MHz, CD3OD) δ 3.31 (quint, J(H,D) = 1.7 Hz, 1H).")
    partner = [g for g in implied.system.groups if not g.observed]
    assert [(g.nucleus, g.spin, g.count) for g in partner] == [("2H", 1.0, 2)]
    weights = [ln.intensity * 9 for ln in simulate_implied(implied).simulation.lines]
    assert weights == pytest.approx([1, 2, 3, 2, 1])


def test_unmatched_j_gets_implicit_partners_so_the_quartet_shows():
    implied = _implied("Ester 25: 1H NMR (400 MHz, CDCl3) δ 4.42 (q, J = 7.1 Hz, 2H), "
                       "1.41 (t, J = 7.6 Hz, 3H).")
    assert implied.system.couplings and all(
        not implied.system.groups[b].observed for (_, b) in implied.system.couplings)
    assert any("4.42" in note and "no match" in note for note in implied.notes)
    lines = first_order_spectrum(implied.system).lines
    quartet = [ln.intensity for ln in lines if ln.ppm > 3]
    assert quartet == pytest.approx([0.25, 0.75, 0.75, 0.25])  # 1:3:3:1 of 2H


def test_propyl_chain_keeps_only_couplings_the_letters_allow():
    implied = _implied("Ketone 26: 1H NMR (400 MHz, CDCl3) δ 2.86 (t, J = 7.4 Hz, 2H), "
                       "1.76 (sext, J = 7.4 Hz, 2H), 1.00 (t, J = 7.4 Hz, 3H).")
    # All three share J = 7.4 Hz, but a t at 2.86 has room for the 2H at 1.76 only.
    assert implied.system.couplings == {(0, 1): 7.4, (1, 2): 7.4}
    assert len(implied.system.groups) == 3  # nothing implicit: the counts fit


def test_partner_missing_from_the_list_is_noted_and_drawn():
    # 1.00 written as q: its reported partner (1.76, 2H) supplies 2 of the 3 partners.
    implied = _implied("Ketone 27: 1H NMR (400 MHz, CDCl3) δ 1.76 (sext, J = 7.4 Hz, 2H), "
                       "1.00 (q, J = 7.4 Hz, 3H), 2.86 (t, J = 7.4 Hz, 2H).")
    assert any("1.00" in note and "2 of its 3" in note.replace(":", "") or
               "1.00" in note and "has 2" in note for note in implied.notes)
    lines = [ln for ln in first_order_spectrum(implied.system).lines if ln.ppm < 1.2]
    assert len(lines) == 4  # still a quartet, as written


def test_no_frequency_assumes_400_mhz_with_a_note():
    implied = _implied("Alcohol 28: 1H NMR (CDCl3) δ 4.88 (q, J = 6.5 Hz, 1H), "
                       "1.47 (d, J = 6.5 Hz, 3H).")
    assert implied.field_mhz == 400.0
    assert any("no frequency" in note for note in implied.notes)


def test_range_multiplet_is_drawn_over_its_range():
    implied = _implied("Arene 29: 1H NMR (400 MHz, CDCl3) δ 7.36–7.28 (m, 5H).")
    (signal,) = implied.signals
    assert signal.shift_ppm == pytest.approx(7.32)
    assert signal.shape == "gaussian" and signal.width_hz == pytest.approx(0.08 * 400)
    simulated = simulate_implied(implied)
    assert simulated.simulation.total_intensity == pytest.approx(5)


def test_total_intensity_is_number_of_reported_nuclei():
    implied = _implied("Ether 30: 1H NMR (400 MHz, CDCl3) δ 6.03 (ddt, J = 17.3, 10.5, 5.3 Hz, "
                       "1H), 5.43 (dq, J = 17.3, 1.5 Hz, 1H), 5.34 (dq, J = 10.5, 1.5 Hz, 1H), "
                       "4.60 (dt, J = 5.3, 1.5 Hz, 2H).")
    for method in ("quantum", "first-order"):
        total = simulate_implied(implied, method).simulation.total_intensity
        assert total == pytest.approx(5, rel=1e-6)  # dust below 1e-7 of the strongest dropped
