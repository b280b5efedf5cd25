"""``peakproof format`` on Markdown and LaTeX: data blocks rewritten in the file's own markup.

The demo twins (examples/demo_si.md, .tex) must read back, in every built-in style, as the
same data as the plain-text twin formatted in that style; every byte outside the edited
source ranges stays; a second pass changes nothing.  Case files (tests/cases/format_markup/)
hold small hand-written inputs and the expected files, checked by eye against the markup
each input already uses (common practice: the file's own spelling of 1H, CDCl3, δ and J).
"""

from __future__ import annotations

import shlex
import shutil
from pathlib import Path

import pytest

import peakproof
from peakproof import markup
from peakproof.cli import main
from peakproof.emit import plan_edits
from peakproof.readers import read_document
from peakproof.safety import checked_format
from peakproof.styles import BUILTIN

EXAMPLES = Path(__file__).parent.parent / "examples"
CASES = Path(__file__).parent / "cases" / "format_markup"


@pytest.fixture(autouse=True)
def no_project_style(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # no pyproject.toml style above


def _format(path: Path, style: str, *extra: str) -> int:
    return main(["format", "-q", "--style", style, *extra, str(path)])


# ---- the demo twins ----------------------------------------------------------------------
@pytest.mark.parametrize("style", sorted(BUILTIN))
@pytest.mark.parametrize("ext", ["md", "tex"])
def test_demo_twin_reads_back_as_the_formatted_plain_text(tmp_path, ext, style, capsys):
    plain = read_document(str(EXAMPLES / "demo_si.txt")).text
    want = peakproof.parse(checked_format(plain, BUILTIN[style]).text)
    path = tmp_path / f"demo_si.{ext}"
    shutil.copy(EXAMPLES / f"demo_si.{ext}", path)
    before = path.read_bytes()

    assert _format(path, style) == 0
    err = capsys.readouterr().err
    assert "kept" not in err and "rewrite not proven" not in err, err
    after = path.read_bytes()
    assert after != before
    got = peakproof.parse(read_document(str(path)).text)
    assert got.data() == want.data()
    # The header form and order are part of what a style changes: compare the plain text too.
    assert read_document(str(path)).text == checked_format(
        read_document(str(EXAMPLES / f"demo_si.{ext}")).text, BUILTIN[style]).text
    # Idempotent: a second pass changes nothing.
    assert _format(path, style, "--check") == 0
    assert path.read_bytes() == after


@pytest.mark.parametrize("style", sorted(BUILTIN))
@pytest.mark.parametrize("ext", ["md", "tex"])
def test_bytes_outside_the_edited_ranges_are_identical(tmp_path, ext, style):
    original = (EXAMPLES / f"demo_si.{ext}").read_text(encoding="utf-8")
    text = read_document(str(EXAMPLES / f"demo_si.{ext}")).text
    edits = plan_edits(peakproof.parse(text), BUILTIN[style]).edits
    placement = markup.place_edits(ext, original, text, edits)
    assert placement.source_edits and not placement.kept
    path = tmp_path / f"demo_si.{ext}"
    shutil.copy(EXAMPLES / f"demo_si.{ext}", path)
    assert _format(path, style) == 0
    new = path.read_bytes()
    # Walk the written file: each untouched piece of the original must appear byte for byte,
    # in order, with exactly the rendered replacement between them.
    pos, old_pos = 0, 0
    old = original.encode("utf-8")
    for start, end, replacement in sorted(placement.source_edits):
        piece = original[old_pos:start].encode("utf-8")
        assert new[pos : pos + len(piece)] == piece
        pos += len(piece)
        rendered = replacement.encode("utf-8")
        assert new[pos : pos + len(rendered)] == rendered
        pos += len(rendered)
        old_pos = end
    tail = original[old_pos:].encode("utf-8")
    assert new[pos:] == tail
    # Independently of the placement: every line without NMR data is unchanged, in place.
    old_lines, new_lines = old.splitlines(), new.splitlines()
    assert len(old_lines) == len(new_lines)
    for a, b in zip(old_lines, new_lines):
        if b"NMR" not in a:
            assert a == b


# ---- conventions -------------------------------------------------------------------------
def test_latex_conventions_are_detected_from_the_document():
    demo = markup.detect("tex", (EXAMPLES / "demo_si.tex").read_text(encoding="utf-8"))
    assert demo.table() == {
        "1H": "$^{1}$H", "CDCl3": "CDCl$_{3}$", "J": "\\textit{J}", "δ": "$\\delta$",
        "δH": "$\\delta_{\\mathrm{H}}$", "400 MHz": "\\SI{400}{\\mega\\hertz}", "–": "--",
        "−": "$-$",
    }  # fmt: skip
    other = markup.detect("tex", "\\textsuperscript{13}C, CDCl\\textsubscript{3}, δ 7.1, "
                          "$J$ = 7~Hz, 2\\textendash 3, \\textminus 4")  # fmt: skip
    assert other.table() == {
        "1H": "\\textsuperscript{1}H", "CDCl3": "CDCl\\textsubscript{3}", "J": "$J$",
        "δ": "δ", "δH": "δ\\textsubscript{H}", "400 MHz": "400~MHz",
        "–": "\\textendash{}", "−": "\\textminus{}",
    }  # fmt: skip


def test_markdown_conventions_are_detected_from_the_document():
    demo = markup.detect("md", (EXAMPLES / "demo_si.md").read_text(encoding="utf-8"))
    assert demo.table()["1H"] == "<sup>1</sup>H" and demo.table()["CDCl3"] == "CDCl<sub>3</sub>"
    assert demo.italic_j == "*J*" and demo.delta == "&delta;" and demo.escape_brackets
    bare = markup.detect("md", "1H NMR (CDCl3) δ 7.26 (d, _J_ = 8 Hz)")
    assert bare.table()["1H"] == "1H" and bare.italic_j == "_J_" and bare.delta == "δ"


@pytest.mark.parametrize("plain", [
    "13C{1H} NMR (101 MHz, CDCl3) δ 7.97 (dd, J = 8.8, 5.4 Hz, 2H, OCH2), 7.33–7.28 (m)",
    "δH (400 MHz; DMSO-d6) 4.12 (2 H, q, 3J(H,H) 7.1), −103.8; 50% {x} #3 a_b ~ ^ $ & \\ --",
    "HRMS (ESI) m/z [M + Na]+ calcd for C10H9FO3Na 219.0433, found 219.0430; `x` *y* <b> &amp;",
])  # fmt: skip
@pytest.mark.parametrize("fmt, example", [("tex", "demo_si.tex"), ("md", "demo_si.md")])
def test_rendered_text_reads_back_exactly(fmt, example, plain):
    conventions = markup.detect(fmt, (EXAMPLES / example).read_text(encoding="utf-8"))
    assert markup.render(plain, conventions) != plain  # the document's markup is used
    for conv in (conventions, markup.plain(conventions)):
        source = markup.render(plain, conv)
        if fmt == "tex":
            source = "\\begin{document}\n" + source + "\n\\end{document}"
        assert markup.read_plain(fmt, source)[0].strip("\n") == plain


def test_a_range_is_never_widened_over_the_authors_markup():
    source = "\\begin{document}\nX \\textbf{$^{1}$H NMR} $\\delta$ 7.1 (s).\n\\end{document}"
    text, offsets = markup.read_plain("tex", source)

    def cover(first: str, last: str):
        start, end = text.index(first), text.index(last) + len(last)
        found = markup.source_range("tex", source, lambda k: offsets.lookup(k)[1], len(text),
                                    start, end)  # fmt: skip
        return source[found[0] : found[1]] if found else None

    assert cover("1H", "NMR") == "$^{1}$H NMR"  # inside the bold group: fine
    assert cover("δ", "(s)") == "$\\delta$ 7.1 (s)"
    assert cover("1H", "(s)") is None  # would take \\textbf's closing brace


# ---- case files --------------------------------------------------------------------------
def read_case(path: Path):
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    assert lines[0].startswith("# flags:"), path
    flags = shlex.split(lines[0][len("# flags:") :])
    split = lines.index("# output\n")
    return flags, "".join(lines[1:split]), "".join(lines[split + 1 :])


@pytest.mark.parametrize("path", sorted(CASES.glob("*.case")), ids=lambda p: p.stem)
def test_case(path, tmp_path, capsys):
    flags, source, expected = read_case(path)
    assert source != expected
    target = tmp_path / "si.txt"  # the format comes from --input-format in the flags
    target.write_text(source, encoding="utf-8")
    assert main(["format", *flags, str(target)]) == 0
    err = capsys.readouterr().err
    assert target.read_text(encoding="utf-8") == expected
    assert ("kept: left as written" in err) == ("kept" in path.stem), err
    assert main(["format", "--check", *flags, str(target)]) == 0
    assert target.read_text(encoding="utf-8") == expected


def test_cases_cover_both_formats():
    formats = {read_case(p)[0][-1] for p in CASES.glob("*.case")}
    assert formats == {"md", "tex"}


# ---- safety ------------------------------------------------------------------------------
MESSY_TEX = (
    "\\begin{document}\nEster 3a.\n$^{1}$H NMR (400 MHz, CDCl$_3$) $\\delta$ 1.25 "
    "(t, \\textit{J}=7.1 Hz, 3H), 4.12 (q, \\textit{J} = 7.1 Hz, 2H).\n\\end{document}\n"
)


def test_a_block_that_cannot_be_rendered_is_kept_and_listed(tmp_path, monkeypatch, capsys):
    path = tmp_path / "si.tex"
    path.write_text(MESSY_TEX, encoding="utf-8")
    monkeypatch.setattr(markup, "render", lambda text, conv: text.replace("δ", "\\alpha "))
    assert main(["format", "--style", "letters-first", str(path)]) == 0
    assert path.read_text(encoding="utf-8") == MESSY_TEX
    err = capsys.readouterr().err
    assert "si.tex:3: kept: left as written" in err and "left as written" in err


def test_a_rewrite_that_reads_back_wrong_writes_nothing_and_exits_3(tmp_path, monkeypatch,
                                                                       capsys):  # fmt: skip
    path = tmp_path / "si.tex"
    path.write_text(MESSY_TEX, encoding="utf-8")
    real = markup.place_edits

    def broken(fmt, source, text, edits):  # a placement bug: one digit lost in the source
        placement = real(fmt, source, text, edits)
        placement.source_edits = [(s, e, new.replace("4.12", "4.1")) for s, e, new in
                                  placement.source_edits]  # fmt: skip
        return placement

    monkeypatch.setattr(markup, "place_edits", broken)
    assert main(["format", "--style", "letters-first", str(path)]) == 3
    assert path.read_text(encoding="utf-8") == MESSY_TEX
    assert "rewrite not proven" in capsys.readouterr().err


def test_crlf_and_bom_kept_in_latex(tmp_path):
    path = tmp_path / "si.tex"
    path.write_bytes(b"\xef\xbb\xbf" + MESSY_TEX.replace("\n", "\r\n").encode("utf-8"))
    assert _format(path, "letters-first") == 0
    data = path.read_bytes()
    assert data.startswith(b"\xef\xbb\xbf\\begin{document}\r\nEster 3a.\r\n")
    assert b"\\textit{J} = 7.1 Hz, 2H), 1.25 (t" in data and b"\n" not in data.replace(b"\r\n", b"")


def test_check_and_diff_speak_about_the_source(tmp_path, capsys):
    path = tmp_path / "si.tex"
    path.write_text(MESSY_TEX, encoding="utf-8")
    assert main(["format", "--check", "--style", "letters-first", str(path)]) == 1
    assert main(["format", "--diff", "--style", "letters-first", str(path)]) == 0
    out = capsys.readouterr().out
    assert "\n+$^{1}$H NMR (400 MHz, CDCl$_3$) $\\delta$ 4.12 (q, \\textit{J} = 7.1 Hz" in out
    assert path.read_text(encoding="utf-8") == MESSY_TEX
