"""Frozen records: named tuples that compare equal only to records of their own class.

The model and the diagnostics are named tuples because a parse builds tens of thousands of them
and a tuple is built several times faster than a frozen dataclass (and its module imports
faster).  A plain named tuple equals any tuple holding the same values; these do not.
"""

from __future__ import annotations


def _eq(self: tuple, other: object) -> bool:
    return type(other) is type(self) and tuple.__eq__(self, other)


def _ne(self: tuple, other: object) -> bool:
    return type(other) is not type(self) or tuple.__ne__(self, other)


def compared_by_class(cls):
    """Class decorator for a NamedTuple: equal only to an instance of the same class."""
    cls.__eq__ = _eq
    cls.__ne__ = _ne
    cls.__hash__ = tuple.__hash__
    return cls
