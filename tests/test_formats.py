"""Every format gives the same data and findings as the plain-text demo, with positions in the
original's own terms (line:column, paragraph/run, page/line).

The twins are the committed files in examples/, built by examples/build_examples.py from
examples/demo_si.txt.  Expected positions are found in each twin directly (its lines, its Word
paragraphs through python-docx, its PDF glyphs through pdfplumber), not through our readers.
"""

from __future__ import annotations

import statistics
from functools import cache
from pathlib import Path

import pytest

from peakproof.api import parse_path
from peakproof.cli import main

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
TWINS = ["demo_si.md", "demo_si.tex", "demo_si.docx", "demo_si.pdf", "demo_si-damaged.pdf"]
# (compound, text that begins its 1H spectrum in demo_si.txt): first, middle and last blocks
CHOSEN = [("1a", "7.97 (dd"), ("6", "7.39 (d"), ("13", "9.81 (t")]


@cache
def parsed(name: str):
    return parse_path(str(EXAMPLES / name))


def reference():
    return parsed("demo_si.txt")[1]


def test_twins_are_up_to_date(tmp_path):
    """The committed twins are what the builder makes now (so the tests below test them)."""
    import subprocess
    import sys

    subprocess.run([sys.executable, str(EXAMPLES / "build_examples.py"), "--damage", "--out",
                    str(tmp_path)], check=True, capture_output=True)  # fmt: skip
    for name in TWINS:
        assert (tmp_path / name).read_bytes() == (EXAMPLES / name).read_bytes(), name


@pytest.mark.parametrize("name", TWINS)
def test_same_data_as_plain_text(name):
    _, doc = parsed(name)
    ref = reference()
    assert len(doc.blocks) == len(ref.blocks) == 14  # demo_si.txt: 14 compounds
    for got, want in zip(doc.blocks, ref.blocks):
        assert got.data() == want.data(), f"compound {want.compound}"
    assert [b.compound for b in doc.blocks] == [b.compound for b in ref.blocks]
    assert [b.formula for b in doc.blocks] == [b.formula for b in ref.blocks]


def test_reference_compounds_are_the_headings():
    # examples/demo_si.txt: the label in parentheses ending each "## " heading
    assert [b.compound for b in reference().blocks] == [
        "1a", "1b", "2", "3", "4", "5", "6", "7", "8", "9", "10", "11", "12", "13"]  # fmt: skip


def findings(name: str) -> list[tuple[str, str | None]]:
    checker = pytest.importorskip("peakproof.checker")
    _, doc = parsed(name)
    out = []
    for d in checker.check(doc):
        if d.rule.startswith("repair-"):
            continue  # the damaged PDF's repairs are tested on their own
        block = next((b for b in doc.blocks if b.span.start <= d.span.start < b.span.end), None)
        out.append((d.rule, block.compound if block else None))
    return out


@pytest.mark.parametrize("name", TWINS)
def test_same_findings_as_plain_text(name):
    want = findings("demo_si.txt")
    assert want, "the demo has planted errors; no findings means the checker did not run"
    assert findings(name) == want


def test_damaged_pdf_reports_its_repairs():
    _, doc = parsed("demo_si-damaged.pdf")
    rules_by_block = {b.compound: set() for b in doc.blocks}
    for d in doc.diagnostics:
        block = next(b for b in doc.blocks if b.span.start <= d.span.start < b.span.end)
        rules_by_block[block.compound].add(d.rule)
    # build_examples.py --damage prints every δ as d, and every second "J =" as "J ¼"; every
    # block has a δ, and every block has at least two "J =" (demo_si.txt)
    assert all("repair-delta-glyph" in rules for rules in rules_by_block.values()), rules_by_block
    assert all("repair-equals-glyph" in rules for rules in rules_by_block.values()), rules_by_block
    assert parsed("demo_si.pdf")[1].diagnostics == ()


# ------------------------------------------------------------------------------ positions


def block_of(doc, compound):
    return next(b for b in doc.blocks if b.compound == compound)


def line_with(path: Path, needle: str) -> tuple[int, str]:
    hits = [(i, line) for i, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1)
            if needle in line]  # fmt: skip
    assert len(hits) == 1, (path.name, needle, len(hits))
    return hits[0]


@pytest.mark.parametrize("compound,needle", CHOSEN)
@pytest.mark.parametrize("name", ["demo_si.txt", "demo_si.md", "demo_si.tex"])
def test_block_start_line_and_column(name, compound, needle):
    source, doc = parsed(name)
    number, line = line_with(EXAMPLES / name, needle)
    located = source.locate(block_of(doc, compound).span.start)
    # the block starts at the "1" of 1H, written "1", "<sup>1</sup>" or "$^{1}$"
    assert (located.line, located.column) == (number, line.index("1") + 1)


