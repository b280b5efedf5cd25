"""Spin systems: validation, spins from nuclei, components and strong clusters."""

import pytest

from peakproof.simulate import SpinGroup, SpinSystem, SpinSystemError, spin_of


def test_spin_defaults_to_the_nucleus():
    """1H is spin ½, 2H spin 1 and 11B spin 3/2 (IUPAC nuclear spin table, common practice)."""
    assert 0.5 == SpinGroup("H", 1.0).spin
    assert 1.0 == SpinGroup("D", 1.0, nucleus="2H").spin
    assert 1.5 == spin_of("11B")


def test_explicit_spin_wins():
    """A spin given as a plain number is used as given."""
    assert 1.0 == SpinGroup("N", 0.0, nucleus="15N", spin=1).spin


def test_unknown_nucleus_is_explained():
    """An unknown nucleus with no spin given asks for the spin."""
    with pytest.raises(SpinSystemError, match="give its spin"):
        SpinGroup("Q", 0.0, nucleus="999Xx")


@pytest.mark.parametrize("count", [0, 1.5, -2, True])
def test_count_must_be_whole(count):
    """A group holds a whole, positive number of nuclei."""
    with pytest.raises(SpinSystemError, match="whole number"):
        SpinGroup("a", 1.0, count)


def test_coupling_indices_are_checked():
    """Couplings must join two existing, different groups."""
    groups = (SpinGroup("a", 1.0), SpinGroup("b", 2.0))
    with pytest.raises(SpinSystemError, match="indices"):
        SpinSystem(groups, {(0, 2): 7.0})
    with pytest.raises(SpinSystemError, match="indices"):
        SpinSystem(groups, {(1, 1): 7.0})


def test_couplings_are_symmetric():
    """J(i, j) and J(j, i) are the same coupling; zero couplings are dropped."""
    system = SpinSystem((SpinGroup("a", 1.0), SpinGroup("b", 2.0), SpinGroup("c", 3.0)),
                        {(1, 0): 7.0, (1, 2): 0.0})
    assert 7.0 == system.j(0, 1) == system.j(1, 0)
    assert {(0, 1): 7.0} == system.couplings
    assert [(0, 1), (2,)] == system.components()
    hash(system)


def test_strong_clusters_cut_weak_and_heteronuclear_couplings():
    """Heteronuclear couplings never join a cluster; |Δν/J| ≥ the ratio cuts one."""
    system = SpinSystem(
        (SpinGroup("a", 7.00), SpinGroup("b", 7.05), SpinGroup("c", 2.00),
         SpinGroup("F", -110.0, nucleus="19F")),
        {(0, 1): 8.0, (1, 2): 1.0, (0, 3): 9.0},
    )
    assert [(0, 1, 2)] == system.strong_clusters()
    assert [(0, 1), (2,)] == system.strong_clusters(weak_ratio=50)
    assert 2.5 == pytest.approx(system.coupling_ratio(0, 1))
    assert float("inf") == system.coupling_ratio(0, 3)


def test_subsystem_and_reordering_keep_couplings():
    """Taking part of a system, or reordering it, carries the couplings along."""
    system = SpinSystem((SpinGroup("a", 1.0), SpinGroup("b", 2.0), SpinGroup("c", 3.0)),
                        {(0, 2): 5.0, (1, 2): 3.0})
    sub, kept = system.subsystem([2, 0])
    assert [0, 2] == kept
    assert {(0, 1): 5.0} == sub.couplings
    moved = system.reordered([2, 1, 0])
    assert 5.0 == moved.j(0, 2) and 3.0 == moved.j(0, 1)
    with pytest.raises(SpinSystemError, match="permutation"):
        system.reordered([0, 0, 1])
