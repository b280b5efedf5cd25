"""Parser problems met while building the checker (the parser is not the checker's to change).

Each test states the expected behaviour; a failing one is a parser bug to fix in parse.py /
parsing.py, not a test to loosen.
"""

import peakproof


def test_proton_list_then_13c_headed_with_400_mhz_is_read():
    # Found while writing the proton-frequency-on-heteronucleus rule: this block is skipped with
    # "internal-error ... AttributeError: 'NoneType' object has no attribute 'group'", so the
    # checker cannot report the 400 MHz written on the 13C line.
    text = ("1H NMR (400 MHz, CDCl3) δ 7.19 (d, J = 8.6 Hz, 2H), 1.25 (t, J = 7.5 Hz, 3H); "
            "13C NMR (400 MHz, CDCl3) δ 171.9.")
    doc = peakproof.parse(text)
    assert [d.rule for d in doc.diagnostics] == []
    assert [s.nucleus for s in doc.blocks[0].spectra] == ["1H", "13C"]
    assert doc.blocks[0].spectra[1].frequency_mhz == 400.0
