"""Batch runs: broken symlinks named for what they are; workers do not outlive a killed parent."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import peakproof
from peakproof.batch import expand_inputs

BLOCK = "Ester {n}. 1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).\n"


def test_a_dangling_symlink_is_reported_as_dangling(tmp_path):
    (tmp_path / "gone.txt").symlink_to(tmp_path / "missing.txt")
    files, problems = expand_inputs([str(tmp_path)])
    assert files == []
    text = " ".join(str(p.to_json()) for p in problems)
    assert "dangling symlink" in text and "permission denied" not in text


def test_a_symlink_loop_is_reported_as_a_loop(tmp_path):
    (tmp_path / "a.txt").symlink_to(tmp_path / "b.txt")
    (tmp_path / "b.txt").symlink_to(tmp_path / "a.txt")
    files, problems = expand_inputs([str(tmp_path / "a.txt")])
    assert files == []
    text = " ".join(str(p.to_json()) for p in problems)
    assert "symlink loop" in text and "permission denied" not in text


def _children(pid: int) -> list[int]:
    found = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                stat = Path(f"/proc/{entry}/stat").read_text()
            except OSError:
                continue
            if int(stat.rsplit(")", 1)[1].split()[1]) == pid:
                found.append(int(entry))
    return found


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


def test_workers_end_when_the_batch_is_killed(tmp_path):
    folder = tmp_path / "si"
    folder.mkdir()
    for n in range(400):
        (folder / f"c{n:03}.txt").write_text(BLOCK.format(n=n) * 40, encoding="utf-8")
    env = dict(os.environ, PYTHONPATH=str(Path(peakproof.__file__).parents[1]))
    proc = subprocess.Popen([sys.executable, "-m", "peakproof", "check", str(folder), "--jobs", "2",
                             "--no-progress"], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                            env=env)  # fmt: skip
    try:
        workers: list[int] = []
        deadline = time.monotonic() + 60
        while len(workers) < 2 and time.monotonic() < deadline and proc.poll() is None:
            time.sleep(0.1)
            workers = [c for c in _children(proc.pid) if _alive(c)]
        assert len(workers) >= 2, "the batch never started two workers"
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=10)
        deadline = time.monotonic() + 15
        while any(_alive(w) for w in workers) and time.monotonic() < deadline:
            time.sleep(0.1)
        left = [w for w in workers if _alive(w)]
        for w in left:  # do not leave them behind even when the test fails
            os.kill(w, signal.SIGKILL)
        assert not left, f"workers {left} outlived their killed parent"
    finally:
        if proc.poll() is None:
            proc.kill()
