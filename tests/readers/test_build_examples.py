"""examples/build_examples.py: twins that read back to the source, deterministically."""

from __future__ import annotations

import importlib.util
import re
from pathlib import Path

import pytest

pytest.importorskip("docx")
pytest.importorskip("reportlab")

from peakproof.readers import read_document  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
SOURCE = Path(__file__).with_name("si_source.txt")


def load_builder():
    spec = importlib.util.spec_from_file_location("build_examples", ROOT / "examples" /
                                                  "build_examples.py")  # fmt: skip
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


builder = load_builder()


@pytest.fixture(scope="module")
def twins(tmp_path_factory):
    return builder.build_examples(SOURCE, tmp_path_factory.mktemp("twins"), damage=True)


def expected() -> str:
    return builder.expected_text(builder.read_source(SOURCE))


@pytest.mark.parametrize("fmt", ["md", "tex", "docx"])
def test_twins_read_back_to_the_source(twins, fmt):
    source = read_document(twins[fmt])
    assert source.format == fmt
    assert source.text == expected()


def test_markup_is_what_documents_use(twins):
    md = twins["md"].read_text(encoding="utf-8")
    assert "<sup>13</sup>C{<sup>1</sup>H}" in md and "CDCl<sub>3</sub>" in md
    assert "C<sub>12</sub>H<sub>16</sub>O<sub>2</sub>Na" in md and "DMSO-d<sub>6</sub>" in md
    assert "(d, *J* = 8.4 Hz, 2H)" in md and "\n## Tarnwick ester 2b\n" in md
    assert "2H)" in md and "<sup>2</sup>H" not in md  # integrations are not mass numbers
    tex = twins["tex"].read_text(encoding="utf-8")
    assert r"$^{1}$H NMR (\SI{400}{\mega\hertz}, CDCl$_{3}$) $\delta$" in tex
    assert r"\textit{J} = \SI{8.4}{\hertz}" in tex and r"\subsection*{Halvorsen amide 3a}" in tex
    import docx

    paragraphs = docx.Document(str(twins["docx"])).paragraphs
    data = next(p for p in paragraphs if p.text.startswith("1H NMR (400"))
    runs = [(r.text, bool(r.font.superscript), bool(r.font.subscript), bool(r.italic))
            for r in data.runs]  # fmt: skip
    assert runs[0] == ("1", True, False, False)
    assert ("3", False, True, False) in runs and ("J", False, False, True) in runs
    assert any(p.style.name == "Heading 2" and p.text == "Tarnwick ester 2b" for p in paragraphs)


def flat(text: str) -> str:
    return " ".join(text.split())


def test_pdf_twin_wraps_lines_and_reads_back(twins):
    source = read_document(twins["pdf"])
    # One page: a running header cannot be told from a title, so it stays.
    assert flat(source.text) == flat("Halvorsen group · Supporting Information " + expected())
    # Long data lines are broken, as in real PDFs.
    assert source.text.count("\n") > expected().count("\n") + 3


def test_pdf_twin_over_several_pages_loses_header_and_page_numbers(tmp_path):
    lines = SOURCE.read_text(encoding="utf-8").splitlines()
    longer = "\n".join(lines + [re.sub(r"\b2b\b|\b3a\b", f"{n}x", line) for n in range(8)
                                for line in lines[1:]])  # fmt: skip
    source_file = tmp_path / "long_si.txt"
    source_file.write_text(longer + "\n", encoding="utf-8")
    paths = builder.build_examples(source_file, tmp_path)
    source = read_document(paths["pdf"])
    assert source.locate(len(source.text) - 1).page >= 3
    assert "Supporting Information" not in source.text
    assert flat(source.text) == flat(builder.expected_text(builder.read_source(source_file)))


def test_damaged_pdf_has_the_usual_artefacts(twins):
    text = read_document(twins["damaged-pdf"]).text
    assert "δ" not in text and "d 7.31 (d" in text and "d 173.0" in text
    couplings = expected().count("J =")
    assert couplings == 8 and text.count("J ¼") == 4 and text.count("J =") == 4  # every second
    repaired = text.replace("J ¼", "J =").replace(") d ", ") δ ")
    assert flat(repaired) == flat("Halvorsen group · Supporting Information " + expected())


def test_rebuilding_gives_identical_files(twins, tmp_path):
    again = builder.build_examples(SOURCE, tmp_path, damage=True)
    for fmt, path in twins.items():
        assert again[fmt].read_bytes() == path.read_bytes(), fmt


def test_command_line(tmp_path, capsys):
    assert builder.main([str(SOURCE), "--out", str(tmp_path)]) == 0
    assert sorted(p.suffix for p in tmp_path.iterdir()) == [".docx", ".md", ".pdf", ".tex"]
    assert builder.main([str(tmp_path / "missing.txt")]) == 2
    assert "does not exist" in capsys.readouterr().err
