"""Parsing and checking pause the cyclic collector and leave it as they found it."""

import gc
import weakref

import pytest

from peakproof import parse
from peakproof.checker import check

TEXT = "1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H).\n" * 3


class Node:
    pass


@pytest.mark.parametrize("work", [parse, lambda text: check(parse(text))], ids=["parse", "check"])
def test_collector_state_is_restored(work):
    assert gc.isenabled()
    work(TEXT)
    assert gc.isenabled()
    gc.disable()
    try:
        work(TEXT)
        assert not gc.isenabled()  # a caller that turned it off keeps it off
    finally:
        gc.enable()


def test_callers_frozen_objects_stay_frozen():
    gc.freeze()
    try:
        frozen = gc.get_freeze_count()
        assert frozen > 0
        parse(TEXT)
        assert gc.get_freeze_count() == frozen
    finally:
        gc.unfreeze()


def test_callers_cycles_are_still_collected():
    """Objects moved to the oldest generation are still looked at by a full collection."""
    a, b = Node(), Node()
    a.other, b.other = b, a
    alive = weakref.ref(a)
    parse(TEXT)
    del a, b
    gc.collect()
    assert alive() is None
    assert gc.get_freeze_count() == 0
