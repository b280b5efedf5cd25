"""Form: order, decimals, plausible ranges, range style, units, duplicates, header completeness."""

from __future__ import annotations

import re

from . import Rule, suggestion
from ._util import fmt, number_edit_span

#: Shift windows (ppm) outside which a value is implausible for ordinary compounds (common practice).
PLAUSIBLE = {
    "1H": (-5.0, 16.0),
    "13C": (-10.0, 240.0),
    "19F": (-300.0, 50.0),
    "31P": (-250.0, 250.0),
    "11B": (-130.0, 100.0),
    "29Si": (-200.0, 100.0),
}
_METALS_WITH_HYDRIDES = ("Ru", "Rh", "Ir", "Os", "Pt", "Pd", "Fe", "Co", "Ni", "Re", "W", "Mo", "Mn", "Cr", "Zr", "Hf", "Ti")


def _shifted(spectrum):
    return [s for s in spectrum.signals if s.shift is not None or s.range is not None]


class ShiftOrder(Rule):
    """Signals listed from high to low shift (the usual convention)."""

    name = "shift-order"
    code = "PP801"
    severity = "note"
    message = "δ {here} follows δ {before}: the list is not in {order} order"
    rationale = "Most journals list shifts from high to low; a reader scanning the list expects one order."
    source = "common practice (ACS and RSC author guidelines)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 7.10 (s, 1H), 2.20 (s, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 3.81 (s, 3H), 2.20 (s, 3H)."),
    )

    def check(self, block, ctx):
        style = ctx.config.style
        order = style.shift_order if style is not None else "descending"
        if order == "as-written":
            return
        either = style is None and ctx.config.shift_order == "either"
        sign = -1.0 if order == "ascending" else 1.0  # compare as if descending
        for spectrum in block.spectra:
            signals = _shifted(spectrum)
            if len(signals) < 2:
                continue
            pos = [sign * s.position for s in signals]
            if either and all(a <= b for a, b in zip(pos, pos[1:])):
                continue  # ascending
            for x in range(1, len(pos)):
                if pos[x] > pos[x - 1] + 1e-9:
                    a, b = signals[x - 1], signals[x]
                    yield self.finding(b.shift_span or b.span, here=b.shift_text, before=a.shift_text,
                                       order=order,
                                       data={"shift": sign * pos[x], "previous": sign * pos[x - 1]})
                    break


