"""Two stand-ins for lark's lexer scanner.

``install``: a scanner that compiles each terminal once per process, for short texts.

Lark's contextual lexer compiles, for every parser state it meets, one alternation of the
terminals that state accepts; on a one-paragraph file that is most of the start-up time. This
scanner tries the same terminals in the same order, one compiled pattern each (shared by every
state), which is exactly what the alternation does ("the first alternative that matches wins").
It is used for the grammar without fast-path tokens, which reads short texts; tests compare its
readings with lark's own scanner.

``install_reader``: for the fast grammar, the SIGNALS token (a whole list of signals, the
highest-priority terminal wherever it is allowed) is read by the transformer's own loop, one
signal at a time, instead of by its long pattern and then again by the transformer.  The loop
matches the pattern's own repeated group, so it ends where the pattern would.
"""

from __future__ import annotations

import re

_COMPILED: dict[tuple[str, int], re.Pattern] = {}


def _compiled(pattern: str, flags: int) -> re.Pattern:
    key = (pattern, flags)
    rx = _COMPILED.get(key)
    if rx is None:
        rx = _COMPILED[key] = re.compile(pattern, flags)
    return rx


class TerminalScanner:
    """Stands in for ``lark.lexer.Scanner``: same constructor, ``match`` and ``fullmatch``."""

    def __init__(self, terminals, g_regex_flags, re_, use_bytes):
        self.terminals = terminals
        self.allowed_types = {t.name for t in terminals}
        self._patterns = [(_compiled(t.pattern.to_regexp(), g_regex_flags), t.name) for t in terminals]

    def match(self, text, pos):
        string, end = text.text, text.end
        for rx, name in self._patterns:
            m = rx.match(string, pos, end)
            if m:
                return m.group(0), name
        return None

    def fullmatch(self, text: str):
        for rx, name in self._patterns:
            if rx.fullmatch(text):
                return name
        return None


def _fresh_lexers(lark_parser):
    """Every per-state lexer of ``lark_parser``'s contextual lexer, or None when this lark version
    is laid out differently or a scanner was built already (then nothing should be replaced)."""
    try:
        from lark.lexer import BasicLexer

        contextual = lark_parser.parser.lexer
        lexers = list(contextual.lexers.values()) + [contextual.root_lexer]
    except (AttributeError, ImportError):
        return None
    for lexer in lexers:
        if not isinstance(lexer, BasicLexer) or getattr(lexer, "_scanner", None) is not None:
            return None
    return lexers


def _replace_scanner_builder(lexers, build) -> bool:
    for lexer in lexers:
        lexer._build_scanner = build.__get__(lexer)
    return True


def install(lark_parser) -> bool:
    """Make every per-state lexer of ``lark_parser`` use :class:`TerminalScanner`.

    Returns False (and changes nothing) when this lark version is laid out differently."""
    lexers = _fresh_lexers(lark_parser)
    if lexers is None:
        return False
    from lark.lexer import BasicLexer, _create_unless

    def build(self):
        terminals, self.callback = _create_unless(self.terminals, self.g_regex_flags, self.re,
                                                  self.use_bytes)
        if self.user_callbacks:  # not used by peakproof's grammars; keep lark's own behaviour
            return BasicLexer._build_scanner(self)
        return TerminalScanner(terminals, self.g_regex_flags, self.re, self.use_bytes)

    return _replace_scanner_builder(lexers, build)


class ReaderFirstScanner:
    """Stands in for ``lark.lexer.Scanner`` when its first terminals are read by functions.

    ``readers`` lists ``(name, read)`` for the leading terminals, in the scanner's order;
    ``read(string, pos, end)`` returns where that terminal's match at ``pos`` would end (``pos``
    when it does not match).  The first that matches wins, as in lark's alternation; the other
    terminals are tried as lark would, in the same order."""

    def __init__(self, readers, terminals, g_regex_flags, re_, use_bytes):
        from lark.lexer import Scanner

        self.terminals = terminals
        self.allowed_types = {t.name for t in terminals}
        self._readers = readers
        rest = terminals[len(readers):]
        self._rest = Scanner(rest, g_regex_flags, re_, use_bytes) if rest else None
        self._whole = (terminals, g_regex_flags, re_, use_bytes)
        self._whole_scanner = None  # lark's own, for fullmatch (rarely asked): built on first use

    def match(self, text, pos):
        string, end = text.text, text.end
        for name, read in self._readers:
            stop = read(string, pos, end)
            if stop > pos:
                return string[pos:stop], name
        return self._rest.match(text, pos) if self._rest is not None else None

    def fullmatch(self, text: str):
        if self._whole_scanner is None:
            from lark.lexer import Scanner

            self._whole_scanner = Scanner(*self._whole)
        return self._whole_scanner.fullmatch(text)


def install_reader(lark_parser, readers: dict) -> bool:
    """Read the terminals named in ``readers`` (name -> read function) with their functions in
    every per-state lexer of ``lark_parser`` where they come first in the lexer's order (they are
    the highest-priority terminals).

    Returns False (and changes nothing) when this lark version is laid out differently."""
    lexers = _fresh_lexers(lark_parser)
    if lexers is None or any(lexer.user_callbacks for lexer in lexers):  # none in our grammars
        return False
    from lark.lexer import BasicLexer, _create_unless

    original = BasicLexer._build_scanner

    def build(self):
        terminals, self.callback = _create_unless(self.terminals, self.g_regex_flags, self.re,
                                                  self.use_bytes)
        leading = []
        for t in terminals:
            if t.name not in readers or t.name in self.callback:
                break
            leading.append((t.name, readers[t.name]))
        if not leading:
            return original(self)
        return ReaderFirstScanner(leading, terminals, self.g_regex_flags, self.re, self.use_bytes)

    return _replace_scanner_builder(lexers, build)
