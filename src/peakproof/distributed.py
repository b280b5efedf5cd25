"""Corpus checks on Dask: batched tasks, part files written by the workers, a resumable manifest.

``run_corpus(files, out_dir, engine="local"|"dask", scheduler=None)`` checks every file and
leaves in ``out_dir``:

- ``parts/<batch-key>.jsonl`` — one JSON object per file, written by the worker that checked
  the batch, atomically (temporary name, then ``os.replace``), so a part is whole or absent;
- ``manifest.jsonl`` — one line per finished batch: its key, which is a hash of the files'
  contents and the settings, so a re-run skips exactly the batches already done;
- ``files.jsonl`` — the assembled result, one record per file, each file exactly once
  (deduplicated by path when a killed worker's batch was run again), in input order.

Only file names and small batch summaries pass through the scheduler.  ``dask`` and
``distributed`` are imported inside the functions that need them.
"""

from __future__ import annotations

import hashlib
import json
import os
from collections.abc import Callable, Iterable
from functools import partial
from typing import Any

#: Files per Dask task: keeps scheduler overhead small against the per-file work.
BATCH_SIZE = 50


def _file_hash(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def batch_key(paths: list[str], settings: str) -> str:
    """Hash of the batch's paths, their contents and the settings text."""
    h = hashlib.sha256(settings.encode())
    for p in paths:
        h.update(p.encode() + b"\0")
        try:
            h.update(_file_hash(p).encode())
        except OSError:
            h.update(b"unreadable")
    return h.hexdigest()[:32]


def run_batch_to_part(paths: list[str], key: str, out_dir: str, worker: Callable[[str], dict]) -> dict:
    """Check ``paths`` and write their records to ``parts/<key>.jsonl`` atomically.

    Returns only counts (files, failures), so nothing large reaches the scheduler."""
    from .batch import _safe_call

    parts = os.path.join(out_dir, "parts")
    os.makedirs(parts, exist_ok=True)
    final = os.path.join(parts, key + ".jsonl")
    tmp = f"{final}.{os.getpid()}.tmp"
    failures = 0
    with open(tmp, "w", encoding="utf-8") as fh:
        for path in paths:
            record = _safe_call(worker, path)
            failures += "error" in record
            fh.write(json.dumps(record, ensure_ascii=False) + "\n")
        fh.flush()
        os.fsync(fh.fileno())
    os.replace(tmp, final)
    return {"key": key, "files": len(paths), "failures": failures}


def _done_keys(out_dir: str) -> set[str]:
    path = os.path.join(out_dir, "manifest.jsonl")
    keys: set[str] = set()
    if os.path.exists(path):
        with open(path, encoding="utf-8") as fh:
            for line in fh:
                try:
                    keys.add(json.loads(line)["key"])
                except (ValueError, KeyError):
                    continue  # a line cut short by an interruption: that batch is redone
    return {k for k in keys if os.path.exists(os.path.join(out_dir, "parts", k + ".jsonl"))}


def run_corpus(files: Iterable[str], out_dir: str, *, worker: Callable[[str], dict] | None = None,
               settings: str = "", engine: str = "local", scheduler: str | None = None,
               workers: int = 2, jobs: int = 2, batch_size: int = BATCH_SIZE,
               on_progress: Callable[[dict], None] | None = None) -> dict[str, Any]:
    """Check ``files`` into ``out_dir`` (see the module docstring); returns a small summary.

    ``engine="local"`` uses a local process pool with ``jobs`` processes; ``engine="dask"``
    connects to ``scheduler`` (an address) or, without one, starts a ``LocalCluster`` with
    ``workers`` processes for the run.  Batches already in the manifest are skipped."""
    from .batch import check_worker

    worker = worker or check_worker
    files = list(files)
    os.makedirs(out_dir, exist_ok=True)
    batches = [files[i:i + batch_size] for i in range(0, len(files), batch_size)]
    keyed = [(batch_key(b, settings), b) for b in batches]
    done = _done_keys(out_dir)
    todo = [(k, b) for k, b in keyed if k not in done]
    summary = {"files": len(files), "batches": len(keyed), "skipped": len(keyed) - len(todo),
               "failures": 0, "dashboard": None}
    manifest = open(os.path.join(out_dir, "manifest.jsonl"), "a", encoding="utf-8")  # noqa: SIM115  (closed in finally; a callback writes it)
    try:
        def finished(result: dict) -> None:
            manifest.write(json.dumps({"key": result["key"], "files": result["files"]}) + "\n")
            manifest.flush()
            summary["failures"] += result["failures"]
            if on_progress is not None:
                on_progress(result)

        if engine == "dask":
            _run_dask(todo, out_dir, worker, scheduler, workers, summary, finished)
        elif engine == "local":
            from concurrent.futures import ProcessPoolExecutor

            with ProcessPoolExecutor(max_workers=max(1, jobs)) as pool:
                futures = [pool.submit(run_batch_to_part, b, k, out_dir, worker) for k, b in todo]
                for f in futures:
                    finished(f.result())
        else:
            raise ValueError(f"engine must be 'local' or 'dask', not {engine!r}")
    finally:
        manifest.close()
    summary["records"] = assemble(out_dir, [k for k, _ in keyed], files)
    return summary


def _run_dask(todo, out_dir, worker, scheduler, workers, summary, finished) -> None:
    from distributed import Client, LocalCluster, as_completed

    cluster = None
    if scheduler is None:
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                               dashboard_address=":0")
        client = Client(cluster)
    else:
        client = Client(scheduler)
    try:
        summary["dashboard"] = client.dashboard_link
        task = partial(run_batch_to_part, out_dir=out_dir, worker=worker)
        futures = [client.submit(task, b, k, key=f"peakproof-batch-{k}", retries=3) for k, b in todo]
        for future in as_completed(futures):
            finished(future.result())
    finally:
        client.close()
        if cluster is not None:
            cluster.close()


def assemble(out_dir: str, keys: list[str], files: list[str]) -> int:
    """Write ``files.jsonl`` from the parts of ``keys``: each file once, in input order."""
    by_file: dict[str, str] = {}
    for key in keys:
        with open(os.path.join(out_dir, "parts", key + ".jsonl"), encoding="utf-8") as fh:
            for line in fh:
                by_file.setdefault(json.loads(line)["file"], line)
    tmp = os.path.join(out_dir, "files.jsonl.tmp")
    with open(tmp, "w", encoding="utf-8") as out:
        out.writelines(by_file[path] for path in files)
    os.replace(tmp, os.path.join(out_dir, "files.jsonl"))
    return len(files)
