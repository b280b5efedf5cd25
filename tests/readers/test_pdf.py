"""PDF reader on PDFs drawn here with reportlab."""

from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pdfplumber")
canvas_module = pytest.importorskip("reportlab.pdfgen.canvas")
from reportlab.pdfbase import pdfmetrics  # noqa: E402
from reportlab.pdfbase.ttfonts import TTFont  # noqa: E402

from peakproof.readers import Location, read_document  # noqa: E402

FONT_FILES = [Path("/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf"),
              Path("/usr/share/fonts/dejavu/DejaVuSans.ttf")]  # fmt: skip


def dejavu() -> str:
    for path in FONT_FILES:
        if path.exists():
            pdfmetrics.registerFont(TTFont("DejaVuSans", str(path)))
            return "DejaVuSans"
    pytest.skip("no DejaVu Sans font on this machine")


def draw_lines(path, pages, font, size=10.0, header=None, footer=None, **kwargs):
    """pages: lists of lines; a line is a str or a list of (text, rise) pieces; None = gap."""
    c = canvas_module.Canvas(str(path), pagesize=(420, 595), invariant=1, **kwargs)
    for number, lines in enumerate(pages, 1):
        if header:
            c.setFont(font, 8)
            c.drawString(40, 570, header)
        y = 540
        for line in lines:
            if line is None:
                y -= 14
                continue
            x = 40
            for text, rise in [(line, 0)] if isinstance(line, str) else line:
                piece_size = size if rise == 0 else size * 0.7
                c.setFont(font, piece_size)
                c.drawString(x, y + rise, text)
                x += pdfmetrics.stringWidth(text, font, piece_size)
            y -= 12
        if footer:
            c.setFont(font, 8)
            c.drawCentredString(210, 30, footer.format(number))
        c.showPage()
    c.save()


def test_ligatures_expanded_and_extraction_damage_kept(tmp_path):
    font = dejavu()
    path = tmp_path / "ligatures.pdf"
    # "¼" for "=" and "d" for "δ" are what broken PDF text layers give; the reader keeps them.
    draw_lines(path, [["ﬁrst ﬂask: J ¼ 8.4 Hz, d 7.31 (eﬀective, ﬃ, ﬄ)"]], font)
    source = read_document(path)
    assert source.format == "pdf"
    assert source.text == "first flask: J ¼ 8.4 Hz, d 7.31 (effective, ffi, ffl)\n"
    # Columns count the PDF's own characters: "ﬁrst ﬂask: " is 11 of them, so J is column 12.
    assert source.locate(source.text.index("J")) == Location("pdf", page=1, line=1, column=12)
    assert source.locate(source.text.index("irst")) == Location("pdf", page=1, line=1, column=1)


def test_superscripts_subscripts_join_their_line(tmp_path):
    font = dejavu()
    path = tmp_path / "scripts.pdf"
    line = [("1", 3.5), ("H NMR (400 MHz, CDCl", 0), ("3", -2), (") δ 7.31", 0)]
    following = [("13", 3.5), ("C{", 0), ("1", 3.5), ("H} NMR δ 128.4", 0)]
    draw_lines(path, [[line, following]], font)
    source = read_document(path)
    assert source.text == "1H NMR (400 MHz, CDCl3) δ 7.31\n13C{1H} NMR δ 128.4\n"
    assert source.locate(source.text.index("128.4")).describe() == "page 1, line 2"


PAGES = [
    [
        "General procedure: the residue was recrys-",
        "tallised from hexane; see the N-",
        "methyl analogue.",
        None,
        "1H NMR (400 MHz, CDCl3) δ 7.36–",
        "7.28 (m, 2H), 4.13 (q, J = 7.1 Hz, 2H), 2-",
        "methyl 1.24 (t, J = 7.1 Hz, 3H).",
    ],
    [
        "13C NMR (101 MHz, CDCl3) δ 173.0, 137.5,",
        "135.7, 129.2.",
    ],
    ["HRMS (ESI) m/z: [M+Na]+ calcd 215.1043; found 215.1040."],
]


