"""Multiplicity first, high to low, ``J = … Hz``: ``7.26 (d, J = 8.4 Hz, 2H, ArH)``."""

from .base import Style


class LettersFirst(Style):
    name = "letters-first"
    description = "multiplicity first, shifts high to low: 7.26 (d, J = 8.4 Hz, 2H, ArH)"
    ion_spaces = True
