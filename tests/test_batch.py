"""Batch runs: input expansion, ordered bounded parallel runs, workers, JSON Lines, summary."""

from __future__ import annotations

import io
import json
import os
import shutil
import time
from pathlib import Path

import pytest

from peakproof.batch import (
    BatchSummary,
    InputProblem,
    JsonLinesWriter,
    ProgressBar,
    check_worker,
    expand_inputs,
    export_worker,
    run_batch,
    run_files,
)

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
DEMO = EXAMPLES / "demo_si.txt"


# Workers must be module-level functions so the process pool can send them by name.
def echo_worker(path: str) -> dict:
    # Later files finish first, so completion order differs from input order.
    time.sleep(0.02 * (5 - int(Path(path).stem) % 5))
    return {"file": path, "pid": os.getpid()}


def raising_worker(path: str) -> dict:
    if path.endswith("bad"):
        raise RuntimeError("boom")
    return {"file": path}


def dying_worker(path: str) -> dict:
    if path.endswith("die"):
        os._exit(3)  # the process vanishes, as when the kernel kills it for memory
    return {"file": path}


def touch(path: Path, text: str = "x") -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


# -------------------------------------------------------------------------------- inputs


@pytest.fixture
def tree(tmp_path):
    for rel in ["b.md", "a.txt", "sub/c.docx", "sub/deeper/d.pdf", "sub/e.tex", "notes.xlsx",
                ".hidden.txt", "~$lock.docx", ".git/f.txt", "sub/g.TXT"]:  # fmt: skip
        touch(tmp_path / rel)
    return tmp_path


def rel(paths, root) -> list[str]:
    return [os.path.relpath(p, root).replace(os.sep, "/") for p in paths]


def test_folder_gives_known_extensions_sorted_recursive(tree):
    files, problems = expand_inputs([str(tree)])
    assert rel(files, tree) == ["a.txt", "b.md", "sub/c.docx", "sub/deeper/d.pdf", "sub/e.tex",
                                "sub/g.TXT"]  # fmt: skip
    assert problems == []


def test_folder_without_recursion(tree):
    files, _ = expand_inputs([str(tree)], recursive=False)
    assert rel(files, tree) == ["a.txt", "b.md"]


def test_globs_inputs_order_and_duplicates(tree):
    files, problems = expand_inputs([str(tree / "sub/**/*.pdf"), str(tree / "*.md"),
                                     str(tree / "b.md"), str(tree / "sub")])  # fmt: skip
    # inputs in the order given, a file reached twice listed once
    assert rel(files, tree) == ["sub/deeper/d.pdf", "b.md", "sub/c.docx", "sub/e.tex", "sub/g.TXT"]
    assert problems == []


def test_explicit_file_with_any_extension_is_kept(tree):
    files, _ = expand_inputs([str(tree / "notes.xlsx")])
    assert rel(files, tree) == ["notes.xlsx"]  # the reader gives the clear message later


def test_missing_inputs_are_problems_not_errors(tree):
    inputs = [str(tree / "nope.txt"), str(tree / "*.zzz"), str(tree / "a.txt")]
    files, problems = expand_inputs(inputs)
    assert rel(files, tree) == ["a.txt"]
    messages = [p.message for p in problems]
    assert messages == ["no such file or folder", "no file matches this pattern"]


def test_empty_folder_is_reported(tmp_path):
    (tmp_path / "empty").mkdir()
    files, problems = expand_inputs([str(tmp_path / "empty")])
    assert files == [] and len(problems) == 1 and "holds no" in problems[0].message


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0, reason="root can read anything")
def test_unreadable_file_is_a_problem(tmp_path):
    secret = touch(tmp_path / "secret.txt")
    secret.chmod(0)
    try:
        files, problems = expand_inputs([str(tmp_path)])
    finally:
        secret.chmod(0o644)
    assert files == [] and "permission denied" in problems[0].message


# -------------------------------------------------------------------------------- running


@pytest.mark.parametrize("jobs", [1, 2, 3])
def test_results_come_in_input_order(jobs):
    names = [f"/virtual/{i}" for i in range(12)]
    results = list(run_batch(names, echo_worker, jobs=jobs))
    assert [r["file"] for r in results] == names
    if jobs > 1:
        assert len({r["pid"] for r in results}) > 1, "work was not spread over processes"
        assert os.getpid() not in {r["pid"] for r in results}


