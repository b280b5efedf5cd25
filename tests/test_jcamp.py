"""JCAMP-DX output read back by the PyPI ``jcamp`` package and by our reader; NMReDATA lines."""

import jcamp
import numpy as np
import pytest

from peakproof.jcamp import (
    JcampError,
    nmredata_1d_lines,
    nmredata_signal_line,
    read_jcamp,
    simulation_to_jcamp,
    write_jcamp,
)
from peakproof.simulate import SpinGroup, SpinSystem, quantum_spectrum

# jcamp 1.2 names its reader ``readfile``; older releases called it ``jcamp_readfile``.
_read_with_package = getattr(jcamp, "jcamp_readfile", None) or jcamp.readfile


@pytest.fixture
def ethyl_simulation():
    system = SpinSystem((SpinGroup("CH2", 3.60, 2), SpinGroup("CH3", 1.20, 3)), {(0, 1): 7.0})
    return quantum_spectrum(system)


@pytest.mark.parametrize("x_units", ["PPM", "HZ"])
def test_package_and_our_reader_agree(tmp_path, ethyl_simulation, x_units):
    """The jcamp package and our reader read the same x, y and peak table from our file."""
    text = simulation_to_jcamp(ethyl_simulation, points=3000, solvent="CDCl3", x_units=x_units)
    path = tmp_path / "ethyl.jdx"
    path.write_text(text)
    theirs = _read_with_package(str(path))
    ours = read_jcamp(text)
    spectrum, peaks = theirs["children"]
    assert 2 == len(ours)
    np.testing.assert_allclose(ours[0].x, spectrum["x"], rtol=1e-12, atol=1e-12)
    np.testing.assert_array_equal(ours[0].y, spectrum["y"])
    np.testing.assert_array_equal([p[0] for p in ours[1].peaks], peaks["x"])
    np.testing.assert_array_equal([p[1] for p in ours[1].peaks], peaks["y"])
    assert 400.0 == spectrum[".observe frequency"]
    assert "^1H" == spectrum[".observe nucleus"]
    assert "CDCl3" == spectrum[".solvent name"]
    assert x_units == spectrum["xunits"]
    assert 3000 == spectrum["npoints"]


def test_values_survive_the_round_trip():
    """Read-back y differs from the written y by at most half a YFACTOR step."""
    x = np.linspace(8.0, 0.0, 1001)
    y = np.exp(-((x - 4.0) ** 2)) * 123.4 - 5.0
    text = write_jcamp(x.tolist(), y.tolist(), observe_frequency_mhz=500.13, nucleus="1H")
    block = read_jcamp(text)[0]
    y_factor = float(block.headers["YFACTOR"])
    assert np.max(np.abs(np.array(block.y) - y)) <= y_factor / 2 * (1 + 1e-9)
    np.testing.assert_allclose(block.x, x, atol=1e-12)
    assert "NMR SPECTRUM" == block.headers["DATATYPE"]
    assert all(len(line) <= 80 for line in text.splitlines())


def test_required_labels_present(ethyl_simulation):
    """The labels of JCAMP-DX 5.01 NMR files are written (Davies & Lampen 1993)."""
    text = simulation_to_jcamp(ethyl_simulation, points=200, solvent="CDCl3")
    for label in ("##TITLE=", "##JCAMP-DX=5.01", "##DATA TYPE=NMR SPECTRUM",
                  "##.OBSERVE FREQUENCY=400.0", "##.OBSERVE NUCLEUS=^1H",
                  "##.SOLVENT NAME=CDCl3", "##XUNITS=PPM", "##FIRSTX=", "##LASTX=",
                  "##NPOINTS=200", "##XYDATA=(X++(Y..Y))", "##PEAK TABLE=(XY..XY)", "##END="):
        assert label in text


HAND_WRITTEN = """\
##TITLE=hand-made test block
##JCAMP-DX=5.01
##DATA TYPE=NMR SPECTRUM
##XUNITS=HZ
##YUNITS=ARBITRARY UNITS
##XFACTOR=0.5
##YFACTOR=0.01
##FIRSTX=100.0
##LASTX=107.0
##NPOINTS=8
##XYDATA=(X++(Y..Y))
200 10 20 30 40
208 50-60 70,80
##END=
"""


def test_factors_and_pac_delimiters():
    """X on each line times XFACTOR checks the abscissa; Y times YFACTOR are the values;
    signs may separate values (PAC) (McDonald & Wilks 1988)."""
    block = read_jcamp(HAND_WRITTEN)[0]
    assert [100.0 + i for i in range(8)] == pytest.approx(block.x)
    assert [0.1, 0.2, 0.3, 0.4, 0.5, -0.6, 0.7, 0.8] == pytest.approx(block.y)
    theirs = jcamp.read(HAND_WRITTEN.splitlines(keepends=True))
    assert block.y == pytest.approx(theirs["y"].tolist())


def test_x_check_failure_is_reported():
    """A line whose X does not match FIRSTX + i·DELTAX is rejected with its line number."""
    broken = HAND_WRITTEN.replace("208 50", "230 50")
    with pytest.raises(JcampError, match="line 13: X check failed"):
        read_jcamp(broken)


def test_point_count_must_match():
    """NPOINTS must equal the number of Y values."""
    with pytest.raises(JcampError, match="NPOINTS=9"):
        read_jcamp(HAND_WRITTEN.replace("##NPOINTS=8", "##NPOINTS=9").replace("107.0", "108.0"))
    with pytest.raises(JcampError, match="X check"):  # a wrong count shifts the X check
        read_jcamp(HAND_WRITTEN.replace("##NPOINTS=8", "##NPOINTS=9"))


def test_compressed_data_are_refused_politely():
    """ASDF-compressed data get a message, not a traceback."""
    with pytest.raises(JcampError, match="ASDF"):
        read_jcamp(HAND_WRITTEN.replace("200 10 20 30 40", "200A0B0C0D0"))


def test_bad_arguments_are_explained():
    """Writer arguments are checked with messages."""
    with pytest.raises(JcampError, match="x_units"):
        write_jcamp([1, 2], [1, 2], observe_frequency_mhz=400, x_units="CM-1")
    with pytest.raises(JcampError, match="matching"):
        write_jcamp([1, 2, 3], [1, 2], observe_frequency_mhz=400)


class TestNmredata:
    def test_signal_line_order_and_digits(self):
        """Shift with four decimals, then S=, J= (two decimals), N=, L= (Pupier et al. 2018)."""
        assert "4.1823, S=dd, J=9.30,4.81, N=1, L=a" == nmredata_signal_line(
            4.18232, "dd", [9.3, 4.81], 1, "a"
        )

    def test_absent_attributes_are_left_out(self):
        """Only the shift is mandatory."""
        assert "7.2600" == nmredata_signal_line(7.26)
        assert "3.5000-3.4000, S=m, N=2" == nmredata_signal_line((3.5, 3.4), "m", (), 2)

    def test_lines_end_with_backslash(self):
        """NMReDATA tag lines end with a backslash."""
        text = nmredata_1d_lines([(7.26, "d", [8.4], 2, "H2"), (3.80, "s", [], 3, "OMe")])
        assert "7.2600, S=d, J=8.40, N=2, L=H2\\\n3.8000, S=s, N=3, L=OMe\\\n" == text
