"""Property tests: generated valid blocks read back as drawn; no input makes parse raise."""

from __future__ import annotations

from corpus import project
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from strategies import blocks, mutated_blocks

SETTINGS = settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _parse(text):
    import peakproof  # the public entry point, imported per call so a missing parser fails here

    return peakproof.parse(text)


@SETTINGS
@given(blocks())
def test_generated_block_reads_back(case):
    """A block written in any supported variant parses to the data it was written from."""
    text, expected = case
    assert expected == project(_parse(text))


@SETTINGS
@given(st.text(max_size=400))
def test_arbitrary_text_never_raises(text):
    """Any text gives a Document; problems become diagnostics, never exceptions."""
    from peakproof.model import Document

    assert isinstance(_parse(text), Document)


@SETTINGS
@given(mutated_blocks())
def test_mutated_block_never_raises(text):
    """A damaged or truncated block still gives a Document."""
    from peakproof.model import Document

    assert isinstance(_parse(text), Document)


@settings(max_examples=200, deadline=None)
@given(blocks())
def test_strategy_expectation_is_consistent(case):
    """The strategy's expectation is well formed: one of shift/range, J counts match letters."""
    text, expected = case
    assert len(expected) == 1 and expected[0]["spectra"]
    for spectrum in expected[0]["spectra"]:
        for signal in spectrum["signals"]:
            assert (signal["shift"] is None) != (signal["range"] is None)
            name = signal["multiplicity"]
            if name and set(name) <= set("dtq") and name not in ("ABq",):
                assert len(signal["j_hz"]) == len(name), (name, signal["j_hz"], text)
