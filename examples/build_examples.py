"""Build .md, .tex, .docx and .pdf twins of a plain-text supporting-information source.

    python examples/build_examples.py [SOURCE] [--out DIR] [--damage]

SOURCE (default ``examples/demo_si.txt``) is plain text: lines starting with ``## `` are
compound headings, blank lines separate blocks.  Each twin marks up what real documents
mark up: superscript mass numbers (``1H``, ``13C{1H}``), subscript counts in formulas and
solvents (``CDCl3``, ``C12H14O3Na``, ``DMSO-d6``), an italic *J*.  The PDF wraps long
lines, as real PDFs do, and carries a running header and page numbers.  ``--damage`` also
writes ``<stem>-damaged.pdf`` where ``δ`` is printed as ``d`` and every second ``J =`` as
``J ¼``, the way text often comes out of PDFs, so the parser's repair step can be tested.
Dates, identifiers and zip timestamps are fixed, so rebuilding gives identical files.
"""

from __future__ import annotations

import argparse
import datetime as dt
import io
import re
import sys
import zipfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
DEFAULT_SOURCE = HERE / "demo_si.txt"
LAB = "Halvorsen group, Institute of Applied Synthesis, Tarnwick"
FIXED_TIME = dt.datetime(2024, 1, 1, 12, 0, 0)
FONT_DIRS = (Path("/usr/share/fonts/truetype/dejavu"), Path("/usr/share/fonts/dejavu"),
             Path("/usr/local/share/fonts"), Path.home() / ".fonts")  # fmt: skip

_MASS_NUMBER = re.compile(
    r"(?<![\w.])(\d{1,3})(?=(?:H|C|N|F|P|B|Si|Sn|Se|Pt|Li|O|Al)(?:\s*NMR|\s*\{|\}|\s*\())"
)
_FORMULA = re.compile(r"(?<![\w-])(?:[A-Z][a-z]?\d*){2,}(?![\w])")
_DEUTERATED = re.compile(r"(?<=-d)\d+\b")
_ITALIC_J = re.compile(r"(?<![A-Za-z])J(?![a-z])")


def segments(line: str) -> list[tuple[str, str]]:
    """One source line → [(text, style)], style "" | "sup" | "sub" | "i"."""
    style = [""] * len(line)
    for m in _MASS_NUMBER.finditer(line):
        style[m.start(1) : m.end(1)] = ["sup"] * len(m.group(1))
    for m in _FORMULA.finditer(line):
        if any(ch.isdigit() for ch in m.group()):
            for d in re.finditer(r"(?<=[A-Za-z])\d+", m.group()):
                style[m.start() + d.start() : m.start() + d.end()] = ["sub"] * len(d.group())
    for m in _DEUTERATED.finditer(line):
        style[m.start() : m.end()] = ["sub"] * (m.end() - m.start())
    for m in _ITALIC_J.finditer(line):
        if not style[m.start()]:
            style[m.start()] = "i"
    out: list[tuple[str, str]] = []
    for ch, st in zip(line, style):
        if out and out[-1][1] == st:
            out[-1] = (out[-1][0] + ch, st)
        else:
            out.append((ch, st))
    return out


def read_source(path: Path) -> list[tuple[str, str]]:
    """Source → [(kind, text)], kind "heading" | "line" | "blank"."""
    items = []
    for raw in path.read_text(encoding="utf-8").splitlines():
        line = raw.rstrip()
        if line.startswith("## "):
            items.append(("heading", line[3:].strip()))
        elif line:
            items.append(("line", line))
        else:
            items.append(("blank", ""))
    while items and items[-1][0] == "blank":
        items.pop()
    return items


def expected_text(items: list[tuple[str, str]]) -> str:
    """The plain text the readers should give back for the md, tex and docx twins."""
    return "".join(text + "\n" for _, text in items)


# -- Markdown --------------------------------------------------------------------------------

_MD_ESCAPES = {"\\": "\\\\", "*": "\\*", "_": "\\_", "`": "\\`", "<": "&lt;", "&": "&amp;",
               "δ": "&delta;", "–": "&ndash;", "−": "&minus;", "[": "\\["}  # fmt: skip


def to_markdown(items) -> str:
    lines = []
    for kind, text in items:
        body = ""
        for chunk, style in segments(text):
            chunk = "".join(_MD_ESCAPES.get(ch, ch) for ch in chunk)
            body += {"sup": "<sup>{}</sup>", "sub": "<sub>{}</sub>", "i": "*{}*"}.get(
                style, "{}").format(chunk)  # fmt: skip
        if kind == "heading":
            body = "## " + body
        elif re.match(r"[#>+-]|\d+\.", body):
            body = "\\" + body if not body[0].isdigit() else body
        lines.append(body)
    return "\n".join(lines) + "\n"


