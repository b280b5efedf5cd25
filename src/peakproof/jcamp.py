"""JCAMP-DX 5.01 text for simulated spectra, a small reader, and NMReDATA signal lines.

The writer produces a spectrum block (``##XYDATA=(X++(Y..Y))`` in AFFN) and, when peaks are
given, a compound file (``##DATA TYPE=LINK``) whose second block holds the
``##PEAK TABLE=(XY..XY)``: JCAMP-DX puts one data table in a block.  References:
McDonald & Wilks, Appl. Spectrosc. 1988, 42, 151 (JCAMP-DX core, XFACTOR/YFACTOR, X check);
Davies & Lampen, Appl. Spectrosc. 1993, 47, 1093 (NMR labels such as ``.OBSERVE FREQUENCY``).

The reader understands what this module writes and other AFFN/PAC files: it applies
``##XFACTOR``/``##YFACTOR``, takes the abscissa from FIRSTX, LASTX and NPOINTS and uses the
X value at the start of each XYDATA line as a check, as the standard says.  Compressed
(ASDF: SQZ/DIF/DUP) data are refused with a clear message.

Pure Python: numpy is imported only by :func:`simulation_to_jcamp`.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from peakproof.simulate import Simulation

#: Largest integer ordinate written; YFACTOR scales the data to it.
Y_INTEGER_RANGE = 100_000_000
_LINE_LENGTH = 80  # JCAMP-DX lines are at most 80 characters


class JcampError(ValueError):
    """A JCAMP-DX text that cannot be read (the message gives the line and the reason)."""


# -- writing --------------------------------------------------------------------------------


def _nucleus_label(nucleus: str) -> str:
    return "^" + nucleus.lstrip("^")


def _header(label: str, value: object) -> str:
    return f"##{label}={value}"


def _float_text(value: float) -> str:
    return repr(float(value))


def _xydata_lines(x_check: Sequence[float], y_ints: Sequence[int], decimals: int) -> list[str]:
    lines: list[str] = []
    index = 0
    while index < len(y_ints):
        line = f"{x_check[index]:.{decimals}f}"
        taken = 0
        while index + taken < len(y_ints):
            item = f" {y_ints[index + taken]}"
            if len(line) + len(item) > _LINE_LENGTH:
                break
            line += item
            taken += 1
        lines.append(line)
        index += taken
    return lines


def write_jcamp(
    x_ppm: Sequence[float],
    y: Sequence[float],
    *,
    observe_frequency_mhz: float,
    nucleus: str = "1H",
    title: str = "simulated spectrum",
    solvent: str | None = None,
    x_units: str = "PPM",
    peaks: Iterable[tuple[float, float]] | None = None,
    origin: str = "peakproof simulation",
    owner: str = "public domain",
) -> str:
    """JCAMP-DX 5.01 text for an evenly spaced spectrum ``y`` over ``x_ppm``.

    ``x_units`` is ``"PPM"`` or ``"HZ"`` (Hz from 0 ppm: ppm × observe frequency).
    ``peaks`` are ``(ppm, intensity)`` pairs for a peak-table block.
    """
    units = x_units.upper()
    if units not in ("PPM", "HZ"):
        raise JcampError(f"x_units must be 'PPM' or 'HZ', got {x_units!r}")
    if len(x_ppm) != len(y) or len(y) < 2:
        raise JcampError(
            f"need matching x and y of at least 2 points, got {len(x_ppm)} and {len(y)}"
        )
    if observe_frequency_mhz <= 0:
        raise JcampError(f"observe frequency must be positive, got {observe_frequency_mhz!r}")
    scale = observe_frequency_mhz if units == "HZ" else 1.0
    xs = [float(v) * scale for v in x_ppm]
    count = len(xs)
    delta = (xs[-1] - xs[0]) / (count - 1)
    biggest = max(abs(float(v)) for v in y)
    y_factor = biggest / Y_INTEGER_RANGE if biggest > 0 else 1.0
    y_ints = [int(round(float(v) / y_factor)) for v in y]
    # X check values need only resolve one point step; keep a few digits more than that.
    decimals = max(0, min(12, 3 - int(_floor_log10(abs(delta))))) if delta else 6

    common = [
        _header("JCAMP-DX", "5.01"),
        _header("DATA TYPE", "NMR SPECTRUM"),
        _header("DATA CLASS", "XYDATA"),
        _header("ORIGIN", origin),
        _header("OWNER", owner),
        _header(".OBSERVE FREQUENCY", _float_text(observe_frequency_mhz)),
        _header(".OBSERVE NUCLEUS", _nucleus_label(nucleus)),
    ]
    if solvent:
        common.append(_header(".SOLVENT NAME", solvent))
    spectrum = [
        _header("TITLE", title),
        *common,
        _header("XUNITS", units),
        _header("YUNITS", "ARBITRARY UNITS"),
        _header("XFACTOR", "1.0"),
        _header("YFACTOR", _float_text(y_factor)),
        _header("FIRSTX", _float_text(xs[0])),
        _header("LASTX", _float_text(xs[-1])),
        _header("DELTAX", _float_text(delta)),
        _header("FIRSTY", _float_text(y_ints[0] * y_factor)),
        _header("MAXY", _float_text(max(y_ints) * y_factor)),
        _header("MINY", _float_text(min(y_ints) * y_factor)),
        _header("NPOINTS", count),
        _header("XYDATA", "(X++(Y..Y))"),
        *_xydata_lines(xs, y_ints, decimals),
        _header("END", ""),
    ]
    if peaks is None:
        return "\n".join(spectrum) + "\n"

    peak_list = [(float(px) * scale, float(py)) for px, py in peaks]
    spectrum.insert(1, _header("BLOCK_ID", 1))
    peak_block = [
        _header("TITLE", f"{title}: peak table"),
        _header("BLOCK_ID", 2),
        _header("CROSS REFERENCE", "SPECTRUM: BLOCK_ID= 1"),
        *common[:2],
        _header("DATA CLASS", "PEAK TABLE"),
        *common[3:],
        _header("XUNITS", units),
        _header("YUNITS", "ARBITRARY UNITS"),
        _header("XFACTOR", "1.0"),
        _header("YFACTOR", "1.0"),
        _header("NPOINTS", len(peak_list)),
        _header("PEAK TABLE", "(XY..XY)"),
        *(f"{_float_text(px)}, {_float_text(py)}" for px, py in peak_list),
        _header("END", ""),
    ]
    link = [
        _header("TITLE", title),
        _header("JCAMP-DX", "5.01"),
        _header("DATA TYPE", "LINK"),
        _header("BLOCKS", 2),
        *spectrum,
        *peak_block,
        _header("END", ""),
    ]
    return "\n".join(link) + "\n"


def _floor_log10(value: float) -> int:
    exponent = 0
    while value >= 10:
        value /= 10
        exponent += 1
    while value < 1:
        value *= 10
        exponent -= 1
    return exponent


def simulation_to_jcamp(
    simulation: Simulation,
    *,
    width_hz: float = 1.0,
    points: int = 16384,
    margin_ppm: float = 0.5,
    shape: str = "lorentzian",
    solvent: str | None = None,
    title: str | None = None,
    x_units: str = "PPM",
    with_peaks: bool = True,
) -> str:
    """A simulated spectrum drawn on a grid (high to low ppm) as JCAMP-DX text."""
    from peakproof.simulate.lineshape import grid_for, spectrum_on_grid

    system = simulation.system
    grid = grid_for(simulation.lines, margin_ppm, points)
    y = spectrum_on_grid(simulation.lines, grid, system.field_mhz, width_hz, shape)
    labels = ", ".join(g.label for g in system.groups)
    return write_jcamp(
        grid.tolist(),
        y.tolist(),
        observe_frequency_mhz=system.field_mhz,
        nucleus=system.nucleus,
        title=title or f"simulated {system.nucleus} NMR ({simulation.method}): {labels}",
        solvent=solvent,
        x_units=x_units,
        peaks=[(line.ppm, line.intensity) for line in simulation.lines] if with_peaks else None,
    )


# -- reading --------------------------------------------------------------------------------


@dataclass
class JcampBlock:
    """One data block: its labelled records (labels normalised) and its data."""

    headers: dict[str, str] = field(default_factory=dict)
    x: list[float] = field(default_factory=list)
    y: list[float] = field(default_factory=list)
    peaks: list[tuple[float, float]] = field(default_factory=list)

    def number(self, label: str) -> float:
        key = normalise_label(label)
        if key not in self.headers:
            raise JcampError(f"block {self.headers.get('TITLE', '?')!r} has no ##{label}=")
        try:
            return float(self.headers[key])
        except ValueError:
            raise JcampError(f"##{label}={self.headers[key]} is not a number") from None


def normalise_label(label: str) -> str:
    """Labels compare without spaces, hyphens, slashes and underscores, in upper case."""
    return re.sub(r"[\s\-/_]", "", label).upper()


_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[Ee][+-]?\d+)?")
_ASDF = re.compile(r"[@%A-DF-Za-df-z]")  # SQZ, DIF and DUP characters (E/e: exponents)


def _numbers(text: str, line_number: int) -> list[float]:
    body = text.replace(",", " ").replace(";", " ")
    if _ASDF.search(body):
        raise JcampError(
            f"line {line_number}: compressed (ASDF) data are not supported; "
            "save the file with AFFN (plain numbers) data"
        )
    tokens = _NUMBER.findall(body)
    if _NUMBER.sub("", body).strip():
        raise JcampError(f"line {line_number}: unreadable data {text.strip()!r}")
    return [float(t) for t in tokens]


def read_jcamp(text: str) -> list[JcampBlock]:
    """The data blocks of a JCAMP-DX text (the blocks of a LINK file, in order)."""
    blocks: list[JcampBlock] = []
    stack: list[JcampBlock] = []
    table: str | None = None
    rows: list[tuple[int, str]] = []

    def finish_table(block: JcampBlock) -> None:
        if table == "XYDATA":
            _read_xydata(block, rows)
        elif table == "PEAKTABLE":
            _read_peak_table(block, rows)

    for line_number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("$$", 1)[0].rstrip()
        if not line.strip():
            continue
        if line.lstrip().startswith("##"):
            label, _, value = line.lstrip()[2:].partition("=")
            key, value = normalise_label(label), value.strip()
            if stack and table is not None:
                finish_table(stack[-1])
                table, rows = None, []
            if key == "TITLE":
                if stack and normalise_label(stack[-1].headers.get("DATATYPE", "")) != "LINK":
                    raise JcampError(f"line {line_number}: ##TITLE= before the previous ##END=")
                stack.append(JcampBlock())
            elif not stack:
                raise JcampError(f"line {line_number}: a block must start with ##TITLE=")
            block = stack[-1]
            if key == "END":
                done = stack.pop()
                if normalise_label(done.headers.get("DATATYPE", "")) != "LINK":
                    blocks.append(done)
                continue
            if key in ("XYDATA", "PEAKTABLE"):
                table = key
                form = value.replace(" ", "").upper()
                wanted = "(X++(Y..Y))" if key == "XYDATA" else "(XY..XY)"
                if form != wanted:
                    raise JcampError(
                        f"line {line_number}: ##{label.strip()}={value} is not supported "
                        f"(only {wanted})"
                    )
            block.headers[key] = value
        elif stack and table is not None:
            rows.append((line_number, line))
        elif stack and _last_label(stack[-1]):
            last = _last_label(stack[-1])
            stack[-1].headers[last] += "\n" + line
        else:
            raise JcampError(f"line {line_number}: text outside a ##LABEL= record")
    if stack:
        raise JcampError("the text ends before ##END=")
    return blocks


def _last_label(block: JcampBlock) -> str | None:
    """The label of the last record read (multi-line values continue it)."""
    return next(reversed(block.headers), None)


def _read_xydata(block: JcampBlock, rows: list[tuple[int, str]]) -> None:
    count = int(block.number("NPOINTS"))
    first, last = block.number("FIRSTX"), block.number("LASTX")
    x_factor = float(block.headers.get("XFACTOR", 1.0))
    y_factor = float(block.headers.get("YFACTOR", 1.0))
    step = (last - first) / (count - 1) if count > 1 else 0.0
    ys: list[float] = []
    for line_number, line in rows:
        values = _numbers(line, line_number)
        if len(values) < 2:
            raise JcampError(f"line {line_number}: an X check value and Y values expected")
        expected = first + len(ys) * step
        # X check: the line's X (times XFACTOR) is the abscissa of its first Y.
        if abs(values[0] * x_factor - expected) > max(abs(step) / 2, 1e-12 * abs(expected)):
            raise JcampError(
                f"line {line_number}: X check failed: the line starts at "
                f"{values[0] * x_factor!r} but point {len(ys) + 1} lies at {expected!r}; "
                "FIRSTX, LASTX or NPOINTS do not match the data"
            )
        ys.extend(v * y_factor for v in values[1:])
    if len(ys) != count:
        raise JcampError(f"##NPOINTS={count} but the XYDATA hold {len(ys)} values")
    block.y = ys
    block.x = [first + i * step for i in range(count - 1)] + [last]


def _read_peak_table(block: JcampBlock, rows: list[tuple[int, str]]) -> None:
    x_factor = float(block.headers.get("XFACTOR", 1.0))
    y_factor = float(block.headers.get("YFACTOR", 1.0))
    values: list[float] = []
    for line_number, line in rows:
        values.extend(_numbers(line, line_number))
    if len(values) % 2:
        raise JcampError("the PEAK TABLE holds an odd number of values (X, Y pairs expected)")
    block.peaks = [(values[i] * x_factor, values[i + 1] * y_factor)
                   for i in range(0, len(values), 2)]
    if "NPOINTS" in block.headers and int(block.number("NPOINTS")) != len(block.peaks):
        raise JcampError(
            f"##NPOINTS={block.headers['NPOINTS']} but the PEAK TABLE holds {len(block.peaks)} "
            "peaks"
        )


# -- NMReDATA -------------------------------------------------------------------------------

#: A signal: (shift or (from, to) range in ppm, multiplicity, J values in Hz, count, label).
NmredataSignal = tuple


def nmredata_signal_line(
    shift: float | tuple[float, float],
    multiplicity: str | None = None,
    couplings: Sequence[float] = (),
    count: float | None = None,
    label: str | None = None,
    separator: str = ", ",
) -> str:
    """One NMReDATA 1D signal line: ``δ, S=…, J=…, N=…, L=…`` (Pupier et al.,
    Magn. Reson. Chem. 2018, 56, 703: shifts with four decimals, J with two, attributes in
    this order, absent ones left out)."""
    if isinstance(shift, tuple):
        parts = [f"{shift[0]:.4f}-{shift[1]:.4f}"]
    else:
        parts = [f"{float(shift):.4f}"]
    if multiplicity:
        parts.append(f"S={multiplicity}")
    if couplings:
        parts.append("J=" + ",".join(f"{float(j):.2f}" for j in couplings))
    if count is not None:
        parts.append(f"N={int(round(count))}")
    if label:
        parts.append(f"L={label}")
    return separator.join(parts)


def nmredata_1d_lines(signals: Iterable[NmredataSignal], end_of_line: str = "\\") -> str:
    """Signal lines for an NMReDATA 1D tag, each ending in ``end_of_line`` (a backslash)."""
    return "".join(nmredata_signal_line(*signal) + end_of_line + "\n" for signal in signals)
