"""Exact spectra against closed-form textbook results, limits and sum rules."""

import math

import numpy as np
import pytest

from peakproof.simulate import (
    SpinGroup,
    SpinSystem,
    composite_spins,
    first_order_spectrum,
    quantum_spectrum,
    simulate,
)


def _pairs(simulation, floor=1e-6):
    return [(line.freq_hz, line.intensity) for line in simulation.lines if line.intensity > floor]


def _matched(expected_freqs, simulation, tolerance_hz=1e-6):
    """Every expected frequency has a simulated line and vice versa."""
    found = [f for f, _ in _pairs(simulation)]
    assert all(min(abs(f - e) for f in found) < tolerance_hz for e in expected_freqs), found
    assert all(min(abs(f - e) for e in expected_freqs) < tolerance_hz for f in found), found


class TestAB:
    @pytest.mark.parametrize("delta_hz, j_hz", [(20.0, 10.0), (5.0, 12.0), (80.0, 16.0)])
    def test_matches_closed_form(self, delta_hz, j_hz):
        """AB lines at ν0 ± ½(D ± J), D = √(Δν² + J²), intensities ∝ 1 ∓ J/D
        (Günther, NMR Spectroscopy, 3rd ed., Wiley 2013, the AB system)."""
        field = 400.0
        nu_a, nu_b = 1200.0, 1200.0 + delta_hz
        system = SpinSystem(
            (SpinGroup("A", nu_a / field, 1), SpinGroup("B", nu_b / field, 1)),
            {(0, 1): j_hz},
            field,
        )
        lines = _pairs(quantum_spectrum(system))
        centre = (nu_a + nu_b) / 2
        d = math.sqrt(delta_hz**2 + j_hz**2)
        outer, inner = 1 - j_hz / d, 1 + j_hz / d
        expected = [
            (centre - (d + j_hz) / 2, outer),
            (centre - (d - j_hz) / 2, inner),
            (centre + (d - j_hz) / 2, inner),
            (centre + (d + j_hz) / 2, outer),
        ]
        assert [f for f, _ in expected] == pytest.approx([f for f, _ in lines], abs=1e-9)
        # intensities are normalised to 2 nuclei: the four ∝ values add up to 4
        assert [i / 2 for _, i in expected] == pytest.approx([i for _, i in lines], abs=1e-9)


class TestAB2:
    @pytest.mark.parametrize("nu_a, nu_b, j_hz", [(1000.0, 1010.0, 8.0), (1040.0, 1000.0, 6.0)])
    def test_line_positions_match_analytic_result(self, nu_a, nu_b, j_hz):
        """AB2 (Pople, Schneider & Bernstein, High-resolution NMR, 1959, AB2 analysis; also
        Günther 2013).  With Δ = ν_A − ν_B and C± = ½√(Δ² ± ΔJ + 9J²/4) the nine lines are
        ν_A;  ½(ν_A + ν_B) + ¾J ± C+;  ½(ν_A + ν_B) − ¾J ± C−;  ν_B ± C+ ± C−
        (the last with both signs negative is the weak combination line)."""
        system = SpinSystem(
            (SpinGroup("A", nu_a / 400, 1), SpinGroup("B", nu_b / 400, 2)), {(0, 1): j_hz}
        )
        delta = nu_a - nu_b
        c_plus = 0.5 * math.sqrt(delta**2 + delta * j_hz + 9 * j_hz**2 / 4)
        c_minus = 0.5 * math.sqrt(delta**2 - delta * j_hz + 9 * j_hz**2 / 4)
        mean = (nu_a + nu_b) / 2
        expected = [nu_a]
        expected += [mean + 0.75 * j_hz + s * c_plus for s in (1, -1)]
        expected += [mean - 0.75 * j_hz + s * c_minus for s in (1, -1)]
        expected += [nu_b + s * c_plus + t * c_minus for s in (1, -1) for t in (1, -1)]
        simulation = quantum_spectrum(system)
        _matched(expected, simulation)
        assert 3.0 == pytest.approx(simulation.total_intensity)


