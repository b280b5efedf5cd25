"""J without ``=``, assignment last, list low to high: ``0.85 (s, 3H, CH3), 7.76 (dd, J 6.0,
8.2 Hz, 1H, H-1')``."""

from .base import Style


class AscendingBareJ(Style):
    name = "ascending-bare-j"
    description = "J without '=', assignment last, shifts low to high: 7.76 (dd, J 6.0, 8.2 Hz, 1H, H-1')"
    shift_order = "ascending"
    range_direction = "ascending"
    j = {**Style.j, "equals": " "}
    lexicon = {**Style.lexicon, "sept": "hept", "br s": "bs"}
    detail_fields = ("multiplicity", "couplings", "count", "notes", "assignment")
