"""Document readers: .txt, .md, .tex, .docx and .pdf → :class:`SourceText`.

Every reader gives plain Unicode text for the parser and a compact map back to the
original's own terms (line:column, paragraph/run, page/line), so findings can point at the
user's document.  Heavy libraries (python-docx, pdfplumber) load only when needed.
"""

from __future__ import annotations

import os
import re

from .base import FORMATS, Location, ReaderError, SourceText
from .limits import Limits, file_size

__all__ = ["read_document", "sniff_format", "SourceText", "Location", "ReaderError", "Limits",
           "FORMATS", "write_docx_runs"]  # fmt: skip

EXTENSIONS = {
    ".txt": "txt", ".text": "txt", ".md": "md", ".markdown": "md", ".tex": "tex",
    ".latex": "tex", ".docx": "docx", ".pdf": "pdf",
}  # fmt: skip
_UNSUPPORTED = {
    ".doc": "Save it as .docx (Word: File ▸ Save As ▸ Word Document).",
    ".rtf": "Save it as .docx or plain text.",
    ".odt": "Save it as .docx (File ▸ Save As ▸ Word 2007-365).",
    ".pages": "Export it as .docx or PDF.",
}  # fmt: skip
_SNIFF_BYTES = 64 * 1024
_MARKDOWN_HINTS = re.compile(
    r"^#{1,6} |<su[pb]>|&[a-zA-Z]{2,8};|\*\*\S|^[-*] |`[^`\n]+`|\*[^*\s][^*\n]*\*", re.MULTILINE
)
_TEX_HINTS = re.compile(r"\\documentclass|\\begin\{|\\(?:sub)*section\*?\{")


def sniff_format(head: bytes) -> str:
    """Guess the format from the first bytes of a file."""
    if head.startswith(b"PK\x03\x04"):
        return "docx" if b"word/" in head or b"[Content_Types].xml" in head else "zip"
    if b"%PDF-" in head[:1024]:
        return "pdf"
    sample = head.decode("utf-8", errors="ignore")
    if _TEX_HINTS.search(sample):
        return "tex"
    if _MARKDOWN_HINTS.search(sample):
        return "md"
    return "txt"


def read_document(path_or_bytes: str | os.PathLike | bytes, *, fmt: str | None = None,
                  name: str | None = None, limits: Limits | None = None) -> SourceText:  # fmt: skip
    """Read a document into :class:`SourceText`.

    ``fmt`` forces the format ("txt", "md", "tex", "docx", "pdf"); otherwise it follows the
    file extension, and for bytes or unknown extensions the content.  ``name`` is used in
    messages (default: the file name).  Raises :class:`ReaderError` for any unreadable file.
    """
    limits = limits or Limits.from_environment()
    if isinstance(path_or_bytes, (bytes, bytearray, memoryview)):
        data: bytes | None = bytes(path_or_bytes)
        path = None
        name = name or "<input>"
        limits.check_size(len(data), name)
        ext = ""
    else:
        path = os.fspath(path_or_bytes)
        name = name or os.path.basename(path)
        limits.check_size(file_size(path, name), name)
        data = None
        ext = os.path.splitext(path)[1].lower()
    if fmt is not None and fmt not in FORMATS:
        raise ReaderError(f"unknown format {fmt!r}", f"Use one of: {', '.join(FORMATS)}.", name)
    if fmt is None and ext in _UNSUPPORTED:
        raise ReaderError(f"{ext} files cannot be read", _UNSUPPORTED[ext], name)
    fmt = fmt or EXTENSIONS.get(ext)
    if fmt is None or fmt in ("txt", "md", "tex") and data is None:
        if data is None:
            data = _read_bytes(path, name)
        sniffed = sniff_format(data[:_SNIFF_BYTES])
        if sniffed == "zip":
            raise ReaderError("this is a zip archive but not a Word document",
                              "Give a .docx, .pdf, .tex, .md or .txt file.", name)  # fmt: skip
        if fmt is None:
            fmt = sniffed
        elif sniffed in ("docx", "pdf") and fmt != sniffed:
            raise ReaderError(f"the file is named .{ext.lstrip('.')} but holds a {sniffed.upper()}",
                              f"Rename it to .{sniffed}.", name)  # fmt: skip
    source = data if data is not None else path
    if fmt == "docx":
        from .docx import read_docx

        return read_docx(source, name, limits)
    if fmt == "pdf":
        from .pdf import read_pdf

        if data is not None and b"%PDF-" not in data[:1024]:
            raise ReaderError("this is not a PDF (no %PDF- header)", "Check the file.", name)
        return read_pdf(source, name, limits)
    if data is None:
        data = _read_bytes(path, name)
    if fmt == "md":
        from .markdown import read_markdown

        return read_markdown(data, name)
    if fmt == "tex":
        from .latex import read_latex

        return read_latex(data, name)
    from .text import read_text

    return read_text(data, name)


def _read_bytes(path: str, name: str) -> bytes:
    try:
        with open(path, "rb") as handle:
            return handle.read()
    except OSError as exc:
        raise ReaderError(f"the file cannot be read ({exc.strerror})", "", name) from None


def write_docx_runs(path_in, path_out, replacements, limits: Limits | None = None) -> None:
    """See :func:`peakproof.readers.docx.write_docx_runs`."""
    from .docx import write_docx_runs as write

    write(path_in, path_out, replacements, limits)
