"""The emitter: any parsed item written again in any style.

:class:`Emitter` dispatches on the model class (``Spectrum`` → ``spectrum_text``, ``MassSpec``
→ ``mass_spec_text`` …).  It reads nothing but the style's constants and the node's data
(plus, for numbers the model keeps only as floats, the text at the node's spans).  Whatever
it changes beyond spelling (order, range direction, rounding) it records as a
:class:`Change`; whatever the style cannot express it records with :meth:`unsupported` and
then writes in a form that keeps it, or leaves the item as it was.

:func:`plan_edits` turns a whole document into ``(start, end, text)`` edits that touch only
the items of its data blocks; :mod:`peakproof.safety` checks them before anything is written.
"""

from __future__ import annotations

import re
from collections import Counter
from dataclasses import dataclass

from .model import (
    Block,
    Coupling,
    Document,
    ElementalAnalysis,
    MassSpec,
    Multiplicity,
    OtherItem,
    Signal,
    Spectrum,
)
from .span import Span
from .styles.base import Style

_NUMBER = re.compile(r"[+\-\u2212]?(?:\d+(?:[.,]\d+)?|[.,]\d+)")
_RANGE = re.compile(r"\s*([+\-\u2212]?(?:\d+(?:[.,]\d+)?|[.,]\d+))\s*(?:to|\S)\s*(\S+)\s*$")
_TEMP = re.compile(r"[+\-\u2212]?\d+(?:[.,]\d+)?\s?(?:K(?![A-Za-z])|[°º˚]\s?C(?![A-Za-z])|℃)")
_COUNT = re.compile(
    r"^(?:(?P<mult>\d+)\s?[×x]\s?)?(?P<n>\d+(?:[.,]\d+)?)\s?(?P<nuc>Si|[A-Z])(?P<each>\s?each)?$"
)
_SUBSCRIPT = {"1H": "H", "13C": "C", "19F": "F", "31P": "P", "11B": "B", "15N": "N"}
_OPTIONAL = re.compile(r"\[([^\[\]]*)\]")
_FIELD = re.compile(r"\{(\w+)\}")
_TRAILING_PPM = re.compile(r"\s?ppm(?![A-Za-z])")
_SIMPLE_GAP = re.compile(r"[;,.] ?")


@dataclass(frozen=True, slots=True)
class Change:
    """One thing the formatter did or could not do, for the user's list."""

    kind: str  # normalised | rounded | unsupported | repaired | fixed | kept
    message: str
    span: Span

    def line(self, name: str) -> str:
        return f"{name}:{self.span.line}:{self.span.column}: {self.kind}: {self.message}"


