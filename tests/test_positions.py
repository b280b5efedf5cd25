"""Every span points at the characters it names, on the whole corpus and its damaged twins."""

import pytest

import peakproof
from tests.corpus import load_corpus
from tests.corpus.damage import damage

ENTRIES = load_corpus()
TEXTS = [(e.id, e.text) for e in ENTRIES] + [(e.id + "~damaged", damage(e.text, e.id).text) for e in ENTRIES]


def _norm(s):
    return _visible(s).replace("\u2212", "-").replace(",", ".")


def _visible(s):
    """What a reader sees: soft hyphens and zero-width characters are not there."""
    return "".join(ch for ch in s if ch not in "\u00ad\u200b\u200c\u200d\u2060\ufeff")


@pytest.mark.parametrize("text", [t for _, t in TEXTS], ids=[i for i, _ in TEXTS])
def test_spans_name_their_text(text):
    """Signal, shift, multiplicity, coupling, count and HRMS spans cover exactly what they stand for."""
    doc = peakproof.parse(text)
    for block in doc.blocks:
        assert 0 <= block.span.start < block.span.end <= len(text)
        for spectrum in block.spectra:
            for sig in spectrum.signals:
                written = text[sig.shift_span.start : sig.shift_span.end]
                # damage may have replaced spaces or split lines inside a range; compare the numbers
                assert _norm(written).split()[0].startswith(_norm(sig.shift_text).split()[0]), (written, sig.shift_text)
                assert text[sig.span.start : sig.span.end].startswith(written)
                if sig.multiplicity is not None:
                    letters = _visible(text[sig.multiplicity.span.start : sig.multiplicity.span.end])
                    assert " ".join(letters.split()) == " ".join(sig.multiplicity.written.split())
                for c in sig.couplings:
                    covered = text[c.span.start : c.span.end]
                    assert _norm(covered).endswith(c.text), (covered, c.text)
                if sig.count_span is not None:
                    covered = _visible(text[sig.count_span.start : sig.count_span.end])
                    assert " ".join(covered.split()) == " ".join(sig.count_text.split())
        for ms in block.mass_spec:
            if ms.found_span is not None:
                assert _norm(text[ms.found_span.start : ms.found_span.end]) == _norm(ms.found_text)
            if ms.formula_span is not None:
                assert _visible(text[ms.formula_span.start : ms.formula_span.end]) == ms.formula
    for d in doc.diagnostics:
        assert 0 <= d.span.start <= d.span.end <= len(text)
        line, col = d.span.line, d.span.column
        assert text.count("\n", 0, d.span.start) + 1 == line
        assert d.span.start - (text.rfind("\n", 0, d.span.start) + 1) + 1 == col
