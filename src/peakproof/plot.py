"""Pictures of simulated 1H spectra: what a described spectrum would look like.

Drawn the way chemists read spectra: the shift axis runs from high to low ppm, each
multiplet is labelled with its shift and letters (labels spread so they never overlap,
joined to their peaks by leader lines), integrals are steps labelled with the number of
nuclei, and where the exact simulation differs visibly from first order the first-order
curve is drawn dashed over it.  matplotlib is imported here only, with the Agg canvas (no
window, no global backend change).
"""

from __future__ import annotations

INK = "#1d2540"
FIRST_ORDER = "#d1495b"
INTEGRAL = "#5b6b7a"
SHADE = "#e9eef5"
DPI = 200
LABEL_SIZE = 7.5
#: The first-order curve is drawn where it differs from the exact one by this fraction of
#: the tallest peak (a difference one can see at figure size, common practice).
VISIBLE_DIFFERENCE = 0.03
_BASELINE, _PEAK_TOP, _LEADER_KNEE, _LEADER_END = -0.16, 1.0, 1.07, 1.15


#: The picture's size range in pixels, and the height each spectrum is given by default.
WIDTH_RANGE_PX = (200, 20000)
HEIGHT_RANGE_PX = (150, 60000)
PANEL_HEIGHT_PX = 900


def size_problem(width_px: int, height_px: int) -> str | None:
    """Why a picture of this size cannot be drawn, or None when it can."""
    (w0, w1), (h0, h1) = WIDTH_RANGE_PX, HEIGHT_RANGE_PX
    if w0 <= width_px <= w1 and h0 <= height_px <= h1:
        return None
    return (f"a picture of {width_px} × {height_px} pixels is out of range "
            f"(width {w0}–{w1}, height {h0}–{h1})")


class PlotError(ValueError):
    """A picture that cannot be drawn as asked (the message says why)."""


def plot_spectra(panels, path, *, width_px: int = 1800, height_px: int = 900,
                 inset: tuple[float, float] | None = None) -> None:
    """Draw ``panels`` — (title, exact ImpliedSimulation, first-order ImpliedSimulation) —
    one above the other into ``path`` (.png or .svg), ``width_px`` × ``height_px`` pixels."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    if not panels:
        raise PlotError("nothing to draw: no 1H spectra with signals")
    problem = size_problem(width_px, height_px)
    if problem:
        raise PlotError(problem)
    fig = Figure(figsize=(width_px / DPI, height_px / DPI), dpi=DPI)
    FigureCanvasAgg(fig)
    fig.patch.set_facecolor("white")
    rows = len(panels)
    fig_h = height_px / DPI
    above, below = 0.42 / fig_h, 0.48 / fig_h  # title line, axis ticks and label (inches)
    slot = 1 / rows
    for row, (title, exact, first) in enumerate(panels):
        bottom = 1 - (row + 1) * slot + below
        height = max(slot - above - below, 0.02)
        ax = fig.add_axes((0.035, bottom, 0.945, height))
        _draw_panel(fig, ax, title, exact, first, inset)
    fmt = "svg" if str(path).lower().endswith(".svg") else "png"
    fig.savefig(path, format=fmt, dpi=DPI, facecolor="white")


def _grid(sim, margin_ppm: float):
    import numpy as np

    shifts = [ln.ppm for ln in sim.simulation.lines]
    for s in sim.implied.signals:
        shifts.extend(s.range_ppm or (s.shift_ppm,))
    high, low = max(shifts) + margin_ppm, min(shifts) - margin_ppm
    span_hz = (high - low) * sim.implied.field_mhz
    points = int(min(400_000, max(8192, span_hz * 8)))  # ≥ 8 points per Hz: 1 Hz lines resolved
    return np.linspace(high, low, points)


def _signal_extent(sim, signal) -> tuple[float, float]:
    """Low and high ppm a signal's first-order multiplet covers (plus its line width)."""
    system = sim.implied.system
    half_hz = 3 * signal.width_hz
    if signal.groups:
        g = signal.groups[0]
        half_hz += sum(abs(system.j(g, p)) * system.groups[p].count * system.groups[p].spin
                       for p in system.partners(g))
    low = min(signal.range_ppm or (signal.shift_ppm,))
    high = max(signal.range_ppm or (signal.shift_ppm,))
    pad = half_hz / sim.implied.field_mhz
    return low - pad, high + pad


