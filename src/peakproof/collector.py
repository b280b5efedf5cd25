"""Pausing Python's cyclic garbage collector while a model is built.

A parse makes about a hundred small objects per block and none of them forms a reference cycle,
so they are freed by reference counting alone.  Left running, the collector would walk them
again and again as they age; merely paused, its first young-generation pass after resuming would
still walk every one of them (about a tenth of a parse's time).
"""

from __future__ import annotations

import gc
from contextlib import contextmanager


@contextmanager
def collector_paused():
    """Run the body with the collector off; afterwards hand what it made to the oldest generation.

    ``gc.freeze()`` followed by ``gc.unfreeze()`` moves every tracked object to the oldest
    generation in one step, without walking them: they are looked at again only by the next full
    collection, as any long-lived object is.  Skipped when the program froze objects itself (a
    pre-fork server does), so its frozen set is never disturbed."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            if gc.get_freeze_count() == 0:
                gc.freeze()
                gc.unfreeze()
            gc.enable()