def test_weak_coupling_limit_reproduces_first_order():
    """At Δν/J = 1000 the exact AMX-type spectrum equals first order within 0.01 Hz."""
    j_am, j_mx, j_ax = 7.0, 5.0, 1.5
    field = 400.0
    nu = [400.0, 400.0 + 1000 * j_am, 400.0 + 2000 * j_am]
    system = SpinSystem(
        tuple(SpinGroup(label, f / field, n) for label, f, n in zip("AMX", nu, (1, 2, 3))),
        {(0, 1): j_am, (1, 2): j_mx, (0, 2): j_ax},
        field,
    )
    exact = _pairs(quantum_spectrum(system), floor=1e-4)
    first = [(line.freq_hz, line.intensity) for line in first_order_spectrum(system).lines]
    # second-order shifts (≈ J²/Δν) may split a first-order line into close lines: sum them
    for freq, intensity in first:
        nearby = sum(i for f, i in exact if abs(f - freq) < 0.01)
        assert intensity == pytest.approx(nearby, abs=2e-3)
    for freq, _ in exact:
        assert min(abs(freq - f) for f, _ in first) < 0.01
    assert 6.0 == pytest.approx(sum(i for _, i in exact), abs=1e-3)


@pytest.mark.parametrize("reduce", [True, False])
def test_total_intensity_is_number_of_observed_nuclei(reduce):
    """Sum rule: the lines of a strongly coupled system add up to its observed nuclei."""
    system = SpinSystem(
        (
            SpinGroup("a", 7.30, 2),
            SpinGroup("b", 7.25, 1),
            SpinGroup("c", 7.20, 2),
            SpinGroup("d", 2.35, 3),
            SpinGroup("F", -110.0, 1, nucleus="19F"),
        ),
        {(0, 1): 7.6, (1, 2): 7.4, (0, 2): 1.3, (2, 3): 0.6, (0, 4): 8.8},
    )
    assert 8.0 == pytest.approx(quantum_spectrum(system, reduce_equivalent=reduce).total_intensity)


def test_unobserved_group_couples_but_shows_no_lines():
    """observed=False keeps the splitting but removes the group's own lines."""
    system = SpinSystem(
        (SpinGroup("A", 2.0, 1), SpinGroup("X", 5.0, 1, observed=False)), {(0, 1): 10.0}
    )
    lines = quantum_spectrum(system).lines
    assert 1.0 == pytest.approx(sum(line.intensity for line in lines))
    # X lines borrow only (J/Δν)²-small intensity from the A spin's F⁻
    assert all(line.intensity < 1e-4 for line in lines if line.ppm > 3)
    assert 1.0 == pytest.approx(sum(line.intensity for line in lines if line.ppm < 3), abs=1e-4)


def test_heteronuclear_partner_splits_by_j():
    """A 1H coupled to one 19F is a doublet split by J(H,F), with no strong-coupling effects."""
    system = SpinSystem(
        (SpinGroup("H", 6.0, 1), SpinGroup("F", 6.0, 1, nucleus="19F")), {(0, 1): 48.0}
    )
    flat = [x for pair in _pairs(quantum_spectrum(system)) for x in pair]
    assert [2400.0 - 24.0, 0.5, 2400.0 + 24.0, 0.5] == pytest.approx(flat)


def test_deuterium_partner_gives_1_1_1_triplet():
    """CHD: the proton is split 1:1:1 by one deuteron (spin 1, from the nucleus)."""
    system = SpinSystem(
        (SpinGroup("H", 3.0, 1), SpinGroup("D", 3.0, 1, nucleus="2H")), {(0, 1): 2.0}
    )
    assert [1 / 3] * 3 == pytest.approx([i for _, i in _pairs(quantum_spectrum(system))])


def test_order_of_groups_does_not_matter():
    """Listing the groups in another order gives the same lines."""
    system = SpinSystem(
        (SpinGroup("a", 7.1, 1), SpinGroup("b", 7.0, 2), SpinGroup("c", 6.9, 1),
         SpinGroup("d", 3.0, 3)),
        {(0, 1): 8.0, (1, 2): 7.0, (0, 2): 2.0, (2, 3): 0.7},
    )
    reference = np.array(_pairs(quantum_spectrum(system), floor=1e-5))
    for order in ([3, 2, 1, 0], [1, 3, 0, 2]):
        other = np.array(_pairs(quantum_spectrum(system.reordered(order)), floor=1e-5))
        np.testing.assert_allclose(other, reference, atol=1e-8)


