"""The reader on the trade's own examples: what is read, and where it is."""

import json
from importlib import resources

import jsonschema
import pytest

import peakproof

# The paragraph trade.md gives as the typical block (common practice).
TYPICAL = (
    "1H NMR (400 MHz, CDCl3) δ 7.36–7.28 (m, 5H), 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H); "
    "13C NMR (101 MHz, CDCl3) δ 170.9, 61.0, 14.2; HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na "
    "229.0835, found 229.0838."
)


def schema():
    return json.loads(resources.files("peakproof").joinpath("schema/parse.schema.json").read_text())


def test_typical_block_is_read_completely():
    """Every item of the typical paragraph becomes model data."""
    doc = peakproof.parse(TYPICAL)
    assert 1 == len(doc.blocks)
    block = doc.blocks[0]
    h, c = block.spectra
    assert ("1H", 400.0, "CDCl3") == (h.nucleus, h.frequency_mhz, h.solvent_normalized)
    assert [(None, (7.36, 7.28), "m", (), 5.0), (4.12, None, "q", (7.1,), 2.0), (1.25, None, "t", (7.1,), 3.0)] == [
        (s.shift, s.range, s.multiplicity.name, s.j_hz, s.count) for s in h.signals
    ]
    assert [170.9, 61.0, 14.2] == [s.shift for s in c.signals]
    (ms,) = block.mass_spec
    assert ("ESI", "[M+Na]+", "C12H14O3Na", 229.0835, 229.0838) == (ms.method, ms.ion, ms.formula, ms.calcd, ms.found)
    assert () == doc.diagnostics


def test_json_matches_published_schema():
    """The parse JSON validates against the schema shipped in the package."""
    jsonschema.validate(peakproof.parse(TYPICAL).to_json(), schema())


def test_spans_point_at_what_they_name():
    """Each signal, coupling and count span covers exactly its text."""
    prose = "The ester was isolated (92%). " + TYPICAL + " It was stored cold."
    doc = peakproof.parse(prose)
    (block,) = doc.blocks
    assert prose[block.span.start : block.span.end] == TYPICAL
    q = block.spectra[0].signals[1]
    assert "4.12 (q, J = 7.1 Hz, 2H)" == prose[q.span.start : q.span.end]
    assert "J = 7.1" == prose[q.couplings[0].span.start : q.couplings[0].span.end]
    assert "2H" == prose[q.count_span.start : q.count_span.end]
    assert "q" == prose[q.multiplicity.span.start : q.multiplicity.span.end]
    ms = block.mass_spec[0]
    assert "229.0838" == prose[ms.found_span.start : ms.found_span.end]
    assert "C12H14O3Na" == prose[ms.formula_span.start : ms.formula_span.end]


def test_line_and_column_are_one_based():
    """Line and column of a span count from 1, across line breaks inside a block."""
    text = "Intro line.\n\n1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H),\n3.80 (s, 3H)."
    doc = peakproof.parse(text)
    sig = doc.blocks[0].spectra[0].signals[1]
    assert (4, 1) == (sig.span.line, sig.span.column)


def test_bad_signal_is_reported_and_others_kept():
    """One unreadable signal costs only itself; the error says where and what was expected."""
    text = "1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 7.10 (dd, J = 8.4 Hz, 2H, 6.90 (s, 1H), 3.80 (s, 3H)."
    doc = peakproof.parse(text)
    shifts = [s.shift for s in doc.blocks[0].spectra[0].signals]
    assert [7.26, 6.90, 3.80] == shifts
    (err,) = [d for d in doc.diagnostics if d.severity == "error"]
    assert "syntax" == err.rule
    assert "(" == text[err.span.start : err.span.end]  # the parenthesis left open
    assert "')'" in err.hint


def test_repairs_are_reported_at_their_place():
    """PDF artefacts are repaired and each repair points at the damaged glyph."""
    text = "1H NMR (400 MHz, CDCl3) d 7.26 (d, J ¼ 8.4 Hz, 2H)."
    doc = peakproof.parse(text)
    sig = doc.blocks[0].spectra[0].signals[0]
    assert (7.26, (8.4,)) == (sig.shift, sig.j_hz)
    found = {d.rule: text[d.span.start : d.span.end] for d in doc.diagnostics}
    assert {"repair-equals-glyph": "¼", "repair-delta-glyph": "d"} == found


@pytest.mark.parametrize(
    "text",
    ["", "no data here at all", "1H NMR", "1H NMR (400 MHz", "δ (((", "HRMS calcd", "\x00\x01", "1H NMR (CDCl3) δ 7.2 (" * 50],
)
def test_garbage_never_raises(text):
    """Arbitrary text returns a Document; problems are diagnostics."""
    doc = peakproof.parse(text)
    assert isinstance(doc.diagnostics, tuple)
