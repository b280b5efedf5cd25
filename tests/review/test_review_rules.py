"""Regressions found by reviewing the checker as its users would (clean data must stay quiet)."""

from __future__ import annotations

from peakproof import parse
from peakproof.checker import check_document


def rules_fired(text: str, formula: str | None = None) -> list[str]:
    result = check_document(parse(text), None, formula, strict=True)
    return [d.rule for d in result.diagnostics]


# 2-fluoropropyl ester: the 48.6 Hz geminal H–F and 23.5 Hz vicinal H–F couplings are written as
# plain J; the 19F spectrum and the C–F doublets in the same block show the compound holds F.
# 2JHF ≈ 47–49 Hz and 3JHF ≈ 20–25 Hz for CHF–CH3 (common practice, from memory).
FLUORO_BLOCK = (
    "1H NMR (400 MHz, CDCl3) δ 8.05 (d, J = 7.6 Hz, 2H), 7.57 (t, J = 7.4 Hz, 1H), "
    "7.45 (t, J = 7.7 Hz, 2H), 5.00 (dqd, J = 48.6, 6.4, 4.0 Hz, 1H), 4.38 (m, 2H), "
    "1.43 (dd, J = 23.5, 6.4 Hz, 3H). 19F{1H} NMR (376 MHz, CDCl3) δ −182.4. "
    "13C NMR (101 MHz, CDCl3) δ 166.3, 133.2, 129.8, 129.7, 128.4, 88.3 (d, J = 169.7 Hz), "
    "67.0 (d, J = 22.6 Hz), 17.7 (d, J = 22.4 Hz)."
)


def test_large_j_not_flagged_when_block_has_a_19f_spectrum():
    assert "large-hh-coupling" not in rules_fired(FLUORO_BLOCK)


def test_large_j_not_flagged_when_a_coupling_names_fluorine():
    text = "1H NMR (400 MHz, C6D6) δ 4.42 (dq, J = 47.9, 6.2 Hz, 1H), 1.10 (dd, JHF = 23.8, JHH = 6.2 Hz, 3H)."
    fired = rules_fired(text)
    assert "large-hh-coupling" not in fired
    assert "coupling-no-partner" not in fired  # 47.9 Hz is to F, which the block shows


def test_large_j_still_flagged_without_any_heteronucleus():
    text = "1H NMR (400 MHz, CDCl3) δ 4.95 (d, J = 60.0 Hz, 1H), 2.10 (d, J = 60.0 Hz, 1H)."
    assert "large-hh-coupling" in rules_fired(text)


def test_abq_coupling_needs_no_partner_elsewhere():
    # an AB quartet's J joins its own two halves (common practice: a benzylic CH2 AB system)
    text = "1H NMR (400 MHz, CDCl3) δ 4.62 (ABq, J = 12.0 Hz, 2H), 1.20 (s, 3H)."
    assert "coupling-no-partner" not in rules_fired(text)


def test_abq_then_extra_unmatched_j_still_reported():
    text = "1H NMR (400 MHz, CDCl3) δ 4.62 (ABq, J = 12.0 Hz, 2H), 3.40 (d, J = 5.5 Hz, 2H), 1.20 (s, 3H)."
    assert rules_fired(text).count("coupling-no-partner") == 1


def test_gem_dimethyl_singlet_near_water_is_not_water():
    # 2-phenylpropan-2-ol-like gem-dimethyl at 1.59 (s, 6H) in CDCl3; water in CDCl3 is 1.56
    # (Gottlieb, Kotlyar, Nudelman, J. Org. Chem. 1997, 62, 7512)
    text = "1H NMR (400 MHz, CDCl3) δ 7.50–7.46 (m, 2H), 7.38–7.33 (m, 2H), 7.27–7.23 (m, 1H), 1.59 (s, 6H)."
    assert "solvent-coincidence" not in rules_fired(text)


def test_water_listed_as_a_2h_singlet_still_flagged():
    text = "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 1.58 (s, 2H)."
    assert "solvent-coincidence" in rules_fired(text)