@pytest.mark.parametrize(
    "count, spin, expected",
    [
        (2, 0.5, [(1.0, 1), (0.0, 1)]),  # A2: triplet + singlet (common practice)
        (3, 0.5, [(1.5, 1), (0.5, 2)]),  # A3: quartet + two doublets
        (4, 0.5, [(2.0, 1), (1.0, 3), (0.0, 2)]),
        (2, 1.0, [(2.0, 1), (1.0, 1), (0.0, 1)]),  # two spin-1: 1 ⊗ 1 = 2 ⊕ 1 ⊕ 0
    ],
)
def test_composite_spins(count, spin, expected):
    """Equivalent spins decompose into total spins by the angular-momentum sum rules."""
    assert expected == composite_spins(count, spin)


def test_large_cluster_is_split_at_weak_coupling_with_note():
    """A cluster over the limit is cut at its weakest coupling, and the result says so."""
    groups = tuple(SpinGroup(f"H{k}", 7.0 + 0.05 * k, 1) for k in range(4))
    groups += tuple(SpinGroup(f"C{k}", 1.0 + 0.05 * k, 1) for k in range(4))
    couplings = {(k, k + 1): 7.0 for k in range(3)}
    couplings.update({(k, k + 1): 7.0 for k in range(4, 7)})
    couplings[(3, 4)] = 0.5  # weak bridge between the two halves
    system = SpinSystem(groups, couplings)
    exact = quantum_spectrum(system)
    split = quantum_spectrum(system, max_spins=4)
    assert exact.notes == ()
    assert any("treated as weak" in note for note in split.notes)
    assert 8.0 == pytest.approx(split.total_intensity)
    strong = [line for line in exact.lines if line.intensity > 1e-3]
    for line in strong:  # bounded by half the cut coupling (see quantum.py)
        assert min(abs(line.freq_hz - other.freq_hz) for other in split.lines) < 0.25 + 1e-3


def test_cut_to_an_isolated_group_is_accurate():
    """Cutting a weak coupling to a lone group (AB + distant X) moves lines by ≲ J²/Δν only."""
    system = SpinSystem(
        (SpinGroup("A", 7.0, 1), SpinGroup("B", 7.05, 1), SpinGroup("X", 1.0, 3)),
        {(0, 1): 7.0, (0, 2): 0.8},
    )
    exact = _pairs(quantum_spectrum(system), floor=1e-3)
    split = quantum_spectrum(system, weak_ratio=100)
    observed_ab = [(f, i) for f, i in exact if f > 2000]
    for freq, _ in observed_ab:
        assert min(abs(freq - line.freq_hz) for line in split.lines) < 1e-3


def test_strongly_coupled_cluster_over_limit_falls_back_to_first_order_with_note():
    """A cluster that cannot be cut is simulated first order, and the result says so."""
    system = SpinSystem(
        tuple(SpinGroup(f"H{k}", 7.0 + 0.01 * k, 1) for k in range(4)),
        {(k, k + 1): 8.0 for k in range(3)},
    )
    result = quantum_spectrum(system, max_spins=3)
    assert any("first order" in note for note in result.notes)
    assert 4.0 == pytest.approx(result.total_intensity)


def test_simulate_dispatches_and_explains_unknown_method():
    """simulate() runs either method by name; a wrong name gets a helpful message."""
    system = SpinSystem((SpinGroup("A", 1.0, 1),))
    assert "quantum" == simulate(system).method
    assert "first-order" == simulate(system, "first-order").method
    with pytest.raises(ValueError, match="first-order"):
        simulate(system, "exact")


def test_first_order_method_refuses_quantum_options():
    """Options of the exact method are not silently ignored by the first-order one."""
    system = SpinSystem((SpinGroup("A", 1.0, 1),))
    with pytest.raises(ValueError, match="max_spins"):
        simulate(system, "first-order", max_spins=8)
