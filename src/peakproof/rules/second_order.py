"""Second-order warnings from Δν/J of coupled partners (Δν in Hz = Δδ × spectrometer MHz)."""

from __future__ import annotations

from . import Rule
from ._util import fmt, signal_label


def _first_order_pairs(spectrum, ctx):
    """(signal, signal, edge) of first-order partners with a Δν/J, once per spectrum and block
    (both second-order rules judge them)."""
    return ctx.shared("first-order-pairs", spectrum, lambda: list(_find_first_order_pairs(spectrum, ctx)))


def _find_first_order_pairs(spectrum, ctx):
    if not any(s.couplings for s in spectrum.signals):
        return  # no J values, no edges (and no network to build for it)
    net = ctx.network(spectrum)
    signals = spectrum.signals
    first_order = [m is not None and m.kind == "first-order" and not m.apparent
                   for m in (s.multiplicity for s in signals)]
    seen = set()
    for edge in net.edges:
        if edge.delta_nu_hz is None or edge.j_hz == 0:
            continue  # no Δν/J (edge.ratio is None)
        pair = (edge.i, edge.j)
        if pair in seen or not (first_order[edge.i] and first_order[edge.j]):
            continue
        seen.add(pair)
        yield signals[edge.i], signals[edge.j], edge


def _exact_effect(a, b, edge, field_mhz):
    """The exact (quantum) AB spectrum against the first-order doublets, for the message."""
    try:
        from ..simulate.verdict import second_order_effect

        return second_order_effect(a.position, b.position, edge.j_hz, field_mhz)
    except Exception:  # the numbers of the rule of thumb still stand without the simulation
        return None


def _effect_text(effect) -> str:
    if effect is None:
        return ""
    text = (f"; simulated exactly, the lines sit up to {effect.max_line_shift_hz:.2f} Hz from the "
            f"first-order positions and the inner lines are {effect.roof_ratio:.1f}× the outer")
    if effect.extra_lines:
        text += f", with {effect.extra_lines} extra line(s)"
    return text


class _SecondOrder(Rule):
    low = 0.0
    high = 0.0

    def check(self, block, ctx):
        cap = ctx.config.max_findings_per_rule
        listed = 0
        for spectrum in block.spectra:
            if not spectrum.frequency_mhz:
                continue
            for a, b, edge in _first_order_pairs(spectrum, ctx):
                if self.low <= edge.ratio < self.high:
                    listed += 1
                    # past the checker's cap a finding is only counted: skip its simulation
                    effect = _exact_effect(a, b, edge, spectrum.frequency_mhz) \
                        if not cap or listed <= cap else None
                    yield self.finding(
                        b.multiplicity.span,  # pair findings point at the later-listed member
                        here=signal_label(a), there=signal_label(b), j=fmt(edge.j_hz, 2),
                        dnu=fmt(edge.delta_nu_hz, 1), ratio=fmt(edge.ratio, 1),
                        mhz=fmt(spectrum.frequency_mhz, 1),
                        effect=_effect_text(effect),
                        data={"delta_nu_hz": round(edge.delta_nu_hz, 3), "j_hz": edge.j_hz,
                              "ratio": round(edge.ratio, 3), "frequency_mhz": spectrum.frequency_mhz,
                              "partner_shift": b.position,
                              "exact": effect.to_json() if effect else None},
                    )


class SecondOrderAB(_SecondOrder):
    """Coupled partners so close that the pattern is an AB system, not two doublets."""

    name = "second-order-ab"
    code = "PP221"
    severity = "warning"
    low, high = 0.0, 4.0
    message = "{here} and {there} share J = {j} Hz but are only {dnu} Hz apart at {mhz} MHz (Δν/J = {ratio} < 4){effect}; report them as an AB system or an apparent multiplet"
    rationale = (
        "When Δν/J is small the lines lean (roofing) and shift from first-order positions; below "
        "about 4 the pattern should be shown as AB (with J and both shifts) or as m."
    )
    source = "common practice (rule of thumb)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.02 (d, J = 8.0 Hz, 1H), 6.98 (d, J = 8.0 Hz, 1H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.0 Hz, 1H), 6.80 (d, J = 8.0 Hz, 1H)."),
    )


class SecondOrderApproximate(_SecondOrder):
    """Partners with 4 ≤ Δν/J < 10: first-order analysis is only approximate."""

    name = "second-order-approximate"
    code = "PP222"
    severity = "note"
    low, high = 4.0, 10.0
    message = "{here} and {there} share J = {j} Hz and are {dnu} Hz apart at {mhz} MHz (Δν/J = {ratio} < 10){effect}; first-order shifts and J values are approximate here"
    rationale = "First-order analysis holds when Δν ≫ J; Δν/J ≳ 10 is the usual threshold."
    source = "common practice (textbook rule of thumb)"
    examples = (
        ("fail", "1H NMR (400 MHz, CDCl3) δ 7.10 (d, J = 8.0 Hz, 1H), 6.95 (d, J = 8.0 Hz, 1H)."),
        ("pass", "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.0 Hz, 1H), 6.80 (d, J = 8.0 Hz, 1H)."),
    )
