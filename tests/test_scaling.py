"""Findings stay bounded as a pathological list grows: counted findings, not wall time."""

from peakproof.checker import check
from peakproof.config import Config
from peakproof.parsing import parse


def _identical(n: int) -> str:
    # n identical doublets: every pair shares J = 8.0 Hz at Δν = 0, so second-order-ab fires for each pair
    return "1H NMR (400 MHz, CDCl3) δ " + ", ".join(["7.30 (d, J = 8.0 Hz, 1H)"] * n) + ".\n"


def _by_rule(findings, rule):
    return [d for d in findings if d.rule == rule]


def test_second_order_findings_capped_with_one_closing_finding():
    for n in (10, 40):
        ab = _by_rule(check(parse(_identical(n))), "second-order-ab")
        pairs = n * (n - 1) // 2
        assert len(ab) == 21  # 20 listed + one closing finding, whatever n is
        closing = [d for d in ab if d.data and "more" in d.data]
        assert len(closing) == 1 and closing[0].data == {"more": pairs - 20, "cap": 20}
        assert f"and {pairs - 20} more like this" in closing[0].message


def test_cap_zero_lists_every_pair():
    n = 12
    ab = _by_rule(check(parse(_identical(n)), Config(max_findings_per_rule=0)), "second-order-ab")
    assert len(ab) == n * (n - 1) // 2
    assert not any(d.data and "more" in d.data for d in ab)


def test_under_the_cap_nothing_changes():
    n = 6  # 15 pairs, below the cap of 20
    ab = _by_rule(check(parse(_identical(n))), "second-order-ab")
    assert len(ab) == 15 and not any(d.data and "more" in d.data for d in ab)
