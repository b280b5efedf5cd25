"""Per PDF extractor: time to extract the twins' PDF and fidelity of peakproof on its text.

Run ``python benchmarks/bench_extraction.py`` after ``tests/extraction/build_twins.py``.
Prints, for pdftotext (plain, -layout), pdfminer.six, pypdfium2 and pdfplumber, the wall time of
one extraction and the fraction of the clean source's signals read identically (blocks lost),
then ``peakproof check`` of the PDF against pdftotext + ``peakproof check`` of the text.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests" / "extraction"))
TWINS = ROOT / "tests" / "extraction" / "twins"
PDF = TWINS / "twins.pdf"


def _pdfminer() -> str:
    from pdfminer.high_level import extract_text
    return extract_text(str(PDF))


def _pypdfium2() -> str:
    import pypdfium2 as pdfium
    doc = pdfium.PdfDocument(str(PDF))
    text = "\n".join(page.get_textpage().get_text_range() for page in doc)
    doc.close()
    return text


def _pdfplumber() -> str:
    import pdfplumber
    with pdfplumber.open(str(PDF)) as pdf:
        return "\n".join(page.extract_text() or "" for page in pdf.pages)


EXTRACTORS = {
    "pdftotext": lambda: subprocess.run(["pdftotext", str(PDF), "-"], capture_output=True,
                                        text=True, check=True).stdout,
    "pdftotext-layout": lambda: subprocess.run(["pdftotext", "-layout", str(PDF), "-"],
                                               capture_output=True, text=True, check=True).stdout,
    "pdfminer": _pdfminer,
    "pypdfium2": _pypdfium2,
    "pdfplumber": _pdfplumber,
}


def _timed(args: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(args, capture_output=True, cwd=ROOT, env={"PYTHONPATH": str(ROOT / "src"),
                                                               "PATH": "/usr/bin:/bin"})
    return time.perf_counter() - start


def main() -> None:
    from test_twins import fidelity
    source = (TWINS / "source.txt").read_text(encoding="utf-8")
    print(f"{'extractor':18s} {'seconds':>8s} {'identical':>10s} {'lost':>6s}")
    for name, extract in EXTRACTORS.items():
        start = time.perf_counter()
        text = extract()
        seconds = time.perf_counter() - start
        identical, lost, total = fidelity(source, text)
        print(f"{name:18s} {seconds:8.2f} {identical:10.1%} {lost:4d}/{total}")
    print("goal (issue 12): >= 97.0 % identical, 0 blocks lost")
    py = sys.executable
    pdf_check = _timed([py, "-m", "peakproof", "check", str(PDF)])
    with tempfile.TemporaryDirectory() as tmp:
        txt = Path(tmp) / "twins.txt"
        start = time.perf_counter()
        subprocess.run(["pdftotext", str(PDF), str(txt)], check=True)
        text_check = time.perf_counter() - start + _timed([py, "-m", "peakproof", "check", str(txt)])
    print(f"peakproof check twins.pdf: {pdf_check:.2f} s; pdftotext + check of the text: "
          f"{text_check:.2f} s; ratio {pdf_check / text_check:.2f}x (target <= 2x)")


if __name__ == "__main__":
    main()