def test_in_flight_work_is_bounded():
    pulled = 0

    def files():
        nonlocal pulled
        for i in range(40):
            pulled += 1
            yield f"/virtual/{i}"

    yielded = 0
    for _ in run_batch(files(), echo_worker, jobs=2, window=3):
        yielded += 1
        # at most the window of files has been taken from the input beyond those yielded
        assert pulled - yielded <= 3
    assert yielded == 40


@pytest.mark.parametrize("jobs", [1, 2])
def test_worker_exception_is_reported_and_the_run_goes_on(jobs):
    results = list(run_batch(["a", "bad", "c"], raising_worker, jobs=jobs))
    assert [r["file"] for r in results] == ["a", "bad", "c"]
    assert "error" not in results[0] and "error" not in results[2]
    assert "RuntimeError: boom" in results[1]["error"]


def test_dead_worker_process_is_reported_and_the_run_goes_on():
    names = ["a", "b", "die", "d", "e", "f"]
    results = list(run_batch(names, dying_worker, jobs=2))
    assert [r["file"] for r in results] == names
    errors = {r["file"]: r["error"] for r in results if "error" in r}
    assert list(errors) == ["die"] and "worker process died" in errors["die"]


def test_progress_advances_once_per_file():
    bar = ProgressBar(5, stream=io.StringIO(), enabled=False)
    list(run_batch([f"/virtual/{i}" for i in range(5)], echo_worker, jobs=2, progress=bar))
    assert bar.done == 5


# -------------------------------------------------------------------------------- workers


@pytest.fixture(scope="module")
def demo_check():
    return check_worker(str(DEMO))


def test_check_worker_counts_and_compound_prefix(demo_check):
    assert demo_check["format"] == "txt"
    assert demo_check["blocks"] == 14 and demo_check["compounds"] == 14  # demo_si.txt: 14 compounds
    json.dumps(demo_check)  # plain data only
    # planted_errors.toml: compound 2 has a 125 MHz 13C beside a 400 MHz 1H spectrum
    freq = [f for f in demo_check["findings"] if f["compound"] == "2" and "frequency" in f["rule"]]
    assert freq, [f["rule"] for f in demo_check["findings"]]
    assert freq[0]["message"].startswith("compound 2: ")
    text_line = DEMO.read_text(encoding="utf-8").splitlines()[freq[0]["line"] - 1]
    assert "125 MHz" in text_line
    assert freq[0]["where"] == f"line {freq[0]['line']}, column {freq[0]['column']}"


def test_check_worker_points_into_word_paragraphs():
    record = check_worker(str(EXAMPLES / "demo_si.docx"))
    freq = next(f for f in record["findings"] if f["compound"] == "2" and "frequency" in f["rule"])
    import docx

    paragraphs = docx.Document(str(EXAMPLES / "demo_si.docx")).paragraphs
    number = freq["location"]["paragraph"]
    assert "(125 MHz" in paragraphs[number - 1].text
    assert freq["where"].startswith(f"paragraph {number}")


def test_check_worker_reports_unreadable_file(tmp_path):
    bad = tmp_path / "broken.docx"
    bad.write_bytes(b"PK\x03\x04 this is not really a zip")
    record = check_worker(str(bad))
    assert set(record) == {"file", "error"} and "damaged" in record["error"]


def test_export_worker_records_per_spectrum_and_signal():
    spectra = export_worker(str(DEMO))
    # demo_si.txt: 14 blocks, each 1H and 13C, and 19F for 1a and 1b
    assert len(spectra["records"]) == 14 * 2 + 2
    assert spectra["records"][0]["compound"] == "1a" and spectra["records"][0]["nucleus"] == "1H"
    signals = export_worker(str(DEMO), per="signal")
    first = signals["records"][0]
    assert first["shift"] == 7.97
    assert first["where"] == f"line {first['line']}, column {first['column']}"
    assert len(signals["records"]) == sum(r["signal_count"] for r in spectra["records"])


# -------------------------------------------------------------------------------- output


class CountingStream(io.StringIO):
    def __init__(self):
        super().__init__()
        self.flushes = 0

    def flush(self):
        self.flushes += 1
        super().flush()


def test_jsonl_per_file_flushes_each_record():
    stream = CountingStream()
    writer = JsonLinesWriter(stream)
    writer.write({"file": "a", "findings": [{"rule": "r1"}, {"rule": "r2"}]})
    assert stream.flushes == 1
    writer.write({"file": "b", "error": "cannot read"})
    lines = [json.loads(line) for line in stream.getvalue().splitlines()]
    assert lines == [{"file": "a", "findings": [{"rule": "r1"}, {"rule": "r2"}]},
                     {"file": "b", "error": "cannot read"}]  # fmt: skip
    assert stream.flushes == 2


