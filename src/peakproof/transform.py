"""From Lark's callbacks straight to the model: no parse tree is kept.

The transformer is handed to the LALR parser's constructor, so each rule becomes a model node the
moment it is reduced.  Positions come from the tokens; a :class:`Context` turns them into spans in
the user's original text (through the repair map and the document's line index).
"""

from __future__ import annotations

import re
from functools import lru_cache

from lark import Token, Transformer

from .lazyre import lazy
from .model import (
    Coupling,
    ElementalAnalysis,
    MassSpec,
    Multiplicity,
    OtherItem,
    Signal,
    Spectrum,
)
from .repair import Repaired
from .span import Diagnostic, LineIndex, Span
from .vocabulary import (
    DELTA_NUCLEUS,
    coupling_label,
    ion_text,
    is_note,
    multiplicity_parts,
    nucleus_symbol,
    number,
    solvent_key,
)


class GrammarDrift(RuntimeError):
    """A pattern written out in this module for speed no longer matches the grammar's own."""


class Context:
    """Where the text being parsed sits in the document."""

    __slots__ = ("base", "repaired", "index", "diagnostics", "text", "parsed", "span")

    def __init__(self, base: int, repaired: Repaired, index: LineIndex):
        self.base = base  # document offset of the parsed text's first original character
        self.repaired = repaired
        self.index = index
        self.text = repaired.text
        self.parsed = repaired.text  # the string the parser is reading now
        self.diagnostics: list[Diagnostic] = []
        self.span = self._plain_span(base, index) if repaired.offsets is None else self._mapped_span

    @staticmethod
    def _plain_span(base: int, index: LineIndex):
        """Span maker for an unrepaired block: offsets shift by ``base`` (the common, fast case)."""
        new = object.__new__

        def span(start: int, end: int) -> Span:
            sp = new(Span)
            sp.start = base + start
            sp.end = base + end
            sp._where = index
            return sp

        return span

    def _mapped_span(self, start: int, end: int) -> Span:
        r = self.repaired
        return self.index.span(self.base + r.original(start), self.base + r.original_end(end))

    def note(self, rule: str, message: str, start: int, end: int, hint: str = "") -> None:
        self.diagnostics.append(Diagnostic(rule, "note", message, self.span(start, end), hint=hint))


_SPEC_HEAD = re.compile(
    r"^[;,.]?\s*(?P<mass>\d{1,3}|[\u00b9\u00b2\u00b3\u2070\u2074-\u2079]{1,3})(?P<gap>\s?)(?P<el>[A-Z][a-z]?)"
    r"\s?(?:\{(?P<dec>[^{}]*)\}|\[(?P<dec2>[^\[\]]*)\])?"
)
_LEAD = re.compile(r"^[;,.]?\s*")
_COUNT = re.compile(
    r"^(?:(?P<mult>\d+)\s?[×x]\s?)?(?P<n>\d+(?:[.,]\d+)?)\s?(?P<nuc>Si|[HCFPDBN])(?P<each>\s?each)?$"
)
_REFERENCE = lazy(r"TMS|Me4Si|Me₄Si|tetramethylsilane|ref|internal|standard|residual|DSS|TSP", re.I)
_ROOM_T = lazy(r"^(?:rt|r\.t\.|RT|room\s+temperature|ambient)$", re.I)
_METHOD_IN_HEAD = lazy(r"(ESI|EI|CI|APCI|APPI|FAB|MALDI|DART|FD)(?:\s?-?\s?((?:Q-?)?TOF))?([+\-]?)")


def _lead(token: Token) -> int:
    """Offset of a token's first character after the separator it absorbed."""
    m = _LEAD.match(token.value)
    return token.start_pos + (m.end() if m else 0)


def _stripped_end(token: Token) -> int:
    return token.start_pos + len(token.value.rstrip())


# (Lark turns the grammar's \uXXXX escapes into the characters themselves, hence the mixed quoting.)
_BARE_REST = r"(?!\s*[(\-" "\u2013\u2014\u2212" r"]|\s*to(?![A-Za-z])|\s*ppm)\s*[,;]\s*(?=[\-" "\u2212" r"]?\d)"
_LAST_REST = r"(?!\s*[(\-" "\u2013\u2014\u2212" r"]|\s*to(?![A-Za-z])|\s*ppm)(?=\s*(?:[;.,]|$))"
_SIGNAL_TAIL = r"(?!\s*ppm)(?:\s*[,;]\s*(?=[\-" "\u2212" r"]?\d))?\s*"
# What _SIGNAL asks of its parentheses: closed, nothing nested, no "8,4"-style decimal comma.
_SIGNAL_OPEN_GUARDS = r"(?=[^()]*\))(?![^)]*\d,\d)"


_new = tuple.__new__  # a record straight from its fields, in order (the hot paths' constructor)

_SHARED: dict[str, str] = {}


def _shared(text: str) -> str:
    """One string object for each of the few texts that recur in every signal ("d", "2H"), so a
    large model keeps one copy of each rather than one per signal."""
    kept = _SHARED.get(text)
    if kept is None:
        if len(_SHARED) >= 4096:
            return text
        kept = _SHARED[text] = text
    return kept


def _j_text(value: str) -> str:
    """A J value as written, with the decimal point and ASCII minus (what Coupling.text keeps)."""
    if "," in value or "\u2212" in value:
        return value.replace("\u2212", "-").replace(",", ".")
    return value


