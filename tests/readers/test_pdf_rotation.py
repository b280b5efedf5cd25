"""Rotated pages and rotated text: lines are rebuilt along each glyph's reading direction."""

from __future__ import annotations

import re

import pytest

pytest.importorskip("pdfplumber")
canvas_module = pytest.importorskip("reportlab.pdfgen.canvas")
from reportlab.pdfbase import pdfmetrics  # noqa: E402

import peakproof  # noqa: E402
from peakproof.readers import read_document  # noqa: E402
from tests.readers.test_pdf import dejavu  # noqa: E402

# An invented compound of the (fictional) Halvorsen group; superscripts and subscripts are
# drawn raised and lowered, as a typesetter would, so they must join their lines when turned.
DATA = [
    [("Compound 7c: ", 0), ("1", 3.5), ("H NMR (400 MHz, CDCl", 0), ("3", -2),
     (") δ 7.42 (d, J = 8.6 Hz, 2H),", 0)],
    "6.91 (d, J = 8.6 Hz, 2H), 4.05 (q, J = 7.0 Hz, 2H), 1.41 (t, J = 7.0 Hz, 3H).",
    [("13", 3.5), ("C NMR (101 MHz, CDCl", 0), ("3", -2), (") δ 158.9, 130.2, 114.6, 63.5,", 0)],
    "14.8. HRMS (ESI) m/z: [M+H]+ calcd 231.1016; found 231.1019.",
]  # fmt: skip


def plain(line) -> str:
    return line if isinstance(line, str) else "".join(text for text, _ in line)


PLAIN = " ".join(plain(line) for line in DATA)


def draw_block(c, font: str, x: float, y: float, lines=DATA, size: float = 10.0) -> None:
    """Draw ``lines`` in the canvas's current (possibly rotated) user space from (x, y) down."""
    for line in lines:
        left = x
        for text, rise in [(line, 0)] if isinstance(line, str) else line:
            piece_size = size if rise == 0 else size * 0.7
            c.setFont(font, piece_size)
            c.drawString(left, y + rise, text)
            left += pdfmetrics.stringWidth(text, font, piece_size)
        y -= 12


def same_modulo_line_breaks(text: str) -> str:
    return re.sub(r"\n+", " ", text).strip()


def assert_reads_like_plain_text(path) -> None:
    source = read_document(path)
    assert same_modulo_line_breaks(source.text) == PLAIN
    from_pdf, from_plain = peakproof.parse(source.text), peakproof.parse(PLAIN)
    assert from_pdf.data() == from_plain.data()
    shifts = [s.shift for sp in from_pdf.blocks[0].spectra for s in sp.signals]
    assert shifts == [7.42, 6.91, 4.05, 1.41, 158.9, 130.2, 114.6, 63.5, 14.8]  # as drawn
    return source


def test_page_rotated_by_its_rotate_entry(tmp_path):
    # /Rotate 90: the content is drawn upright but displayed turned a quarter clockwise
    font = dejavu()
    path = tmp_path / "rotate90.pdf"
    c = canvas_module.Canvas(str(path), pagesize=(595, 420), invariant=1)
    c.setPageRotation(90)
    draw_block(c, font, 40, 380)
    c.showPage()
    c.save()
    source = assert_reads_like_plain_text(path)
    assert source.text.count("\n") == len(DATA)  # one output line per drawn line
    assert source.locate(source.text.index("13C")).describe() == "page 1, line 3"


@pytest.mark.parametrize("degrees", [90, 180, 270])
def test_text_drawn_under_a_rotation(tmp_path, degrees):
    font = dejavu()
    path = tmp_path / f"turned{degrees}.pdf"
    c = canvas_module.Canvas(str(path), pagesize=(595, 842), invariant=1)
    c.translate(297, 421)  # the page centre, so every turn keeps the block on the page
    c.rotate(degrees)
    draw_block(c, font, -250, 40)
    c.showPage()
    c.save()
    source = assert_reads_like_plain_text(path)
    assert source.text.count("\n") == len(DATA)
    found = source.text.index("found")
    assert source.locate(found).line == 4


def test_landscape_table_pages_keep_running_header_and_footer_in_place(tmp_path):
    # A portrait document whose pages hold a block turned a quarter counter-clockwise (a
    # landscape table), under an upright running header and over an upright page number.
    font = dejavu()
    path = tmp_path / "landscape.pdf"
    c = canvas_module.Canvas(str(path), pagesize=(420, 595), invariant=1)
    for number in (1, 2):
        c.setFont(font, 8)
        c.drawString(40, 570, "Halvorsen group · Supporting Information")
        c.drawCentredString(210, 25, f"Page {number} of 2")
        c.saveState()
        c.translate(100, 60)
        c.rotate(90)
        draw_block(c, font, 0, 0)
        c.restoreState()
        c.showPage()
    c.save()
    source = read_document(path)
    assert same_modulo_line_breaks(source.text) == PLAIN + " " + PLAIN
    assert peakproof.parse(source.text).data() == peakproof.parse(PLAIN + "\n" + PLAIN).data()
    # the header stays line 1 of each page, so the turned block starts on line 2
    assert source.locate(source.text.index("Compound")).describe() == "page 1, line 2"


def test_mixed_directions_on_one_page_read_the_body_first(tmp_path):
    # An upright data paragraph with a short label turned upwards beside it (a figure axis).
    font = dejavu()
    path = tmp_path / "mixed.pdf"
    c = canvas_module.Canvas(str(path), pagesize=(595, 842), invariant=1)
    draw_block(c, font, 60, 780)
    c.saveState()
    c.translate(30, 500)
    c.rotate(90)
    c.setFont(font, 10)
    c.drawString(0, 0, "δ (ppm)")
    c.restoreState()
    c.showPage()
    c.save()
    source = read_document(path)
    assert source.text.startswith(plain(DATA[0]) + "\n")
    # a blank line keeps the turned label out of the data paragraph above it
    assert source.text.endswith(plain(DATA[-1]) + "\n\nδ (ppm)\n")
    assert same_modulo_line_breaks(source.text) == PLAIN + " δ (ppm)"
    assert peakproof.parse(source.text).data() == peakproof.parse(PLAIN).data()
