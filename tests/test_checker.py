"""The checker engine: rule selection, severities, inline markers, settings files, networks."""

from __future__ import annotations

import pytest

import peakproof
from peakproof.checker import check, check_document
from peakproof.config import Config, ConfigError, config_from_table, load_config
from peakproof.network import build_network
from peakproof.report import apply_suggestion

UNORDERED = "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H), 7.10 (s, 1H), 2.20 (s, 3H)."


def rules(text, **kw):
    return [d.rule for d in check(peakproof.parse(text), **kw)]


def test_findings_are_sorted_and_carry_code_span_and_data():
    text = "1H NMR (400 MHz, CDCl3) δ 7.40 (dd, J = 8.4 Hz, 1H), 6.80 (d, J = 8.4 Hz, 1H)."
    [d] = check(peakproof.parse(text))
    assert (d.rule, d.code, d.severity) == ("multiplicity-j-count", "PP101", "error")
    assert text[d.span.start : d.span.end] == "dd"
    assert d.data == {"multiplicity": "dd", "expected_j": 2, "given_j": [8.4]}


def test_select_ignore_and_severity_override_by_name_code_or_family():
    assert rules(UNORDERED) == ["shift-order"]
    assert rules(UNORDERED, config=Config(ignore=("PP801",))) == []
    assert rules(UNORDERED, config=Config(select=("multiplicity",))) == []
    assert rules(UNORDERED, config=Config(select=("form",))) == ["shift-order"]
    [d] = check(peakproof.parse(UNORDERED), Config(severity={"shift-order": "error"}))
    assert d.severity == "error"
    assert rules(UNORDERED, config=Config(shift_order="either")) == ["shift-order"]  # mixed, not ascending


def test_inline_marker_silences_named_rules_for_one_block_only():
    marked = f"<!-- peakproof: ignore shift-order -->\n{UNORDERED}\n\nNext compound.\n\n{UNORDERED}\n"
    doc = peakproof.parse(marked)
    assert doc.blocks[0].suppressed == ("shift-order",)
    findings = check(doc)
    assert [d.rule for d in findings] == ["shift-order"]
    assert findings[0].span.start > doc.blocks[0].span.end
    by_code = peakproof.parse(f"peakproof: ignore PP801\n{UNORDERED}\n")
    assert check(by_code) == []


def test_suggestions_apply_and_fix_the_finding():
    cases = [
        "1H NMR (400 MHz, CDCl3) δ 7.20 (dd, J = 7.5, 7.4 Hz, 1H), 6.95 (d, J = 7.5 Hz, 2H).",
        "1H NMR (400 MHz, CDCl3) δ 7.40 (d, J = 8.4 Hz, 1H), 6.95 (dd, J = 2.0, 8.4 Hz, 1H), 6.80 (d, J = 2.0 Hz, 1H).",
        "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1, 2H), 1.25 (t, J = 7.1 Hz, 3H).",
        "1H NMR (400 MHz, CDCl3) δ 7.40-7.31 (m, 4H), 1.60–1.52 (m, 2H).",
        "1H NMR (400 MHz, CDCl3) δ 3.81 (s, 3H); 13C NMR (125 MHz, CDCl3) δ 55.3.",
        # the value computed for the formula as written, not for the ion: the formula is fixed
        "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3 206.0937, found 229.0838.",
        "13C NMR (101 MHz, CDCl3) δ 171.1, 128.5, 128.5, 55.3.",
    ]
    for text in cases:
        [d] = [d for d in check(peakproof.parse(text)) if d.suggestion]
        fixed = apply_suggestion(text, d.suggestion)
        assert fixed != text
        assert d.rule not in rules(fixed), (text, fixed)


def test_equal_j_suggestion_text():
    text = "1H NMR (400 MHz, CDCl3) δ 2.91 (ddd, J = 7.5, 7.4, 2.0 Hz, 1H), 2.40 (m, 3H)."
    [d] = [d for d in check(peakproof.parse(text)) if d.rule == "equal-j-multiplet"]
    assert "2.91 (td, J = 7.5, 2.0 Hz, 1H)" in apply_suggestion(text, d.suggestion)


