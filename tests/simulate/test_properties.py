"""Random small spin systems: the composite-spin reduction changes nothing but speed."""

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from peakproof.simulate import SpinGroup, SpinSystem, quantum_spectrum


@st.composite
def small_systems(draw):
    """Up to four groups, at most six spin-½ nuclei in all, random shifts and couplings."""
    counts = draw(st.lists(st.integers(1, 3), min_size=1, max_size=4))
    total = 0
    kept = []
    for count in counts:
        if total + count > 6:
            break
        kept.append(count)
        total += count
    groups = tuple(
        SpinGroup(f"g{k}", draw(st.floats(1.0, 1.3)), count) for k, count in enumerate(kept)
    )
    couplings = {}
    for i in range(len(groups)):
        for j in range(i + 1, len(groups)):
            if draw(st.booleans()):
                couplings[(i, j)] = draw(st.floats(-18.0, 18.0).filter(lambda v: abs(v) > 0.1))
    return SpinSystem(groups, couplings, draw(st.sampled_from([60.0, 300.0, 600.0])))


def _spectrum(simulation):
    return np.array([(line.freq_hz, line.intensity) for line in simulation.lines])


def _assert_same_lines(a, b, window_hz=1e-3):
    """Each clear line of one spectrum is matched in the other by the intensity nearby.

    Summing within a window keeps the check blind to how near-coincident lines were merged.
    """
    for mine, theirs in ((a, b), (b, a)):
        for freq, _intensity in mine[mine[:, 1] > 1e-5]:
            near_mine = mine[np.abs(mine[:, 0] - freq) < window_hz, 1].sum()
            near_theirs = theirs[np.abs(theirs[:, 0] - freq) < window_hz, 1].sum()
            assert abs(near_mine - near_theirs) < 1e-6, (freq, near_mine, near_theirs)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(small_systems())
def test_reduction_agrees_with_full_product_basis(system):
    """Composite spins and the full product basis give the same lines."""
    reduced = quantum_spectrum(system, reduce_equivalent=True)
    full = quantum_spectrum(system, reduce_equivalent=False)
    _assert_same_lines(_spectrum(reduced), _spectrum(full))
    assert abs(reduced.total_intensity - sum(g.count for g in system.groups)) < 1e-5


@settings(max_examples=25, deadline=None)
@given(small_systems(), st.randoms(use_true_random=False))
def test_order_of_groups_never_matters(system, random):
    """Any permutation of the groups gives the same lines."""
    order = list(range(len(system.groups)))
    random.shuffle(order)
    _assert_same_lines(
        _spectrum(quantum_spectrum(system)), _spectrum(quantum_spectrum(system.reordered(order)))
    )
