"""Readings the parser once got wrong, found in review (now regression tests).

Each test states the input as an author writes it and the reading a chemist means."""

from __future__ import annotations

from peakproof import parse


def only_signals(text: str):
    doc = parse(text)
    return [s for b in doc.blocks for sp in b.spectra for s in sp.signals], doc


def test_doublet_of_multiplets():
    # "dm" = a doublet whose lines are further split unresolved (common practice, e.g. CHF
    # protons with 2J(H,F) ≈ 48 Hz)
    signals, _ = only_signals("1H NMR (400 MHz, CDCl3) δ 4.97 (dm, J = 48.6 Hz, 1H), 1.20 (s, 3H).")
    first = signals[0]
    assert first.multiplicity is not None and first.multiplicity.name == "dm"
    assert first.assignment is None
    assert first.j_hz == (48.6,) and first.count == 1


def test_triplet_of_multiplets():
    signals, _ = only_signals("1H NMR (400 MHz, CDCl3) δ 2.10 (tm, J = 7.0 Hz, 2H).")
    assert signals[0].multiplicity is not None and signals[0].multiplicity.name == "tm"
    assert signals[0].assignment is None


def test_abq_with_both_shifts_written():
    # an AB quartet reported by its two centres, common for diastereotopic CH2 (common practice)
    signals, doc = only_signals("1H NMR (400 MHz, CDCl3) δ 3.52 and 3.40 (ABq, JAB = 11.2 Hz, 2H).")
    assert not [d for d in doc.diagnostics if d.severity == "error"]
    assert sorted(s.position for s in signals)[::-1] == [3.52, 3.40] or \
        (len(signals) == 1 and signals[0].range == (3.52, 3.40))
    assert all(s.multiplicity is not None and s.multiplicity.name == "ABq" for s in signals)
    assert any(s.j_hz == (11.2,) for s in signals)