def test_formula_sources_and_exchangeable_note():
    text = "1H NMR (400 MHz, CDCl3) δ 7.90 (d, J = 8.8 Hz, 2H), 6.88 (d, J = 8.8 Hz, 2H)."
    [d] = [d for d in check(peakproof.parse(text), formula="C7H6O3") if d.rule == "integration-h-count"]
    assert d.severity == "note" and "exchangeable" in d.message  # 2 H short, 3 O to carry them
    [d] = [d for d in check(peakproof.parse(text), formula="C7H8") if d.rule == "integration-h-count"]
    assert d.severity == "warning"  # no O or N: nothing exchangeable
    hrms = text + " HRMS (ESI) m/z [M + H]+ calcd for C7H7O3 139.0390, found 139.0392."
    [d] = [d for d in check(peakproof.parse(hrms)) if d.rule == "integration-h-count"]
    assert d.data["formula_source"] == "HRMS" and d.data["formula"] == "C7H6O3"


def test_parse_diagnostics_are_included():
    doc = peakproof.parse("1H NMR (400 MHz, CDCl3) δ 7.26 (d, J ¼ 8.4 Hz, 1H), 7.10 (d, J = 8.4 Hz, 1H).")
    assert [d.rule for d in doc.diagnostics] == ["repair-equals-glyph"]
    assert "repair-equals-glyph" in {d.rule for d in check(doc)}
    assert "repair-equals-glyph" not in {d.rule for d in check(doc, Config(ignore=("repair",)))}


def test_network_is_plain_data():
    spectrum = peakproof.parse(
        "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 2.04 (s, 3H), 1.25 (t, J = 7.2 Hz, 3H)."
    ).blocks[0].spectra[0]
    net = build_network(spectrum, 0.3)
    assert [(e.i, e.j) for e in net.edges] == [(0, 2)]
    edge = net.edges[0]
    assert abs(edge.j_hz - 7.15) < 1e-9
    assert abs(edge.delta_nu_hz - (4.12 - 1.25) * 400) < 1e-6  # Δν = Δδ × MHz
    out = net.to_json()
    assert out["nodes"][1] == {"index": 1, "shift_ppm": 2.04, "count": 3.0, "multiplicity": "s", "j_hz": []}
    assert build_network(spectrum, 0.01).edges == ()
    result = check_document(peakproof.parse("1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)."))
    assert result.networks[0]["edges"][0]["i"] == 0


def test_settings_from_pyproject_with_unknown_key_suggestion(tmp_path):
    (tmp_path / "pyproject.toml").write_text(
        '[tool.peakproof]\nignore = ["shift-order"]\ncoupling-tolerence = 0.5\nhrms-ppm = 3\n'
        '[tool.peakproof.severity]\nPP101 = "warning"\n', "utf-8")
    sub = tmp_path / "data"
    sub.mkdir()
    config = load_config(near=sub / "si.txt")
    assert config.ignore == ("shift-order",) and config.hrms_ppm == 3.0
    assert config.severity == {"PP101": "warning"}
    assert len(config.problems) == 1 and "did you mean 'coupling-tolerance'" in config.problems[0]


def test_bad_settings_are_errors_for_people(tmp_path):
    with pytest.raises(ConfigError, match="non-negative number"):
        config_from_table({"ea-tolerance": "wide"})
    with pytest.raises(ConfigError, match="error, warning or note"):
        config_from_table({"severity": {"shift-order": "fatal"}})
    broken = tmp_path / "bad.toml"
    broken.write_text("[tool.peakproof\n", "utf-8")
    with pytest.raises(ConfigError, match="not valid TOML"):
        load_config(broken)
    assert "unknown rule" in config_from_table({"ignore": ["shift-ordr"]}).problems[0]


def test_false_positive_guards():
    # two equivalent OEt groups: CH2 4H (q) beside CH3 6H (t) is consistent (n+1 per group)
    diethyl = "1H NMR (400 MHz, CDCl3) δ 4.10 (q, J = 7.1 Hz, 4H), 1.32 (t, J = 7.1 Hz, 6H)."
    assert "reciprocity-count" not in rules(diethyl)
    assert "reciprocity-count" in rules(diethyl.replace("6H", "5H"))
    # a J that already has its partner is no near miss for an unrelated 7.5 Hz triplet
    ester = ("1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 2.31 (t, J = 7.5 Hz, 2H), "
             "1.25 (t, J = 7.1 Hz, 3H).")
    assert "coupling-near-miss" not in rules(ester)
    # a methyl ketone singlet (3H) at acetone's shift is the compound's own; an unassigned 1H is not
    assert "solvent-coincidence" not in rules("1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 2.17 (s, 3H).")
    assert "solvent-coincidence" in rules("1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 2.17 (s, 0.4H).")
