"""SARIF 2.1.0 output, validated against the OASIS schema vendored in tests/data (see README there)."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema

from peakproof.cli import main

DATA = Path(__file__).resolve().parent / "data"
SARIF_SCHEMA = json.loads((DATA / "sarif-schema-2.1.0.json").read_text("utf-8"))
TEXT = ("1H NMR (400 MHz, CDCl3) δ 7.40-7.31 (m, 4H), 1.60–1.52 (m, 2H); "
        "HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0841, found 229.0838.\n")


def run(tmp_path, capsys, text=TEXT):
    path = tmp_path / "si.txt"
    path.write_text(text, "utf-8")
    main(["check", str(path), "--format", "sarif"])
    return json.loads(capsys.readouterr().out), text


def test_sarif_validates_against_the_published_schema(tmp_path, capsys):
    log, _ = run(tmp_path, capsys)
    jsonschema.Draft4Validator(SARIF_SCHEMA).validate(log)
    assert log["version"] == "2.1.0"


def test_results_rules_regions_and_fixes(tmp_path, capsys):
    log, text = run(tmp_path, capsys)
    run0 = log["runs"][0]
    rules = run0["tool"]["driver"]["rules"]
    by_id = {r["id"]: r for r in rules}
    assert by_id["PP601"]["name"] == "hrms-calcd"
    results = {r["ruleId"]: r for r in run0["results"]}
    calcd = results["PP601"]
    assert calcd["level"] == "error" and rules[calcd["ruleIndex"]]["id"] == "PP601"
    region = calcd["locations"][0]["physicalLocation"]["region"]
    assert text[region["charOffset"] : region["charOffset"] + region["charLength"]] == "229.0841"
    [change] = calcd["fixes"][0]["artifactChanges"]
    [rep] = change["replacements"]
    assert rep["insertedContent"]["text"] == "229.0835"
    dash = results["PP805"]["fixes"][0]["artifactChanges"][0]["replacements"][0]
    start, length = dash["deletedRegion"]["charOffset"], dash["deletedRegion"]["charLength"]
    assert text[start : start + length] == "-" and dash["insertedContent"]["text"] == "–"


def test_parse_diagnostics_get_a_descriptor(tmp_path, capsys):
    log, _ = run(tmp_path, capsys, "1H NMR (400 MHz, CDCl3) δ 7.26 (d, J ¼ 8.4 Hz, 1H), 6.80 (d, J = 8.4 Hz, 1H).\n")
    jsonschema.Draft4Validator(SARIF_SCHEMA).validate(log)
    names = {r["name"] for r in log["runs"][0]["tool"]["driver"]["rules"]}
    assert "repair-equals-glyph" in names
