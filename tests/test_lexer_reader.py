"""The SIGNALS token is read by the builder's loop; it must end exactly where its pattern ends."""

import re

import pytest
from hypothesis import HealthCheck, given, settings

from peakproof.lean_lexer import ReaderFirstScanner
from peakproof.parsing import _builder_and_parser, parse
from peakproof.repair import repair
from peakproof.span import LineIndex
from peakproof.transform import Context
from tests.corpus import load_corpus
from tests.corpus.damage import damage
from tests.strategies import blocks

ENTRIES = load_corpus()


def _pattern(name):
    _, parser = _builder_and_parser(True)
    return re.compile(parser.get_terminal(name).pattern.to_regexp())


def _check_every_start(text: str, name: str = "SIGNALS") -> int:
    """Compare the reader of terminal ``name`` with its pattern at every place it could start (a
    shift for SIGNALS, any character for SPECTRUM_FAST); return how many places matched."""
    builder, _ = _builder_and_parser(True)
    pattern = _pattern(name)
    read = builder.read_signals if name == "SIGNALS" else builder.read_spectrum
    repaired = repair(text)
    string = repaired.text
    starts = re.finditer(r"[-+\u2212]?\d" if name == "SIGNALS" else r"(?s).", string)
    matched = 0
    for m in starts:
        pos = m.start()
        want = pattern.match(string, pos)
        want_end = want.end() if want else pos
        builder.ctx = None
        assert read(string, pos, len(string)) == want_end
        builder.ctx = Context(0, repaired, LineIndex(text))
        builder.ctx.parsed = string
        try:
            assert read(string, pos, len(string)) == want_end, string[pos:pos + 80]
        finally:
            builder.ctx = None
            builder.read_ahead.clear()
        matched += want is not None
    return matched


def test_reader_is_installed_where_signals_come_first():
    parse("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H).", fast=True)
    _, parser = _builder_and_parser(True)
    lexers = list(parser.parser.lexer.lexers.values())
    built = [lx for lx in lexers if lx._scanner is not None]
    readers = [lx for lx in built if isinstance(lx._scanner, ReaderFirstScanner)]
    assert readers  # the signal list was read by the builder's loop
    for lx in built:
        if lx.terminals and lx.terminals[0].name in ("SIGNALS", "SPECTRUM_FAST"):
            assert isinstance(lx._scanner, ReaderFirstScanner)


@pytest.mark.parametrize("name", ["SIGNALS", "SPECTRUM_FAST"])
@pytest.mark.parametrize("damaged", [False, True], ids=["clean", "damaged"])
def test_reader_ends_where_the_pattern_ends_on_the_corpus(damaged, name):
    matched = 0
    for entry in ENTRIES:
        matched += _check_every_start(damage(entry.text, entry.id).text if damaged else entry.text, name)
    assert matched > (1500 if name == "SIGNALS" else 150)  # the comparison really met such tokens


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(blocks())
def test_reader_ends_where_the_pattern_ends_on_generated_blocks(case):
    _check_every_start(case[0], "SIGNALS")
    _check_every_start(case[0], "SPECTRUM_FAST")


class _ForgetfulDict(dict):
    """Keeps nothing: every SIGNALS / SPECTRUM_FAST callback has to split its token again."""

    def __setitem__(self, key, value):
        pass


def test_callbacks_read_the_same_without_the_readers_entries(monkeypatch):
    """The callbacks' own splitting (used when a lark version cannot take the readers, or a
    token was lexed elsewhere) gives exactly what the readers' kept entries give."""
    texts = [e.text for e in ENTRIES] + [damage(e.text, e.id).text for e in ENTRIES]
    document = "\n\n".join(texts)
    assert len(document) >= 20_000  # long enough for the fast grammar by default
    with_readers = parse(document, fast=True)
    builder, _ = _builder_and_parser(True)
    monkeypatch.setattr(builder, "read_ahead", _ForgetfulDict())
    without = parse(document, fast=True)
    assert without == with_readers
    assert len(with_readers.blocks) > 300
