"""Plain text, Markdown and LaTeX readers: text handed to the parser and positions back."""

from __future__ import annotations

import pytest

from peakproof.readers import ReaderError, read_document, sniff_format
from peakproof.readers.base import Location


def where(source, needle: str, nth: int = 0) -> str:
    start = -1
    for _ in range(nth + 1):
        start = source.text.index(needle, start + 1)
    return source.locate(start).describe()


# -- plain text ------------------------------------------------------------------------------


def test_utf8_bom_and_crlf_map_back_to_original_lines():
    data = "\ufeffcompound 2b\r\n1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H)\r\n"
    source = read_document(data.encode("utf-8"), fmt="txt")
    assert source.text == "compound 2b\n1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H)\n"
    assert source.notes == ()
    assert where(source, "compound") == "line 1, column 1"  # the BOM is not a column
    assert where(source, "δ") == "line 2, column 25"
    assert where(source, "J") == "line 2, column 36"
    # The "\n" standing for a CRLF points at the end of its own line.
    assert source.locate(source.text.index("\n")) == Location("txt", line=1, column=12)


def test_lone_cr_counts_as_a_line_break():
    source = read_document(b"a\rb\rc 7.31", fmt="txt")
    assert source.text == "a\nb\nc 7.31"
    assert where(source, "7.31") == "line 3, column 3"


@pytest.mark.parametrize("encoding", ["utf-16", "utf-16-be", "utf-32"])
def test_utf16_and_utf32_by_bom(encoding):
    data = "δ 7.26 (s, 1H)\n".encode(encoding)  # Python's utf-16/utf-32 codecs write a BOM
    if encoding == "utf-16-be":
        data = b"\xfe\xff" + data
    source = read_document(data, fmt="txt")
    assert source.text == "δ 7.26 (s, 1H)\n"
    assert where(source, "7.26") == "line 1, column 3"


def test_cp1252_fallback_with_a_note():
    # 0x96 is EN DASH and 0xB0 DEGREE SIGN in Windows-1252 (Unicode's cp1252 mapping table).
    source = read_document(b"7.36\x967.28 (m, 2H) at 25 \xb0C", fmt="txt")
    assert source.text == "7.36–7.28 (m, 2H) at 25 °C"
    assert len(source.notes) == 1 and "cp1252" in source.notes[0]


def test_binary_garbage_is_refused(tmp_path, fails_quickly):
    garbage = bytes((i * 131 + 7) % 256 for i in range(200_000))  # every byte value, NULs too
    path = tmp_path / "spectrum.txt"
    path.write_bytes(garbage)
    error = fails_quickly(lambda: read_document(path), seconds=3)
    assert "does not look like a text file" in str(error)
    assert "spectrum.txt" in str(error)
    error = fails_quickly(lambda: read_document(garbage), seconds=3)  # sniffed as text
    assert "does not look like a text file" in error.message


# -- Markdown --------------------------------------------------------------------------------

MARKDOWN = (
    "# Supporting information\n"
    "\n"
    "## Compound **3a**\n"
    "<sup>1</sup>H NMR (400 MHz, CDCl<sub>3</sub>) &delta; 7.31 (d, *J* = 8.4&nbsp;Hz, 2H),\r\n"
    "7.36&ndash;7.28 (m, 2H), &#8722;0.12 (s, `Si(CH3)3`), __13C__ and _J_ in a_b_c.\n"
    "- **1H NMR** see [table 2](#t2)\n"
    "```\n"
    "*raw* &delta;\n"
    "```\n"
    "Setext heading\n"
    "==============\n"
)


def test_markdown_markup_is_stripped():
    source = read_document(MARKDOWN.encode(), fmt="md")
    assert source.text == (
        "Supporting information\n"
        "\n"
        "Compound 3a\n"
        "1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4\u00a0Hz, 2H),\n"
        "7.36–7.28 (m, 2H), −0.12 (s, Si(CH3)3), 13C and J in a_b_c.\n"
        "1H NMR see table 2\n"
        "*raw* &delta;\n"
        "Setext heading\n"
    )


def column_of(document: str, line: int, needle: str, nth: int = 0) -> str:
    """The expected description, found by searching the original document itself."""
    text = document.splitlines()[line - 1]
    col = -1
    for _ in range(nth + 1):
        col = text.index(needle, col + 1)
    return f"line {line}, column {col + 1}"


MARKDOWN_POSITIONS = [
    # (text in the output, line in the source, what that output character came from)
    ("Compound", 3, "Compound"),
    ("3a", 3, "3a"),  # inside ** **
    ("1H", 4, "1</sup>"),
    ("H NMR", 4, "H NMR"),
    ("CDCl3", 4, "CDCl"),
    ("3)", 4, "3</sub>"),
    ("δ", 4, "&delta;"),  # a whole entity maps to its "&"
    ("J", 4, "J*"),
    ("\u00a0Hz", 4, "&nbsp;"),
    ("–", 5, "&ndash;"),
    ("7.28", 5, "7.28"),
    ("−", 5, "&#8722;"),
    ("Si(CH3)3", 5, "Si(CH3)3"),
    ("13C", 5, "13C"),
    ("table 2", 6, "table 2"),
    ("*raw*", 8, "*raw*"),
    ("Setext", 10, "Setext"),
]