class MixedDecimals(Rule):
    """One number of decimals per nucleus: 1H to 0.01 ppm, 13C to 0.1 ppm."""

    name = "mixed-decimals"
    code = "PP802"
    severity = "note"
    message = "δ {shift} has {decimals} decimal(s) where the rest of the {nucleus} list has {usual}"
    rationale = (
        "1H shifts are given to 0.01 ppm and 13C to 0.1 ppm; mixed precision looks like a dropped "
        "digit. Extra 13C decimals that separate two close peaks are fine."
    )
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 3.8 (s, 3H), 2.20 (s, 3H)."),
        ("pass", "13C NMR (101 MHz, CDCl3) δ 171.1, 128.52, 128.48, 55.3."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            signals = [s for s in spectrum.signals if s.shift is not None]
            if len(signals) < 3:
                continue
            decimals = [s.decimals for s in signals]
            tally: dict[int, int] = {}
            for d in decimals:
                tally[d] = tally.get(d, 0) + 1
            usual = max(tally, key=tally.__getitem__)  # the first-met of the commonest
            n = tally[usual]
            if n <= len(signals) / 2 or n == len(signals):
                continue
            for s, d in zip(signals, decimals):
                if d == usual:
                    continue
                if d > usual and any(
                    abs(o.shift - s.shift) < 10 ** -usual + 1e-9 for o in signals if o is not s
                ):
                    continue  # extra digits to separate close peaks
                yield self.finding(s.shift_span or s.span, shift=s.shift_text, decimals=d,
                                   nucleus=spectrum.nucleus, usual=usual,
                                   data={"decimals": d, "usual": usual})


class ShiftOutOfRange(Rule):
    """A shift outside the window where that nucleus is normally found."""

    name = "shift-out-of-range"
    code = "PP803"
    severity = "warning"
    message = "δ {shift} is outside the usual {nucleus} range ({low} to {high} ppm){hint}"
    rationale = (
        "Each nucleus has a characteristic shift window (1H about −5 to 16, 13C −10 to 240, "
        "organic 19F −300 to +50 ppm); a value outside it is usually a typing error or a lost "
        "minus sign (19F)."
    )
    source = "common practice"
    examples = (
        ("fail", "19F NMR (376 MHz, CDCl3) δ 63.2 (s)."),
        ("fail", "1H NMR (400 MHz, CDCl3) δ 73.1 (s, 3H)."),
        ("pass", "19F NMR (376 MHz, CDCl3) δ −63.2 (s)."),
    )

    def check(self, block, ctx):
        f = ctx.formula
        metal = f is not None and any(f.element_count(m) for m in _METALS_WITH_HYDRIDES)
        for spectrum in block.spectra:
            window = PLAUSIBLE.get(spectrum.nucleus)
            if window is None:
                continue
            low, high = window
            if spectrum.nucleus == "1H" and metal:
                low = -40.0  # metal hydrides
            for s in _shifted(spectrum):
                if s.range:
                    if all(low <= v <= high for v in s.range):
                        continue
                elif low <= s.shift <= high:
                    continue
                hint = ""
                fix = None
                if spectrum.nucleus == "19F" and s.position > high and low <= -s.position and s.shift_span:
                    hint = "; a lost minus sign is likely"
                    fix = suggestion("restore the minus sign", (s.shift_span.start, s.shift_span.start, "−"))
                yield self.finding(s.shift_span or s.span, shift=s.shift_text, nucleus=spectrum.nucleus,
                                   low=fmt(low, 0), high=fmt(high, 0), hint=hint,
                                   data={"shift": s.position, "range": [low, high]}, suggestion=fix)


class RangeNotMultiplet(Rule):
    """A shift range is a multiplet; first-order letters belong to a single shift."""

    name = "range-not-multiplet"
    code = "PP804"
    severity = "note"
    message = "the range {shift} is reported as '{letters}'; a range is written as 'm'"
    rationale = "A first-order pattern has one centre; a range of shifts describes an unresolved multiplet."
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.36–7.28 (d, J = 8.0 Hz, 2H), 6.90 (d, J = 8.0 Hz, 2H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.36–7.28 (m, 5H), 5.12 (s, 2H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            for s in spectrum.signals:
                m = s.multiplicity
                if s.range is None or m is None or m.kind in ("multiplet", "broad"):
                    continue
                yield self.finding(m.span, shift=s.shift_text, letters=m.written or m.name,
                                   data={"range": list(s.range), "multiplicity": m.name})


_RANGE_SEP = re.compile(r"(?<=\d)\s*(-|—|−| to )\s*(?=\d)")


class RangeDash(Rule):
    """Ranges joined with an en dash, as typeset convention has it."""

    name = "range-dash"
    code = "PP805"
    severity = "note"
    message = "the range {shift} uses '{sep}'; an en dash (–) is the usual range sign"
    rationale = "A hyphen or minus between two shifts can be read as a negative number; the en dash is unambiguous."
    source = "common practice (ACS Style Guide)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.40-7.31 (m, 4H), 1.60–1.52 (m, 2H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.40–7.31 (m, 4H), 1.60–1.52 (m, 2H)."),
    )

    def check(self, block, ctx):
        text = ctx.document.text
        for spectrum in block.spectra:
            for s in spectrum.signals:
                if s.range is None or s.shift_span is None:
                    continue
                m = _RANGE_SEP.search(text, s.shift_span.start, s.shift_span.end)
                if m is None:
                    continue
                yield self.finding(
                    ctx.span(m.start(1), m.end(1)), shift=s.shift_text, sep=m.group(1).strip() or m.group(1),
                    data={"separator": m.group(1)},
                    suggestion=suggestion("use an en dash", (m.start(), m.end(), "–")),
                )


_UNIT_IN_HEADER = re.compile(r"(?<![MkG])Hz")


class MissingHz(Rule):
    """Coupling constants written without their unit."""

    name = "missing-hz"
    code = "PP806"
    severity = "note"
    message = "J = {j} is written without 'Hz'"
    rationale = "Coupling constants are given in Hz; the unit is written once after the J values of a signal."
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
    )

    def check(self, block, ctx):
        style = ctx.config.style
        if style is not None and not style.j.get("unit", "Hz"):
            return  # the configured style declares the unit once, outside the lists
        text = ctx.document.text
        for spectrum in block.spectra:
            if _UNIT_IN_HEADER.search(spectrum.header_text):
                continue  # units declared once in the header
            for s in spectrum.signals:
                if not s.couplings or s.details_span is None:
                    continue
                if text.find("Hz", s.details_span.start, s.details_span.end) >= 0:
                    continue
                last = number_edit_span(ctx, s.couplings[-1])
                yield self.finding(
                    last, j=", ".join(c.text or fmt(c.value, 2) for c in s.couplings),
                    data={"j_hz": list(s.j_hz)},
                    suggestion=suggestion("add the unit", (last.end, last.end, " Hz")),
                )


