"""Build the extraction twins: invented supporting information typeset as a real PDF, then extracted.

Run ``python tests/extraction/build_twins.py`` (needs reportlab, pdfminer.six, pypdfium2 and
Debian's poppler-utils and tesseract-ocr).  It writes into ``tests/extraction/twins/``:

* ``source.txt`` – the clean text, one compound a paragraph, written by a seeded generator;
* ``twins.pdf`` – the same text typeset with reportlab: real superscripts (¹H as a raised small
  "1"), subscripts (CDCl₃), italic *J* and *d*, two columns, running heads, page numbers ``S1``…
  and line numbers in the margin;
* ``pdftotext.txt``, ``pdftotext-layout.txt``, ``pdfminer.txt``, ``pypdfium2.txt`` – each
  extractor's text of the whole PDF;
* ``ocr.txt`` and ``ocr-source.txt`` – Tesseract's reading of the first ``OCR_PAGES`` pages
  rendered at 300 dpi, and the clean text of the compounds that start on those pages.

The compounds and the laboratory (Halvorsen group, Tarnwick) are invented; no real text is used.
"""

from __future__ import annotations

import random
import re
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).parent
OUT = HERE / "twins"
SEED = 20261202
N_COMPOUNDS = 320
OCR_PAGES = 3
FONT_DIR = Path("/usr/share/fonts/truetype/dejavu")

MULTS_NO_J = ["s", "s", "s", "m", "br s"]
MULTS_J = {"d": 1, "t": 1, "q": 1, "dd": 2, "dt": 2, "td": 2, "ddd": 3}
SOLVENTS = ["CDCl3", "CDCl3", "DMSO-d6", "CD3OD", "C6D6", "acetone-d6", "CD2Cl2"]
FREQ = {300: "75", 400: "101", 500: "126", 600: "151"}
IONS = ["[M+H]+", "[M+Na]+", "[M+H]+"]
NAMES = ["arylketone", "nitrile", "anisole", "pyrazole", "oxazoline", "lactam", "ester", "amide"]


def _proton_signal(rng: random.Random) -> str:
    shift = round(rng.uniform(0.8, 8.3), 2)
    count = rng.choice([1, 1, 2, 2, 3, 6])
    if rng.random() < 0.4:
        return f"{shift:.2f} ({rng.choice(MULTS_NO_J)}, {count}H)"
    mult = rng.choice(sorted(MULTS_J))
    js = sorted((round(rng.uniform(1.2, 17.5), 1) for _ in range(MULTS_J[mult])), reverse=True)
    return f"{shift:.2f} ({mult}, J = {', '.join(f'{j:.1f}' for j in js)} Hz, {count}H)"


