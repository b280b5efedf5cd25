"""Subscripted δ, conditions with semicolons, units declared once:
``δH (400 MHz; CDCl3; Me4Si) 4.12 (2 H, q, J 7.1, OCH2)``."""

from .base import Style


class SubscriptDelta(Style):
    name = "subscript-delta"
    description = "δH (400 MHz; CDCl3) with '; ', J without unit or '=': 4.12 (2 H, q, J 7.1, OCH2)"
    header_form = "subscript"
    delta = ""
    separators = {**Style.separators, "conditions": "; "}
    detail_fields = ("count", "multiplicity", "couplings", "assignment", "notes")
    count_template = "{n} {nucleus}"
    j = {**Style.j, "equals": " ", "unit": "", "typed": "{bonds}J{a}{b}"}
    ea_template = "Anal. Calcd[ for {formula}]: {calcd}; found: {found}"
