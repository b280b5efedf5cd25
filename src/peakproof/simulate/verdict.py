"""How far a coupled pair of signals is from first order, in numbers a finding can quote.

For groups A (n_a nuclei) and B (n_b) with one coupling J, the exact spectrum at the stated
field is compared with the first-order one (a multiplet of n_b + 1 lines for A, n_a + 1 for
B): how far lines move, how much the multiplets lean towards each other ("roofing": inner
half over outer half of a multiplet, 1 in first order) and how many lines appear that
first order does not have.  For AB the exact result is the textbook closed form: lines at
ν₀ ± ½(D ± J) with D = √(Δν² + J²), intensities ∝ 1 ∓ J/D.
"""

from __future__ import annotations

from dataclasses import dataclass

from .spin_system import Line, SpinGroup, SpinSystem, merge_lines

#: Defaults for "visible": a line moved by this much, this much lean, a line this strong.
VISIBLE_SHIFT_HZ = 0.3  # about a third of a typical 1H line width (common practice)
VISIBLE_ROOF_RATIO = 1.2  # inner/outer 20 % taller stands out by eye (common practice)
VISIBLE_EXTRA_LINE = 0.02  # new lines ≥ 2 % of the strongest line
RESOLUTION_HZ = 0.2  # exact lines closer than this are one line (narrow 1H lines, common practice)


@dataclass(frozen=True)
class SecondOrderEffect:
    """The exact spectrum of a coupled pair against its first-order description."""

    field_mhz: float
    delta_nu_hz: float  # |ν_A − ν_B|
    j_hz: float
    first_order: tuple[Line, ...]
    exact: tuple[Line, ...]
    max_line_shift_hz: float  # largest move of a first-order line in the exact spectrum
    centre_shift_a_hz: float  # intensity-weighted centre of A's lines minus ν_A (signed)
    centre_shift_b_hz: float
    roof_ratio_a: float  # A's half nearer B over its far half (1 in first order)
    roof_ratio_b: float
    extra_lines: int  # visible exact lines beyond the first-order count

    @property
    def ratio(self) -> float:
        """Δν/J, the usual first-order criterion (infinite without coupling)."""
        return self.delta_nu_hz / abs(self.j_hz) if self.j_hz else float("inf")

    @property
    def roof_ratio(self) -> float:
        return max(self.roof_ratio_a, self.roof_ratio_b)

    def visible(self, shift_hz: float = VISIBLE_SHIFT_HZ,
                roof: float = VISIBLE_ROOF_RATIO) -> bool:
        """Whether the exact spectrum would look different from the first-order one."""
        return self.max_line_shift_hz >= shift_hz or self.roof_ratio >= roof or bool(
            self.extra_lines)

    def describe(self) -> str:
        """One sentence with the numbers, for a finding's message."""
        parts = [f"lines move by up to {self.max_line_shift_hz:.2f} Hz",
                 f"inner/outer intensity {self.roof_ratio:.2f}"]
        if self.extra_lines:
            parts.append(f"{self.extra_lines} extra line(s)")
        return (f"at {self.field_mhz:g} MHz, Δν = {self.delta_nu_hz:.1f} Hz and "
                f"J = {self.j_hz:g} Hz (Δν/J = {self.ratio:.1f}): " + ", ".join(parts))

    def to_json(self) -> dict:
        return {
            "field_mhz": self.field_mhz,
            "delta_nu_hz": self.delta_nu_hz,
            "j_hz": self.j_hz,
            "delta_nu_over_j": self.ratio,
            "max_line_shift_hz": self.max_line_shift_hz,
            "centre_shift_a_hz": self.centre_shift_a_hz,
            "centre_shift_b_hz": self.centre_shift_b_hz,
            "roof_ratio_a": self.roof_ratio_a,
            "roof_ratio_b": self.roof_ratio_b,
            "extra_lines": self.extra_lines,
            "visible": self.visible(),
        }


def second_order_effect(
    shift_a_ppm: float,
    shift_b_ppm: float,
    j_hz: float,
    field_mhz: float,
    n_a: int = 1,
    n_b: int = 1,
    extra_line_floor: float = VISIBLE_EXTRA_LINE,
    resolution_hz: float = RESOLUTION_HZ,
) -> SecondOrderEffect:
    """Compare the exact and first-order spectra of an A(n_a)B(n_b) pair coupled by ``j_hz``.

    Exact lines closer than ``resolution_hz`` count as one (they would not be resolved).
    """
    from .first_order import first_order_spectrum
    from .quantum import quantum_spectrum

    system = SpinSystem((SpinGroup("A", shift_a_ppm, n_a), SpinGroup("B", shift_b_ppm, n_b)),
                        {(0, 1): j_hz}, field_mhz)
    exact = tuple(Line(f, f / field_mhz, i) for f, i in merge_lines(
        ((ln.freq_hz, ln.intensity) for ln in quantum_spectrum(system).lines),
        tolerance_hz=resolution_hz))
    first = first_order_spectrum(system).lines
    nu_a, nu_b = system.frequency_hz(0), system.frequency_hz(1)
    middle = (nu_a + nu_b) / 2

    def side(lines, of_a: bool):
        if nu_a == nu_b:
            return list(lines)
        return [ln for ln in lines if (ln.freq_hz > middle) == ((nu_a > nu_b) == of_a)]

    shifts = []
    for of_a in (True, False):
        fo, qm = side(first, of_a), side(exact, of_a)
        shifts.extend(min((abs(a.freq_hz - b.freq_hz) for b in qm), default=0.0) for a in fo)
    strongest = max((ln.intensity for ln in exact), default=0.0)
    visible_exact = sum(1 for ln in exact if ln.intensity >= extra_line_floor * strongest)
    return SecondOrderEffect(
        field_mhz=field_mhz,
        delta_nu_hz=abs(nu_a - nu_b),
        j_hz=j_hz,
        first_order=tuple(first),
        exact=tuple(exact),
        max_line_shift_hz=max(shifts, default=0.0),
        centre_shift_a_hz=_centre(side(exact, True)) - nu_a,
        centre_shift_b_hz=_centre(side(exact, False)) - nu_b,
        roof_ratio_a=_roof(side(exact, True), nu_a, nu_b),
        roof_ratio_b=_roof(side(exact, False), nu_b, nu_a),
        extra_lines=max(0, visible_exact - len(first)),
    )


def _centre(lines) -> float:
    total = sum(ln.intensity for ln in lines)
    return sum(ln.freq_hz * ln.intensity for ln in lines) / total if total else 0.0


def _roof(lines, own_hz: float, partner_hz: float, tolerance_hz: float = 1e-6) -> float:
    """Intensity on the partner's side of ``own_hz`` over the far side (lines at it: half each)."""
    towards = 1.0 if partner_hz > own_hz else -1.0
    near = far = 0.0
    for ln in lines:
        offset = (ln.freq_hz - own_hz) * towards
        if abs(offset) <= tolerance_hz:
            near += ln.intensity / 2
            far += ln.intensity / 2
        elif offset > 0:
            near += ln.intensity
        else:
            far += ln.intensity
    return near / far if far else float("inf")


__all__ = ["SecondOrderEffect", "second_order_effect"]
