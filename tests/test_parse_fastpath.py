"""The fast-path tokens read exactly what the token-by-token rules read."""

import pytest
from hypothesis import HealthCheck, given, settings

from peakproof.parsing import parse
from tests.corpus import load_corpus
from tests.corpus.damage import damage
from tests.strategies import blocks

ENTRIES = load_corpus()


def both(text):
    """The two readings as JSON (for a readable difference), after checking the whole models,
    every span and field the JSON leaves out included, are equal."""
    fast, slow = parse(text, fast=True), parse(text, fast=False)
    if fast != slow:
        for a, b in zip(fast.blocks, slow.blocks):
            for x, y in zip(a.spectra, b.spectra):
                for field, u, v in zip(x._fields, x, y):
                    assert u == v, (field, u, v) if field != "signals" else next(
                        (p, q) for p, q in zip(u, v) if p != q)
            assert a == b
        assert fast.diagnostics == slow.diagnostics
        assert fast == slow
    return fast.to_json(), slow.to_json()


@pytest.mark.parametrize("entry", ENTRIES, ids=[e.id for e in ENTRIES])
def test_corpus_entry_same_either_way(entry):
    """Model, spans and diagnostics agree on every corpus entry."""
    fast, slow = both(entry.text)
    assert slow == fast


@pytest.mark.parametrize("entry", ENTRIES, ids=[e.id for e in ENTRIES])
def test_damaged_twin_same_either_way(entry):
    """…and on its PDF-damaged twin."""
    fast, slow = both(damage(entry.text, entry.id).text)
    assert slow == fast


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(blocks())
def test_generated_blocks_same_either_way(case):
    """…and on generated blocks across the notation variants."""
    text = case[0]
    fast, slow = both(text)
    assert slow == fast


def test_fast_path_is_really_taken():
    """The default grammar has the fast-path tokens and the comparison grammar has none."""
    from peakproof.parsing import _builder_and_parser

    _, fast_parser = _builder_and_parser(True)
    _, slow_parser = _builder_and_parser(False)
    assert "SIGNALS" == fast_parser.get_terminal("SIGNALS").name
    with pytest.raises(KeyError):
        slow_parser.get_terminal("SIGNALS")
