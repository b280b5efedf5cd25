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
