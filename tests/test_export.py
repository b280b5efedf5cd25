"""Exports: the parse JSON shape, one JSON Lines record per signal or spectrum, flat CSV."""

from __future__ import annotations

import csv
import io
import json

import jsonschema
import pytest

import peakproof
from peakproof.cli import main
from peakproof.export import SIGNAL_COLUMNS, export

TEXT = ("1H NMR (400 MHz, CDCl3) δ 7.31 (dd, J = 8.4, 2.1 Hz, 1H, ArH), 3.80 (s, 3H); "
        "13C{1H} NMR (101 MHz, CDCl3) δ 159.1, 55.3.\n")  # fmt: skip


def _docs():
    return [peakproof.parse(TEXT, path="si.txt")]


def test_json_is_the_parse_shape():
    payload = json.loads(export(_docs(), "json"))
    assert payload == json.loads(json.dumps(_docs()[0].to_json()))
    from pathlib import Path

    schema_path = Path(peakproof.__file__).parent / "schema" / "parse.schema.json"
    if schema_path.exists():
        jsonschema.validate(payload, json.loads(schema_path.read_text(encoding="utf-8")))


def test_jsonl_one_record_per_signal_and_per_spectrum():
    lines = export(_docs(), "jsonl", "signal").splitlines()
    records = [json.loads(line) for line in lines]
    assert [r["shift"] for r in records] == [7.31, 3.80, 159.1, 55.3]
    assert records[0]["j_hz"] == [8.4, 2.1] and records[0]["assignment"] == "ArH"
    assert records[2]["decoupled"] == ["1H"] and records[2]["nucleus"] == "13C"
    spectra = [json.loads(line) for line in export(_docs(), "jsonl", "spectrum").splitlines()]
    assert [s["signal_count"] for s in spectra] == [2, 2]


def test_csv_has_flat_columns():
    rows = list(csv.DictReader(io.StringIO(export(_docs(), "csv", "signal"))))
    assert tuple(rows[0]) == SIGNAL_COLUMNS
    assert rows[0]["j_hz"] == "8.4; 2.1" and rows[0]["multiplicity"] == "dd"
    assert rows[1]["multiplicity"] == "s" and rows[1]["count"] == "3"
    spectra = list(csv.DictReader(io.StringIO(export(_docs(), "csv", "spectrum"))))
    assert spectra[1]["shifts"] == "159.1; 55.3"


def test_export_command(tmp_path, capsys):
    path = tmp_path / "si.txt"
    path.write_text(TEXT, encoding="utf-8")
    assert main(["export", str(path), "--to", "csv"]) == 0
    assert capsys.readouterr().out.startswith("file,block,compound,nucleus")
    out = tmp_path / "out.jsonl"
    assert main(["export", str(path), "--to", "jsonl", "--per", "spectrum", "-o", str(out)]) == 0
    assert len(out.read_text(encoding="utf-8").splitlines()) == 2
    assert main(["export", str(tmp_path / "nope.txt")]) == 2


def test_bad_export_options():
    with pytest.raises(ValueError):
        export(_docs(), "xml")