@lru_cache(maxsize=1024)
def _count_value(count_text: str) -> tuple[float, str, bool]:
    """``"2 × 3H"`` → (6.0, "H", False); ``"1H each"`` → (1.0, "H", True)."""
    cm = _COUNT.match(" ".join(count_text.split()))
    value = number(cm.group("n")) * (int(cm.group("mult")) if cm.group("mult") else 1)
    return value, cm.group("nuc"), bool(cm.group("each"))


class FastPatterns:
    """The terminal patterns the fast-path tokens are made of, compiled for splitting them."""

    def __init__(self, pattern_of):
        self.number = re.compile(pattern_of("NUMBER"))
        self.mult = re.compile(pattern_of("MULT"))
        self.count = re.compile(pattern_of("COUNT"))
        self.j_item = re.compile(
            f"({pattern_of('JLABEL')})\\s?(?:(?:{pattern_of('J_EQ')})\\s?)?({pattern_of('NUMBER')})(?:\\s?{pattern_of('HZ')})?"
        )
        self.bare_j = re.compile(f"({pattern_of('NUMBER')})(?:\\s?{pattern_of('HZ')})?")
        self.spec_head = re.compile(pattern_of("SPEC_HEAD"))
        num, hz = pattern_of("NUMBER"), pattern_of("HZ")
        try:
            self.ms_start = re.compile(pattern_of("MS_START"))
            self.ms_part = re.compile("|".join(
                f"(?P<{name}>{pattern_of(name)})" for name in
                ("FOUND", "ION", "CALCD", "MZ", "METHOD_PAREN", "ION_FORMULA", "NUMBER", "COLON", "MS_PUNCT")))
            # Possessive white space, then one part: what a gap match and a part match would give.
            self.ms_gap_part = re.compile(
                f"(?>(?:{pattern_of('WS')})?)(?:{self.ms_part.pattern})")
        except KeyError:
            pass
        details = (
            f"\\s?(?P<open>\\(){_SIGNAL_OPEN_GUARDS}(?P<m>{pattern_of('MULT')})"
            f"(?:,\\s?(?P<jl>{pattern_of('JLABEL')})\\s?(?:(?:{pattern_of('J_EQ')})\\s?)?(?P<j1>{num})"
            f"(?:,\\s?(?P<j2>{num}))?(?:,\\s?(?P<j3>{num}))?(?:\\s?{hz})?)?"
            f",\\s?(?P<c>{pattern_of('COUNT')})(?P<close>\\))"
        )
        self.common = re.compile(details)  # the commonest details, on their own
        # The commonest signal once more, with cheap stand-ins for MULT, JLABEL, the J values and
        # COUNT that match only where the grammar's own terminal would match the very same text
        # (letters before a non-word character; a bare "J" before white space or "="; a decimal J
        # before "," or "Hz"; "2H" before ")"), so anything else takes the general path.
        j_num = f"\\d{{1,3}}\\.\\d{{1,2}}(?=,\\s?\\d|\\s?{hz})"
        cheap_details = (
            f"\\s?(?P<open>\\(){_SIGNAL_OPEN_GUARDS}(?P<m>br ?s|[dtqph]{{1,4}}|s|m)(?![\\w\\-])"
            f"(?:,\\s?(?P<jl>J)(?=\\s|{pattern_of('J_EQ')})\\s?(?:(?:{pattern_of('J_EQ')})\\s?)?(?P<j1>{j_num})"
            f"(?:,\\s?(?P<j2>{j_num}))?(?:,\\s?(?P<j3>{j_num}))?(?:\\s?{hz})?)?"
            f",\\s?(?P<c>\\d{{1,3}}H)(?P<close>\\))"
        )
        self.direct = re.compile(f"(?P<s>{num})(?:\\s?[\u2013\\-]\\s?(?P<s2>{num}))?" + cheap_details)
        try:
            whole = pattern_of("SIGNALS")
        except KeyError:  # the grammar without its fast path (used by tests)
            self.one_signal = None
        else:
            # SIGNALS is "(?:ONE){1,9999}": one signal is the repeated group itself
            if not (whole.startswith("(?:") and whole.endswith("){1,9999}")):
                raise GrammarDrift(f"SIGNALS no longer has the form '(?:ONE){{1,9999}}': …{whole[-20:]}")
            self.one_signal = re.compile(whole[3 : -len("){1,9999}")])
        if self.one_signal is not None:
            # Pieces of the SIGNALS terminal, written out here for speed; the check keeps them
            # equal to the grammar's, also under ``python -O`` (tests build this class).
            whole = pattern_of("SIGNALS")
            for piece in (_BARE_REST, _LAST_REST, _SIGNAL_TAIL, "\\(" + _SIGNAL_OPEN_GUARDS):
                if piece not in whole:
                    raise GrammarDrift(f"grammar/peaks.lark changed: update {piece!r} in transform.py")
            # One step of a SIGNALS token: a shift of a plain list (group "b"), tried first as the
            # lexer's alternation does, or the commonest detailed signal with its separator.
            # (NUMBER is atomic, so its match is the same in either branch: read it once.)
            # First a cheap stand-in for the commonest plain shift ("123.6, " before a digit: the
            # very text NUMBER and _BARE_REST would take there).
            self.step = re.compile(f"(?P<q>\\d{{1,3}}\\.\\d{{1,2}}), (?=\\d)"
                                   f"|(?P<s>{num})(?:(?P<b>{_BARE_REST}|{_LAST_REST})"
                                   f"|{self.direct.pattern[len(f'(?P<s>{num})'):]}{_SIGNAL_TAIL})")
        self.shift_head = re.compile(
            f"\\s*({pattern_of('NUMBER')})(?:\\s?[\u2013\\-]\\s?({pattern_of('NUMBER')}))?"
        )
        self.header = re.compile(pattern_of("HEADER")) if self.one_signal is not None else None
        self.freq = re.compile(pattern_of("FREQ"))
        self.temp = re.compile(pattern_of("TEMP"))
        self.headers: dict[str, tuple] = {}  # HEADER token text -> what it says (see _header_reading)


