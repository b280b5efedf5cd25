"""Spectrometer frequencies of one instrument go together through the IUPAC ratios Ξ."""

from __future__ import annotations

import re

from ..nuclei import UnknownNucleus, expected_frequency, proton_frequency
from . import Rule, suggestion
from ._util import fmt

_NUMBER = re.compile(r"\d+(?:[.,]\d+)?")
#: No NMR magnet in use exceeds about 1.3 GHz 1H frequency (1.2 GHz systems exist).
MAX_PROTON_MHZ = 1300.0


def _proton_mhz(block):
    for s in block.spectra:
        if s.nucleus == "1H" and s.frequency_mhz:
            return s.frequency_mhz
    return None


def _frequency_fix(ctx, spectrum, expected: float, why: str):
    span = spectrum.frequency_span
    if span is None:
        return None
    m = _NUMBER.search(ctx.document.text, span.start, span.end)
    if m is None:
        return None
    return suggestion(why, (m.start(), m.end(), fmt(expected, 1)))


def _within(a: float, b: float, tolerance: float) -> bool:
    return abs(a - b) <= max(tolerance, 0.01 * b) + 1e-9


class ProtonFrequencyOnHeteronucleus(Rule):
    """A 13C (or other) line headed with the 1H frequency of the magnet."""

    name = "proton-frequency-on-heteronucleus"
    code = "PP402"
    severity = "error"
    message = "{nucleus} at {written} MHz is the 1H frequency of the magnet; {nucleus} resonates at {expected} MHz there (IUPAC Ξ)"
    rationale = (
        "Each nucleus resonates at its own frequency in a given field: Ξ(13C) = 25.145020 % of the "
        "1H frequency, so a 400 MHz magnet observes 13C at 100.6 MHz."
    )
    source = "Harris et al., Pure Appl. Chem. 2001, 73, 1795 (IUPAC frequency ratios Ξ)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); 13C NMR (400 MHz, CDCl3) δ 55.3."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); 13C NMR (101 MHz, CDCl3) δ 55.3."),
    )

    def check(self, block, ctx):
        proton = _proton_mhz(block)
        for s in block.spectra:
            if s.nucleus == "1H" or not s.frequency_mhz:
                continue
            try:
                if proton and _within(s.frequency_mhz, proton, ctx.config.frequency_tolerance):
                    magnet = proton
                elif proton_frequency(s.nucleus, s.frequency_mhz) > MAX_PROTON_MHZ:
                    magnet = s.frequency_mhz
                else:
                    continue
                expected = expected_frequency(s.nucleus, magnet)
            except UnknownNucleus:
                continue
            yield self.finding(
                s.frequency_span or s.header_span or s.span,
                nucleus=s.nucleus, written=fmt(s.frequency_mhz, 2), expected=fmt(expected, 1),
                data={"written_mhz": s.frequency_mhz, "proton_mhz": magnet, "expected_mhz": round(expected, 3)},
                suggestion=_frequency_fix(ctx, s, expected, f"the {s.nucleus} frequency of a {fmt(magnet, 1)} MHz magnet"),
            )


class FrequencyMismatch(Rule):
    """A heteronucleus frequency that belongs to a different magnet than the 1H frequency."""

    name = "frequency-mismatch"
    code = "PP401"
    severity = "warning"
    message = "{nucleus} at {written} MHz does not match 1H at {proton} MHz: the same magnet gives {nucleus} at {expected} MHz (IUPAC Ξ); a different instrument or a typing error is likely"
    rationale = (
        "Frequencies of one instrument are tied by the IUPAC frequency ratios Ξ: at 400 MHz 13C "
        "is 100.6, 19F 376.4 and 31P 161.9 MHz; at 500 MHz 13C is 125.7 MHz."
    )
    source = "Harris et al., Pure Appl. Chem. 2001, 73, 1795 (IUPAC frequency ratios Ξ)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); 13C NMR (125 MHz, CDCl3) δ 55.3."),
        ("pass", "1H NMR (500 MHz, CDCl3) δ 3.81 (s, 3H); 13C NMR (125 MHz, CDCl3) δ 55.3."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); 19F NMR (376 MHz, CDCl3) δ −63.2."),
    )

    def check(self, block, ctx):
        proton = _proton_mhz(block)
        if not proton:
            return
        tol = ctx.config.frequency_tolerance
        for s in block.spectra:
            if s.nucleus == "1H" or not s.frequency_mhz or _within(s.frequency_mhz, proton, tol):
                continue
            try:
                expected = expected_frequency(s.nucleus, proton)
                if proton_frequency(s.nucleus, s.frequency_mhz) > MAX_PROTON_MHZ:
                    continue  # proton-frequency-on-heteronucleus reports it
            except UnknownNucleus:
                continue
            if _within(s.frequency_mhz, expected, tol):
                continue
            yield self.finding(
                s.frequency_span or s.header_span or s.span,
                nucleus=s.nucleus, written=fmt(s.frequency_mhz, 2), proton=fmt(proton, 2),
                expected=fmt(expected, 1),
                data={"written_mhz": s.frequency_mhz, "proton_mhz": proton, "expected_mhz": round(expected, 3),
                      "tolerance_mhz": max(tol, 0.01 * expected)},
                suggestion=_frequency_fix(ctx, s, expected, f"the {s.nucleus} frequency of the {fmt(proton, 1)} MHz magnet"),
            )