# -- LaTeX -----------------------------------------------------------------------------------

_TEX_ESCAPES = {
    "\\": r"\textbackslash{}", "%": r"\%", "&": r"\&", "#": r"\#", "_": r"\_", "$": r"\$",
    "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}", "^": r"\textasciicircum{}",
    "δ": r"$\delta$", "–": "--", "—": "---", "−": "$-$", "×": r"$\times$", "°": r"\textdegree{}",
    "μ": r"$\mu$", "±": r"$\pm$",
}  # fmt: skip
_TEX_QUANTITY = re.compile(r"(\d+(?:\.\d+)?) (MHz|Hz)\b")
_TEX_UNITS = {"MHz": r"\mega\hertz", "Hz": r"\hertz"}


def _tex_plain(chunk: str) -> str:
    out, pos = [], 0
    for m in _TEX_QUANTITY.finditer(chunk):
        out.append("".join(_TEX_ESCAPES.get(ch, ch) for ch in chunk[pos : m.start()]))
        out.append(rf"\SI{{{m.group(1)}}}{{{_TEX_UNITS[m.group(2)]}}}")
        pos = m.end()
    out.append("".join(_TEX_ESCAPES.get(ch, ch) for ch in chunk[pos:]))
    return "".join(out)


def to_latex(items) -> str:
    lines = [
        r"\documentclass{article}",
        r"\usepackage[utf8]{inputenc}",
        r"\usepackage{siunitx}",
        r"\usepackage[version=4]{mhchem}",
        f"% {LAB} (fictional): generated by examples/build_examples.py",
        r"\begin{document}",
    ]
    for kind, text in items:
        body = ""
        for chunk, style in segments(text):
            if style == "sup":
                body += f"$^{{{chunk}}}$"
            elif style == "sub":
                body += f"$_{{{chunk}}}$"
            elif style == "i":
                body += rf"\textit{{{chunk}}}"
            else:
                body += _tex_plain(chunk)
        lines.append(rf"\subsection*{{{body}}}" if kind == "heading" else body)
    lines.append(r"\end{document}")
    return "\n".join(lines) + "\n"


# -- Word ------------------------------------------------------------------------------------


