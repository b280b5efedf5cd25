"""The one face the command line and the web page call: read, parse, check, format, simulate.

Neither face reaches below this module, so a third (an editor plug-in, a notebook) costs
nothing new.
"""

from __future__ import annotations

import os
import sys
from typing import TYPE_CHECKING, NamedTuple

from .model import Document
from .records import compared_by_class

if TYPE_CHECKING:
    from .readers.base import SourceText


@compared_by_class
class Source(NamedTuple):
    """A document's text as handed to the parser, and how to locate offsets in the original."""

    text: str
    name: str
    format: str
    reader: SourceText | None = None  # when read by a reader

    def locate(self, offset: int):
        if self.reader is not None:
            return self.reader.locate(offset)
        return None


class InputError(Exception):
    """An input that cannot be read; ``str()`` is a message for people."""


def read_source(path, *, fmt: str | None = None, data: bytes | None = None, limits=None) -> Source:
    """Read ``path`` (``"-"`` for standard input, or ``data`` bytes) into a :class:`Source`."""
    from .readers import ReaderError, read_document

    try:
        if data is not None:
            st = read_document(data, fmt=fmt, name=str(path), limits=limits)
        elif str(path) == "-":
            raw = sys.stdin.buffer.read()
            st = read_document(raw, fmt=fmt or "txt", name="<stdin>", limits=limits)
        else:
            if not os.path.exists(path):
                raise InputError(f"{path}: no such file")
            if os.path.isdir(path):
                raise InputError(f"{path}: is a folder; give a file, or a glob such as '{path}/*.md'")
            st = read_document(path, fmt=fmt, limits=limits)
    except ReaderError as exc:
        raise InputError(str(exc)) from None
    except OSError as exc:
        raise InputError(f"{path}: {exc.strerror or exc}") from None
    return Source(text=st.text, name=str(path), format=st.format, reader=st)


def parse_source(source: Source) -> Document:
    from .parsing import parse

    return parse(source.text, path=source.name)


def parse_path(path, *, fmt: str | None = None) -> tuple[Source, Document]:
    source = read_source(path, fmt=fmt)
    return source, parse_source(source)


def check(document: Document | str, *, config=None, formula: str | None = None, structures=None):
    """Findings and coupling networks (``checker.CheckResult``) for a parsed document, or for
    text, which is parsed first (its syntax diagnostics are among the findings).

    ``structures``: a side file or folder path, a list of ``structures.Structure``, or the
    ``structures.Matching`` that :func:`match_structures` returned; structures written in the
    document itself (``SMILES: …``) are always used."""
    from .checker import check_document

    if isinstance(document, str):
        from .parsing import parse

        document = parse(document)
    if structures is not None and not hasattr(structures, "by_block"):
        structures = match_structures(document, structures)
    by_block = structures.by_block if structures is not None else None
    return check_document(document, config, formula, structures=by_block)


def match_structures(document: Document, structures):
    """A side file's (or a list's) structures matched to the document's compounds by label;
    raises ``InputError`` when the file cannot be read."""
    from .structures import StructureFileError, load_structures
    from .structures import match_structures as match

    if not isinstance(structures, (list, tuple)):
        try:
            structures = load_structures(structures)
        except StructureFileError as exc:
            raise InputError(str(exc)) from None
    return match(document, list(structures))


def format_text(text: str, style: str = "letters-first", *, round_numbers: bool = False):
    """Rewrite the data blocks of ``text`` in ``style``; the result is checked before it is returned
    (raises ``safety.UnsafeFormat`` rather than return text whose data changed)."""
    from .safety import checked_format
    from .styles import get_style

    return checked_format(text, get_style(style), round_numbers=round_numbers)
