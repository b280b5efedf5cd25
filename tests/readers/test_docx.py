"""Word reader and run-level writer, on documents built here with python-docx."""

from __future__ import annotations

import io
import os
import zipfile

import pytest

docx = pytest.importorskip("docx")
from docx.oxml import OxmlElement  # noqa: E402
from docx.oxml.ns import qn  # noqa: E402
from lxml import etree  # noqa: E402

from peakproof.readers import Location, read_document, write_docx_runs  # noqa: E402

DATA_RUNS = [  # (text, formatting) — an invented 1H NMR line as Word users type it
    ("1", "sup"),
    ("H NMR (400 MHz, CDCl", ""),
    ("3", "sub"),
    (") ", ""),
    ("d", "symbol"),  # Adobe Symbol encoding: "d" (0x64) is delta (from memory)
    (" 7.31 (d, ", ""),
    ("J", "italic"),
    (" = 8.4 Hz, 2H).", ""),
]


def build_docx(path) -> None:
    document = docx.Document()
    document.add_paragraph("Invented data, Halvorsen group (fictional).")
    document.add_heading("Compound 2b", level=2)
    paragraph = document.add_paragraph()
    for text, style in DATA_RUNS:
        run = paragraph.add_run(text)
        run.font.superscript = style == "sup" or None
        run.font.subscript = style == "sub" or None
        run.italic = style == "italic" or None
        if style == "symbol":
            run.font.name = "Symbol"
    document.add_paragraph()  # an empty paragraph: an empty line
    special = document.add_paragraph()
    special.add_run("HRMS:")
    run = special.add_run()
    run._r.append(OxmlElement("w:tab"))
    run = special.add_run("m/z 215.1043")
    run.add_break()
    run = special.add_run("10 ")
    sym = OxmlElement("w:sym")
    sym.set(qn("w:font"), "Symbol")
    sym.set(qn("w:char"), "F06D")  # Symbol 0x6D is mu (from memory), stored in the PUA
    run._r.append(sym)
    special.add_run("L")
    table = document.add_table(rows=2, cols=2)
    table.cell(0, 0).text = "nucleus"
    table.cell(0, 1).text = "13C NMR"
    table.cell(1, 0).text = "shifts"
    table.cell(1, 1).text = "δ 128.4, 21.0"
    table.cell(1, 1).add_paragraph("second cell paragraph")
    document.add_paragraph("After the table.")
    document.save(path)


EXPECTED = (
    "Invented data, Halvorsen group (fictional).\n"
    "\n"
    "Compound 2b\n"
    "1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H).\n"
    "\n"
    "HRMS: m/z 215.1043\n10 μL\n"
    "nucleus\n13C NMR\nshifts\nδ 128.4, 21.0\nsecond cell paragraph\n"
    "After the table.\n"
)


@pytest.fixture
def sample(tmp_path):
    path = tmp_path / "si.docx"
    build_docx(path)
    return path


def test_docx_text(sample):
    source = read_document(sample)
    assert source.format == "docx"
    assert source.text == EXPECTED


def test_docx_is_sniffed_from_bytes(sample):
    assert read_document(sample.read_bytes()).text == EXPECTED


