"""Parsing from several threads at once gives each the same result as parsing alone."""

from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import peakproof

DEMO = (Path(__file__).resolve().parents[1] / "examples" / "demo_si.txt").read_text(encoding="utf-8")


def test_threads_do_not_share_a_block_in_progress():
    """Eight threads parsing the demo concurrently all get the single-threaded data."""
    expected = peakproof.parse(DEMO).to_json()
    with ThreadPoolExecutor(max_workers=8) as pool:
        results = list(pool.map(lambda _: peakproof.parse(DEMO).to_json(), range(16)))
    assert all(expected == r for r in results)
