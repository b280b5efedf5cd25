"""Property tests: random valid data, emitted in every style, parses back to the same data.

The data is drawn at model level (shifts, multiplicities, J, counts, assignments), written by
the emitter, parsed, and compared with the drawn data — never with the emitter's own text.
"""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import peakproof
from peakproof.emit import Emitter
from peakproof.model import Coupling, Multiplicity, Signal, Spectrum
from peakproof.safety import checked_format, fingerprint
from peakproof.span import Span
from peakproof.styles import BUILTIN
from peakproof.vocabulary import multiplicity_parts

SETTINGS = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
NOWHERE = Span(0, 0, 1, 1, 1, 1)
STYLES = sorted(BUILTIN)
#: normalised multiplicity → number of J values it takes (first-order letters: one per letter).
MULTIPLICITIES = {"s": 0, "br s": 0, "m": 0, "d": 1, "t": 1, "q": 1, "quint": 1, "sext": 1,
                  "sept": 1, "dd": 2, "dt": 2, "td": 2, "ddd": 3, "app t": 1, "br d": 1}
ASSIGNMENTS = ["ArH", "H-3", "OCH3", "NCH2", "H-2'", "CH=CH"]
NOTES = ["major rotamer", "exchangeable"]


def _hundredths(low, high):
    return st.integers(round(low * 100), round(high * 100)).map(lambda n: n / 100)


@st.composite
def proton_signal(draw):
    if draw(st.integers(0, 5)) == 0:
        a, b = draw(st.lists(_hundredths(0.5, 11.5), min_size=2, max_size=2, unique=True))
        shift, rng, text, name = None, (a, b), f"{a:.2f}–{b:.2f}", "m"
    else:
        shift = draw(_hundredths(0.5, 11.5))
        rng, text = None, f"{shift:.2f}"
        name = draw(st.sampled_from(sorted(MULTIPLICITIES)))
    parts = multiplicity_parts(name)
    mult = Multiplicity(name=parts[0], span=NOWHERE, written=name, components=parts[1],
                        broad=parts[2], apparent=parts[3], kind=parts[4])  # fmt: skip
    values = sorted((draw(st.integers(5, 180)) / 10 for _ in range(MULTIPLICITIES[name])),
                    reverse=True)  # fmt: skip
    typed = draw(st.booleans())
    couplings = tuple(
        Coupling(v, NOWHERE, f"{v:.1f}", ("H", "H") if typed and i == 0 else None,
                 3 if typed and i == 0 else None) for i, v in enumerate(values))  # fmt: skip
    count = draw(st.sampled_from([1, 2, 3, 4, 6, 9]))
    return Signal(span=NOWHERE, shift=shift, range=rng, shift_text=text, multiplicity=mult,
                  couplings=couplings, count=float(count), count_nucleus="H",
                  count_text=f"{count}H", assignment=draw(st.none() | st.sampled_from(ASSIGNMENTS)),
                  notes=tuple(draw(st.lists(st.sampled_from(NOTES), max_size=1))))  # fmt: skip


@st.composite
def carbon_signal(draw):
    shift = draw(st.integers(50, 2150)) / 10
    count = draw(st.sampled_from([None, None, 2, 3]))
    return Signal(span=NOWHERE, shift=shift, shift_text=f"{shift:.1f}",
                  count=float(count) if count else None, count_nucleus="C" if count else None,
                  count_text=f"{count}C" if count else "")  # fmt: skip


@st.composite
def spectra(draw):
    mhz = draw(st.sampled_from([400, 500]))
    solvent = draw(st.sampled_from(["CDCl3", "DMSO-d6", "CD3OD"]))
    proton = Spectrum(span=NOWHERE, nucleus="1H", frequency_mhz=float(mhz), solvent=solvent,
                      signals=tuple(draw(st.lists(proton_signal(), min_size=1, max_size=6))))  # fmt: skip
    out = [proton]
    if draw(st.booleans()):
        carbon_mhz = {400: 101.0, 500: 126.0}[mhz]  # IUPAC Ξ 25.145020 %, rounded as written
        out.append(Spectrum(span=NOWHERE, nucleus="13C", decoupled=("1H",), solvent=solvent,
                            frequency_mhz=carbon_mhz,
                            signals=tuple(draw(st.lists(carbon_signal(), min_size=1, max_size=8,
                                                        unique_by=lambda s: s.shift)))))  # fmt: skip
    return out


def expected(spectra_list):
    """The drawn data as the parser must give it back: order-free, ranges low to high."""
    out = []
    for s in spectra_list:
        signals = sorted(
            ((sig.shift, tuple(sorted(sig.range)) if sig.range else None,
             sig.multiplicity.name if sig.multiplicity else None, sig.j_hz,
             tuple((c.nuclei, c.bonds) for c in sig.couplings), sig.count, sig.assignment,
             sig.notes)
            for sig in s.signals), key=repr)  # fmt: skip
        out.append((s.nucleus, s.decoupled, s.frequency_mhz, s.solvent, signals))
    return out


def parsed(text):
    doc = peakproof.parse(text)
    assert not [d for d in doc.diagnostics if d.severity == "error"], (text, doc.diagnostics)
    assert len(doc.blocks) == 1
    return expected(doc.blocks[0].spectra)


def emit_all(spectra_list, style) -> str:
    emitter = Emitter(BUILTIN[style], "")
    return "; ".join(emitter.emit(s) for s in spectra_list) + "."


@SETTINGS
@given(spectra(), st.sampled_from(STYLES))
def test_every_style_parses_back_to_the_drawn_data(drawn, style):
    assert parsed(emit_all(drawn, style)) == expected(drawn)


@SETTINGS
@given(spectra(), st.sampled_from(STYLES), st.sampled_from(STYLES))
def test_style_a_then_style_b_is_identity_on_data(drawn, a, b):
    text_a = emit_all(drawn, a)
    result = checked_format(text_a, BUILTIN[b])  # raises if the data changed
    assert parsed(result.text) == expected(drawn)
    assert fingerprint(peakproof.parse(result.text)) == fingerprint(peakproof.parse(text_a))


@SETTINGS
@given(spectra(), st.sampled_from(STYLES))
def test_formatting_is_idempotent(drawn, style):
    first = checked_format(emit_all(drawn, STYLES[0]), BUILTIN[style]).text
    second = checked_format(first, BUILTIN[style])
    assert second.text == first and not second.changed