class Emitter:
    """Writes model nodes in one style; collects the changes it makes on the way."""

    def __init__(self, style: type[Style], text: str, *, round_numbers: bool = False):
        self.style = style
        self.text = text  # the document text, for numbers the model keeps only as floats
        self.round_numbers = round_numbers
        self.changes: list[Change] = []

    # ---- dispatch ------------------------------------------------------------------------
    def emit(self, node) -> str:
        kind = re.sub(r"(?<!^)(?=[A-Z])", "_", type(node).__name__).lower()
        method = getattr(self, f"{kind}_text", None)
        if method is None:
            raise TypeError(f"the emitter cannot write a {type(node).__name__}")
        return method(node)

    def note(self, kind: str, message: str, span: Span) -> None:
        self.changes.append(Change(kind, message, span))

    def unsupported(self, node, what: str, instead: str) -> None:
        """Record that the style cannot express ``what`` of ``node``, and what was done instead."""
        self.note("unsupported", f"{self.style.name} cannot write {what}; {instead}", node.span)

    # ---- numbers -------------------------------------------------------------------------
    def number(self, written: str, decimals: int | None, span: Span) -> str:
        """A number as written, in the style's notation; rounded only when asked."""
        text = written.strip().replace(",", ".").replace("\u2212", "-").replace("+", "")
        if text.startswith(".") or text.startswith("-."):
            text = text.replace(".", "0.", 1)
        if self.round_numbers and decimals is not None and "." in text:
            places = len(text) - text.index(".") - 1
            if places > decimals:
                rounded = f"{round(float(text), decimals):.{decimals}f}"
                self.note("rounded", f"{written.strip()} → {rounded}", span)
                text = rounded
        if text.startswith("-"):
            text = self.style.minus + text[1:]
        return text

    # ---- spectra -------------------------------------------------------------------------
    def spectrum_text(self, spectrum: Spectrum) -> str:
        style = self.style
        head = self.header_text(spectrum)
        units = self.signal_units(spectrum)
        body = style.separators["signals"].join(self.unit_text(spectrum, unit) for unit in units)
        if not body:
            return head
        return f"{head} {body}{style.trailing_unit}"

    def header_text(self, spectrum: Spectrum) -> str:
        style = self.style
        conditions = [c for c in self.header_conditions(spectrum) if c]
        inside = f" ({style.separators['conditions'].join(conditions)})" if conditions else ""
        letter = _SUBSCRIPT.get(spectrum.nucleus)
        if style.header_form == "subscript" and letter and not spectrum.decoupled:
            return f"δ{letter}{inside}" + (f" {style.delta}" if style.delta else "")
        if style.header_form == "subscript":
            what = f"the decoupling of {spectrum.nucleus}{{{','.join(spectrum.decoupled)}}}" \
                if spectrum.decoupled else f"a {spectrum.nucleus} header with a subscripted δ"
            self.unsupported(spectrum, what, "wrote the nucleus header instead")
        decoupling = ""
        if spectrum.decoupled:
            decoupling = style.decoupling_template.format(nuclei=",".join(spectrum.decoupled))
        head = style.nucleus_template.format(nucleus=spectrum.nucleus, decoupling=decoupling)
        return f"{head}{inside}" + (f" {style.delta or 'δ'}")

    def header_conditions(self, spectrum: Spectrum) -> list[str]:
        parts = {
            "frequency": f"{spectrum.frequency_mhz:g} MHz" if spectrum.frequency_mhz else "",
            "solvent": spectrum.solvent or "",
            "temperature": self.temperature_text(spectrum),
            "reference": spectrum.reference or "",
            "conditions": self.style.separators["conditions"].join(spectrum.conditions),
        }
        return [parts[name] for name in self.style.header_fields]

    def temperature_text(self, spectrum: Spectrum) -> str:
        if spectrum.temperature_k is None:
            return ""
        m = _TEMP.search(spectrum.header_text)
        return " ".join(m.group(0).split()) if m else f"{spectrum.temperature_k:g} K"

    # ---- signal list ---------------------------------------------------------------------
    def signal_units(self, spectrum: Spectrum) -> list[list[Signal]]:
        """Signals grouped as written together, in the style's order."""
        units: list[list[Signal]] = []
        for signal in spectrum.signals:
            if signal.group and units and units[-1][0].group == signal.group:
                units[-1].append(signal)
            else:
                units.append([signal])
        order = self.style.shift_order
        if order == "as-written" or len(units) < 2:
            return units
        descending = order == "descending"
        key = (lambda u: max(_position(s) for s in u)) if descending else (
            lambda u: min(_position(s) for s in u))  # fmt: skip
        ordered = sorted(units, key=key, reverse=descending)
        if ordered != units:
            if _regroups(ordered):
                self.note("kept", "kept the written signal order: reordering would join a bare "
                          "shift to the signals written together after it", spectrum.span)  # fmt: skip
                return units
            self.note("normalised", f"listed the {spectrum.nucleus} signals {order} "
                      f"({_moved(units, ordered)} moved)", spectrum.span)  # fmt: skip
        return ordered

    def unit_text(self, spectrum: Spectrum, unit: list[Signal]) -> str:
        shifts = self.style.separators["group"].join(self.shift_text(spectrum, s) for s in unit)
        details = self.details_text(spectrum, unit[0])
        return f"{shifts} ({details})" if details else shifts

    def signal_text(self, signal: Signal, nucleus: str = "1H") -> str:
        spectrum = Spectrum(span=signal.span, nucleus=nucleus, signals=(signal,))
        return self.unit_text(spectrum, [signal])

    def shift_text(self, spectrum: Spectrum, signal: Signal) -> str:
        decimals = self.style.shift_decimals(spectrum.nucleus)
        span = signal.shift_span or signal.span
        if signal.range is None:
            return self.number(signal.shift_text, decimals, span)
        first, last = _bounds(signal)
        a, b = _number_value(first), _number_value(last)
        direction = self.style.range_direction
        if (direction == "descending" and a < b) or (direction == "ascending" and a > b):
            first, last = last, first
            self.note("normalised", f"range {signal.shift_text} written {direction}", span)
        dash = self.style.range_dash
        if not re.search(re.escape(dash), signal.shift_text) and dash.strip() == "–":
            self.note("normalised", f"range {signal.shift_text} written with an en dash", span)
        return f"{self.number(first, decimals, span)}{dash}{self.number(last, decimals, span)}"

    def details_text(self, spectrum: Spectrum, signal: Signal) -> str:
        style = self.style
        fields = {
            "multiplicity": [self.multiplicity_text(signal.multiplicity)] if signal.multiplicity else [],
            "couplings": self.couplings_text(signal.couplings),
            "count": [self.count_text(signal)] if signal.count_text else [],
            "assignment": [signal.assignment] if signal.assignment else [],
            "notes": list(signal.notes),
        }
        out = ""
        for name in style.detail_fields:
            for part in fields[name]:
                if out:
                    quiet = name in ("assignment", "notes")
                    out += style.separators["before_assignment" if quiet else "details"]
                out += part
        return out

    def multiplicity_text(self, mult: Multiplicity) -> str:
        lex = self.style.lexicon
        if mult.kind == "AB":
            body = lex.get(mult.name, mult.name)
        elif mult.name in ("br", "br s"):
            body = lex[mult.name]
        else:
            letters = "".join(lex[c] for c in mult.components) if mult.components else lex.get(
                mult.name.split()[-1], mult.name.split()[-1])  # fmt: skip
            if mult.components and mult.kind == "multiplet":  # "dm": resolved letters, then m
                letters += lex.get("m", "m")
            body = (lex["broad"] if mult.broad else "") + (lex["apparent"] if mult.apparent else "")
            body += letters
        if mult.multiplier > 1:
            body = f"{mult.multiplier}{lex['times']}{body}"
        return body

    def couplings_text(self, couplings: tuple[Coupling, ...]) -> list[str]:
        """Couplings as detail parts: a label, then values; a typed coupling starts a new part."""
        j = self.style.j
        parts: list[tuple[str, list[str]]] = []
        for c in couplings:
            value = self.number(c.text or f"{c.value:g}", self.style.j_decimals, c.span)
            typed = c.nuclei or c.bonds or c.label
            if typed or not parts:
                parts.append((self.coupling_label(c), [value]))
            else:
                parts[-1][1].append(value)
        return [f"{label}{j['equals']}{', '.join(values)}{j['unit']}" for label, values in parts]

    def coupling_label(self, c: Coupling) -> str:
        j = self.style.j
        bonds = str(c.bonds) if c.bonds else ""
        if c.label:
            return bonds + j["numbered"].format(label=c.label)
        if c.nuclei:
            return j["typed"].format(bonds=bonds, a=c.nuclei[0], b=c.nuclei[1])
        return bonds + j["label"]

    def coupling_text(self, c: Coupling) -> str:
        return self.couplings_text((c,))[0]

    def count_text(self, signal: Signal) -> str:
        m = _COUNT.match(" ".join(signal.count_text.split()))
        if m is None:  # not a form we know how to respell: keep it
            return signal.count_text
        n = m.group("n").replace(",", ".")
        out = self.style.count_template.format(n=n, nucleus=m.group("nuc"))
        if m.group("mult"):
            out = f"{m.group('mult')}{self.style.lexicon['times']}{out}"
        return out + (" each" if m.group("each") else "")

    # ---- mass spectra and analyses ---------------------------------------------------------
    def mass_spec_text(self, ms: MassSpec) -> str:
        ion = ms.ion
        if ion and self.style.ion_spaces:
            ion = re.sub(r"(?<=[\w\]])\s?([+\-])\s?(?=[\w])", r" \1 ", ion.split("]")[0]) + (
                "]" + ion.split("]", 1)[1] if "]" in ion else "")  # fmt: skip
        formula = ms.formula
        if formula and ms.formula_span and not ms.ion:
            formula = self._written_formula(ms)
        return fill_template(self.style.ms_template, {
            "method": ms.method, "ion": ion, "formula": formula,
            "calcd": ms.calcd_text or None, "found": ms.found_text or None,
        })  # fmt: skip

    def _written_formula(self, ms: MassSpec) -> str:
        """``[C12H15O3]+`` as written when no separate ion carries the charge."""
        start, end = ms.formula_span.start, ms.formula_span.end
        if start > 0 and self.text[start - 1] == "[":
            start -= 1
        m = re.compile(r"\]?(?:\d?[+\-−⁺⁻]|[•·])*").match(self.text, end)
        return self.text[start : m.end()] if m else self.text[start:end]

    def elemental_analysis_text(self, ea: ElementalAnalysis) -> str:
        def values(pairs, spans):
            out = []
            for (element, value), span in zip(pairs, spans):
                numbers = _NUMBER.findall(self.text[span.start : span.end])
                written = numbers[-1] if numbers else f"{value:g}"
                out.append(self.style.ea_element.format(element=element, value=self.number(
                    written, None, span)))  # fmt: skip
            return self.style.ea_separator.join(out)

        return fill_template(self.style.ea_template, {
            "formula": ea.formula,
            "calcd": values(ea.calcd, ea.calcd_spans),
            "found": values(ea.found, ea.found_spans),
        })  # fmt: skip

    def other_item_text(self, item: OtherItem) -> str:
        return self.text[item.span.start : item.span.end]