def test_jsonl_per_finding():
    stream = io.StringIO()
    writer = JsonLinesWriter(stream, per="finding")
    writer.write({"file": "a", "findings": [{"rule": "r1"}, {"rule": "r2"}]})
    writer.write({"file": "b", "error": "cannot read"})
    writer.write({"file": "c", "records": [{"nucleus": "1H"}]})
    lines = [json.loads(line) for line in stream.getvalue().splitlines()]
    assert lines == [{"file": "a", "rule": "r1"}, {"file": "a", "rule": "r2"},
                     {"file": "b", "error": "cannot read"},
                     {"file": "c", "nucleus": "1H"}]  # fmt: skip
    with pytest.raises(ValueError):
        JsonLinesWriter(stream, per="block")


def test_progress_bar_is_silent_off_a_terminal():
    stream = io.StringIO()  # isatty() is False
    with ProgressBar(3, stream=stream) as bar:
        for name in "abc":
            bar.advance(name)
    assert stream.getvalue() == "" and bar.done == 3


def test_progress_bar_draws_on_a_terminal_and_clears():
    class Terminal(io.StringIO):
        def isatty(self):
            return True

    stream = Terminal()
    with ProgressBar(4, stream=stream) as bar:
        bar.advance("first.docx")
        drawn = stream.getvalue()
        assert drawn.startswith("\r") and "1/4 files" in drawn and "first.docx" in drawn
        bar.advance("x")  # within 0.1 s of the last draw: not redrawn
        assert stream.getvalue() == drawn
        bar.advance("x", n=2)  # the last file is always drawn
        assert "4/4 files" in stream.getvalue()
    assert stream.getvalue().endswith("\r\x1b[K")


def test_summary_table():
    summary = BatchSummary(unreadable=[InputProblem("gone.txt", "no such file or folder")])
    summary.add({"file": "a.txt", "blocks": 3, "compounds": 2,
                 "findings": [{"rule": "hrms-calcd", "severity": "error"},
                              {"rule": "j-order", "severity": "note"},
                              {"rule": "hrms-calcd", "severity": "error"}]})  # fmt: skip
    locked = "b.docx: the document is password-protected. Remove it."
    summary.add({"file": "b.docx", "error": locked})
    table = summary.table()
    assert "files      3 (1 read, 2 unreadable)" in table
    assert "compounds  2 (3 data blocks)" in table
    assert "findings   2 errors, 0 warnings, 1 note" in table
    rows = [line.split() for line in table.splitlines() if line.startswith(("  hrms", "  j-"))]
    assert rows == [["hrms-calcd", "error", "2"], ["j-order", "note", "1"]]
    assert "  b.docx: the document is password-protected. Remove it." in table
    assert summary.to_json()["by_severity"] == {"error": 2, "warning": 0, "note": 1}


def test_summary_keeps_a_bounded_list_of_unreadable_files():
    summary = BatchSummary(max_listed=3)
    for i in range(10):
        summary.add({"file": f"{i}.pdf", "error": "damaged"})
    assert summary.unreadable_count == 10 and len(summary.unreadable) == 3
    assert "… and 7 more" in summary.table()


def test_run_files_end_to_end(tmp_path):
    for ext in ("txt", "md", "docx"):
        shutil.copy(EXAMPLES / f"demo_si.{ext}", tmp_path / f"demo.{ext}")
    (tmp_path / "garbage.pdf").write_bytes(os.urandom(2048))
    out, err = io.StringIO(), io.StringIO()
    seen = []
    summary = run_files([str(tmp_path), str(tmp_path / "missing.md")], check_worker, jobs=2,
                        jsonl=out, on_record=seen.append, summary_stream=err)  # fmt: skip
    records = [json.loads(line) for line in out.getvalue().splitlines()]
    assert [Path(r["file"]).name for r in records] == ["missing.md", "demo.docx", "demo.md",
                                                       "demo.txt", "garbage.pdf"]  # fmt: skip
    assert "error" in records[-1] and "error" in records[0]
    # the same document in three formats gives the same findings
    by_format = [[(f["rule"], f["compound"]) for f in r["findings"]] for r in records[1:4]]
    assert by_format[0] == by_format[1] == by_format[2] and by_format[0]
    assert len(seen) == 4 and summary.read == 3 and summary.unreadable_count == 2
    assert summary.compounds == 3 * 14
    assert "unreadable (2):" in err.getvalue()