def _deterministic_zip(data: bytes) -> bytes:
    """Rewrite a zip with fixed timestamps and order, so identical content gives equal bytes."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as src, zipfile.ZipFile(out, "w") as dst:
        for info in src.infolist():
            fixed = zipfile.ZipInfo(info.filename, date_time=(1980, 1, 1, 0, 0, 0))
            fixed.compress_type = zipfile.ZIP_DEFLATED
            fixed.external_attr = 0o644 << 16
            dst.writestr(fixed, src.read(info.filename))
    return out.getvalue()


def to_docx(items, path: Path) -> None:
    import docx

    document = docx.Document()
    props = document.core_properties
    props.author = props.last_modified_by = LAB
    props.title = "Supporting information (demo)"
    props.created = props.modified = FIXED_TIME
    props.revision = 1
    for kind, text in items:
        if kind == "blank":
            document.add_paragraph()
            continue
        paragraph = document.add_heading(level=2) if kind == "heading" else document.add_paragraph()
        for chunk, style in segments(text):
            run = paragraph.add_run(chunk)
            if style == "sup":  # both set w:vertAlign, so set only the one that applies
                run.font.superscript = True
            elif style == "sub":
                run.font.subscript = True
            elif style == "i":
                run.italic = True
    buffer = io.BytesIO()
    document.save(buffer)
    path.write_bytes(_deterministic_zip(buffer.getvalue()))


# -- PDF -------------------------------------------------------------------------------------


def find_font(name: str) -> Path | None:
    for folder in FONT_DIRS:
        candidate = folder / name
        if candidate.exists():
            return candidate
    return None


def _register_fonts() -> tuple[str, str]:
    """DejaVu Sans (with δ, ¼, ligatures) when present, else the built-in Helvetica."""
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    files = {"": "DejaVuSans.ttf", "-Oblique": "DejaVuSans-Oblique.ttf",
             "-Bold": "DejaVuSans-Bold.ttf", "-BoldOblique": "DejaVuSans-BoldOblique.ttf"}
    found = {suffix: find_font(f) for suffix, f in files.items()}
    if not all(found.values()):
        return "Helvetica", "Helvetica-Bold"
    for suffix, path in found.items():
        pdfmetrics.registerFont(TTFont("DejaVuSans" + suffix, str(path)))
    for bold, italic, suffix in ((0, 0, ""), (0, 1, "-Oblique"), (1, 0, "-Bold"),
                                 (1, 1, "-BoldOblique")):  # fmt: skip
        addMapping("DejaVuSans", bold, italic, "DejaVuSans" + suffix)
    return "DejaVuSans", "DejaVuSans-Bold"


def damage_line(text: str, counter: list[int]) -> str:
    """Print δ as d and every second "J =" as "J ¼", as PDF text extraction often does."""
    text = text.replace("δ", "d")

    def equals(m: re.Match) -> str:
        counter[0] += 1
        return m.group(1) + ("¼" if counter[0] % 2 == 0 else "=")

    return re.sub(r"(J\s*)=", equals, text)


def to_pdf(items, path: Path, damage: bool = False, header: str | None = None) -> None:
    from xml.sax.saxutils import escape

    from reportlab.lib.pagesizes import A5
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.lib.units import mm
    from reportlab.platypus import Paragraph, SimpleDocTemplate

    regular, bold = _register_fonts()
    header = header or "Halvorsen group · Supporting Information"
    body = ParagraphStyle("body", fontName=regular, fontSize=9, leading=11.5)
    gap = ParagraphStyle("gap", parent=body, spaceBefore=11.5)
    heading = ParagraphStyle("heading", parent=body, fontName=bold, fontSize=10.5, leading=13,
                             spaceBefore=11.5)  # fmt: skip

    def running(canvas, doc) -> None:
        canvas.saveState()
        canvas.setFont(regular, 7.5)
        canvas.drawString(doc.leftMargin, A5[1] - 10 * mm, header)
        canvas.drawCentredString(A5[0] / 2, 8 * mm, f"S{doc.page}")
        canvas.restoreState()

    flow, counter, after_blank = [], [0], False
    for kind, text in items:
        if kind == "blank":
            after_blank = True
            continue
        if damage:
            text = damage_line(text, counter)
        markup = ""
        for chunk, style in segments(text):
            chunk = escape(chunk)
            markup += {"sup": "<super>{}</super>", "sub": "<sub>{}</sub>", "i": "<i>{}</i>"}.get(
                style, "{}").format(chunk)  # fmt: skip
        style = heading if kind == "heading" else (gap if after_blank else body)
        flow.append(Paragraph(markup, style))
        after_blank = False
    doc = SimpleDocTemplate(str(path), pagesize=A5, leftMargin=14 * mm, rightMargin=14 * mm,
                            topMargin=16 * mm, bottomMargin=16 * mm, invariant=1,
                            title="Supporting information (demo)", author=LAB,
                            creator="peakproof examples/build_examples.py")  # fmt: skip
    doc.build(flow, onFirstPage=running, onLaterPages=running)


def build_examples(source: Path = DEFAULT_SOURCE, out_dir: Path | None = None,
                   damage: bool = False) -> dict[str, Path]:  # fmt: skip
    """Write the twins next to ``source`` (or into ``out_dir``); returns format → path."""
    source = Path(source)
    out_dir = Path(out_dir) if out_dir else source.parent
    out_dir.mkdir(parents=True, exist_ok=True)
    items = read_source(source)
    stem = out_dir / source.stem
    paths = {fmt: stem.with_suffix("." + fmt) for fmt in ("md", "tex", "docx", "pdf")}
    paths["md"].write_text(to_markdown(items), encoding="utf-8")
    paths["tex"].write_text(to_latex(items), encoding="utf-8")
    to_docx(items, paths["docx"])
    to_pdf(items, paths["pdf"])
    if damage:
        paths["damaged-pdf"] = out_dir / f"{source.stem}-damaged.pdf"
        to_pdf(items, paths["damaged-pdf"], damage=True)
    return paths


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("source", nargs="?", type=Path, default=DEFAULT_SOURCE)
    parser.add_argument("--out", type=Path, default=None, help="folder for the twins")
    parser.add_argument("--damage", action="store_true",
                        help="also write <stem>-damaged.pdf with ¼ for = and d for δ")
    args = parser.parse_args(argv)
    if not args.source.exists():
        print(f"error: {args.source} does not exist", file=sys.stderr)
        return 2
    for fmt, path in build_examples(args.source, args.out, args.damage).items():
        print(f"{fmt:12} {path}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
