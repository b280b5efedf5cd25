"""The n+1 rule from both ends of a coupling (splitting-from-partners with reciprocity-count).

Each alkyl pattern is written correctly (quiet) and broken on either side (exactly one finding,
at the signal whose letters are wrong). Expected splittings are the n+1 rule for groups of
equivalent protons: ethyl CH2 q / CH3 t, isopropyl CH sept / CH3 d, propyl CH2 t, CH2 sext,
CH3 t, isobutyl CH2 d, CH m, CH3 d (common practice). The shifts and J values are invented.
"""

from __future__ import annotations

import pytest

import peakproof

H = "1H NMR (400 MHz, CDCl3) δ "
RULES = {"splitting-from-partners", "reciprocity-count"}

QUIET = {
    "ethyl": "4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).",
    "two equivalent ethyls": "4.20 (q, J = 7.1 Hz, 4H), 1.28 (t, J = 7.1 Hz, 6H).",
    "isopropyl": "2.90 (sept, J = 6.9 Hz, 1H), 1.25 (d, J = 6.9 Hz, 6H).",
    "propyl": "3.40 (t, J = 7.0 Hz, 2H), 1.60 (sext, J = 7.2 Hz, 2H), 0.95 (t, J = 7.4 Hz, 3H).",
    "isobutyl": "3.20 (d, J = 6.7 Hz, 2H), 1.90 (m, 1H), 0.92 (d, J = 6.7 Hz, 6H).",
    "para ring": "7.30 (d, J = 8.4 Hz, 2H), 6.90 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H).",
    "phenyl first order": "7.80 (d, J = 7.9 Hz, 2H), 7.38 (t, J = 7.4 Hz, 1H), 7.36 (t, J = 7.6 Hz, 2H), 1.35 (s, 12H).",
    "diastereotopic CH2": "3.85 (dd, J = 9.5, 6.0 Hz, 1H), 3.70 (dd, J = 9.5, 7.2 Hz, 1H), 2.10 (m, 1H), 1.02 (d, J = 6.8 Hz, 3H).",
    "CH2CH2": "3.75 (t, J = 6.5 Hz, 2H), 2.85 (t, J = 6.5 Hz, 2H).",
    "tert-butyl beside ethyl": "4.10 (q, J = 7.1 Hz, 2H), 1.45 (s, 9H), 1.24 (t, J = 7.1 Hz, 3H).",
}

BROKEN = {  # text, the shift whose letters are wrong
    "ethyl CH3 written d": ("4.12 (q, J = 7.1 Hz, 2H), 1.25 (d, J = 7.1 Hz, 3H).", 1.25),
    "ethyl CH2 written t": ("4.12 (t, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).", 4.12),
    "isopropyl CH written sext": ("2.90 (sext, J = 6.9 Hz, 1H), 1.25 (d, J = 6.9 Hz, 6H).", 2.90),
    "isopropyl CH3 written t": ("2.90 (sept, J = 6.9 Hz, 1H), 1.25 (t, J = 6.9 Hz, 6H).", 1.25),
    "propyl middle CH2 written q": ("3.40 (t, J = 7.0 Hz, 2H), 1.60 (q, J = 7.2 Hz, 2H), 0.95 (t, J = 7.4 Hz, 3H).", 1.60),
    "propyl CH3 written d": ("3.40 (t, J = 7.0 Hz, 2H), 1.60 (sext, J = 7.2 Hz, 2H), 0.95 (d, J = 7.4 Hz, 3H).", 0.95),
    "isobutyl CH2 written t": ("3.20 (t, J = 6.7 Hz, 2H), 1.90 (m, 1H), 0.92 (d, J = 6.7 Hz, 6H).", 3.20),
    "isobutyl CH3 written t": ("3.20 (d, J = 6.7 Hz, 2H), 1.90 (m, 1H), 0.92 (t, J = 6.7 Hz, 6H).", 0.92),
}


def _findings(text):
    doc = peakproof.parse(H + text)
    return doc, [d for d in peakproof.check(doc).diagnostics if d.rule in RULES]


@pytest.mark.parametrize("name", sorted(QUIET))
def test_correct_patterns_stay_quiet(name):
    _, found = _findings(QUIET[name])
    assert found == [], [d.message for d in found]


@pytest.mark.parametrize("name", sorted(BROKEN))
def test_broken_side_is_found_once_at_its_own_letters(name):
    text, wrong = BROKEN[name]
    doc, found = _findings(text)
    assert len(found) == 1, [d.message for d in found]
    signal = next(s for s in doc.blocks[0].spectra[0].signals if abs(s.shift - wrong) < 1e-9)
    assert signal.multiplicity.span.start == found[0].span.start
