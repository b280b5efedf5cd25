"""Plain text: encoding detection, binary refusal and newline normalisation."""

from __future__ import annotations

import codecs
import re

from .base import LineColumnLocator, ReaderError, SourceText, TextBuilder

_BOMS = (
    (codecs.BOM_UTF32_LE, "utf-32-le"),
    (codecs.BOM_UTF32_BE, "utf-32-be"),
    (codecs.BOM_UTF8, "utf-8"),
    (codecs.BOM_UTF16_LE, "utf-16-le"),
    (codecs.BOM_UTF16_BE, "utf-16-be"),
)
_SAMPLE = 64 * 1024
_CR = re.compile(r"\r\n?")
# Bytes that text files do not contain (tab, LF, FF, CR and ESC are allowed).
_CONTROL_BYTES = [b for b in range(32) if b not in (9, 10, 12, 13, 27)] + [127]


def decode_text(data: bytes, name: str = "") -> tuple[str, tuple[str, ...]]:
    """Bytes → str: BOM first, then strict UTF-8, then cp1252 (with a note saying so)."""
    for bom, encoding in _BOMS:
        if data.startswith(bom):
            try:
                return data[len(bom) :].decode(encoding), ()
            except UnicodeDecodeError as exc:
                raise ReaderError(
                    f"the file starts with a {encoding.upper()} byte-order mark but byte "
                    f"{exc.start + len(bom)} is not valid {encoding.upper()}",
                    "Save the file again as UTF-8.",
                    name,
                ) from None
    sample = data[:_SAMPLE]
    controls = sum(sample.count(b) for b in _CONTROL_BYTES)
    if sample.count(0) > 4 or controls > max(8, len(sample) // 100):
        raise ReaderError(
            "this does not look like a text file (it contains NUL or other control bytes)",
            "Give a .txt, .md, .tex, .docx or .pdf file; UTF-16 text needs a byte-order mark.",
            name,
        )
    try:
        return data.decode("utf-8"), ()
    except UnicodeDecodeError as exc:
        note = (
            f"the file is not valid UTF-8 (byte {exc.start}); it was read as Windows-1252 "
            "(cp1252). Save it as UTF-8 to be sure δ, μ and dashes come through."
        )
        return data.decode("cp1252", errors="replace"), (note,)


def normalise_newlines(original: str) -> TextBuilder:
    """CRLF and lone CR → LF; every other character copied where it was."""
    out = TextBuilder()
    pos = 0
    for m in _CR.finditer(original):
        out.copy(original[pos : m.start()], pos)
        out.put("\n", m.start())
        pos = m.end()
    out.copy(original[pos:], pos)
    return out


def read_text(data: bytes, name: str = "") -> SourceText:
    original, notes = decode_text(data, name)
    out = normalise_newlines(original)
    return SourceText(out.text(), "txt", name, notes, LineColumnLocator(out.map, original, "txt"))
