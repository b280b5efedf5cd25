"""The demo SI and where its planted errors are, found from planted_errors.toml alone."""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
DEMO_TXT = EXAMPLES / "demo_si.txt"
DEMO_DOCX = EXAMPLES / "demo_si.docx"


def demo_text() -> str:
    return DEMO_TXT.read_text(encoding="utf-8")


def planted_ranges(text: str) -> list[tuple[str, int, int]]:
    """(compound, start, end) of every planted error's excerpt in ``text``.

    Each excerpt is unique within its compound's paragraph (heading line to the next heading),
    as planted_errors.toml promises.
    """
    planted = tomllib.loads((EXAMPLES / "planted_errors.toml").read_text(encoding="utf-8"))["error"]
    paragraphs: dict[str, tuple[int, int]] = {}
    headings = [m for m in re.finditer(r"^## .*$", text, re.MULTILINE)]
    for k, heading in enumerate(headings):
        label = re.search(r"\(([0-9]+[a-z]?)\)\s*$", heading.group(0))
        end = headings[k + 1].start() if k + 1 < len(headings) else len(text)
        if label:
            paragraphs[label.group(1)] = (heading.start(), end)
    out = []
    for error in planted:
        start, end = paragraphs[error["compound"]]
        at = text.find(error["excerpt"], start, end)
        assert at >= 0, f"planted excerpt {error['excerpt']!r} not in compound {error['compound']}"
        assert text.find(error["excerpt"], at + 1, end) < 0, "excerpt not unique in its paragraph"
        out.append((error["compound"], at, at + len(error["excerpt"])))
    return out
