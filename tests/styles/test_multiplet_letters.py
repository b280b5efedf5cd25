"""Letters followed by m ("dm", "tm") and shifts joined by "and" survive every style."""

import pytest

import peakproof
from peakproof.styles import BUILTIN

TEXT = "1H NMR (400 MHz, CDCl3) δ 4.97 (dm, J = 48.6 Hz, 1H), 3.52 and 3.40 (ABq, JAB = 11.2 Hz, 2H), 2.10 (tm, J = 7.0 Hz, 2H)."


@pytest.mark.parametrize("style", sorted(BUILTIN))
def test_dm_and_abq_pairs_format_safely(style):
    """The formatted text reads back with the same letters and shifts (the safety check passes)."""
    result = peakproof.format_text(TEXT, style)
    signals = peakproof.parse(result.text).blocks[0].spectra[0].signals
    assert {"dm", "tm", "ABq"} == {s.multiplicity.name for s in signals}
    assert sorted([4.97, 3.52, 3.40, 2.10]) == sorted(s.shift for s in signals)