def _draw_panel(fig, ax, title, exact, first, inset) -> None:
    import numpy as np

    implied = exact.implied
    x = _grid(exact, 0.35)
    y = exact.curve(x)
    scale = y.max() or 1.0
    y = y / scale
    y_first = first.curve(x) / scale
    differs = np.abs(y - y_first) > VISIBLE_DIFFERENCE
    shown_first = np.full_like(y_first, np.nan)
    regions = []
    for signal in implied.signals:
        low, high = _signal_extent(exact, signal)
        inside = (x >= low) & (x <= high)
        regions.append((signal, low, high, inside))
        if differs[inside].any():
            shown_first[inside] = y_first[inside]

    ax.plot(x, y, color=INK, lw=0.7, solid_joinstyle="round", label="exact (quantum)",
            zorder=3)
    if not np.all(np.isnan(shown_first)):
        ax.plot(x, shown_first, color=FIRST_ORDER, lw=0.8, ls=(0, (3, 1.6)),
                label="first order", zorder=4)
        ax.legend(loc="lower right", bbox_to_anchor=(1.0, 1.0), frameon=False, ncol=2,
                  fontsize=8, handlelength=2.2, borderaxespad=0.1, columnspacing=1.2)
    ax.set_xlim(x[0], x[-1])  # high ppm on the left

    width_in = ax.get_position().width * fig.get_figwidth()
    height_in = ax.get_position().height * fig.get_figheight()
    ppm_per_inch = (x[0] - x[-1]) / width_in
    _draw_integrals(ax, x, y, regions, implied, ppm_per_inch)
    longest = max((len(_label(s)) for s in implied.signals), default=4)
    text_in = longest * LABEL_SIZE * 0.62 / 72 + 0.08
    frac = min(0.6, text_in / max(height_in, 0.1))
    top = (_LEADER_END + 0.03 - _BASELINE * frac) / (1 - frac)
    ax.set_ylim(_BASELINE, top)
    _draw_labels(ax, x, y, regions, ppm_per_inch)

    ax.set_title(title_text(title, implied), loc="left", fontsize=10, color=INK, pad=4)
    ax.set_xlabel("δ (ppm)", fontsize=9, color=INK, labelpad=2)
    for side in ("top", "right", "left"):
        ax.spines[side].set_visible(False)
    ax.spines["bottom"].set_color(INK)
    ax.spines["bottom"].set_linewidth(0.8)
    ax.spines["bottom"].set_bounds(x[-1], x[0])
    ax.set_yticks([])
    ax.tick_params(axis="x", labelsize=8.5, colors=INK, width=0.8, length=3)
    from matplotlib.ticker import AutoMinorLocator, MaxNLocator

    ax.xaxis.set_major_locator(MaxNLocator(nbins=12, steps=[1, 2, 2.5, 5, 10]))
    ax.xaxis.set_minor_locator(AutoMinorLocator())
    ax.tick_params(axis="x", which="minor", length=1.5, width=0.6, colors=INK)
    if inset is not None:
        _draw_inset(ax, exact, first, x, y, scale, inset)


def title_text(title: str, implied) -> str:
    """The panel title, e.g. compound 3 — simulated ¹H NMR, 400 MHz, CDCl₃ (mathtext)."""
    import re

    mass = re.match(r"(\d+)(\D+)", implied.nucleus)
    nucleus = f"$^{{{mass.group(1)}}}$" + mass.group(2) if mass else implied.nucleus
    parts = [f"{nucleus} NMR", f"{implied.field_mhz:g} MHz"]
    if implied.solvent:
        parts.append(re.sub(r"(?<=[A-Za-z])(\d+)", r"$_{\1}$", _plain(implied.solvent)))
    return f"{_plain(title)} — simulated " + ", ".join(parts)


def _plain(text: str) -> str:
    """Text with mathtext's dollar signs escaped."""
    return text.replace("$", r"\$")


def _label(signal) -> str:
    letters = signal.multiplicity or ""
    return f"{signal.label} {letters}".strip()


def _spread(anchors: list[float], width: float, low: float, high: float) -> list[float]:
    """Positions near ``anchors`` at least ``width`` apart, inside [low, high] (all one unit).

    Overlapping neighbours are merged into clusters centred on their anchors' mean, until
    no clusters overlap (the usual way to space peak labels).
    """
    order = sorted(range(len(anchors)), key=lambda i: anchors[i])
    clusters = [[i] for i in order]

    def placed(cluster):
        centre = sum(anchors[i] for i in cluster) / len(cluster)
        size = width * (len(cluster) - 1)
        start = min(max(centre - size / 2, low), max(low, high - size))
        return start

    changed = True
    while changed:
        changed = False
        for k in range(len(clusters) - 1):
            end = placed(clusters[k]) + width * (len(clusters[k]) - 1)
            if placed(clusters[k + 1]) - end < width - 1e-12:
                clusters[k:k + 2] = [clusters[k] + clusters[k + 1]]
                changed = True
                break
    result = [0.0] * len(anchors)
    for cluster in clusters:
        start = placed(cluster)
        for offset, i in enumerate(cluster):
            result[i] = start + offset * width
    return result