@pytest.mark.parametrize(
    "needle, expected",
    [
        ("Invented", Location("docx", paragraph=1, run=1, offset_in_run=0)),
        ("Compound", Location("docx", paragraph=2, run=1, offset_in_run=0)),
        ("1H", Location("docx", paragraph=3, run=1, offset_in_run=0)),
        ("400", Location("docx", paragraph=3, run=2, offset_in_run=7)),
        ("3) δ", Location("docx", paragraph=3, run=3, offset_in_run=0)),
        ("δ 7.31", Location("docx", paragraph=3, run=5, offset_in_run=0)),
        ("J =", Location("docx", paragraph=3, run=7, offset_in_run=0)),
        ("8.4", Location("docx", paragraph=3, run=8, offset_in_run=3)),
        (" m/z", Location("docx", paragraph=5, run=2, offset_in_run=0)),  # the tab
        ("μ", Location("docx", paragraph=5, run=4, offset_in_run=3)),  # the w:sym
        # in a cell, paragraphs count within the cell; the document-wide number rides along
        ("13C", Location("docx", paragraph=1, run=1, offset_in_run=0, table=1, row=1, cell=2,
                         document_paragraph=7)),  # fmt: skip
        ("21.0", Location("docx", paragraph=1, run=1, offset_in_run=9, table=1, row=2, cell=2,
                          document_paragraph=9)),  # fmt: skip
        ("second", Location("docx", paragraph=2, run=1, offset_in_run=0, table=1, row=2,
                            cell=2, document_paragraph=10)),  # fmt: skip
        ("After", Location("docx", paragraph=11, run=1, offset_in_run=0)),
    ],
)
def test_docx_locations(sample, needle, expected):
    source = read_document(sample)
    assert source.locate(source.text.index(needle)) == expected


def test_docx_descriptions(sample):
    source = read_document(sample)
    assert source.locate(source.text.index("J =")).describe() == "paragraph 3, run 7"
    assert source.locate(source.text.index("21.0")).describe() == (
        "table 1, row 2, cell 2, paragraph 1 of the cell, run 1"
    )
    assert source.locate(source.text.index("second")).describe() == (
        "table 1, row 2, cell 2, paragraph 2 of the cell, run 1"
    )
    # A paragraph break belongs to its paragraph, not to a run.
    newline = source.text.index("\n", source.text.index("2H)."))
    assert source.locate(newline).describe() == "paragraph 3"


def test_docx_json_keeps_the_document_wide_paragraph(sample):
    source = read_document(sample)
    in_cell = source.locate(source.text.index("second")).to_json()
    assert in_cell == {"format": "docx", "paragraph": 2, "run": 1, "offset_in_run": 0,
                       "table": 1, "row": 2, "cell": 2, "document_paragraph": 10}  # fmt: skip
    # outside tables the two numbers agree, and the JSON says so just the same
    body = source.locate(source.text.index("After")).to_json()
    assert body["paragraph"] == body["document_paragraph"] == 11 and "table" not in body


def test_nested_table_paragraphs_count_within_their_own_cell(tmp_path):
    document = docx.Document()
    document.add_paragraph("Invented data, Halvorsen group (fictional).")
    outer = document.add_table(rows=1, cols=1).cell(0, 0)
    outer.text = "outer first"
    inner = outer.add_table(rows=1, cols=2)
    inner.cell(0, 1).text = "inner only"
    outer.add_paragraph("outer after")
    path = tmp_path / "nested.docx"
    document.save(path)
    source = read_document(path)

    def where(needle):
        return source.locate(source.text.index(needle))

    assert where("outer first").describe() == (
        "table 1, row 1, cell 1, paragraph 1 of the cell, run 1")
    assert where("inner only").describe() == (
        "table 2, row 1, cell 2, paragraph 1 of the cell, run 1")
    # Document paragraphs: 2 "outer first", 3 inner cell 1's empty one, 4 "inner only", 5 the
    # empty one python-docx puts after a table in a cell (Word wants a cell to end with a
    # paragraph), 6 "outer after": the outer cell's own are 2, 5 and 6, so this is its third.
    assert where("outer after").describe() == (
        "table 1, row 1, cell 1, paragraph 3 of the cell, run 1")
    assert [where(n).document_paragraph for n in ("outer first", "inner only", "outer after")] \
        == [2, 4, 6]  # fmt: skip