def fill_template(template: str, fields: dict[str, str | None]) -> str:
    """Fill ``{name}`` fields; a ``[…]`` part whose fields are unknown is left out (innermost
    parts first, so ``[ calcd[ for {formula}]]`` keeps "calcd" when only the formula is unknown)."""
    def known(part: str) -> bool:
        return all(fields.get(name) not in (None, "") for name in _FIELD.findall(part))

    text = template
    while True:
        m = _OPTIONAL.search(text)
        if m is None:
            break
        inner = m.group(1)
        keep = known(inner) and (bool(_FIELD.search(inner)) or "\x00" in inner)
        text = text[: m.start()] + (inner.replace("\x00", "") + "\x00" if keep else "") + text[m.end() :]
    text = text.replace("\x00", "")
    return _FIELD.sub(lambda mm: str(fields.get(mm.group(1)) or ""), text)


def _number_value(text: str) -> float:
    return float(text.replace(",", ".").replace("\u2212", "-"))


def _bounds(signal: Signal) -> tuple[str, str]:
    """A range's bounds as written (read from the text: a hyphen is a dash, not a minus)."""
    m = _RANGE.match(signal.shift_text)
    return m.group(1), m.group(2)


def _position(signal: Signal) -> float:
    if signal.range is None:
        return signal.position
    a, b = _bounds(signal)
    return (_number_value(a) + _number_value(b)) / 2