def test_running_headers_page_numbers_and_line_breaks(tmp_path):
    font = dejavu()
    path = tmp_path / "si.pdf"
    draw_lines(path, PAGES, font, header="Halvorsen group · Supporting Information",
               footer="Page {} of 3")  # fmt: skip
    source = read_document(path)
    # Header and "Page n of 3" footers gone; "recrys-/tallised" joined; the hyphens after
    # "N" and "2" and the dash after "7.36" kept with their line breaks; a gap → blank line.
    assert source.text == (
        "General procedure: the residue was recrystallised from hexane; see the N-\n"
        "methyl analogue.\n"
        "\n"
        "1H NMR (400 MHz, CDCl3) δ 7.36–\n"
        "7.28 (m, 2H), 4.13 (q, J = 7.1 Hz, 2H), 2-\n"
        "methyl 1.24 (t, J = 7.1 Hz, 3H).\n"
        "13C NMR (101 MHz, CDCl3) δ 173.0, 137.5,\n"
        "135.7, 129.2.\n"
        "HRMS (ESI) m/z: [M+Na]+ calcd 215.1043; found 215.1040.\n"
    )


def test_a_single_page_keeps_its_header_but_not_its_page_number(tmp_path):
    font = dejavu()
    path = tmp_path / "one.pdf"
    draw_lines(path, PAGES[2:], font, header="Halvorsen group", footer="{}")
    assert read_document(path).text == "Halvorsen group\n" + PAGES[2][0] + "\n"


def test_page_and_line_numbers_count_the_lines_a_reader_sees(tmp_path):
    font = dejavu()
    path = tmp_path / "si.pdf"
    draw_lines(path, PAGES, font, header="Halvorsen group · Supporting Information",
               footer="Page {} of 3")  # fmt: skip
    source = read_document(path)
    # line 1 of every page is the header, so the first body line is line 2
    assert source.locate(source.text.index("General")) == Location("pdf", page=1, line=2,
                                                                    column=1)  # fmt: skip
    assert source.locate(source.text.index("tallised")).describe() == "page 1, line 3"
    assert source.locate(source.text.index("7.28")).describe() == "page 1, line 6"
    assert source.locate(source.text.index("135.7")).describe() == "page 2, line 3"
    found = source.text.index("found")
    assert source.locate(found) == Location("pdf", page=3, line=2, column=found
                                            - source.text.index("HRMS") + 1)  # fmt: skip


def test_encrypted_pdf(tmp_path, fails_quickly):
    font = dejavu()
    path = tmp_path / "locked.pdf"
    draw_lines(path, [["δ 7.26 (s, 1H)"]], font, encrypt="secret")
    error = fails_quickly(lambda: read_document(path))
    assert error.message == "the PDF is encrypted"
    assert "Remove the password" in error.hint


def test_malformed_and_textless_pdfs(tmp_path, fails_quickly):
    broken = tmp_path / "broken.pdf"
    broken.write_bytes(b"%PDF-1.4\n1 0 obj << /Type /Catalog >>\n%%EOF garbage" * 10)
    assert "damaged" in fails_quickly(lambda: read_document(broken)).message
    truncated = tmp_path / "truncated.pdf"
    draw_lines(truncated, [["δ 7.26"]], "Helvetica")
    truncated.write_bytes(truncated.read_bytes()[:300])
    assert "PDF" in fails_quickly(lambda: read_document(truncated)).message
    blank = tmp_path / "scan.pdf"
    c = canvas_module.Canvas(str(blank), invariant=1)
    c.rect(50, 50, 100, 100, fill=1)
    c.showPage()
    c.save()
    assert "no extractable text" in fails_quickly(lambda: read_document(blank)).message


def test_page_limit(tmp_path, fails_quickly):
    from peakproof.readers import Limits

    path = tmp_path / "long.pdf"
    draw_lines(path, [["page text"]] * 5, "Helvetica")
    error = fails_quickly(lambda: read_document(path, limits=Limits(max_pages=3)))
    assert "5 pages" in error.message
