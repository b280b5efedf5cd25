"""Markdown → plain text, keeping every character's way back to line:column.

Choices: headings become their bare text on their own line (a later step uses them as
compound labels); code-span backticks, emphasis markers, HTML tags and link syntax are
dropped, keeping the text they mark; ``<br>`` becomes a newline; entities are decoded
exactly (``&nbsp;`` is U+00A0); fenced code is kept verbatim without its fences; bullet
markers and ``>`` quote markers are dropped; numbered-list numbers are kept (they may be
compound numbers); setext underlines and thematic breaks vanish with their line.
"""

from __future__ import annotations

import html
import re

from .base import LineColumnLocator, SourceText, TextBuilder
from .text import decode_text

_LINE = re.compile(r"([^\r\n]*)(\r\n|\r|\n|$)")
_FENCE = re.compile(r" {0,3}(`{3,}|~{3,})")
_ATX = re.compile(r" {0,3}#{1,6}(?:[ \t]+|$)")
_ATX_CLOSE = re.compile(r"[ \t]+#+[ \t]*$|[ \t]+$")
_RULE = re.compile(r" {0,3}(?:=+|-+|(?:\*[ \t]*){3,}|(?:_[ \t]*){3,})[ \t]*")
_QUOTE = re.compile(r"(?: {0,3}>[ \t]?)+")
_BULLET = re.compile(r"[ \t]*[-*+][ \t]+")

_CODE = re.compile(r"(`+)(.+?)(?<!`)\1(?!`)")
_ESCAPE = re.compile(r"\\([!-/:-@\[-`{-~])")
_TAG = re.compile(r"</?([A-Za-z][A-Za-z0-9]*)\b[^<>\x00]*?/?>")
_ENTITY = re.compile(r"&(?:#[0-9]{1,7}|#[xX][0-9a-fA-F]{1,6}|[A-Za-z][A-Za-z0-9]{1,31});")
_LINK = re.compile(r"(!?\[)([^\]\x00]*)(\]\([^)\x00]*\))")
_EMPHASIS = [
    re.compile(r"(?<![*\\])(\*\*\*)(?=[^\s*])(.+?)(?<=[^\s*])(\*\*\*)(?!\*)"),
    re.compile(r"(?<![\w])(___)(?=\S)(.+?)(?<=\S)(___)(?!\w)"),
    re.compile(r"(?<![*\\])(\*\*)(?=[^\s*])(.+?)(?<=[^\s*])(\*\*)(?!\*)"),
    re.compile(r"(?<![\w])(__)(?=\S)(.+?)(?<=\S)(__)(?!\w)"),
    re.compile(r"(?<![*\\])(\*)(?=[^\s*])(.+?)(?<=[^\s*])(\*)(?!\*)"),
    re.compile(r"(?<![\w])(_)(?=[^\s_])(.+?)(?<=[^\s_])(_)(?!\w)"),
]


class _Inline:
    """Edits (start, end, replacement) on one line, found on a mask so they never overlap."""

    def __init__(self, line: str):
        self.mask = list(line)
        self.edits: list[tuple[int, int, str]] = []

    def free(self, start: int, end: int) -> bool:
        return "\x00" not in self.mask[start:end]

    def take(self, start: int, end: int) -> None:
        self.mask[start:end] = "\x00" * (end - start)

    def edit(self, start: int, end: int, replacement: str) -> None:
        self.edits.append((start, end, replacement))
        self.take(start, end)

    def masked(self) -> str:
        return "".join(self.mask)


def _inline_edits(line: str) -> list[tuple[int, int, str]]:
    work = _Inline(line)
    for m in _CODE.finditer(line):
        work.edit(m.start(1), m.end(1), "")
        work.edit(m.end(2), m.end(), "")
        work.take(m.start(2), m.end(2))  # code content is literal
    for m in _ESCAPE.finditer(work.masked()):
        work.edit(m.start(), m.start() + 1, "")
        work.take(m.start(1), m.end(1))
    for m in _TAG.finditer(work.masked()):
        work.edit(m.start(), m.end(), "\n" if m.group(1).lower() == "br" else "")
    for m in _ENTITY.finditer(work.masked()):
        decoded = html.unescape(m.group())
        if decoded != m.group():
            work.edit(m.start(), m.end(), decoded)
    for m in _LINK.finditer(work.masked()):
        work.edit(m.start(1), m.end(1), "")
        work.edit(m.start(3), m.end(3), "")
    for pattern in _EMPHASIS:
        for m in pattern.finditer(work.masked()):
            work.edit(m.start(1), m.end(1), "")
            work.edit(m.start(3), m.end(3), "")
    return sorted(work.edits)


def _emit_inline(out: TextBuilder, original: str, start: int, end: int) -> None:
    line = original[start:end]
    pos = 0
    for e_start, e_end, replacement in _inline_edits(line):
        out.copy(line[pos:e_start], start + pos)
        out.put(replacement, start + e_start)
        pos = e_end
    out.copy(line[pos:], start + pos)


def markdown_to_text(original: str) -> TextBuilder:
    out = TextBuilder()
    fence: str | None = None
    for m in _LINE.finditer(original):
        start, end, eol = m.start(1), m.end(1), m.group(2)
        if not eol and start == end and start == len(original):
            break
        line = m.group(1)
        opening = _FENCE.match(line)
        if fence is not None:
            if opening and opening.group(1)[0] == fence[0] and len(opening.group(1)) >= len(fence):
                fence = None
                continue
            out.copy(line, start)
        elif opening:
            fence = opening.group(1)
            continue
        elif _RULE.fullmatch(line) and line.strip():
            continue  # setext underline or thematic break: the line vanishes
        else:
            content = start
            heading = _ATX.match(line)
            if heading:
                content += heading.end()
                close = _ATX_CLOSE.search(line, heading.end())
                if close:
                    end = start + close.start()
            else:
                quote = _QUOTE.match(line)
                if quote:
                    content += quote.end()
                bullet = _BULLET.match(original, content, end)
                if bullet:
                    content = bullet.end()
            _emit_inline(out, original, content, end)
        if eol:
            out.put("\n", m.start(2))
    return out


def read_markdown(data: bytes, name: str = "") -> SourceText:
    original, notes = decode_text(data, name)
    out = markdown_to_text(original)
    return SourceText(out.text(), "md", name, notes, LineColumnLocator(out.map, original, "md"))