class DuplicateShift(Rule):
    """The same shift twice in one list, where one entry with a count was meant."""

    name = "duplicate-shift"
    code = "PP807"
    severity = "note"
    message = "δ {shift} is listed twice; write it once with a count such as '({count}{element})'"
    rationale = "Equivalent or overlapping nuclei are one signal with a count; a repeated value reads as a copy error."
    source = "common practice"
    examples = (
        ("fail", "13C NMR (101 MHz, CDCl3) δ 171.1, 128.5, 128.5, 55.3."),
        ("pass", "13C NMR (101 MHz, CDCl3) δ 171.1, 128.5 (2C), 55.3."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            signals = spectrum.signals
            for k in range(1, len(signals)):
                a, b = signals[k - 1], signals[k]
                if not a.shift_text or a.shift_text != b.shift_text or a.count is not None or b.count is not None:
                    continue
                if a.multiplicity or b.multiplicity:
                    continue
                element = spectrum.element
                yield self.finding(
                    b.shift_span or b.span, shift=b.shift_text, count=2, element=element,
                    data={"shift": b.position},
                    suggestion=suggestion("one entry with a count", (a.span.end, b.span.end, f" (2{element})")),
                )


class _MissingHeaderField(Rule):
    """A header item every spectrum should state; subclasses name the Spectrum field."""

    header_field = ""

    def check(self, block, ctx):
        for s in block.spectra:
            if getattr(s, self.header_field) is None:
                yield self.finding(s.nucleus_span or s.header_span or s.span, nucleus=s.nucleus,
                                   data={"nucleus": s.nucleus})


class MissingFrequency(_MissingHeaderField):
    """An NMR header without the spectrometer frequency."""

    name = "missing-frequency"
    code = "PP808"
    severity = "note"
    message = "the {nucleus} header gives no spectrometer frequency"
    rationale = "The frequency (field) is needed to judge resolution and second-order effects."
    source = "common practice (journal characterization guidelines)"
    examples = (
        ("fail", "1H NMR (CDCl3) δ 3.81 (s, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H)."),
    )

    header_field = "frequency_mhz"


class MissingSolvent(_MissingHeaderField):
    """An NMR header without the solvent."""

    name = "missing-solvent"
    code = "PP809"
    severity = "note"
    message = "the {nucleus} header gives no solvent"
    rationale = "Shifts depend on the solvent; without it the values cannot be compared or referenced."
    source = "common practice (journal characterization guidelines)"
    examples = (
        ("fail", "1H NMR (400 MHz) δ 3.81 (s, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H)."),
    )

    header_field = "solvent"


class OverPreciseJ(Rule):
    """J values given to 0.01 Hz or finer, beyond the usual digital resolution."""

    name = "over-precise-j"
    code = "PP810"
    severity = "note"
    message = "J = {j} Hz is given to {decimals} decimals; routine spectra resolve J to about 0.1 Hz"
    rationale = "With typical acquisition times the digital resolution is 0.1–0.3 Hz, so J is reported to 0.1 Hz."
    source = "common practice"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.13 Hz, 2H), 1.25 (t, J = 7.13 Hz, 3H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."),
    )

    def check(self, block, ctx):
        for spectrum in block.spectra:
            for s in spectrum.signals:
                for c in s.couplings:
                    if c.decimals >= 2:
                        target = number_edit_span(ctx, c)
                        yield self.finding(
                            target, j=c.text, decimals=c.decimals, data={"j_hz": c.value, "decimals": c.decimals},
                            suggestion=suggestion("round to 0.1 Hz", (target.start, target.end, f"{c.value:.1f}")),
                        )