def _draw_labels(ax, x, y, regions, ppm_per_inch) -> None:
    import numpy as np

    if not regions:
        return
    anchors, tops = [], []
    for signal, _low, _high, inside in regions:
        anchors.append(signal.shift_ppm)
        tops.append(float(y[inside].max()) if inside.any() else 0.0)
    step = LABEL_SIZE * 1.55 / 72 * ppm_per_inch  # one rotated line of text, in ppm
    # Spread in "−ppm" so left-to-right order is preserved.
    placed = _spread([-a for a in anchors], step, -x[0] + step / 2, -x[-1] - step / 2)
    for (signal, *_), anchor, top, spot in zip(regions, anchors, tops, placed):
        spot = -spot
        base = min(top + 0.03, _LEADER_KNEE - 0.02)
        ax.plot([anchor, anchor, spot, spot],
                [base, _LEADER_KNEE - 0.02, _LEADER_END - 0.04, _LEADER_END],
                color=INTEGRAL, lw=0.5, zorder=2, solid_capstyle="butt")
        ax.text(spot, _LEADER_END + 0.015, _label(signal), rotation=90, ha="center",
                va="bottom", fontsize=LABEL_SIZE, color=INK, zorder=5)
    del np


def _draw_integrals(ax, x, y, regions, implied, ppm_per_inch) -> None:
    """The running integral as one stepped curve, each step labelled with its nuclei."""
    import numpy as np

    if not regions:
        return
    steps = np.concatenate(([0.0], np.cumsum((y[1:] + y[:-1]) / 2)))
    if steps[-1] > 0:
        ax.plot(x, 0.02 + 0.88 * steps / steps[-1], color=INTEGRAL, lw=0.7, alpha=0.55,
                zorder=2)
    anchors = [signal.shift_ppm for signal, *_ in regions]
    step = 8 * 2.4 / 72 * ppm_per_inch  # "12H" at 8 pt, in ppm
    spots = _spread([-a for a in anchors], step, -x[0] + step / 2, -x[-1] - step / 2)
    for (signal, *_), spot in zip(regions, spots):
        ax.text(-spot, _BASELINE * 0.45, f"{signal.count}H", ha="center", va="center",
                fontsize=7.5, color=INTEGRAL, zorder=5)


def _draw_inset(ax, exact, first, x, y, scale, window) -> None:
    import numpy as np

    low, high = window
    if high < x[-1] or low > x[0]:
        return  # the window is outside this spectrum
    span = high - low
    fine = np.linspace(high, low, 4000)
    y_exact = exact.curve(fine) / scale
    y_first = first.curve(fine) / scale
    peak = max(float(y_exact.max()), 1e-9)
    # Put the inset where the main spectrum is lowest, below the label leaders.
    anchors = [s.shift_ppm for s in exact.implied.signals]
    best, where = None, 0.02
    for left in np.arange(0.01, 0.79, 0.01):
        left_ppm = x[0] - left * (x[0] - x[-1])
        right_ppm = x[0] - (left + 0.2) * (x[0] - x[-1])
        mask = (x <= left_ppm) & (x >= right_ppm)
        crossed = sum(1 for a in anchors if right_ppm <= a <= left_ppm)
        score = (crossed, float(y[mask].max()) if mask.any() else 0.0)
        if best is None or score < best:
            best, where = score, left
    box = ax.inset_axes((where, 0.34, 0.2, 0.36), zorder=6)
    box.plot(fine, y_exact / peak, color=INK, lw=0.8)
    if np.abs(y_exact - y_first).max() / peak > VISIBLE_DIFFERENCE:
        box.plot(fine, y_first / peak, color=FIRST_ORDER, lw=0.8, ls=(0, (3, 1.6)))
    box.set_xlim(high, low)
    box.set_ylim(-0.04, 1.12)
    box.set_yticks([])
    for side in ("top", "right", "left"):
        box.spines[side].set_visible(False)
    box.spines["bottom"].set_color(INK)
    box.tick_params(axis="x", labelsize=7, colors=INK, length=2)
    from matplotlib.ticker import MaxNLocator

    box.xaxis.set_major_locator(MaxNLocator(nbins=4))
    hz = span * exact.implied.field_mhz
    box.set_title(f"{high:.2f}–{low:.2f} ppm ({hz:.0f} Hz)", fontsize=7, color=INK, pad=2)
    box.patch.set_facecolor("white")
    ax.axvspan(low, high, color=SHADE, zorder=0, lw=0)
