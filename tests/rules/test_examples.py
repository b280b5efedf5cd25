"""Every rule's own examples: each 'fail' triggers exactly that rule, each 'pass' does not trigger it."""

from __future__ import annotations

import pytest

import peakproof
from peakproof.checker import check_document
from peakproof.rules import all_rules

CASES = [
    pytest.param(rule, example[0], example[1], example[2] if len(example) > 2 else None,
                 id=f"{rule.name}-{example[0]}-{n}")
    for rule in all_rules()
    for n, example in enumerate(rule.examples)
]


@pytest.mark.parametrize("rule, kind, text, formula", CASES)
def test_rule_example(rule, kind, text, formula):
    doc = peakproof.parse(text)
    assert not doc.diagnostics, f"example does not parse cleanly: {doc.diagnostics}"
    fired = {d.rule for d in check_document(doc, formula=formula, strict=True).diagnostics}
    if kind == "fail":
        assert fired == {rule.name}, f"{rule.name} fail example fired {sorted(fired)}"
    else:
        assert rule.name not in fired, f"{rule.name} pass example fired it"


def test_every_rule_has_both_kinds_of_example():
    for rule in all_rules():
        kinds = [example[0] for example in rule.examples]
        assert "pass" in kinds and "fail" in kinds, rule.name


def test_names_and_codes_are_unique_and_well_formed():
    rules = all_rules()
    assert len({r.name for r in rules}) == len(rules)
    assert len({r.code for r in rules}) == len(rules)
    for r in rules:
        assert r.name == r.name.lower() and " " not in r.name and "_" not in r.name
        assert r.code.startswith("PP") and len(r.code) == 5
        assert r.source and r.rationale and r.message