class BlockBuilder(Transformer):
    """Builds model nodes bottom-up while the LALR parser reduces."""

    def __init__(self):
        super().__init__(visit_tokens=False)
        self.ctx: Context | None = None
        self.fast: FastPatterns | None = None
        # Tokens read while lexing, for their callbacks: (start, end) -> (text, entries) for SIGNALS,
        # (text, (header end, entries)) for SPECTRUM_FAST; see read_signals and read_spectrum
        self.read_ahead: dict[tuple[int, int], tuple[str, list]] = {}

    # ---- signals -------------------------------------------------------------------------
    def shift(self, c):
        first, last = c[0], c[-1]
        text = self.ctx.text[first.start_pos : last.end_pos]
        if len(c) == 1:
            return (number(first.value), None, text, first.start_pos, last.end_pos)
        return (None, (number(first.value), number(last.value)), text, first.start_pos, last.end_pos)

    def mult(self, c):
        tok = c[0]
        name, components, broad, apparent, kind, multiplier = multiplicity_parts(tok.value)
        return Multiplicity(
            name=name,
            span=self.ctx.span(tok.start_pos, _stripped_end(tok)),
            written=tok.value.strip(),
            components=components,
            broad=broad,
            apparent=apparent,
            kind=kind,
            multiplier=multiplier,
        )

    def j_values(self, c):
        return [t for t in c if t.type == "NUMBER"]

    def j_labeled(self, c):
        label_tok = c[0]
        bonds, nuclei, label = coupling_label(label_tok.value)
        values = c[-1]
        label_start = label_tok.start_pos + len(label_tok.value) - len(label_tok.value.lstrip())
        span = self.ctx.span
        return [
            Coupling(
                value=number(t.value),
                span=span(label_start if i == 0 else t.start_pos, t.end_pos),
                text=t.value.replace("\u2212", "-").replace(",", "."),
                nuclei=nuclei,
                bonds=bonds,
                label=label,
            )
            for i, t in enumerate(values)
        ]

    def j_bare(self, c):
        span = self.ctx.span
        return [
            Coupling(
                value=number(t.value),
                span=span(t.start_pos, t.end_pos),
                text=t.value.replace("\u2212", "-").replace(",", "."),
            )
            for t in c[0]
        ]

    def count(self, c):
        tok = c[0]
        text = tok.value.strip()
        value, nucleus, each = _count_value(text)
        return ("count", value, nucleus, text, each, tok.start_pos, _stripped_end(tok))

    def free(self, c):
        tok = c[0]
        text = " ".join(tok.value.split())
        return ("free", text, tok.start_pos, _stripped_end(tok))

    def details(self, c):
        mult = None
        couplings: list[Coupling] = []
        count = None
        assignment: list[str] = []
        notes: list[str] = []
        for item in c:
            if isinstance(item, Token):
                continue
            if isinstance(item, Multiplicity):
                if mult is None:
                    mult = item
                else:
                    notes.append(item.written)
            elif isinstance(item, list):
                couplings.extend(item)
            elif item[0] == "count":
                if count is None:
                    count = item
                else:
                    notes.append(item[3])
            elif item[0] == "free":
                (notes if is_note(item[1]) else assignment).append(item[1])
        return (mult, tuple(couplings), count, assignment, notes, c[0].start_pos, c[-1].end_pos)

    def entry(self, c):
        if isinstance(c[0], Token):  # SIGNALS, the fast-path token: several entries
            return self._fast_entries(c[0])
        details = next((item for item in c[1:] if not isinstance(item, Token)), None)
        return (c[0], details)

    def _fast_entries(self, tok: Token) -> list:
        """A SIGNALS token's entries: read while the lexer matched it (see ``read_signals``), or
        split now with the token's own pattern."""
        parsed = self.ctx.parsed  # match in context: the token's own lookaheads saw past its end
        read = self.read_ahead.pop((tok.start_pos, tok.end_pos), None)
        if read is not None and read[0] is parsed:
            return read[1]
        return self._signal_run(parsed, tok.start_pos, tok.end_pos, len(parsed))[0]

    def read_spectrum(self, string: str, pos: int, end: int) -> int:
        """Read a SPECTRUM_FAST token (HEADER SIGNALS) at ``pos`` for the lexer, as ``read_signals``
        does.  The header's pattern ends in a DELTA and white space, and a signal list starts with
        a number, so the two split where the header's own match ends."""
        header = self.fast.header.match(string, pos, end)
        if header is None:
            return pos
        at = header.end()
        if self.ctx is None:
            stop = self.read_signals(string, at, end)
            return stop if stop > at else pos
        entries, stop = self._signal_run(string, at, end, end)
        if stop == at:
            return pos
        self.read_ahead[(pos, stop)] = (string, (at, entries))
        return stop

    def _fast_spectrum(self, c) -> Spectrum:
        """A SPECTRUM_FAST token (with any signals after it): header and signals as read."""
        tok = c[0]
        parsed = self.ctx.parsed
        read = self.read_ahead.pop((tok.start_pos, tok.end_pos), None)
        if read is not None and read[0] is parsed:
            at, entries = read[1]
        else:
            at = self.fast.header.match(parsed, tok.start_pos).end()
            entries = self._signal_run(parsed, at, tok.end_pos, len(parsed))[0]
        if len(c) > 1:
            entries = list(entries)
            for item in c[1:]:
                if isinstance(item, list):  # a SIGNALS token's entries
                    entries.extend(item)
                elif not isinstance(item, Token):
                    entries.append(item)
        return self._header_spectrum(parsed[tok.start_pos : at], tok.start_pos, self._signals(entries))

    def read_signals(self, string: str, pos: int, end: int) -> int:
        """Read a SIGNALS token at ``pos`` for the lexer (see ``lean_lexer.install_reader``): the
        end of what the token's pattern would match, or ``pos`` when it matches nothing.  The
        entries are kept for the parser's callback, so each signal is matched once."""
        if self.ctx is None:  # not reading a block: find the end only
            one = self.fast.one_signal
            for _ in range(9999):
                m = one.match(string, pos, end) if pos < end else None
                if m is None:
                    break
                pos = m.end()
            return pos
        entries, stop = self._signal_run(string, pos, end, end)
        if stop > pos:
            self.read_ahead[(pos, stop)] = (string, entries)
        return stop

    def _signal_run(self, string: str, pos: int, limit: int, end: int) -> tuple[list, int]:
        """Consecutive fast-path signals from ``pos`` up to ``limit`` (matching within ``end``),
        one repetition of SIGNALS at a time, and where they stop."""
        fast = self.fast
        one, step = fast.one_signal, fast.step
        out = []
        append = out.append
        while pos < limit and len(out) < 9999:  # SIGNALS repeats its group at most 9999 times
            d = step.match(string, pos, end)
            if d is not None:
                value = d.group("q")
                if value is not None or d.start("b") >= 0:  # a shift of a plain list
                    # (the alternatives are disjoint); left as an entry: a following
                    # "(2 × d, 1H each)" may claim it
                    if value is None:
                        value = d.group("s")
                    append(((number(value), None, value, pos, pos + len(value)), None))
                    pos = d.end()
                    continue
                signal = self._direct_signal(d)
                if signal is not None:
                    append(signal)
                    pos = d.end()
                    continue
            m = one.match(string, pos, end)
            if m is None:
                break
            append(self._fast_entry(Token("SIGNAL", m.group(0), start_pos=pos)))
            pos = m.end()
        return out, pos

    def _direct_signal(self, d):
        """The commonest signal, ``7.26 (d, J = 8.4 Hz, 2H)``, straight from one match; None when
        it needs the general path (a count "each", a "2 × d", an AB pattern)."""
        s1, s2, written, label, j1, j2, j3, count_text = d.group("s", "s2", "m", "jl", "j1", "j2", "j3", "c")
        name, components, broad, apparent, kind, multiplier = multiplicity_parts(written)
        if multiplier != 1 or kind == "AB" or "each" in count_text:
            return None
        written, count_text = _shared(written), _shared(count_text)
        span = self.ctx.span
        where = d.span
        mult = _new(Multiplicity, (name, span(*where("m")), written, components, broad, apparent, kind,
                                   multiplier))
        couplings: tuple[Coupling, ...] = ()
        if j1 is not None:
            bonds, nuclei, lab = coupling_label(label)
            label_start = d.start("jl") + len(label) - len(label.lstrip())
            couplings = (_new(Coupling, (number(j1), span(label_start, d.end("j1")), _j_text(j1),
                                         nuclei, bonds, lab)),)
            if j2 is not None:
                couplings += (_new(Coupling, (number(j2), span(*where("j2")), _j_text(j2), None, None,
                                              None)),)
                if j3 is not None:
                    couplings += (_new(Coupling, (number(j3), span(*where("j3")), _j_text(j3), None,
                                                  None, None)),)
        n, nucleus, _ = _count_value(count_text)
        s_start, s_end = where("s")
        if s2 is None:
            shift, shift_range, shift_text = number(s1), None, s1
        else:
            s_end = d.end("s2")
            shift, shift_range, shift_text = None, (number(s1), number(s2)), self.ctx.parsed[s_start:s_end]
        d_end = d.end("close")
        return _new(Signal, (
            span(s_start, d_end),
            shift,
            shift_range,
            shift_text,
            span(s_start, s_end),
            mult,
            couplings,
            n,
            nucleus,
            count_text,
            span(*where("c")),
            None,
            (),
            span(d.start("open"), d_end),
            0,
        ))

    def _fast_entry(self, tok: Token):
        """Split one piece of a SIGNALS token exactly as the token-by-token rules would."""
        fast = self.fast
        text = tok.value
        base = tok.start_pos
        paren = text.find("(")
        hm = fast.shift_head.match(text)
        s_start, s_end = base + hm.start(1), base + hm.end(hm.lastindex)
        shift_text = text[hm.start(1) : hm.end(hm.lastindex)]
        if hm.group(2) is None:
            shift = (number(hm.group(1)), None, shift_text, s_start, s_end)
        else:
            shift = (None, (number(hm.group(1)), number(hm.group(2))), shift_text, s_start, s_end)
        if paren < 0:
            return (shift, None)
        cm = fast.common.match(text, hm.end())
        if cm is not None:
            return (shift, self._common_details(cm, base))
        close = text.rfind(")")
        mult = None
        couplings: list[Coupling] = []
        count = None
        assignment: list[str] = []
        notes: list[str] = []
        span = self.ctx.span
        pos = paren + 1
        for raw in text[paren + 1 : close].split(","):
            lead = len(raw) - len(raw.lstrip())
            item = raw.strip()
            at = base + pos + lead
            pos += len(raw) + 1
            if fast.mult.fullmatch(item):
                name, components, broad, apparent, kind, multiplier = multiplicity_parts(item)
                m = Multiplicity(name=name, span=span(at, at + len(item)), written=item,
                                 components=components, broad=broad, apparent=apparent,
                                 kind=kind, multiplier=multiplier)
                if mult is None:
                    mult = m
                else:
                    notes.append(item)
                continue
            jm = fast.j_item.fullmatch(item)
            if jm:
                bonds, nuclei, label = coupling_label(jm.group(1))
                label_start = at + len(jm.group(1)) - len(jm.group(1).lstrip())
                value = jm.group(2)
                couplings.append(Coupling(
                    value=number(value), span=span(label_start, at + jm.end(2)),
                    text=value.replace("\u2212", "-").replace(",", "."),
                    nuclei=nuclei, bonds=bonds, label=label))
                continue
            if fast.count.fullmatch(item):
                if count is None:
                    value, nucleus, each = _count_value(item)
                    count = ("count", value, nucleus, item, each, at, at + len(item))
                else:
                    notes.append(item)
                continue
            nm = fast.bare_j.fullmatch(item)
            if nm:
                value = nm.group(1)
                couplings.append(Coupling(value=number(value), span=span(at, at + nm.end(1)),
                                          text=value.replace("\u2212", "-").replace(",", ".")))
                continue
            free_text = " ".join(item.split())
            (notes if is_note(free_text) else assignment).append(free_text)
        return (shift, (mult, tuple(couplings), count, assignment, notes, base + paren, base + close + 1))

    def _common_details(self, m, base):
        """Details of the commonest shape, ``(dd, J = 8.4, 2.1 Hz, 1H)``, read in one match (of
        ``FastPatterns.common`` or ``.direct``, which share the group names); offsets + ``base``."""
        span = self.ctx.span
        written, label, j1, j2, j3, count_text = m.group("m", "jl", "j1", "j2", "j3", "c")
        name, components, broad, apparent, kind, multiplier = multiplicity_parts(written)
        mult = Multiplicity(name, span(base + m.start("m"), base + m.end("m")), written,
                            components, broad, apparent, kind, multiplier)
        couplings: tuple[Coupling, ...] = ()
        if j1 is not None:
            bonds, nuclei, lab = coupling_label(label)
            label_start = base + m.start("jl") + len(label) - len(label.lstrip())
            couplings = (Coupling(number(j1), span(label_start, base + m.end("j1")), _j_text(j1),
                                  nuclei, bonds, lab),)
            for g, value in (("j2", j2), ("j3", j3)):
                if value is None:
                    break
                couplings += (Coupling(number(value), span(base + m.start(g), base + m.end(g)),
                                       _j_text(value)),)
        n, nucleus, each = _count_value(count_text)
        count = ("count", n, nucleus, count_text, each, base + m.start("c"), base + m.end("c"))
        return (mult, couplings, count, [], [], base + m.start("open"), base + m.end("close"))

    def signal_list(self, c):
        entries = []
        for e in c:
            if isinstance(e, list):
                entries.extend(e)
            elif not isinstance(e, Token):
                entries.append(e)
        return self._signals(entries)

    def entry_only(self, c):
        return self._signals(c[0] if isinstance(c[0], list) else [c[0]])

    def _signals(self, entries):
        signals: list[Signal] = []
        span = self.ctx.span
        pending: list = []  # entries without details, which a following "each" may claim
        group_id = 0
        for entry in entries:
            if type(entry) is Signal:  # built whole by the direct path: never claims bare shifts
                for lone in pending:
                    signals.append(self._bare_signal(lone))
                pending = []
                signals.append(entry)
                continue
            shift, details = entry
            if details is None:
                pending.append(shift)
                continue
            mult, couplings, count, assignment, notes, d_start, d_end = details
            members = [shift]
            if pending:
                take = 0
                if mult is not None and mult.multiplier > 1:
                    take = mult.multiplier - 1
                elif count is not None and count[4]:
                    take = len(pending)
                elif mult is not None and mult.kind == "AB":
                    take = 1
                take = min(take, len(pending))
                if take:
                    members = pending[len(pending) - take :] + [shift]
                    del pending[len(pending) - take :]
            for lone in pending:
                signals.append(self._bare_signal(lone))
            pending = []
            if len(members) > 1:
                group_id += 1
            for member in members:
                value, rng, text, s_start, s_end = member
                n = None
                if count is not None:
                    n = count[1] if (count[4] or len(members) == 1) else count[1] / len(members)
                last = d_end if member is shift else s_end
                signals.append(
                    Signal(
                        span=span(s_start, last),
                        shift=value,
                        range=rng,
                        shift_text=text,
                        shift_span=span(s_start, s_end),
                        multiplicity=mult,
                        couplings=couplings,
                        count=n,
                        count_nucleus=count[2] if count else None,
                        count_text=count[3] if count else "",
                        count_span=span(count[5], count[6]) if count else None,
                        assignment=", ".join(assignment) if assignment else None,
                        notes=tuple(notes),
                        details_span=span(d_start, d_end),
                        group=group_id if len(members) > 1 else 0,
                    )
                )
        for lone in pending:
            signals.append(self._bare_signal(lone))
        return signals

    def _bare_signal(self, shift):
        value, rng, text, s_start, s_end = shift
        sp = self.ctx.span(s_start, s_end)
        return Signal(sp, value, rng, text, sp, None, (), None, None, "", None, None, (), None, 0)

    # ---- spectrum header -------------------------------------------------------------------
    def condition(self, c):
        return list(c)

    def conditions(self, c):
        return [x for x in c if isinstance(x, list)]

    def bare_conditions(self, c):
        return [x for x in c if isinstance(x, list)]

    def delta(self, c):
        return ("delta", c[0])

    def head_tail(self, c):
        conditions: list = []
        delta = None
        for item in c:
            if isinstance(item, list):
                conditions.extend(item)
            elif isinstance(item, tuple):
                delta = item[1]
        return (conditions, delta)

    def head_only(self, c):
        return self._spectrum(c, signals=[])

    def spectrum(self, c):
        if c[0].type == "SPECTRUM_FAST":
            return self._fast_spectrum(c)
        return self._spectrum(c, signals=None)

    def _header_reading(self, text: str) -> tuple:
        """What a HEADER token's text says, with offsets relative to its start.  Computed once per
        distinct header (an SI repeats a handful of them) and kept in ``FastPatterns.headers``."""
        fast = self.fast
        hit = fast.headers.get(text)
        if hit is not None:
            return hit
        m = fast.spec_head.match(text)
        head_end = m.end()
        lead = _LEAD.match(text).end()
        hm = _SPEC_HEAD.match(text)
        nucleus = nucleus_symbol(hm.group("mass")) + hm.group("el")
        dec = hm.group("dec") or hm.group("dec2")
        decoupled = tuple(
            nucleus_symbol(d) for d in re.split(r"\s*,\s*", dec.strip()) if d.strip()
        ) if dec else ()
        nucleus_end = len(text[:head_end].rstrip())
        note = None
        if hm.group("gap") or (dec and " " in dec.strip()):
            note = (f"read '{' '.join(text[lead:head_end].split())}' as {nucleus} NMR "
                    "(a superscript lost its place)", lead, nucleus_end)
        open_at = text.index("(", head_end)
        depth, close_at = 0, open_at  # a solvent may hold parentheses: "(CD3)2SO"
        for close_at in range(open_at, len(text)):
            ch = text[close_at]
            if ch == "(":
                depth += 1
            elif ch == ")":
                depth -= 1
                if depth == 0:
                    break
        freq = freq_at = solvent = solvent_at = temperature = None
        pos = open_at + 1
        for raw in re.split(r"[,;]", text[open_at + 1 : close_at]):
            item = raw.strip()
            at = pos + len(raw) - len(raw.lstrip())
            pos += len(raw) + 1
            if fast.freq.fullmatch(item):
                freq, freq_at = number(item[: item.index("M")].strip()), (at, at + len(item))
            elif fast.temp.fullmatch(item):
                t = number(re.match(r"[+\-\u2212]?\d+(?:[.,]\d+)?", item).group(0))
                temperature = t if item.endswith("K") else round(t + 273.15, 2)
            else:
                solvent, solvent_at = item, (at, at + len(item))
        header_end = len(text.rstrip())
        hit = (lead, nucleus, decoupled, note, freq, freq_at, solvent,
               solvent_key(solvent) if solvent else None, solvent_at, temperature,
               nucleus_end, header_end, text[lead:header_end])
        if len(fast.headers) < 4096:
            fast.headers[text] = hit
        return hit

    def _header_spectrum(self, header: str, base: int, signals: list) -> Spectrum:
        """A spectrum whose header (at ``base``) was read as one HEADER match (the fast path)."""
        (lead, nucleus, decoupled, note, freq, freq_at, solvent, solvent_norm, solvent_at,
         temperature, nucleus_end, header_end, header_text) = self._header_reading(header)
        ctx = self.ctx
        span = ctx.span
        if note is not None:
            ctx.note("repair-superscript", note[0], base + note[1], base + note[2])
        start = base + lead
        end = base + header_end
        last = self._unspan(signals[-1].span.end) if signals else end
        return Spectrum(
            span(start, last),
            nucleus,
            tuple(signals),
            decoupled,
            freq,
            span(base + freq_at[0], base + freq_at[1]) if freq_at else None,
            solvent,
            solvent_norm,
            span(base + solvent_at[0], base + solvent_at[1]) if solvent_at else None,
            temperature,
            None,
            (),
            span(start, end),
            header_text,
            span(start, base + nucleus_end),
        )

    def _spectrum(self, c, signals):
        head = c[0]
        if head.type == "HEADER":
            return self._header_spectrum(head.value, head.start_pos, c[1] if len(c) > 1 else [])
        conditions: list = []
        delta = None
        for item in c[1:]:
            if isinstance(item, tuple) and len(item) == 2 and isinstance(item[0], list):
                conditions, delta = item
            elif isinstance(item, list) and item and isinstance(item[0], list):
                conditions = item
            elif isinstance(item, list) and (not item or isinstance(item[0], Signal)):
                signals = item
        if signals is None:
            signals = []
        ctx = self.ctx
        start = _lead(head)
        if head.type == "SPEC_HEAD":
            m = _SPEC_HEAD.match(head.value)
            nucleus = nucleus_symbol(m.group("mass")) + m.group("el")
            dec = m.group("dec") or m.group("dec2")
            decoupled = tuple(
                nucleus_symbol(d) for d in re.split(r"\s*,\s*", dec.strip()) if d.strip()
            ) if dec else ()
            if m.group("gap") or (dec and " " in dec.strip()):
                ctx.note("repair-superscript",
                         f"read '{' '.join(head.value[start - head.start_pos:].split())}' as {nucleus} NMR "
                         "(a superscript lost its place)", start, _stripped_end(head))
        else:
            letter = re.search(r"[HCFPBN]", head.value[head.value.index("δ") :]).group(0)
            nucleus = DELTA_NUCLEUS[letter]
            decoupled = ()
        freq = freq_span = solvent = solvent_norm = solvent_span = temperature = reference = None
        notes: list[str] = []
        for cond in conditions:
            words: list[Token] = []
            cond_solvent = False
            for tok in cond:
                kind = tok.type
                if kind == "FREQ":
                    freq = number(tok.value[: tok.value.index("M")].strip())
                    freq_span = ctx.span(tok.start_pos, tok.end_pos)
                elif kind == "SOLVENT":
                    cond_solvent = True
                    solvent = tok.value.strip()
                    solvent_span = ctx.span(tok.start_pos, tok.end_pos)
                elif kind == "RATIO" and cond_solvent:
                    solvent = f"{solvent} {tok.value.strip()}"
                    solvent_span = ctx.span(solvent_span.start - ctx.base, tok.end_pos) if ctx.repaired.offsets is None else solvent_span
                elif kind == "TEMP":
                    value = tok.value.strip()
                    t = number(re.match(r"[+\-\u2212]?\d+(?:[.,]\d+)?", value).group(0))
                    temperature = t if value.endswith("K") else round(t + 273.15, 2)
                else:
                    words.append(tok)
            if words:
                phrase = " ".join(w.value for w in words)
                if _ROOM_T.match(phrase):
                    notes.append(phrase)
                elif _REFERENCE.search(phrase):
                    reference = phrase
                else:
                    notes.append(phrase)
        if solvent:
            solvent_norm = solvent_key(solvent)
        last_pos = self._last_pos(c)
        header_end = self._last_pos(c[:-1]) if signals else last_pos
        return Spectrum(
            span=ctx.span(start, last_pos),
            nucleus=nucleus,
            signals=tuple(signals),
            decoupled=decoupled,
            frequency_mhz=freq,
            frequency_span=freq_span,
            solvent=solvent,
            solvent_normalized=solvent_norm,
            solvent_span=solvent_span,
            temperature_k=temperature,
            reference=reference,
            conditions=tuple(notes),
            header_span=ctx.span(start, header_end),
            header_text=ctx.text[start:header_end],
            nucleus_span=ctx.span(start, _stripped_end(head)),
        )

    def _last_pos(self, items) -> int:
        """End offset (parsed-text coordinates) of the last thing in ``items``."""
        for item in reversed(items):
            if isinstance(item, Token):
                return _stripped_end(item)
            if isinstance(item, Signal):
                return self._unspan(item.span.end)
            if isinstance(item, list) and item:
                return self._last_pos(item)
            if isinstance(item, tuple):
                return self._last_pos(list(item))
        return 0

    def _unspan(self, doc_offset: int) -> int:
        """Parsed-text offset of a document offset (inverse of the repair map)."""
        ctx = self.ctx
        target = doc_offset - ctx.base
        offsets = ctx.repaired.offsets
        if offsets is None:
            return target
        from bisect import bisect_left

        return bisect_left(offsets, target)

    # ---- mass spectra ---------------------------------------------------------------------
    def _ms_parts(self, c) -> tuple[tuple[str, str, int], list]:
        """A mass-spec item's start and parts as ``(kind, text, start)``; an MS_FAST token is split
        into the MS_START and part tokens the lexer would have given (one match per part)."""
        first = c[0]
        if first.type != "MS_FAST":
            return (first.type, first.value, first.start_pos), [(t.type, t.value, t.start_pos) for t in c[1:]]
        text = self.ctx.parsed
        m = self.fast.ms_start.match(text, first.start_pos)
        pos, end = m.end(), first.end_pos
        gap_part = self.fast.ms_gap_part
        parts = []
        append = parts.append
        while pos < end:
            p = gap_part.match(text, pos, end)
            if p is None:  # only white space is left
                break
            kind = p.lastgroup
            append((kind, p.group(kind), p.start(kind)))
            pos = p.end()
        parts.extend((t.type, t.value, t.start_pos) for t in c[1:])
        return ("MS_START", m.group(0), m.start()), parts

    def mass_spec(self, c):
        span = self.ctx.span
        (_, head, head_start), parts = self._ms_parts(c)
        method = _method_in_head(head)
        ion = ion_written = ion_span = None
        formula = formula_span = None
        calcd = found = None
        calcd_text = found_text = ""
        calcd_span = found_span = None
        mode = None
        for kind, value, start in parts:
            if kind == "NUMBER":
                if mode == "found" and found is None:
                    found, found_text, found_span = number(value), value, span(start, start + len(value))
                elif mode == "calcd" and calcd is None:
                    calcd, calcd_text, calcd_span = number(value), value, span(start, start + len(value))
                elif mode is None and found is None:
                    found, found_text, found_span = number(value), value, span(start, start + len(value))
            elif kind == "CALCD":
                mode = "calcd"
            elif kind == "FOUND":
                mode = "found"
            elif kind == "ION":
                if ion is None:
                    ion_written = value.strip()
                    ion = _ion_text(ion_written)
                    ion_span = span(start, start + len(value.rstrip()))
            elif kind == "ION_FORMULA":
                if formula is None:
                    formula, lead = _formula_cut(value, False)
                    formula_span = span(start + lead, start + lead + len(formula))
            elif kind == "METHOD_PAREN":
                if method is None:
                    inner = value.strip()[1:-1].strip()
                    if not inner.lower().startswith("m/z"):
                        method = inner
        last_kind, last, last_start = parts[-1] if parts else ("MS_START", head, head_start)
        lead = _LEAD.match(head).end()
        return _new(MassSpec, (span(head_start + lead, last_start + len(last.rstrip())), method, ion,
                               ion_written, formula, formula_span, calcd, calcd_text, calcd_span,
                               found, found_text, found_span, ion_span))

    # ---- elemental analysis ---------------------------------------------------------------
    def element_value(self, c):
        el = c[0]
        num = next(t for t in c[1:] if t.type == "NUMBER")
        return (el.value, number(num.value), el.start_pos, num.end_pos)

    def element_list(self, c):
        return [x for x in c if isinstance(x, tuple)]

    def analysis(self, c):
        ctx = self.ctx
        formula = formula_span = None
        lists = [x for x in c if isinstance(x, list)]
        for tok in c:
            if isinstance(tok, Token) and tok.type == "ION_FORMULA":
                formula, f_start, f_end = _bare_formula(tok, keep_charge=True)
                formula_span = ctx.span(f_start, f_end)
        calcd, found = lists[0], lists[1]
        return ElementalAnalysis(
            span=ctx.span(_lead(c[0]), found[-1][3]),
            formula=formula,
            formula_span=formula_span,
            calcd=tuple((e, v) for e, v, _, _ in calcd),
            found=tuple((e, v) for e, v, _, _ in found),
            calcd_spans=tuple(ctx.span(s, e) for _, _, s, e in calcd),
            found_spans=tuple(ctx.span(s, e) for _, _, s, e in found),
        )

    # ---- other items and the block ----------------------------------------------------------
    def other(self, c):
        tok = c[0]
        start = _lead(tok)
        text = tok.value[start - tok.start_pos :].rstrip()
        return OtherItem(span=self.ctx.span(start, start + len(text)), kind=_other_kind(text), text=text)

    def block(self, c):
        return [x for x in c if not isinstance(x, Token)]

    def item_only(self, c):
        return [x for x in c if not isinstance(x, Token)]


