"""Line shapes: a sum of Lorentzian (or Gaussian) lines on a ppm grid, vectorised.

Each line has full width at half height ``width_hz`` and peak height equal to its
intensity, so equal-width lines keep their areas in proportion to their intensities.
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from .spin_system import Line, SpinSystemError

SHAPES = ("lorentzian", "gaussian")
_CHUNK = 1 << 22  # grid points × lines evaluated at once, to bound memory


def ppm_grid(start_ppm: float, stop_ppm: float, points: int = 16384) -> np.ndarray:
    """``points`` evenly spaced shifts from ``start_ppm`` to ``stop_ppm`` (either direction)."""
    if points < 2:
        raise SpinSystemError(f"a grid needs at least 2 points, got {points}")
    return np.linspace(float(start_ppm), float(stop_ppm), int(points))


def grid_for(lines: Iterable[Line], margin_ppm: float = 0.5, points: int = 16384) -> np.ndarray:
    """A grid from high to low ppm (the way spectra are drawn) covering ``lines``."""
    shifts = [line.ppm for line in lines]
    if not shifts:
        return ppm_grid(10.0, 0.0, points)
    return ppm_grid(max(shifts) + margin_ppm, min(shifts) - margin_ppm, points)


def spectrum_on_grid(
    lines: Iterable[Line],
    ppm: np.ndarray,
    field_mhz: float,
    width_hz: float = 1.0,
    shape: str = "lorentzian",
) -> np.ndarray:
    """Intensity at each point of ``ppm`` (a 1-D array) for lines of width ``width_hz``."""
    if shape not in SHAPES:
        raise SpinSystemError(f"unknown line shape {shape!r}: use one of {', '.join(SHAPES)}")
    if width_hz <= 0:
        raise SpinSystemError(f"line width must be positive, got {width_hz!r} Hz")
    grid_hz = np.asarray(ppm, dtype=float) * field_mhz
    lines = list(lines)
    centres = np.array([line.freq_hz for line in lines], dtype=float)
    heights = np.array([line.intensity for line in lines], dtype=float)
    result = np.zeros_like(grid_hz)
    half = width_hz / 2
    step = max(1, _CHUNK // max(1, grid_hz.size))
    for start in range(0, centres.size, step):
        offset = (grid_hz[:, None] - centres[None, start:start + step]) / half
        if shape == "lorentzian":
            profile = 1.0 / (1.0 + offset**2)
        else:
            profile = np.exp(-np.log(2.0) * offset**2)
        result += profile @ heights[start:start + step]
    return result