def docx_paragraphs():
    import docx

    return docx.Document(str(EXAMPLES / "demo_si.docx")).paragraphs


@pytest.mark.parametrize("compound,needle", CHOSEN)
def test_block_start_paragraph_and_run(compound, needle):
    source, doc = parsed("demo_si.docx")
    paragraphs = docx_paragraphs()
    numbers = [i for i, p in enumerate(paragraphs, 1) if needle in p.text]
    assert len(numbers) == 1
    located = source.locate(block_of(doc, compound).span.start)
    assert located.paragraph == numbers[0]
    run = paragraphs[located.paragraph - 1].runs[located.run - 1]
    assert run.text[located.offset_in_run] == "1" and run.font.superscript  # the ¹ of ¹H


def pdf_page_and_line(path: Path, needle: str) -> tuple[int, int]:
    """Page of ``needle`` and its line counted from the top of the page, from glyph positions:
    one line per distinct baseline of characters that are not super- or subscripts (the
    builder's reportlab text draws scripts at 7.2 pt, the running header at 7.5 pt, the body
    at 9 pt and more)."""
    import pdfplumber

    with pdfplumber.open(str(path)) as pdf:
        for number, page in enumerate(pdf.pages, 1):
            hits = page.search(needle, regex=False)
            if not hits:
                continue
            body = statistics.median(c["size"] for c in page.chars)
            baselines: list[float] = []
            for bottom in sorted(c["bottom"] for c in page.chars if c["size"] >= 0.82 * body):
                if not baselines or bottom - baselines[-1] > 1.0:
                    baselines.append(bottom)
            return number, sum(1 for b in baselines if b <= hits[0]["bottom"] + 1.0)
    raise AssertionError(f"{needle!r} not in {path.name}")


@pytest.mark.parametrize("compound,needle", CHOSEN)
@pytest.mark.parametrize("name", ["demo_si.pdf", "demo_si-damaged.pdf"])
def test_block_start_page_and_line(name, compound, needle):
    source, doc = parsed(name)
    located = source.locate(block_of(doc, compound).span.start)
    assert (located.page, located.line) == pdf_page_and_line(EXAMPLES / name, needle)
    assert located.column == 1  # each block begins a line in the PDF twin


def finding_at(name: str, rule: str, compound: str):
    checker = pytest.importorskip("peakproof.checker")
    source, doc = parsed(name)
    block = block_of(doc, compound)
    inside = range(block.span.start, block.span.end)
    hits = [d for d in checker.check(doc) if d.rule == rule and d.span.start in inside]
    assert len(hits) == 1, (rule, compound, hits)
    return source.locate(hits[0].span.start), doc.text[hits[0].span.start : hits[0].span.end]


# planted_errors.toml: compound 2's "125 MHz" (13C beside 400 MHz 1H), compound 3's "C, 74.86"
PLANTED = [("frequency-mismatch", "2", "(125 MHz", "125"), ("ea-found", "3", "C, 74.86", "74.86")]


@pytest.mark.parametrize("rule,compound,context,value", PLANTED)
@pytest.mark.parametrize("name", ["demo_si.txt", "demo_si.md", "demo_si.tex"])
def test_finding_positions_in_text_formats(name, rule, compound, context, value):
    located, _ = finding_at(name, rule, compound)
    lines = (EXAMPLES / name).read_text(encoding="utf-8").splitlines()
    line = lines[located.line - 1]
    column = located.column
    assert line[column - 1 :].startswith(value), line[column - 10 : column + 10]


@pytest.mark.parametrize("rule,compound,context,value", PLANTED)
def test_finding_positions_in_word(rule, compound, context, value):
    located, _ = finding_at("demo_si.docx", rule, compound)
    run = docx_paragraphs()[located.paragraph - 1].runs[located.run - 1]
    assert run.text[located.offset_in_run :].startswith(value), run.text


@pytest.mark.parametrize("rule,compound,context,value", PLANTED)
@pytest.mark.parametrize("name", ["demo_si.pdf", "demo_si-damaged.pdf"])
def test_finding_positions_in_pdf(name, rule, compound, context, value):
    located, text = finding_at(name, rule, compound)
    assert text.startswith(value)
    assert (located.page, located.line) == pdf_page_and_line(EXAMPLES / name, context)


# ------------------------------------------------------------------------------ commands


@pytest.mark.parametrize("name", ["demo_si.txt", *TWINS])
def test_parse_command_reads_every_format(name, capsys):
    assert main(["parse", str(EXAMPLES / name)]) == 0
    out = capsys.readouterr().out
    assert out.splitlines()[0].endswith(": 14 data block(s)")
    assert "  compound 13 (" in out