def _regroups(units: list[list[Signal]]) -> bool:
    """Would a bare shift be read as one of the signals written together after it?"""
    for before, after in zip(units, units[1:]):
        s = after[0]
        if len(before) == 1 and before[0].details_span is None and s.multiplicity is not None and (
            s.multiplicity.multiplier > 1 or s.multiplicity.kind == "AB" or "each" in s.count_text
        ):
            return True
    return False


def _moved(before: list, after: list) -> int:
    return sum(1 for a, b in zip(before, after) if a is not b)


def _digits(text: str) -> Counter:
    return Counter(re.findall(r"\d+", text.replace(",", ".")))


# ---- whole documents ---------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Plan:
    """Edits for one document and the changes behind them."""

    edits: tuple[tuple[int, int, str], ...]
    changes: tuple[Change, ...]

    def apply(self, text: str) -> str:
        return apply_edits(text, self.edits)


def apply_edits(text: str, edits) -> str:
    out, pos = [], 0
    for start, end, new in sorted(edits):
        out.append(text[pos:start])
        out.append(new)
        pos = end
    out.append(text[pos:])
    return "".join(out)


def plan_edits(doc: Document, style: type[Style], *, round_numbers: bool = False) -> Plan:
    """The edits that write every readable item of every block in ``style``."""
    text = doc.text
    emitter = Emitter(style, text, round_numbers=round_numbers)
    edits: list[tuple[int, int, str]] = []
    errors = [d for d in doc.diagnostics if d.severity == "error"]
    repairs = [d for d in doc.diagnostics if d.rule.startswith("repair-")]
    for block in doc.blocks:
        previous_end = None
        for item in block.items:
            start, end = item.span.start, item.span.end
            if isinstance(item, Spectrum):
                m = _TRAILING_PPM.match(text, end)
                end = m.end() if m else end
            if previous_end is not None and not isinstance(item, OtherItem):
                gap = text[previous_end:start]
                if _SIMPLE_GAP.fullmatch(gap) and gap != style.item_separator:
                    edits.append((previous_end, start, style.item_separator))
            previous_end = end
            if isinstance(item, OtherItem):
                continue
            if any(d.span.start < end and d.span.end > start for d in errors):
                emitter.note("kept", "left as written: part of it could not be read "
                             "(see 'peakproof parse')", item.span)  # fmt: skip
                continue
            before = len(emitter.changes)
            new = emitter.emit(item)
            old = text[start:end]
            lost = _digits(old) - _digits(new)
            if isinstance(item, Spectrum) and item.nucleus_span is not None:
                lost -= _digits(text[item.nucleus_span.start : item.nucleus_span.end])
            if lost and not round_numbers:
                del emitter.changes[before:]
                emitter.unsupported(item, f"all of {' '.join(old.split())!r} "
                                    f"(the numbers {', '.join(sorted(lost))} have no place in it)",
                                    "left the item as written")  # fmt: skip
                continue
            if new != old:
                edits.append((start, end, new))
                for d in repairs:
                    if start <= d.span.start < end:
                        emitter.note("repaired", d.message, d.span)
    changes = sorted(emitter.changes, key=lambda c: c.span.start)
    return Plan(tuple(sorted(edits)), tuple(changes))


def emit_block(block: Block, style: type[Style], text: str) -> str:
    """One block's items written in ``style`` and joined with its item separator."""
    emitter = Emitter(style, text)
    return style.item_separator.join(emitter.emit(item) for item in block.items)