def _formula(rng: random.Random) -> tuple[str, int, int]:
    c = rng.randint(8, 22)
    h = rng.randint(c // 2, 2 * c)
    return f"C{c}H{h}O{rng.randint(1, 4)}", c, h


def compound(rng: random.Random, index: int) -> str:
    """One invented compound's characterization paragraph (plain, clean text)."""
    mhz = rng.choice(sorted(FREQ))
    solvent = rng.choice(SOLVENTS)
    protons = ", ".join(_proton_signal(rng) for _ in range(rng.randint(2, 7)))
    parts = [f"1H NMR ({mhz} MHz, {solvent}) δ {protons}"]
    if rng.random() < 0.7:
        carbons = sorted({round(rng.uniform(10, 205), 1) for _ in range(rng.randint(4, 12))},
                         reverse=True)
        parts.append(f"13C{{1H}} NMR ({FREQ[mhz]} MHz, {solvent}) δ "
                     + ", ".join(f"{c:.1f}" for c in carbons))
    if rng.random() < 0.25:
        parts.append(f"19F NMR ({round(mhz * 0.9408)} MHz, {solvent}) δ "
                     f"−{rng.uniform(60, 120):.1f} (s)")
    formula, _, _ = _formula(rng)
    calcd = rng.uniform(150, 450)
    found = calcd + rng.randint(-9, 9) / 10000
    parts.append(f"HRMS (ESI) m/z {rng.choice(IONS)} calcd for {formula} {calcd:.4f}, "
                 f"found {found:.4f}")
    name = f"Tarnwick {rng.choice(NAMES)} T-{index}"
    return f"{name} ({index}). Obtained as a colourless oil. " + "; ".join(parts) + "."


def source_paragraphs() -> list[str]:
    rng = random.Random(SEED)
    return [compound(rng, i) for i in range(1, N_COMPOUNDS + 1)]


_MARKUP = [
    (re.compile(r"\b(1|13|19)(H|C|F)(?= NMR|\})"), r"<super>\1</super>\2"),
    (re.compile(r"\{1H\}"), "{<super>1</super>H}"),
    (re.compile(r"\bCDCl3\b"), "CDCl<sub>3</sub>"),
    (re.compile(r"\bCD3OD\b"), "CD<sub>3</sub>OD"),
    (re.compile(r"\bCD2Cl2\b"), "CD<sub>2</sub>Cl<sub>2</sub>"),
    (re.compile(r"\bC6D6\b"), "C<sub>6</sub>D<sub>6</sub>"),
    (re.compile(r"-d6\b"), "-<i>d</i><sub>6</sub>"),
    (re.compile(r"\bJ ="), "<i>J</i> ="),
    (re.compile(r"\](\+)"), r"]<super>\1</super>"),
    (re.compile(r"\bm/z\b"), "<i>m/z</i>"),
    (re.compile(r"\b(C\d+H\d+O\d)\b"), lambda m: re.sub(r"(\d+)", r"<sub>\1</sub>", m.group(1))),
]


def markup(text: str) -> str:
    """The clean text as reportlab paragraph markup with real super- and subscripts."""
    for pattern, replacement in _MARKUP:
        text = pattern.sub(replacement, text)
    return text


def typeset(paragraphs: list[str], path: Path) -> None:
    from reportlab.lib.pagesizes import A4
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.lib.units import mm
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont
    from reportlab.platypus import BaseDocTemplate, Frame, PageTemplate, Paragraph

    pdfmetrics.registerFont(TTFont("Sans", str(FONT_DIR / "DejaVuSans.ttf")))
    pdfmetrics.registerFont(TTFont("Sans-Italic", str(FONT_DIR / "DejaVuSans-Oblique.ttf")))
    pdfmetrics.registerFont(TTFont("Sans-Bold", str(FONT_DIR / "DejaVuSans-Bold.ttf")))
    from reportlab.lib.fonts import addMapping
    addMapping("Sans", 0, 0, "Sans")
    addMapping("Sans", 0, 1, "Sans-Italic")
    addMapping("Sans", 1, 0, "Sans-Bold")
    addMapping("Sans", 1, 1, "Sans-Bold")

    width, height = A4
    margin, gap = 20 * mm, 8 * mm
    col = (width - 2 * margin - gap) / 2
    leading = 11

    def furniture(canvas, doc):
        canvas.saveState()
        canvas.setFont("Sans", 7)
        canvas.drawString(margin, height - 12 * mm,
                          "Halvorsen group, Tarnwick · Supporting Information · J. Invented Chem. 2026, 4, 101")
        canvas.drawRightString(width - margin, 10 * mm, f"S{doc.page}")
        y = height - margin - leading + 2
        n = (doc.page - 1) * 60 + 1
        while y > margin:
            canvas.drawRightString(margin - 3 * mm, y, str(n))
            n += 1
            y -= 2 * leading
        canvas.restoreState()

    frames = [Frame(margin, margin, col, height - 2 * margin, id="left"),
              Frame(margin + col + gap, margin, col, height - 2 * margin, id="right")]
    doc = BaseDocTemplate(str(path), pagesize=A4, title="Invented SI (Tarnwick)",
                          author="peakproof test suite")
    doc.addPageTemplates([PageTemplate(id="two", frames=frames, onPage=furniture)])
    style = ParagraphStyle("si", fontName="Sans", fontSize=8.5, leading=leading, spaceAfter=6)
    doc.build([Paragraph(markup(p), style) for p in paragraphs])


def run(args: list[str]) -> str:
    return subprocess.run(args, check=True, capture_output=True, text=True).stdout


def extract_all(pdf: Path) -> dict[str, str]:
    """Every extractor's text of ``pdf`` (name → text)."""
    import pypdfium2 as pdfium
    from pdfminer.high_level import extract_text

    out = {"pdftotext": run(["pdftotext", str(pdf), "-"]),
           "pdftotext-layout": run(["pdftotext", "-layout", str(pdf), "-"]),
           "pdfminer": extract_text(str(pdf))}
    document = pdfium.PdfDocument(str(pdf))
    out["pypdfium2"] = "\n".join(page.get_textpage().get_text_range() for page in document)
    document.close()
    return out


def ocr(pdf: Path, pages: int) -> str:
    with tempfile.TemporaryDirectory() as tmp:
        run(["pdftoppm", "-r", "300", "-gray", "-png", "-f", "1", "-l", str(pages), str(pdf),
             f"{tmp}/p"])
        texts = [run(["tesseract", str(png), "-", "--psm", "3"])
                 for png in sorted(Path(tmp).glob("p*.png"))]
    return "\n".join(texts)


def main() -> int:
    OUT.mkdir(exist_ok=True)
    paragraphs = source_paragraphs()
    (OUT / "source.txt").write_text("\n\n".join(paragraphs) + "\n", encoding="utf-8")
    pdf = OUT / "twins.pdf"
    typeset(paragraphs, pdf)
    for name, text in extract_all(pdf).items():
        (OUT / f"{name}.txt").write_text(text, encoding="utf-8")
    # OCR covers the compounds whose label (N) appears in the OCR pages' pdftotext text.
    first_pages = run(["pdftotext", "-l", str(OCR_PAGES), str(pdf), "-"])
    labels = {int(m) for m in re.findall(r"T-(\d+)", first_pages)}
    (OUT / "ocr-source.txt").write_text(
        "\n\n".join(p for i, p in enumerate(paragraphs, 1) if i in labels) + "\n", encoding="utf-8")
    (OUT / "ocr.txt").write_text(ocr(pdf, OCR_PAGES), encoding="utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
