"""Shared fixture for the reader tests: failures must come in bounded time and memory."""

from __future__ import annotations

import time
import tracemalloc

import pytest

from peakproof.readers import ReaderError

MiB = 1024 * 1024


def _fails_quickly(action, seconds: float = 5.0, peak_bytes: int = 64 * MiB) -> ReaderError:
    """Run ``action``; it must raise ReaderError within ``seconds`` and ``peak_bytes``."""
    tracemalloc.start()
    started = time.monotonic()
    try:
        with pytest.raises(ReaderError) as caught:
            action()
        elapsed = time.monotonic() - started
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert elapsed < seconds, f"took {elapsed:.2f} s"
    assert peak < peak_bytes, f"peak memory {peak / MiB:.1f} MiB"
    return caught.value


@pytest.fixture
def fails_quickly():
    return _fails_quickly
