"""The plot command's picture: exists, has the asked size, is not blank."""

from pathlib import Path

import numpy as np
import pytest

from peakproof.cli import main

DEMO = Path(__file__).resolve().parent.parent / "examples" / "demo_si.txt"
pytestmark = pytest.mark.skipif(not DEMO.exists(), reason="demo file not built")


def _pixels(path):
    from matplotlib.image import imread

    return imread(str(path))


def test_demo_compound_renders_png_of_requested_size(tmp_path):
    out = tmp_path / "spectrum.png"
    assert main(["plot", str(DEMO), "--compound", "3", "-o", str(out), "--width", "1200",
                 "--height", "700", "--inset", "5.25:5.50"]) == 0
    image = _pixels(out)
    assert image.shape[:2] == (700, 1200)
    grey = image[..., :3].mean(axis=2)
    assert grey.var() > 1e-3  # not blank
    assert (grey < 0.5).mean() > 0.002  # some dark ink: the spectrum and its labels


def test_whole_demo_renders_one_panel_per_compound(tmp_path):
    out = tmp_path / "all.png"
    assert main(["plot", str(DEMO), "-o", str(out), "--width", "800"]) == 0
    image = _pixels(out)
    assert image.shape[1] == 800
    assert image.shape[0] == 900 * 14  # 14 compounds with 1H data in the demo
    rows = image[..., :3].mean(axis=(1, 2))
    assert np.var(rows) > 0


def test_svg_output(tmp_path):
    out = tmp_path / "spectrum.svg"
    assert main(["plot", str(DEMO), "--compound", "4", "-o", str(out)]) == 0
    text = out.read_text()
    assert text.lstrip().startswith("<?xml") and "<svg" in text


@pytest.mark.parametrize("extra", [["--inset", "7.2"], ["--width", "10"]])
def test_bad_plot_options_exit_2(tmp_path, capsys, extra):
    out = tmp_path / "x.png"
    assert main(["plot", str(DEMO), "--compound", "4", "-o", str(out), *extra]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("peakproof plot:")
    assert not out.exists()


def test_other_extension_is_refused(tmp_path, capsys):
    assert main(["plot", str(DEMO), "-o", str(tmp_path / "x.jpg")]) == 2
    assert ".png or .svg" in capsys.readouterr().err


def test_many_compounds_refused_at_once_with_a_way_out(tmp_path, capsys, monkeypatch):
    """70 compounds × 900 px exceed the 60,000-pixel height: refused before any simulation,
    naming --compound; nothing is simulated and no file is written."""
    block = "Compound {n}. 1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), 6.90 (d, J = 8.4 Hz, 2H).\n"
    path = tmp_path / "many.txt"
    path.write_text("".join(block.format(n=f"{i}a") for i in range(1, 71)), "utf-8")

    import peakproof.simulate.from_model as from_model

    def no_simulation(*a, **k):
        raise AssertionError("simulated before refusing")

    monkeypatch.setattr(from_model, "simulate_implied", no_simulation)
    out = tmp_path / "many.png"
    assert main(["plot", str(path), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "70 1H spectra" in err and "--compound 1a" in err and "at most 66" in err
    assert not out.exists()
