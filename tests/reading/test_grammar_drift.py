"""Patterns that transform.py writes out for speed are checked against the grammar when the fast
patterns are built, with an exception (not an assertion, which ``python -O`` removes)."""

from __future__ import annotations

import subprocess
import sys

import pytest

from peakproof import transform
from peakproof.parsing import _builder_and_parser


def _pattern_of():
    _, parser = _builder_and_parser(True)
    return lambda name: parser.get_terminal(name).pattern.to_regexp()


def test_agreeing_pieces_build(monkeypatch):
    assert transform.FastPatterns(_pattern_of()).one_signal is not None


def test_a_piece_that_drifted_from_the_grammar_raises(monkeypatch):
    monkeypatch.setattr(transform, "_BARE_REST", "(?:no such piece)")
    with pytest.raises(transform.GrammarDrift, match="update"):
        transform.FastPatterns(_pattern_of())


def test_the_check_survives_optimised_python():
    code = ("import peakproof.transform as t; from peakproof.parsing import _builder_and_parser\n"
            "p = _builder_and_parser(True)[1]; t._SIGNAL_TAIL = '(?:drifted)'\n"
            "try:\n    t.FastPatterns(lambda n: p.get_terminal(n).pattern.to_regexp())\n"
            "except t.GrammarDrift:\n    print('raised')\n")
    out = subprocess.run([sys.executable, "-O", "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "raised"
