"""Batch runs through the real commands: folders, globs, --jobs, JSON Lines, unreadable files."""

import json
import shutil
from pathlib import Path

from peakproof.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
CLEAN = "1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H).\n"
FAULTY = "1H NMR (400 MHz, CDCl3) δ 7.26 (dd, J = 8.0 Hz, 1H).\n"  # dd with one J: an error


def _corpus(tmp_path):
    folder = tmp_path / "si"
    (folder / "sub").mkdir(parents=True)
    (folder / "a.txt").write_text(CLEAN, encoding="utf-8")
    (folder / "sub" / "b.md").write_text(FAULTY, encoding="utf-8")
    shutil.copy(EXAMPLES / "demo_si.docx", folder / "demo.docx")
    return folder


def test_folder_with_jobs_reports_every_file_and_a_summary(tmp_path, capsys):
    """A folder is walked recursively in two processes; findings name file and place; exit 1."""
    folder = _corpus(tmp_path)
    assert 1 == main(["check", str(folder), "--jobs", "2", "--no-progress"])
    out, err = capsys.readouterr()
    assert f"{folder / 'sub' / 'b.md'}:1:" in out and "multiplicity-j-count" in out
    assert "paragraph" in out  # Word findings point at paragraph and run
    assert "files      3 (3 read, 0 unreadable)" in err


def test_unreadable_file_is_reported_and_the_run_goes_on(tmp_path, capsys):
    """A broken file costs only itself: the others are checked, the exit code says 2."""
    folder = _corpus(tmp_path)
    (folder / "broken.docx").write_bytes(b"PK\x03\x04 not really a zip")
    assert 2 == main(["check", str(folder), "--no-progress"])
    out, err = capsys.readouterr()
    assert "multiplicity-j-count" in out
    assert "broken.docx" in err


def test_jsonl_stream_has_one_record_per_file(tmp_path, capsys):
    """--jsonl - streams one JSON object per file to stdout."""
    folder = _corpus(tmp_path)
    main(["check", str(folder), "--jsonl", "-", "--no-progress"])
    lines = [json.loads(line) for line in capsys.readouterr().out.splitlines() if line.strip()]
    assert {Path(r["file"]).name for r in lines} == {"a.txt", "b.md", "demo.docx"}
    b = next(r for r in lines if r["file"].endswith("b.md"))
    assert ["multiplicity-j-count"] == [f["rule"] for f in b["findings"] if f["severity"] == "error"]


def test_glob_and_export_stream(tmp_path, capsys):
    """A glob selects files; export --to jsonl streams one record per signal with its file."""
    folder = _corpus(tmp_path)
    assert 0 == main(["export", str(folder / "*.txt"), "--to", "jsonl", "--no-progress"])
    rows = [json.loads(line) for line in capsys.readouterr().out.splitlines()]
    assert [(Path(r["file"]).name, r["shift"]) for r in rows] == [("a.txt", 7.26)]


def test_json_format_over_a_folder_gathers_all_files(tmp_path, capsys):
    """--format json with a folder expands it and prints one document per file."""
    folder = _corpus(tmp_path)
    main(["check", str(folder), "--format", "json"])
    payload = json.loads(capsys.readouterr().out)
    assert 3 == len(payload["documents"])