def _bare_formula(tok: Token, keep_charge: bool = False) -> tuple[str, int, int]:
    """The formula inside ``[C12H14O3Na]+`` or ``C12H15O3+``, with its offsets."""
    text, lead = _formula_cut(tok.value, keep_charge)
    start = tok.start_pos + lead
    return text, start, start + len(text)


_CHARGE_END = re.compile(r"(?:\^?\d?[+\-−⁺⁻]|[•·])+$")
# After an unbracketed formula a digit before the sign is the last element's count
# (C12H15O3+ is C12H15O3 with charge +); only ]3+ carries a charge number.
_SIGN_END = re.compile(r"(?:\^?[+\-−⁺⁻]|[•·])+$")
_ISOTOPE_LABEL = re.compile(r"^\d+[A-Z]")


@lru_cache(maxsize=1024)
def _formula_cut(value: str, keep_charge: bool) -> tuple[str, int]:
    """The formula part of an ION_FORMULA token's text and where it starts in it."""
    text = value.rstrip()
    lead = 0
    if not keep_charge:
        charge = _CHARGE_END.search(text)
        if charge and text[: charge.start()].endswith("]"):
            text = text[: charge.start()]
        else:
            text = _SIGN_END.sub("", text)
        if text.startswith("[") and "]" in text:
            close = text.rfind("]")
            inner = text[1:close]
            if not _ISOTOPE_LABEL.match(inner):  # not an isotope label such as [13C]
                text = inner
                lead = 1
        text = _SIGN_END.sub("", text)
    return text, lead


