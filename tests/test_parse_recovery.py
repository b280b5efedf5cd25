"""One bad signal costs only itself, in clean text and in its PDF-damaged twin alike."""

import pytest

from peakproof.parsing import parse
from tests.corpus import load_corpus
from tests.corpus.damage import damage

ENTRIES = load_corpus()


def _break_first_signal(text: str):
    """The text with an empty J value put into the first detailed signal of a spectrum that has
    at least two signals, and that spectrum; None when no spectrum qualifies."""
    doc = parse(text)
    spectra = [s for b in doc.blocks for s in b.spectra]
    for spectrum in spectra:
        first, second = (spectrum.signals + (None, None))[:2]
        if second is not None and first.details_span is not None and first.group == second.group == 0:
            close = first.details_span.end - 1
            assert text[close] == ")"
            return text[:close] + ", J = Hz" + text[close:], spectra, spectrum
    return None


CASES = [
    (f"{e.id}-{kind}", case)
    for e in ENTRIES
    for kind, text in (("clean", e.text), ("damaged", damage(e.text, e.id).text))
    if (case := _break_first_signal(text)) is not None
]


def test_enough_cases():
    assert len(CASES) >= 150  # most corpus entries have a spectrum with two signals


@pytest.mark.parametrize("case", [c for _, c in CASES], ids=[i for i, _ in CASES])
def test_one_bad_signal_loses_nothing_else(case):
    broken, spectra, target = case
    doc = parse(broken)
    errors = [d for d in doc.diagnostics if d.severity == "error"]
    assert len(errors) == 1 and errors[0].rule == "syntax"
    assert "Hz" in broken[errors[0].span.start : errors[0].span.end]
    after = [s for b in doc.blocks for s in b.spectra]
    assert len(after) == len(spectra)  # the spectrum itself is kept, header and all
    kept = after[spectra.index(target)]
    assert (kept.nucleus, kept.frequency_mhz, kept.solvent) == (target.nucleus, target.frequency_mhz, target.solvent)
    assert [s.shift for s in kept.signals] == [s.shift for s in target.signals[1:]]
