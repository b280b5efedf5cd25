"""The demo write-up: the checker finds every planted error and nothing else at warning/error.

examples/planted_errors.toml lists each planted error with a family and an excerpt unique within
its compound's paragraph. A planted error counts as found when a finding of one of the family's
rules has a span overlapping the excerpt. Notes not planted must be in ALLOWED_NOTES, each with
its reason.
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

import pytest

import peakproof
from peakproof.checker import check

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"

#: planted family → the checker rules that report it
FAMILY_RULES = {
    "hrms-electron": {"hrms-calcd"},
    "hrms-adduct": {"hrms-adduct"},
    "reciprocity": {"reciprocity-count"},
    "frequency": {"frequency-mismatch", "proton-frequency-on-heteronucleus"},
    "j-order": {"j-order"},
    "ea-tolerance": {"ea-found"},
    "second-order": {"second-order-ab"},
    "multiplicity-j-count": {"multiplicity-j-count"},
    "j-on-singlet": {"singlet-with-j"},
    "impurity": {"solvent-coincidence"},
    "decoupled-multiplet": {"decoupled-multiplet"},
    "integration": {"integration-h-count", "integration-f-count"},
    "formula-mismatch": {"formula-mismatch"},
    "carbon-count": {"carbon-count-excess"},
    "hrms-tolerance": {"hrms-found"},
    "form-order": {"shift-order"},
    "form-missing-hz": {"missing-hz"},
    "form-range-dash": {"range-dash"},
    "form-decimals": {"mixed-decimals"},
    "partner-mismatch": {"coupling-near-miss"},
    "equal-j": {"equal-j-multiplet"},
}

#: (compound, rule, text in the message): notes that are right but not planted
ALLOWED_NOTES = {
    # 7.59/7.48 d, J = 8.6 Hz at 400 MHz: Δν = 44 Hz, Δν/J = 5.1, first order only approximately
    ("9", "second-order-approximate", "δ 7.59 (d) and δ 7.48 (d)"),
    # 2.73/2.84 t, J = 7.5 Hz: Δν/J = 5.9
    ("10", "second-order-approximate", "δ 2.73 (t) and δ 2.84 (t)"),
    # 2.91 dd / 2.75 td share 7.5 Hz: Δν/J = 8.5
    ("13", "second-order-approximate", "δ 2.91 (dd) and δ 2.75 (td)"),
}

pytestmark = pytest.mark.skipif(not (EXAMPLES / "planted_errors.toml").exists(), reason="demo not built")


def _paragraphs(text: str) -> dict[str, tuple[int, int]]:
    """compound label → (start, end) of its paragraph: heading line to the next heading."""
    heads = [(m.start(), m.group(1)) for m in re.finditer(r"^## .*\(([^()]+)\)\s*$", text, re.M)]
    out = {}
    for k, (start, label) in enumerate(heads):
        end = heads[k + 1][0] if k + 1 < len(heads) else len(text)
        out[label] = (start, end)
    return out


@pytest.fixture(scope="module")
def demo():
    text = (EXAMPLES / "demo_si.txt").read_text("utf-8")
    planted = tomllib.loads((EXAMPLES / "planted_errors.toml").read_text("utf-8"))["error"]
    doc = peakproof.parse(text)
    return text, planted, doc, check(doc), _paragraphs(text)


def _excerpt_span(text, paragraphs, compound, excerpt):
    start, end = paragraphs[compound]
    at = text.find(excerpt, start, end)
    assert at >= 0, f"excerpt {excerpt!r} not in compound {compound}"
    assert text.find(excerpt, at + 1, end) < 0, f"excerpt {excerpt!r} not unique in {compound}"
    return at, at + len(excerpt)


def test_every_family_is_mapped(demo):
    _, planted, _, _, _ = demo
    assert {p["family"] for p in planted} <= set(FAMILY_RULES)


def test_each_planted_error_is_found(demo):
    text, planted, _, findings, paragraphs = demo
    missing = []
    for p in planted:
        a, b = _excerpt_span(text, paragraphs, p["compound"], p["excerpt"])
        rules = FAMILY_RULES[p["family"]]
        if not any(d.rule in rules and d.span.start < b and a < d.span.end for d in findings):
            missing.append((p["compound"], p["family"], p["excerpt"]))
    assert not missing, missing


def test_nothing_else_is_reported(demo):
    text, planted, doc, findings, paragraphs = demo
    assert not doc.diagnostics, doc.diagnostics
    planted_spans = []
    for p in planted:
        a, b = _excerpt_span(text, paragraphs, p["compound"], p["excerpt"])
        planted_spans.append((a, b, FAMILY_RULES[p["family"]]))
    unexpected = []
    for d in findings:
        if any(d.rule in rules and d.span.start < b and a < d.span.end for a, b, rules in planted_spans):
            continue
        compound = next((c for c, (s, e) in paragraphs.items() if s <= d.span.start < e), None)
        excerpt_ok = any(
            c == compound and r == d.rule and x in d.message
            for c, r, x in ALLOWED_NOTES
        )
        if d.severity == "note" and excerpt_ok:
            continue
        unexpected.append((compound, d.severity, d.rule, d.message))
    assert not unexpected, unexpected


def test_allowed_notes_are_still_reported(demo):
    # an allowed note that no longer appears means the list is stale
    text, _, _, findings, paragraphs = demo
    for compound, rule, excerpt in ALLOWED_NOTES:
        s, e = paragraphs[compound]
        assert any(d.rule == rule and s <= d.span.start < e and excerpt in d.message
                   for d in findings), (compound, rule)
