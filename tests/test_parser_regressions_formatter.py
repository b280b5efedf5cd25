"""Parser bugs met while building the formatter (the formatter works around them)."""

import peakproof


def test_ascending_hyphen_range_is_a_range_not_a_negative_bound():
    # "1.21-1.30" is a range written low to high with a hyphen (trade guide: ranges and both
    # directions are in use); the hyphen is the dash, so both bounds are positive.
    doc = peakproof.parse("1H NMR (400 MHz, CDCl3) δ 7.28-7.36 (m, 2H), 1.21-1.30 (m, 6H).")
    ranges = [s.range for s in doc.blocks[0].spectra[0].signals]
    assert ranges == [(7.28, 7.36), (1.21, 1.30)]