@lru_cache(maxsize=256)
def _method_in_head(head: str) -> str | None:
    """The ionisation method written in an MS item's start (``HRMS-ESI`` → ``ESI``)."""
    m = _METHOD_IN_HEAD.search(head)
    if not m:
        return None
    return m.group(1) + (f"-{m.group(2)}" if m.group(2) else "") + m.group(3)


_ion_text = lru_cache(maxsize=256)(ion_text)


_OTHER_KINDS = [
    (re.compile(r"^(?:IR|FT-?IR|ATR-?IR|FTIR|ν)"), "IR"),
    (re.compile(r"^(?:mp|m\.p\.|Mp|M\.p\.|M\.P\.|MP)(?![A-Za-z])"), "mp"),
    (re.compile(r"^(?:bp|b\.p\.)"), "bp"),
    (re.compile(r"^(?:Rf|R_f|R\s?f|TLC)"), "Rf"),
    (re.compile(r"^(?:\[α\]|α|Optical rotation|Specific rotation)"), "rotation"),
    (re.compile(r"^(?:Yield|yield)"), "yield"),
    (re.compile(r"^(?:UV|λmax)"), "UV"),
    (re.compile(r"^(?:LRMS|GC-?MS|LC-?MS|MS)"), "MS"),
]


def _other_kind(text: str) -> str:
    for pattern, kind in _OTHER_KINDS:
        if pattern.match(text):
            return kind
    return "other"
