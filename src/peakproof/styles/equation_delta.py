"""Equation δ, typed couplings, trailing ppm: ``δ = 4.12 (q, 3J(H,H) = 7.1 Hz, 2H; OCH2) ppm``."""

from .base import Style


class EquationDelta(Style):
    name = "equation-delta"
    description = "δ = … ppm with typed couplings: δ = 4.12 (q, 3J(H,H) = 7.1 Hz, 2H; OCH2) ppm"
    delta = "δ ="
    trailing_unit = " ppm"
    separators = {**Style.separators, "before_assignment": "; "}
    lexicon = {**Style.lexicon, "apparent": "apparent "}
    ms_template = "HRMS[ ({method})]: m/z[ calcd for {formula}][ {ion}][ {calcd}][, found {found}]"
