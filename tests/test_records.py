"""The model's records: frozen, equal only within their class, picklable (batch workers)."""

import pickle

import pytest

from peakproof import parse
from peakproof.model import Coupling, Signal
from peakproof.readers.base import Location, SourceText
from peakproof.span import Diagnostic, Span

SPAN = Span(0, 4, 1, 1, 1, 4)


def test_record_equals_only_its_own_class():
    signal = Signal(SPAN, 7.26)
    assert signal == Signal(SPAN, 7.26)
    assert not signal != Signal(SPAN, 7.26)
    assert signal != tuple(signal) and tuple(signal) != signal
    assert not signal == tuple(signal)
    assert hash(signal) == hash(Signal(SPAN, 7.26))
    coupling = Coupling(8.4, SPAN)
    assert coupling != Coupling(8.5, SPAN)


def test_records_are_frozen():
    signal = Signal(SPAN, 7.26)
    with pytest.raises(AttributeError):
        signal.shift = 7.3
    source = SourceText("text", "txt")
    with pytest.raises(AttributeError):
        source.text = "other"


def test_a_parsed_document_pickles():
    doc = parse("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H); HRMS (ESI) m/z "
                "[M + H]+ calcd for C8H9O 121.0648, found 121.0650.\n\n"
                "1 H NMR (400 MHz, CDCl3) δ 7.26 (d, J ¼ 8.4 Hz, 2H), 3.80 (s, J = Hz, 3H).")
    assert {d.rule for d in doc.diagnostics} >= {"syntax", "repair-superscript"}
    again = pickle.loads(pickle.dumps(doc))
    assert again == doc and again.blocks[0].spectra[0].signals[0].count == 2


def test_small_records_pickle():
    diagnostic = Diagnostic("r", "note", "m", SPAN)
    assert diagnostic.data is None
    assert pickle.loads(pickle.dumps(diagnostic)) == diagnostic
    location = Location("txt", line=3, column=2)
    assert pickle.loads(pickle.dumps(location)) == location
    assert location.to_json() == {"format": "txt", "line": 3, "column": 2}
    source = SourceText("text", "txt", "a.txt", ("note",))
    assert pickle.loads(pickle.dumps(source)) == source
