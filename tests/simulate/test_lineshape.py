"""Line shapes: heights, widths and areas of Lorentzian and Gaussian lines."""

import numpy as np
import pytest

from peakproof.simulate import Line, SpinSystemError, ppm_grid, spectrum_on_grid


def _one_line(intensity=2.0, ppm=1.0, field=400.0):
    return [Line(ppm * field, ppm, intensity)]


@pytest.mark.parametrize("shape", ["lorentzian", "gaussian"])
def test_height_and_full_width_at_half_height(shape):
    """A line peaks at its intensity and falls to half at ± width/2."""
    field, width = 400.0, 2.0
    half = width / 2 / field
    grid = np.array([1.0, 1.0 + half, 1.0 - half])
    y = spectrum_on_grid(_one_line(), grid, field, width, shape)
    assert [2.0, 1.0, 1.0] == pytest.approx(y.tolist())


def test_lorentzian_area():
    """A Lorentzian of height h and FWHM w has area π h w / 2 (in Hz; standard integral)."""
    field, width = 400.0, 1.5
    grid = ppm_grid(-49.0, 51.0, 400001)
    y = spectrum_on_grid(_one_line(), grid, field, width)
    area_hz = np.trapezoid(y, grid * field)
    assert np.pi * 2.0 * width / 2 == pytest.approx(area_hz, rel=1e-3)


def test_lines_add():
    """The spectrum of two lines is the sum of their spectra, however many lines at once."""
    lines = [Line(400.0, 1.0, 1.0), Line(404.0, 1.01, 0.5)]
    grid = ppm_grid(1.05, 0.95, 501)
    together = spectrum_on_grid(lines, grid, 400.0)
    apart = sum(spectrum_on_grid([line], grid, 400.0) for line in lines)
    np.testing.assert_allclose(together, apart)


def test_bad_shape_and_width_are_explained():
    """Unknown shapes and non-positive widths get a message."""
    grid = ppm_grid(2, 0, 11)
    with pytest.raises(SpinSystemError, match="lorentzian"):
        spectrum_on_grid(_one_line(), grid, 400.0, 1.0, "voigt")
    with pytest.raises(SpinSystemError, match="positive"):
        spectrum_on_grid(_one_line(), grid, 400.0, 0.0)