def test_check_points_into_a_table_cell(tmp_path, capsys):
    from peakproof.cli import main

    document = docx.Document()
    document.add_paragraph("Invented data, Halvorsen group (fictional).")
    table = document.add_table(rows=2, cols=2)
    table.cell(0, 0).text, table.cell(0, 1).text = "compound", "data"
    table.cell(1, 0).text = "7c"
    cell = table.cell(1, 1)
    cell.text = "Ethyl 4-methoxybenzoate (7c)."
    # a doublet's J recurs in its partner (common practice); 8.9 Hz here recurs nowhere
    cell.add_paragraph("1H NMR (400 MHz, CDCl3) δ 7.99 (d, J = 8.9 Hz, 2H), 6.91 (d, "
                       "J = 7.2 Hz, 2H), 3.86 (s, 3H).")  # fmt: skip
    path = tmp_path / "cell.docx"
    document.save(path)
    main(["check", "--select", "coupling-no-partner", "--no-progress", str(path)])
    out = capsys.readouterr().out
    finding = next(line for line in out.splitlines() if "J = 8.9 Hz" in line)
    assert finding.startswith(f"{path}:table 1, row 2, cell 2, paragraph 2 of the cell, run 1: ")


def document_xml(path) -> bytes:
    with zipfile.ZipFile(path) as zf:
        return zf.read("word/document.xml")


def run_xml(path) -> list[list[str]]:
    """Serialised runs, paragraph by paragraph, to compare untouched ones byte for byte."""
    root = etree.fromstring(document_xml(path))
    return [[etree.tostring(r, encoding=str) for r in p.iter(qn("w:r"))] for p in root.iter(qn("w:p"))]


def test_write_docx_runs_edits_only_covered_runs(sample, tmp_path):
    text = read_document(sample).text
    start = text.index("400 MHz, CDCl3")
    end = start + len("400 MHz, CDCl3")  # spans run 2 ("...CDCl") and run 3 (subscript "3")
    j_value = text.index("8.4")
    out = tmp_path / "edited.docx"
    write_docx_runs(sample, out, [(j_value, j_value + 3, "8.40"), (start, end, "500 MHz, CD2Cl2")])
    after = read_document(out).text
    assert after == EXPECTED.replace("400 MHz, CDCl3", "500 MHz, CD2Cl2").replace("8.4 ", "8.40 ")
    before_runs, after_runs = run_xml(sample), run_xml(out)
    assert len(before_runs) == len(after_runs)
    for number, (old, new) in enumerate(zip(before_runs, after_runs), 1):
        if number != 3:
            assert old == new, f"paragraph {number} changed"
    old, new = before_runs[2], after_runs[2]
    assert len(new) == len(old) - 1  # the subscript "3" run was fully covered and dropped
    assert new[0] == old[0] and new[2:6] == old[3:7]
    assert "H NMR (500 MHz, CD2Cl2<" in new[1] and "> = 8.40 Hz, 2H).<" in new[6]
    assert [name for name in os.listdir(tmp_path) if name.startswith(".peakproof-")] == []


def test_write_docx_runs_in_place_and_with_symbol_font(sample):
    text = read_document(sample).text
    delta = text.index("δ 7.31")
    write_docx_runs(sample, sample, [(delta, delta + 1, "δ")])
    assert read_document(sample).text == EXPECTED
    paragraph = run_xml(sample)[2]
    assert "Symbol" not in paragraph[4] and ">δ<" in paragraph[4]


def test_write_docx_runs_refuses_to_cross_paragraphs(sample, tmp_path):
    text = read_document(sample).text
    end_of_heading = text.index("Compound 2b") + len("Compound 2b")
    with pytest.raises(ValueError, match="paragraph"):
        write_docx_runs(sample, tmp_path / "x.docx", [(end_of_heading - 2, end_of_heading + 3, "")])
    with pytest.raises(ValueError, match="overlaps"):
        write_docx_runs(sample, tmp_path / "x.docx", [(0, 5, "a"), (3, 8, "b")])
    assert not (tmp_path / "x.docx").exists()


def test_docx_without_document_part(tmp_path, fails_quickly):
    path = tmp_path / "empty.docx"
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w") as zf:
        zf.writestr("[Content_Types].xml", "<Types/>")
    path.write_bytes(buffer.getvalue())
    error = fails_quickly(lambda: read_document(path))
    assert "no Word document" in error.message
