"""Odd but legal inputs never end in a traceback; a bug of ours gets its own exit code (4)."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import peakproof
from peakproof.cli import EXIT_INTERNAL, main

BLOCK = "Ester 3a. 1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H)."


def _run(*args, cwd):
    env = dict(os.environ, PYTHONPATH=str(Path(peakproof.__file__).parents[1]))  # this checkout's code
    return subprocess.run([sys.executable, "-m", "peakproof", *args], capture_output=True,
                          text=True, cwd=cwd, env=env, timeout=120)  # fmt: skip


def test_an_elemental_analysis_count_of_thousands_of_digits_is_no_crash(tmp_path):
    path = tmp_path / "ea.txt"
    path.write_text(BLOCK + " Anal. Calcd for C" + "9" * 5000 + "H10O2: C, 70.00; H, 6.00. "
                    "Found: C, 70.01; H, 6.02.\n", encoding="utf-8")  # fmt: skip
    done = _run("check", str(path), cwd=tmp_path)
    assert "Traceback" not in done.stderr and done.returncode in (0, 1), done.stderr


def test_a_formula_count_longer_than_the_bound_is_a_formula_error():
    import pytest

    from peakproof.formula import MAX_COUNT_DIGITS, FormulaError, parse_formula

    with pytest.raises(FormulaError, match="digits"):
        parse_formula("C" + "1" * (MAX_COUNT_DIGITS + 1) + "H4")
    assert parse_formula("C" + "9" * MAX_COUNT_DIGITS).counts["C"] == 999999


def test_latex_nested_thousands_of_groups_deep_is_refused_in_words(tmp_path):
    path = tmp_path / "deep.tex"
    path.write_text("{" * 5000 + BLOCK + "}" * 5000 + "\n", encoding="utf-8")
    done = _run("check", str(path), cwd=tmp_path)
    assert "Traceback" not in done.stderr
    assert done.returncode == 2 and "nests groups more than" in done.stderr, done.stderr


def test_latex_nested_a_little_still_reads(tmp_path):
    path = tmp_path / "ok.tex"
    path.write_text("{" * 20 + BLOCK + "}" * 20 + "\n", encoding="utf-8")
    done = _run("parse", str(path), cwd=tmp_path)
    assert done.returncode == 0 and "1H NMR, 400 MHz, CDCl3: 1 signal(s)" in done.stdout, done.stderr


def test_a_bug_in_the_formula_search_is_one_internal_error_at_its_block(tmp_path, monkeypatch, capsys):
    import peakproof.checker as checker

    def broken(*args, **kwargs):
        raise ValueError("deliberate")

    monkeypatch.setattr(checker, "block_formula", broken)
    path = tmp_path / "si.txt"
    path.write_text(BLOCK + "\n", encoding="utf-8")
    assert main(["check", str(path)]) == EXIT_INTERNAL
    out = capsys.readouterr().out
    assert "internal-error" in out and "si.txt:1:" in out and "deliberate" in out


def test_a_bug_anywhere_in_a_command_is_a_line_and_exit_4_not_a_traceback(tmp_path, monkeypatch, capsys):
    import peakproof.api as api

    def broken(*args, **kwargs):
        raise RuntimeError("deliberate")

    monkeypatch.setattr(api, "parse_path", broken)
    path = tmp_path / "si.txt"
    path.write_text(BLOCK + "\n", encoding="utf-8")
    assert main(["check", str(path)]) == EXIT_INTERNAL == 4
    err = capsys.readouterr().err
    assert "internal-error: RuntimeError: deliberate" in err and "Traceback" not in err


def test_unreadable_analysis_formula_is_a_finding_not_silence():
    """A 5000-digit count is refused by the formula reader; the check says the analysis went
    unchecked instead of passing it in silence."""
    import peakproof

    text = "Anal. Calcd for C" + "1" * 5000 + "H10O2: C, 70.1; H, 6.2. Found: C, 70.0; H, 6.3."
    [d] = [d for d in peakproof.check(text).diagnostics if d.rule == "formula-unreadable"]
    assert d.severity == "warning" and "5000 digits" in d.message and "\n" not in d.message
    assert len(d.message) < 300
