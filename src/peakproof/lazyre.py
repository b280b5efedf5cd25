"""Regular expressions compiled on first use: patterns for rare paths cost nothing at start-up."""

from __future__ import annotations

import re


class LazyPattern:
    """Behaves like a compiled pattern for the methods peakproof uses."""

    __slots__ = ("_source", "_flags", "_rx")

    def __init__(self, source: str, flags: int = 0):
        self._source = source
        self._flags = flags
        self._rx = None

    def compiled(self) -> re.Pattern:
        rx = self._rx
        if rx is None:
            rx = self._rx = re.compile(self._source, self._flags)
        return rx

    @property
    def pattern(self) -> str:
        return self._source

    def match(self, *args):
        return self.compiled().match(*args)

    def fullmatch(self, *args):
        return self.compiled().fullmatch(*args)

    def search(self, *args):
        return self.compiled().search(*args)

    def finditer(self, *args):
        return self.compiled().finditer(*args)

    def findall(self, *args):
        return self.compiled().findall(*args)

    def sub(self, *args, **kwargs):
        return self.compiled().sub(*args, **kwargs)

    def split(self, *args, **kwargs):
        return self.compiled().split(*args, **kwargs)


def lazy(source: str, flags: int = 0) -> LazyPattern:
    return LazyPattern(source, flags)
