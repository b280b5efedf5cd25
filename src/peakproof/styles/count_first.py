"""Integration first: ``7.26 (2H, d, J = 8.4 Hz, ArH)``."""

from .base import Style


class CountFirst(Style):
    name = "count-first"
    description = "integration first, shifts high to low: 7.26 (2H, d, J = 8.4 Hz, ArH)"
    detail_fields = ("count", "multiplicity", "couplings", "assignment", "notes")
    lexicon = {**Style.lexicon, "quint": "p", "sext": "h"}
    ms_template = (
        "HRMS[ ({method})] m/z: calcd[ for {formula}][ {ion}][ {calcd}][; found {found}]"
    )
