"""check --format json names the compound and, for Word and PDF, the place in the original."""

import json
from importlib import resources
from pathlib import Path

import jsonschema

from peakproof.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def _findings(path, capsys):
    main(["check", str(path), "--format", "json"])
    payload = json.loads(capsys.readouterr().out)
    schema = json.loads(resources.files("peakproof").joinpath("schema/check.schema.json").read_text())
    jsonschema.validate(payload, schema)
    return payload["documents"][0]["findings"]


def test_word_findings_give_paragraph_and_run(capsys):
    """A finding in the demo .docx says which paragraph and run it is in."""
    first = _findings(EXAMPLES / "demo_si.docx", capsys)[0]
    assert "1a" == first["compound"]
    assert first["where"].startswith("paragraph ") and ", run " in first["where"]
    assert {"paragraph", "run"} <= set(first["location"])


def test_pdf_findings_give_page_and_line(capsys):
    """…and in the PDF twin, which page and line."""
    first = _findings(EXAMPLES / "demo_si.pdf", capsys)[0]
    assert first["where"].startswith("page ") and "line" in first["where"]


def test_text_findings_have_no_extra_place(capsys):
    """Plain text keeps line and column only (they already are the original's)."""
    first = _findings(EXAMPLES / "demo_si.txt", capsys)[0]
    assert "where" not in first and first["line"] >= 1
