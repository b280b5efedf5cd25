"""``peakproof check``, ``rules`` and ``explain`` from the command line."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema

from peakproof.cli import main

SCHEMA = json.loads((Path(__file__).resolve().parent.parent / "src/peakproof/schema/check.schema.json").read_text("utf-8"))
CLEAN = "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).\n"
BAD = ("1H NMR (400 MHz, CDCl3) δ 7.40 (dd, J = 8.4 Hz, 1H), 6.80 (d, J = 8.4 Hz, 1H); "
       "13C NMR (125 MHz, CDCl3) δ 128.1, 115.2.\n")


def write(tmp_path, text, name="si.txt"):
    path = tmp_path / name
    path.write_text(text, "utf-8")
    return str(path)


def test_clean_file_exits_0(tmp_path, capsys):
    assert main(["check", write(tmp_path, CLEAN)]) == 0
    assert "0 errors, 0 warnings, 0 notes" in capsys.readouterr().out


def test_text_report_lines_and_exit_1(tmp_path, capsys):
    path = write(tmp_path, BAD)
    assert main(["check", path]) == 1
    out = capsys.readouterr().out.splitlines()
    assert out[0] == f"{path}:1:33: error multiplicity-j-count 'dd' calls for 2 J value(s) but 1 is given"
    assert out[2].strip() == "^^"  # the caret under "dd"
    assert any("warning frequency-mismatch" in line for line in out)
    assert any(line.strip().startswith("suggestion:") for line in out)


def test_fail_on_and_select_ignore(tmp_path):
    path = write(tmp_path, BAD)
    assert main(["check", path, "--ignore", "PP101"]) == 0  # only a warning left
    assert main(["check", path, "--ignore", "PP101", "--fail-on", "warning"]) == 1
    assert main(["check", path, "--select", "form,carbon"]) == 0
    assert main(["check", path, "--select", "no-such-rule"]) == 2


def test_missing_file_is_one_line_exit_2(tmp_path, capsys):
    assert main(["check", str(tmp_path / "absent.txt")]) == 2
    err = capsys.readouterr().err
    assert err.strip().endswith("absent.txt: no such file") and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1


def test_bad_formula_option_is_usage_error(tmp_path, capsys):
    assert main(["check", write(tmp_path, CLEAN), "--formula", "C12H$$"]) == 2
    assert "--formula" in capsys.readouterr().err


def test_json_output_validates_and_has_networks(tmp_path, capsys):
    assert main(["check", write(tmp_path, BAD), "--format", "json"]) == 1
    payload = json.loads(capsys.readouterr().out)
    jsonschema.validate(payload, SCHEMA)
    doc = payload["documents"][0]
    assert doc["findings"][0]["rule"] == "multiplicity-j-count" and doc["findings"][0]["code"] == "PP101"
    fix = [f for f in doc["findings"] if f["rule"] == "frequency-mismatch"][0]["suggestion"]
    assert fix["replace"][0]["text"] == "100.6"
    assert doc["networks"][0]["edges"][0]["j_hz"] == 8.4
    assert payload["summary"] == {"error": 1, "warning": 1, "note": 0}


def test_json_of_the_demo_validates(capsys):
    demo = Path(__file__).resolve().parent.parent / "examples" / "demo_si.txt"
    if not demo.exists():
        return
    main(["check", str(demo), "--format", "json"])
    jsonschema.validate(json.loads(capsys.readouterr().out), SCHEMA)


def test_settings_from_nearest_pyproject_and_unknown_key(tmp_path, capsys):
    (tmp_path / "pyproject.toml").write_text('[tool.peakproof]\nignore = ["PP101"]\nfial-on = "note"\n', "utf-8")
    folder = tmp_path / "si"
    folder.mkdir()
    path = write(folder, BAD)
    assert main(["check", path]) == 0
    assert "unknown key 'fial-on'" in capsys.readouterr().err
    other = write(tmp_path, 'fail-on = "warning"\n', "strict.toml")
    assert main(["check", path, "--config", other]) == 1  # the given file replaces pyproject.toml


def test_rules_and_explain(capsys):
    assert main(["rules"]) == 0
    listing = capsys.readouterr().out
    assert "PP101  multiplicity-j-count" in listing and "PP901" in listing
    assert main(["explain", "PP221"]) == 0
    text = capsys.readouterr().out
    assert text.startswith("second-order-ab (PP221)") and "fail:" in text and "Source:" in text
    assert main(["explain", "multiplicity-jcount"]) == 2
    assert "did you mean multiplicity-j-count" in capsys.readouterr().err


def test_prose_without_data_says_so(tmp_path, capsys):
    path = write(tmp_path, "The flask was cooled to 0 °C and stirred overnight.\n")
    assert main(["check", path]) == 0
    out = capsys.readouterr().out
    assert f"{path}: no characterization data found" in out.splitlines()


def test_json_findings_name_their_own_compound(tmp_path, capsys):
    """Each finding carries the compound of the block it lies in (found by bisection over the
    blocks), not a neighbour's; a finding between blocks has none."""
    text = ("Compound 3a. " + CLEAN + "\nCompound 3b. " + BAD + "\nCompound 3c. " + CLEAN
            + "\nCompound 3d. " + BAD)
    assert main(["check", write(tmp_path, text), "--format", "json"]) == 1
    findings = json.loads(capsys.readouterr().out)["documents"][0]["findings"]
    assert findings and {f["compound"] for f in findings} == {"3b", "3d"}


def test_api_check_accepts_text():
    import peakproof

    from_text = peakproof.check(BAD).diagnostics
    from_doc = peakproof.check(peakproof.parse(BAD)).diagnostics
    assert [d.rule for d in from_text] == [d.rule for d in from_doc]
    assert "multiplicity-j-count" in {d.rule for d in from_text}