@pytest.mark.parametrize("output, line, origin", MARKDOWN_POSITIONS)
def test_markdown_offsets_map_to_source_line_and_column(output, line, origin):
    source = read_document(MARKDOWN.encode(), fmt="md")
    assert where(source, output) == column_of(MARKDOWN, line, origin)


def test_markdown_is_sniffed():
    assert sniff_format(b"## Compound 3\n<sup>1</sup>H NMR") == "md"
    assert read_document(b"**1H NMR** (CDCl3)").format == "md"
    assert read_document(b"1H NMR (CDCl3) d 7.26").format == "txt"


# -- LaTeX -----------------------------------------------------------------------------------

LATEX = r"""\documentclass{article}
\usepackage{siunitx}
\begin{document}
\section{Experimental}
\subsection*{Compound \textbf{2b}}\label{cmp:2b}
% recorded by the (fictional) Halvorsen group
$^{1}$H NMR (\SI{400}{\mega\hertz}, \ce{CDCl3}) $\delta$ 7.31 (d, \textit{J}~=~\SI{8.4}{\hertz}, 2H), 7.36--7.28 (m), $-$0.12 % trailing comment
^{13}C\{^1H\} NMR (101\,\si{\mega\hertz}, CDCl$_3$): \delta 128.4; \emph{J} and $J$, CD_{3}OD, CDCl\textsubscript{3}
\textsuperscript{19}F NMR at 25\ $^\circ$C, 30~\degree C, 40 \textdegree{}C; 5\,\% yield; 3---4; $2\times3$; see \ref{tab:1} \cite{k1}
\end{document}
"""


def test_latex_markup_becomes_plain_text():
    source = read_document(LATEX.encode(), fmt="tex")
    assert source.text == (
        "Experimental\n"
        "Compound 2b\n"
        "1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H), 7.36–7.28 (m), −0.12 \n"
        "13C{1H} NMR (101 MHz, CDCl3): δ 128.4; J and J, CD3OD, CDCl3\n"
        "19F NMR at 25 °C, 30 °C, 40 °C; 5 % yield; 3—4; 2×3; see tab:1 [k1]\n"
    )


LATEX_POSITIONS = [
    ("Experimental", 4, "Experimental"),
    ("2b", 5, "2b"),
    ("1H", 7, "1}$H"),
    ("H NMR", 7, "H NMR"),
    ("400 MHz", 7, "400"),  # the number inside \\SI{...}
    ("MHz", 7, "\\mega"),  # a unit maps to its first macro
    ("CDCl3", 7, "CDCl3"),
    ("δ", 7, "\\delta"),
    ("7.31", 7, "7.31"),
    ("J", 7, "J}"),
    (" = 8.4", 7, "~=~"),
    ("8.4", 7, "8.4"),
    ("–", 7, "--"),
    ("−", 7, "-$0.12"),
    ("13C", 8, "13"),
    ("{1H}", 8, "\\{"),
    ("128.4", 8, "128.4"),
    ("CD3OD", 8, "CD_"),
    ("°", 9, "\\circ"),  # the symbol macro of ^\\circ
    ("30 °C", 9, "30"),
    ("—", 9, "---"),
    ("×", 9, "\\times"),
    ("tab:1", 9, "tab:1"),
    ("[k1]", 9, "\\cite"),
]


@pytest.mark.parametrize("output, line, origin", LATEX_POSITIONS)
def test_latex_offsets_map_to_tex_line_and_column(output, line, origin):
    source = read_document(LATEX.encode(), fmt="tex")
    assert where(source, output) == column_of(LATEX, line, origin)


def test_latex_is_sniffed_and_preamble_only_documents_work():
    assert sniff_format(b"\\documentclass{article}") == "tex"
    assert read_document(b"\\begin{itemize}\\item $^{1}$H\\end{itemize}").text == "1H"


# -- dispatch --------------------------------------------------------------------------------


def test_unsupported_and_unknown_inputs_give_reader_errors(tmp_path):
    legacy = tmp_path / "old.doc"
    legacy.write_bytes(b"\xd0\xcf\x11\xe0")
    assert "docx" in read_or_error(legacy).hint
    assert "does not exist" in read_or_error(tmp_path / "missing.txt").message
    assert "folder" in read_or_error(tmp_path).message
    with pytest.raises(ReaderError, match="unknown format"):
        read_document(b"x", fmt="rtf")
    pdf_named_txt = tmp_path / "data.txt"
    pdf_named_txt.write_bytes(b"%PDF-1.4\n")
    assert "Rename it to .pdf" in read_or_error(pdf_named_txt).hint


def read_or_error(path) -> ReaderError:
    with pytest.raises(ReaderError) as caught:
        read_document(path)
    return caught.value
