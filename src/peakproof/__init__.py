"""peakproof: read, check, reformat and simulate NMR characterization data as chemists write it.

The public API is small and imports little; heavy libraries load only where they are needed.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "parse", "parse_file"]


def parse(text: str, *, path: str | None = None):
    """Read every characterization block in ``text`` into a :class:`peakproof.model.Document`."""
    from .parsing import parse as _parse

    return _parse(text, path=path)


def parse_file(path, *, fmt: str | None = None):
    """Read a .txt/.md/.tex/.docx/.pdf file and parse it; positions refer to the text read."""
    from .api import parse_path

    return parse_path(path, fmt=fmt)[1]
