"""``peakproof parse`` through the real entry point."""

import json
import subprocess
import sys
from importlib import resources

import jsonschema

from peakproof.cli import main

BLOCK = "1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H); HRMS (ESI) m/z [M+H]+ calcd for C8H11O 123.0804, found 123.0801.\n"


def schema():
    return json.loads(resources.files("peakproof").joinpath("schema/parse.schema.json").read_text())


def test_summary_names_what_was_read(tmp_path, capsys):
    """The default output lists each spectrum with its signal count."""
    path = tmp_path / "si.txt"
    path.write_text(BLOCK, encoding="utf-8")
    assert 0 == main(["parse", str(path)])
    out = capsys.readouterr().out
    assert "1 data block(s)" in out
    assert "1H NMR, 400 MHz, CDCl3: 2 signal(s)" in out


def test_json_output_validates(tmp_path, capsys):
    """--format json prints the published shape."""
    path = tmp_path / "si.txt"
    path.write_text(BLOCK, encoding="utf-8")
    assert 0 == main(["parse", str(path), "--format", "json"])
    payload = json.loads(capsys.readouterr().out)
    jsonschema.validate(payload, schema())
    assert [7.26, 3.8] == [s["shift"] for s in payload["blocks"][0]["spectra"][0]["signals"]]


def test_missing_file_is_one_line_and_exit_2(tmp_path, capsys):
    """An unreadable input gives a message for people and exit code 2, never a traceback."""
    assert 2 == main(["parse", str(tmp_path / "nope.txt")])
    err = capsys.readouterr().err
    assert "no such file" in err
    assert "Traceback" not in err
    assert 1 == len(err.strip().splitlines())


def test_syntax_error_is_shown_with_caret(tmp_path, capsys):
    """A damaged signal is reported at its line and column with the excerpt and a caret."""
    path = tmp_path / "si.txt"
    path.write_text("Intro.\n\n1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H, 3.80 (s, 3H).\n", encoding="utf-8")
    assert 0 == main(["parse", str(path)])
    out = capsys.readouterr().out
    line = next(l for l in out.splitlines() if " error syntax " in l)
    assert line.startswith(f"{path}:3:32: error syntax")  # the "(" left open
    assert "^" in out and "hint:" in out


def test_stdin_through_a_subprocess():
    """'-' reads standard input; the console entry point works as a module."""
    proc = subprocess.run([sys.executable, "-m", "peakproof", "parse", "-", "--format", "json"],
                          input=BLOCK.encode(), capture_output=True, timeout=60)
    assert 0 == proc.returncode, proc.stderr.decode()
    assert 1 == len(json.loads(proc.stdout)["blocks"])


def test_unknown_command_is_a_usage_error(capsys):
    """An unknown command exits 2 with argparse's message."""
    assert 2 == main(["frobnicate"])
