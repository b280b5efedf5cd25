"""``peakproof format`` / ``styles`` through the real entry point: exit codes, --check, --diff."""

from __future__ import annotations

import os
import subprocess
import sys

import pytest

from peakproof.cli import main

MESSY = "Ester 3a. 1H NMR (400 MHz, CDCl3) δ 1.25 (t, J=7.1Hz, 3H), 4.12 (q, J = 7.1 Hz, 2H).\n\nProse stays.\n"
CLEAN = "Ester 3a. 1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).\n\nProse stays.\n"


@pytest.fixture
def messy(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # no pyproject.toml style above
    path = tmp_path / "si.txt"
    path.write_text(MESSY, encoding="utf-8")
    return path


def test_check_exits_1_and_writes_nothing(messy, capsys):
    assert main(["format", "--check", str(messy)]) == 1
    assert messy.read_text(encoding="utf-8") == MESSY
    assert f"{messy.name}: not in style yet" in capsys.readouterr().err


def test_diff_prints_a_unified_diff_and_writes_nothing(messy, capsys):
    assert main(["format", "--diff", str(messy)]) == 0
    out = capsys.readouterr().out
    assert out.startswith("---") and "\n-Ester 3a. 1H NMR" in out and "\n+" + CLEAN.splitlines()[0] in out
    assert messy.read_text(encoding="utf-8") == MESSY


def test_in_place_then_check_is_clean(messy, capsys):
    assert main(["format", str(messy)]) == 0
    assert messy.read_text(encoding="utf-8") == CLEAN
    assert not [p for p in os.listdir(messy.parent) if p.startswith(".peakproof-")]  # no temp left
    err = capsys.readouterr().err
    assert "listed the 1H signals descending" in err and f"{messy.name}: restyled" in err
    assert main(["format", "--check", str(messy)]) == 0


def test_crlf_and_bom_are_kept(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    path = tmp_path / "si.txt"
    path.write_bytes(b"\xef\xbb\xbf" + MESSY.replace("\n", "\r\n").encode("utf-8"))
    assert main(["format", "-q", str(path)]) == 0
    assert path.read_bytes() == b"\xef\xbb\xbf" + CLEAN.replace("\n", "\r\n").encode("utf-8")


def test_usage_errors_exit_2(messy, capsys):
    assert main(["format", "--style", "nope", str(messy)]) == 2
    assert "unknown style" in capsys.readouterr().err
    assert main(["format", str(messy.parent / "missing.txt")]) == 2
    assert "no such file" in capsys.readouterr().err


def test_unproven_rewrite_exits_3_and_writes_nothing(messy, monkeypatch, capsys):
    import peakproof.emit as emit

    # A deliberately broken emitter (every multiplicity becomes m): the safety check must
    # refuse to write.
    monkeypatch.setattr(emit.Emitter, "multiplicity_text", lambda self, mult: "m")
    assert main(["format", str(messy)]) == 3
    assert messy.read_text(encoding="utf-8") == MESSY
    err = capsys.readouterr().err
    assert "rewrite not proven" in err and "nothing was written" in err and "output data" in err


def test_fix_applies_checker_suggestions_and_lists_them(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    path = tmp_path / "si.txt"
    # dd with two equal J: the checker suggests t (trade guide: apparent pattern of a dd
    # with near-equal J is written t).
    path.write_text("1H NMR (400 MHz, CDCl3) δ 7.10 (dd, J = 7.5, 7.5 Hz, 1H).\n", encoding="utf-8")
    code = main(["format", "--fix", str(path)])
    err = capsys.readouterr().err
    assert code == 0, err
    assert "fixed:" in err
    assert "(dd" not in path.read_text(encoding="utf-8")


def test_fix_without_checker_says_so(messy, monkeypatch, capsys):
    monkeypatch.setitem(sys.modules, "peakproof.checker", None)  # import fails
    assert main(["format", "--fix", str(messy)]) == 2
    assert "--fix needs the checker" in capsys.readouterr().err


def test_style_file_and_styles_listing(messy, tmp_path, capsys):
    style = tmp_path / "mine.toml"
    style.write_text('extends = "count-first"\nname = "mine"\n', encoding="utf-8")
    assert main(["styles", "--style-file", str(style)]) == 0
    out = capsys.readouterr().out
    for name in ("letters-first", "count-first", "ascending-bare-j", "subscript-delta",
                 "equation-delta", "mine"):
        assert f"{name}:" in out
    assert main(["format", "-q", "--style-file", str(style), str(messy)]) == 0
    assert "(3H, t, J = 7.1 Hz)" in messy.read_text(encoding="utf-8")


def test_stdin_to_stdout_in_a_subprocess(tmp_path):
    env = {**os.environ, "PYTHONIOENCODING": "utf-8"}
    done = subprocess.run([sys.executable, "-m", "peakproof", "format", "-", "-q"],
                          input=MESSY.encode("utf-8"), capture_output=True, env=env,
                          cwd=tmp_path, timeout=120)  # fmt: skip
    assert done.returncode == 0, done.stderr.decode()
    assert done.stdout.decode("utf-8") == CLEAN
    check = subprocess.run([sys.executable, "-m", "peakproof", "format", "--check", "-"],
                           input=MESSY.encode("utf-8"), capture_output=True, env=env,
                           cwd=tmp_path, timeout=120)  # fmt: skip
    assert check.returncode == 1


def test_docx_is_rewritten_as_docx(tmp_path, monkeypatch):
    docx = pytest.importorskip("docx")
    monkeypatch.chdir(tmp_path)
    document = docx.Document()
    document.add_paragraph("Methyl ester 3a (Halvorsen group).")
    para = document.add_paragraph()
    para.add_run("1H NMR (400 MHz, CDCl3) δ 3.80 (s, 3H), 7.31 (d, J=8.4Hz, 2H).")
    path = tmp_path / "si.docx"
    document.save(path)
    assert main(["format", "-q", str(path)]) == 0
    from peakproof.readers import read_document

    text = read_document(str(path)).text
    assert "7.31 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H)" in text
    assert "Methyl ester 3a (Halvorsen group)." in text
