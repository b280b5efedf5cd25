"""``peakproof simulate`` through the CLI: formats, exit codes, JCAMP-DX read back."""

import json
from pathlib import Path

import jcamp
import numpy as np
import pytest

from peakproof.cli import main
from peakproof.jcamp import read_jcamp

_read_with_package = getattr(jcamp, "jcamp_readfile", None) or jcamp.readfile

TEXT = """Ethyl 4-iodobenzoate (31): 1H NMR (400 MHz, CDCl3) δ 7.80 (d, J = 8.6 Hz, 2H), 7.75 (d,
J = 8.6 Hz, 2H), 4.37 (q, J = 7.1 Hz, 2H), 1.39 (t, J = 7.1 Hz, 3H); 13C{1H} NMR (101 MHz,
CDCl3) δ 166.1, 137.7, 131.1; 19F NMR (376 MHz, CDCl3) δ −110.2 (s).

Salt (32): 13C NMR (101 MHz, D2O) δ 171.2, 40.5.
"""


@pytest.fixture
def source(tmp_path):
    path = tmp_path / "si.txt"
    path.write_text(TEXT, encoding="utf-8")
    return str(path)


def _run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_json_lists_lines_and_spin_system(source, capsys):
    code, out, _ = _run(capsys, "simulate", source, "--compound", "31")
    assert code == 0
    payload = json.loads(out)
    (compound,) = payload["compounds"]
    assert compound["compound"] == "31"
    spectra = {s["nucleus"]: s for s in compound["spectra"]}
    assert set(spectra) == {"1H", "19F"}
    proton = spectra["1H"]
    assert proton["method"] == "quantum" and proton["field_mhz"] == 400.0
    assert proton["solvent"] == "CDCl3"
    assert sum(line["intensity"] for line in proton["lines"]) == pytest.approx(9, rel=1e-6)
    for line in proton["lines"]:
        assert line["offset_hz"] == pytest.approx(line["ppm"] * 400.0, abs=1e-3)
    couplings = sorted(c["j_hz"] for c in proton["spin_system"]["couplings"])
    assert couplings == [7.1, 8.6, 8.6]
    assert any("copies" in note for note in proton["notes"])


def test_first_order_and_field_options(source, capsys):
    code, out, _ = _run(capsys, "simulate", source, "--compound", "1", "--first-order",
                        "--field", "600", "--nucleus", "1H")
    assert code == 0
    (spectrum,) = json.loads(out)["compounds"][0]["spectra"]
    assert spectrum["method"] == "first-order" and spectrum["field_mhz"] == 600.0
    # First order at 600 MHz: the 7.80 doublet lines at 7.80 × 600 ± 4.3 Hz.
    offsets = [line["offset_hz"] for line in spectrum["lines"]]
    assert pytest.approx(7.80 * 600 + 4.3) in offsets and pytest.approx(7.80 * 600 - 4.3) in offsets


def test_jcamp_output_read_back_by_package_and_our_reader(source, capsys, tmp_path):
    code, out, _ = _run(capsys, "simulate", source, "--compound", "31", "--nucleus", "1H",
                        "--format", "jcamp", "--points", "4000")
    assert code == 0
    path = tmp_path / "out.jdx"
    path.write_text(out)
    theirs = _read_with_package(str(path))
    ours = read_jcamp(out)
    spectrum, peaks = theirs["children"]
    np.testing.assert_allclose(ours[0].x, spectrum["x"], rtol=1e-12, atol=1e-12)
    np.testing.assert_array_equal(ours[0].y, spectrum["y"])
    np.testing.assert_array_equal([p[0] for p in ours[1].peaks], peaks["x"])
    np.testing.assert_array_equal([p[1] for p in ours[1].peaks], peaks["y"])
    assert spectrum[".observe frequency"] == 400.0
    assert spectrum[".observe nucleus"] == "^1H"
    assert spectrum[".solvent name"] == "CDCl3"
    assert spectrum["npoints"] == 4000
    # The peak table is the simulated lines: intensities add up to the 9 protons.
    assert sum(p[1] for p in ours[1].peaks) == pytest.approx(9, rel=1e-6)
    assert max(spectrum["x"]) > 7.80 and min(spectrum["x"]) < 1.39


def test_nmredata_lines(source, capsys):
    code, out, _ = _run(capsys, "simulate", source, "--compound", "31", "--format", "nmredata")
    assert code == 0
    assert "> <NMREDATA_1D_1H>\nLarmor=400\\\n" in out
    assert "7.8000, S=d, J=8.60, N=2\\\n" in out
    assert "4.3700, S=q, J=7.10, N=2\\\n" in out
    assert "> <NMREDATA_1D_13C>\nLarmor=101\\\nDecoupled=1H\\\n166.1000\\\n" in out


@pytest.mark.parametrize("argv, expected", [
    (["--compound", "99"], "no compound '99'"),
    (["--compound", "32"], "no 1H, 19F or 31P NMR data"),
    (["--compound", "31", "--nucleus", "31P"], "no 31P NMR data"),
])
def test_refusals_are_one_line_and_exit_2(source, capsys, argv, expected):
    code, out, err = _run(capsys, "simulate", source, *argv)
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and expected in lines[0]


def test_missing_file_exits_2(tmp_path, capsys):
    code, _, err = _run(capsys, "simulate", str(tmp_path / "absent.txt"))
    assert code == 2 and "no such file" in err


def test_compound_by_block_number(source, capsys):
    code, out, _ = _run(capsys, "simulate", source, "--compound", "2", "--format", "nmredata")
    assert code == 0 and "171.2000" in out and "7.8000" not in out


def test_demo_simulates_every_compound():
    demo = Path(__file__).resolve().parent.parent / "examples" / "demo_si.txt"
    if not demo.exists():
        pytest.skip("demo file not built")
    assert main(["simulate", str(demo), "--format", "jcamp", "--points", "512"]) == 0
