"""peakproof: read, check, reformat and simulate NMR characterization data as chemists write it.

The public API is small and imports little; heavy libraries load only where they are needed.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "check", "format_text", "parse", "parse_file"]


def parse(text: str, *, path: str | None = None):
    """Read every characterization block in ``text`` into a :class:`peakproof.model.Document`."""
    from .parsing import parse as _parse

    return _parse(text, path=path)


def parse_file(path, *, fmt: str | None = None):
    """Read a .txt/.md/.tex/.docx/.pdf file and parse it; positions refer to the text read."""
    from .api import parse_path

    return parse_path(path, fmt=fmt)[1]


def check(document, *, config=None, formula: str | None = None):
    """Check a parsed document, or text (parsed first); returns findings (``.diagnostics``) and
    coupling networks."""
    from .api import check as _check

    return _check(document, config=config, formula=formula)


def format_text(text: str, style: str = "letters-first", *, round_numbers: bool = False):
    """Rewrite the data blocks of ``text`` in one style, safely (see :mod:`peakproof.safety`)."""
    from .api import format_text as _format_text

    return _format_text(text, style, round_numbers=round_numbers)
