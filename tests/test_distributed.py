"""Corpus runs on a real Dask LocalCluster, compared file by file with the local pool."""

import json
import os
import sys

import pytest

pytest.importorskip("distributed")
sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "benchmarks"))

from generate import document

from peakproof.distributed import run_corpus


def _corpus(tmp_path, n=12):
    folder = tmp_path / "corpus"
    folder.mkdir()
    for i in range(n):
        (folder / f"si_{i:03d}.txt").write_text(document(3, seed=i), encoding="utf-8")
    (folder / "broken.docx").write_bytes(b"not a zip at all")  # a bad file: a record, not a failure
    return sorted(str(p) for p in folder.iterdir())


def _records(out):
    with open(os.path.join(out, "files.jsonl"), encoding="utf-8") as fh:
        return [json.loads(line) for line in fh]


def test_local_cluster_equals_local_pool_and_resume_skips_done(tmp_path):
    files = _corpus(tmp_path)
    local = tmp_path / "local"
    run_corpus(files, str(local), engine="local", jobs=2, batch_size=5)
    dask_out = tmp_path / "dask"
    summary = run_corpus(files, str(dask_out), engine="dask", workers=2, batch_size=5)
    assert summary["dashboard"]
    assert _records(dask_out) == _records(local)
    assert [r["file"] for r in _records(local)] == files
    assert sum("error" in r for r in _records(local)) == 1
    assert summary["failures"] == 1
    # Resume: drop one finished part as if the run had stopped there; only that batch is redone.
    parts = sorted(os.listdir(dask_out / "parts"))
    os.remove(dask_out / "parts" / parts[0])
    again = run_corpus(files, str(dask_out), engine="local", jobs=1, batch_size=5)
    assert again["skipped"] == again["batches"] - 1
    assert _records(dask_out) == _records(local)


def test_dask_scheduler_and_worker_processes_on_loopback(tmp_path):
    import subprocess
    import time

    files = _corpus(tmp_path, n=6)
    local = tmp_path / "local"
    run_corpus(files, str(local), engine="local", jobs=1, batch_size=4)
    bindir = os.path.dirname(sys.executable)
    dask = os.path.join(bindir, "dask")
    sched_file = tmp_path / "scheduler.json"
    env = {**os.environ, "PYTHONPATH": os.pathsep.join(sys.path)}
    sched = subprocess.Popen([dask, "scheduler", "--host", "127.0.0.1", "--port", "0",
                              "--dashboard-address", ":0", "--scheduler-file", str(sched_file)],
                             env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)  # fmt: skip
    worker = None
    try:
        for _ in range(200):
            if sched_file.exists() and sched_file.stat().st_size:
                break
            time.sleep(0.1)
        address = json.loads(sched_file.read_text())["address"]
        worker = subprocess.Popen([dask, "worker", address, "--nworkers", "1", "--nthreads", "1",
                                   "--host", "127.0.0.1"], env=env,
                                  stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)  # fmt: skip
        out = tmp_path / "remote"
        run_corpus(files, str(out), engine="dask", scheduler=address, batch_size=4)
        assert _records(out) == _records(local)
    finally:
        for proc in (worker, sched):
            if proc is not None:
                proc.terminate()
                proc.wait(timeout=30)
