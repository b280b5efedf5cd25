"""Batch throughput and memory: does memory stay flat as the corpus grows?

    python benchmarks/bench_batch.py [--sizes 1000 5000] [--jobs 2] [--worker check|export]

For each size N, a corpus of N small supporting-information files (.txt and .md, one to three
compounds each, fixed seed) is generated in a temporary folder and run through
:func:`peakproof.batch.run_batch` with ``--jobs`` worker processes, records streamed as JSON
Lines to /dev/null and counted into the summary, as ``peakproof check --jsonl`` would.  Each
size runs in a fresh interpreter, so peak figures do not carry over from one size to the next.

Printed per size: files/s, and peak memory as (a) the largest sum of resident memory of the
parent and its worker processes, sampled every 20 ms from /proc, and (b) ``ru_maxrss`` of the
parent and of the largest worker.  Then the ratio of the 5,000-file peak to the 1,000-file
peak: flat memory means a ratio near 1 (target ≤ 1.2).
"""

from __future__ import annotations

import argparse
import json
import os
import random
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from generate import block  # noqa: E402

MiB = 1024 * 1024
TARGET_RATIO = 1.2


def write_corpus(folder: Path, n_files: int, seed: int = 20240101) -> list[str]:
    rng = random.Random(seed)
    paths = []
    for i in range(n_files):
        parts = []
        for k in range(rng.randint(1, 3)):
            label = f"{i + 1}{'abc'[k]}"
            heading = f"## Methyl 4-substituted benzoate ({label})"
            parts.append(f"{heading}\n{block(rng, i)}")
        ext = ".md" if i % 3 == 0 else ".txt"
        path = folder / f"{i // 500:02d}" / f"si_{i:05d}{ext}"
        path.parent.mkdir(exist_ok=True)
        path.write_text("# Supporting information (generated)\n\n" + "\n\n".join(parts) + "\n",
                        encoding="utf-8")  # fmt: skip
        paths.append(str(path))
    return paths


def _rss_bytes(pid: int | str) -> int:
    try:
        with open(f"/proc/{pid}/status", encoding="ascii") as handle:
            for line in handle:
                if line.startswith("VmRSS:"):
                    return int(line.split()[1]) * 1024
    except (OSError, ValueError):
        pass
    return 0


def _children(pid: int) -> list[str]:
    found: list[str] = []
    try:
        for tid in os.listdir(f"/proc/{pid}/task"):
            with open(f"/proc/{pid}/task/{tid}/children", encoding="ascii") as handle:
                found.extend(handle.read().split())
    except OSError:
        pass
    return found


class RssSampler(threading.Thread):
    """Largest sum of RSS over this process and its children, sampled until stopped."""

    def __init__(self, interval: float = 0.02):
        super().__init__(daemon=True)
        self.interval = interval
        self.peak = 0
        self.peak_children = 0
        self._stop_event = threading.Event()

    def run(self) -> None:
        me = os.getpid()
        while not self._stop_event.is_set():
            children = _children(me)
            total = _rss_bytes(me) + sum(_rss_bytes(c) for c in children)
            self.peak = max(self.peak, total)
            self.peak_children = max(self.peak_children, len(children))
            self._stop_event.wait(self.interval)

    def stop(self) -> None:
        self._stop_event.set()
        self.join()


def measure(n_files: int, jobs: int, worker_name: str) -> dict:
    """One size, in this process: generate, run, report."""
    import resource

    from peakproof.batch import (
        BatchSummary,
        JsonLinesWriter,
        check_worker,
        export_worker,
        run_batch,  # fmt: skip
    )

    worker = check_worker if worker_name == "check" else export_worker
    with tempfile.TemporaryDirectory(prefix="peakproof-bench-") as tmp:
        files = write_corpus(Path(tmp), n_files)
        sampler = RssSampler()
        summary = BatchSummary()
        with open(os.devnull, "w", encoding="utf-8") as sink:
            writer = JsonLinesWriter(sink)
            sampler.start()
            started = time.perf_counter()
            for record in run_batch(files, worker, jobs=jobs):
                writer.write(record)
                summary.add(record)
            seconds = time.perf_counter() - started
            sampler.stop()
    if summary.unreadable_count:
        raise SystemExit(f"{summary.unreadable_count} generated files failed:\n{summary.table()}")
    return {
        "files": n_files,
        "compounds": summary.compounds,
        "findings": sum(summary.findings.values()),
        "seconds": seconds,
        "files_per_s": n_files / seconds,
        "peak_rss_total": sampler.peak,
        "processes_seen": sampler.peak_children + 1,
        "parent_maxrss": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024,
        "child_maxrss": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * 1024,
    }


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[1000, 5000])
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--worker", choices=("check", "export"), default="check")
    parser.add_argument("--one", type=int, default=None, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.one is not None:
        print(json.dumps(measure(args.one, args.jobs, args.worker)))
        return 0
    if not sys.platform.startswith("linux"):
        print("this benchmark reads /proc and needs Linux", file=sys.stderr)
        return 2
    print(f"peakproof batch: {args.worker} worker, --jobs {args.jobs}")
    print(f"{'files':>6} {'compounds':>9} {'s':>7} {'files/s':>8} {'peak RSS all':>13} "
          f"{'parent':>8} {'worker':>8}")  # fmt: skip
    results = []
    for n in args.sizes:
        done = subprocess.run([sys.executable, __file__, "--one", str(n), "--jobs", str(args.jobs),
                               "--worker", args.worker],
                              capture_output=True, text=True)  # fmt: skip
        if done.returncode != 0:
            print(done.stderr, file=sys.stderr)
            return 1
        r = json.loads(done.stdout.splitlines()[-1])
        results.append(r)
        print(f"{r['files']:>6} {r['compounds']:>9} {r['seconds']:>7.1f} {r['files_per_s']:>8.0f} "
              f"{r['peak_rss_total'] / MiB:>9.1f} MiB {r['parent_maxrss'] / MiB:>4.0f} MiB "
              f"{r['child_maxrss'] / MiB:>4.0f} MiB")  # fmt: skip
    if len(results) >= 2:
        first, last = results[0], results[-1]
        ratio = last["peak_rss_total"] / first["peak_rss_total"]
        verdict = "flat" if ratio <= TARGET_RATIO else "GROWS"
        print(f"peak memory {last['files']} vs {first['files']} files: {ratio:.2f}x "
              f"({verdict}; target <= {TARGET_RATIO}x for {last['files'] / first['files']:.0f}x "
              f"the files)")  # fmt: skip
        return 0 if ratio <= TARGET_RATIO else 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
