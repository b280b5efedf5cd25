"""Read text into the model: locate blocks, repair them, parse them, recover from errors."""

from __future__ import annotations

import os
import re
import tempfile
import threading
import zlib
from functools import lru_cache
from pathlib import Path

from lark import Lark
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from .collector import collector_paused
from .compounds import compound_of
from .lazyre import lazy
from .locate import CORE_START, OTHER_START, iter_locate
from .model import Block, Document, ElementalAnalysis, MassSpec, OtherItem, Spectrum
from .repair import normalize_for_locating, repair
from .span import Diagnostic, LineIndex
from .transform import BlockBuilder, Context, FastPatterns

GRAMMAR_DIR = Path(__file__).resolve().parent / "grammar"

#: What each terminal means to a chemist, for "expected …" messages.
EXPECTED_NAMES = {
    "NUMBER": "a number such as 7.26",
    "MULT": "a multiplicity (s, d, t, q, m, dd, br s…)",
    "JLABEL": "a coupling constant (J = 8.4 Hz)",
    "COUNT": "an integration such as 2H",
    "FREE": "an assignment such as ArH",
    "CLOSE": "a closing parenthesis ')'",
    "OPEN": "an opening parenthesis '('",
    "DETAIL_SEP": "a comma between details",
    "LIST_SEP": "a comma between signals",
    "COND_SEP": "a comma between conditions",
    "HZ": "the unit Hz",
    "J_EQ": "'='",
    "J_AND": "'and'",
    "FREQ": "a frequency such as 400 MHz",
    "SOLVENT": "a solvent such as CDCl3",
    "TEMP": "a temperature such as 298 K",
    "DELTA": "δ",
    "SPEC_HEAD": "a spectrum header such as 13C NMR",
    "DELTA_HEAD": "a header such as δH",
    "MS_START": "HRMS",
    "EA_START": "an elemental analysis (Anal. Calcd for …)",
    "OTHER_ITEM": "another item (IR, mp, Rf…)",
    "BLOCK_END": "the end of the block",
    "RANGE_DASH": "a range dash",
    "RANGE_TO": "'to'",
    "PPM": "ppm",
    "ELEMENT": "an element symbol such as C",
    "FOUND": "'found'",
    "CALCD": "'calcd'",
    "ION": "an ion such as [M+H]+",
    "ION_FORMULA": "a formula such as C12H14O3Na",
    "COLON": "':'",
    "RATIO": "a ratio such as 4:1",
    "COND_WORD": "a note",
    "PERCENT": "'%'",
    "MW_PAREN": "a molar mass in parentheses",
    "METHOD_PAREN": "an ionisation method such as (ESI)",
    "MZ": "m/z",
    "MS_PUNCT": "punctuation",
}


def _grammar_files() -> list[Path]:
    return sorted(GRAMMAR_DIR.glob("*.lark"))


_PER_THREAD = threading.local()


def _builder_and_parser(fast: bool = True) -> tuple[BlockBuilder, Lark]:
    """This thread's parser: the transformer keeps the block being read, so threads never share one."""
    pairs = getattr(_PER_THREAD, "pairs", None)
    if pairs is None:
        pairs = _PER_THREAD.pairs = {}
    pair = pairs.get(fast)
    if pair is None:
        pair = pairs[fast] = _build(fast)
    return pair


def _build(fast: bool) -> tuple[BlockBuilder, Lark]:
    """The LALR parser with the transformer inside, built once and cached on disk.

    ``fast=False`` drops the fast-path tokens (SIGNALS, HEADER, MS_FAST) so tests can check that both
    ways of reading give the same model.
    """
    # The cache file is named after the grammar files' contents (crc32 and length: hashlib would
    # cost an import at every start-up, and a stale cache only means one rebuild).
    key = zlib.crc32(b"fast" if fast else b"slow")
    size = 0
    for path in _grammar_files():
        data = path.name.encode() + path.read_bytes()
        key = zlib.crc32(data, key)
        size += len(data)
    import lark

    key = zlib.crc32(lark.__version__.encode(), key)
    cache_dir = Path(os.environ.get("PEAKPROOF_CACHE_DIR") or tempfile.gettempdir())
    cache = cache_dir / f"peakproof-grammar-{key:08x}-{size}.lark-cache"
    builder = BlockBuilder()
    options = dict(
        parser="lalr",
        lexer="contextual",
        start=["block", "item_only", "head_only", "entry_only"],
        transformer=builder,
        maybe_placeholders=False,
    )
    grammar_path = GRAMMAR_DIR / "peaks.lark"
    grammar = grammar_path.read_text(encoding="utf-8")
    if not fast:
        grammar = re.sub(r"\n\s*\| (?:SIGNALS|HEADER|MS_FAST|SPECTRUM_FAST)\b[^\n]*", "", grammar)
    options.update(import_paths=[str(GRAMMAR_DIR)], source_path=str(grammar_path))
    try:
        parser = Lark(grammar, cache=str(cache), **options)
    except (OSError, PermissionError):
        parser = Lark(grammar, **options)
    if not fast:  # short texts: one compiled pattern per terminal, not one per parser state
        from .lean_lexer import install

        install(parser)
    # The fast tokens' own patterns are compiled only for the grammar that has them.
    builder.fast = FastPatterns(lambda name: parser.get_terminal(name).pattern.to_regexp()) if fast else None
    if fast:  # the lexer's SIGNALS tokens are read by the builder's own loop, once
        from .lean_lexer import install_reader

        install_reader(parser, {"SPECTRUM_FAST": builder.read_spectrum, "SIGNALS": builder.read_signals})
    return builder, parser


# ---- public entry points ---------------------------------------------------------------------
#: Below this many characters the fast-path tokens cost more to compile than they save.
FAST_PATH_MIN_CHARS = 20_000


def _choose_fast(text: str, fast: bool | None) -> bool:
    if fast is not None:
        return fast
    pairs = getattr(_PER_THREAD, "pairs", None) or {}
    return True in pairs or len(text) >= FAST_PATH_MIN_CHARS


def parse(text: str, *, path: str | None = None, fast: bool | None = None) -> Document:
    """Read every data block in ``text``.  Never raises on bad input: problems become diagnostics.

    ``fast`` picks the grammar with or without its fast-path tokens (both read the same model;
    by default the fast one for long texts, where compiling its larger patterns pays off)."""
    if not isinstance(text, str):
        raise TypeError(f"parse() takes text (str), not {type(text).__name__}")
    index = LineIndex(text)
    blocks: list[Block] = []
    diagnostics: list[Diagnostic] = []
    for block, diags in iter_blocks(text, index=index, fast=fast):
        blocks.append(block)
        diagnostics.extend(diags)
    return Document(text=text, blocks=tuple(blocks), diagnostics=tuple(diagnostics), path=path)


def iter_blocks(text: str, *, index: LineIndex | None = None, fast: bool | None = None):
    """Yield ``(block, diagnostics)`` one block at a time, so a caller that does not keep them
    reads a large text in constant memory."""
    index = index or LineIndex(text)
    fast = _choose_fast(text, fast)
    view = normalize_for_locating(text)
    with collector_paused():  # the model has no reference cycles (see collector.py)
        floor = 0
        for i, located in enumerate(iter_locate(view.text)):
            start, end = view.original(located.start), view.original_end(located.end)
            block, diags = parse_block(text, start, end, index, fast=fast, number=i,
                                       suppressed=located.suppressed, floor=floor)
            floor = end
            yield block, diags


def parse_block(text: str, start: int, end: int, index: LineIndex, *, fast: bool = True,
                number: int = 0, suppressed: tuple[str, ...] = (), floor: int | None = None,
                ) -> tuple[Block, list[Diagnostic]]:
    """Parse ``text[start:end]``; on a syntax error, read it piece by piece."""
    builder, parser = _builder_and_parser(fast)
    raw = text[start:end]
    repaired = repair(raw)
    ctx = Context(start, repaired, index)
    for r in repaired.repairs:
        ctx.diagnostics.append(
            Diagnostic(f"repair-{r.kind}", "note", r.message, index.span(start + r.start, start + r.end))
        )
    builder.ctx = ctx
    builder.read_ahead.clear()
    try:
        items = parser.parse(repaired.text, start="block")
    except UnexpectedInput:
        try:
            items = _recover(parser, builder, ctx)
        except Exception as exc:  # a bug of ours must not lose the document
            items = []
            ctx.diagnostics.append(_internal(index, start, end, exc))
    except Exception as exc:
        items = []
        ctx.diagnostics.append(_internal(index, start, end, exc))
    finally:
        builder.ctx = None
    spectra, ms, ea, others = _sorted_items(items)
    compound = c_span = formula = None
    if floor is not None:  # the compound: its label or heading in the text since the last block
        compound, c_span, formula = compound_of(text, floor, start, index, ea)
    block = Block(span=index.span(start, end), text=raw, spectra=spectra, mass_spec=ms, analyses=ea,
                  others=others, compound=compound, compound_span=c_span, formula=formula,
                  index=number, suppressed=suppressed)
    return block, ctx.diagnostics


def _internal(index, start, end, exc) -> Diagnostic:
    return Diagnostic(
        "internal-error", "error",
        f"peakproof could not read this block ({type(exc).__name__}: {exc}); please report it",
        index.span(start, end), hint="the block was skipped; the rest of the document was read",
    )


def _sorted_items(items) -> tuple[tuple, tuple, tuple, tuple]:
    """A block's items by kind: spectra, mass spectra, elemental analyses, other items."""
    spectra, ms, ea, others = [], [], [], []
    for item in items:
        if isinstance(item, Spectrum):
            spectra.append(item)
        elif isinstance(item, MassSpec):
            ms.append(item)
        elif isinstance(item, ElementalAnalysis):
            ea.append(item)
        elif isinstance(item, OtherItem):
            others.append(item)
    return tuple(spectra), tuple(ms), tuple(ea), tuple(others)


# ---- recovery --------------------------------------------------------------------------------
@lru_cache(maxsize=1)
def _item_boundary() -> re.Pattern:
    """Where items start inside a block (compiled on the first damaged block only)."""
    return re.compile(
        r"(?:^|(?<=[;,.])|(?<=[;,.]\s)|(?<=[;,.]\s\s))(?=\s*(?:" + CORE_START.pattern + "|"
        + OTHER_START.pattern[OTHER_START.pattern.index("(?:(?:"):] + "))"
    )


def _recover(parser: Lark, builder: BlockBuilder, ctx: Context) -> list:
    """Read a block that failed as a whole: item by item, then signal by signal."""
    text = ctx.text
    starts = sorted({m.start() for m in _item_boundary().finditer(text)} | {0})
    items: list = []
    for a, b in zip(starts, starts[1:] + [len(text)]):
        piece = text[a:b]
        if not piece.strip():
            continue
        try:
            items.extend(_parse_piece(parser, builder, ctx, a, piece, "item_only"))
            continue
        except (UnexpectedInput, ValueError, AttributeError, IndexError) as exc:
            first_error = exc if isinstance(exc, UnexpectedInput) else None
        spectrum = _recover_spectrum(parser, builder, ctx, a, piece)
        if spectrum is not None:
            items.append(spectrum)
        elif first_error is not None:
            _syntax_error(ctx, first_error, a, piece)
    return items


def _parse_piece(parser, builder, ctx, offset, piece, start):
    """Parse ``piece`` (at ``offset`` in the block) with positions kept block-relative."""
    # Pad with spaces so token offsets are block offsets: cheap, and keeps the Context simple.
    padded = " " * offset + piece
    ctx.parsed = padded
    try:
        result = parser.parse(padded, start=start)
    finally:
        ctx.parsed = ctx.text
    return result if isinstance(result, list) else [result]


def _recover_spectrum(parser, builder, ctx, offset, piece) -> Spectrum | None:
    """Header, then each signal on its own; bad signals become diagnostics, good ones are kept."""
    header_end = _header_end(piece)
    if header_end is None:
        return None
    try:
        head = _parse_piece(parser, builder, ctx, offset, piece[:header_end], "head_only")[0]
    except UnexpectedInput as exc:
        _syntax_error(ctx, exc, offset, piece)
        return None
    signals = []
    for s, e in _split_top_level(piece, header_end):
        chunk = piece[s:e]
        if chunk.rstrip().endswith("."):
            chunk = chunk.rstrip()[:-1]
        if not chunk.strip() or chunk.strip() in {".", ";", ","}:
            continue
        try:
            signals.extend(_parse_piece(parser, builder, ctx, offset + s, chunk, "entry_only"))
        except UnexpectedInput as exc:
            _syntax_error(ctx, exc, offset + s, chunk, skipped=True)
    last = signals[-1].span if signals else head.span
    return head._replace(signals=tuple(signals), span=ctx.index.span(head.span.start, last.end))


_HEADER_RE = lazy(
    # "1 H NMR": a lost superscript leaves the mass apart from the element
    r"^\s*[;,.]?\s*(?:\S+?(?:\s[A-Z][a-z]?)?\s?(?:\{[^{}]*\}|\[[^\]]*\])?\s?-?\s?NMR(?:\s?spectrum)?"
    r"|δ\s?_?\{?[HCFPBN]\}?)"
)


def _header_end(piece: str) -> int | None:
    m = _HEADER_RE.match(piece)
    if not m:
        return None
    i = m.end()
    n = len(piece)
    while True:
        while i < n and piece[i] in " \t:":
            i += 1
        if i < n and piece[i] == "(":
            depth = 0
            j = i
            while j < n:
                if piece[j] == "(":
                    depth += 1
                elif piece[j] == ")":
                    depth -= 1
                    if depth == 0:
                        break
                j += 1
            if j >= n:
                return None
            if re.match(r"\(\s?ppm\s?\)", piece[i : j + 1]):
                i = j + 1
                continue
            i = j + 1
            continue
        dm = re.match(r"(?:δ|delta)\s?(?:_?\{?[HCFPBN]\}?(?![a-z]))?(?:\s?\(\s?ppm\s?\))?(?:\s?ppm)?\s?[=:]?", piece[i:])
        if dm and dm.end():
            i += dm.end()
            continue
        return i


_UNCLOSED_BEFORE = lazy(r"[,;]\s*[-−]?\d+(?:[.,]\d+)?(?:\s*[-–—]\s*[-−]?\d+(?:[.,]\d+)?)?\s*$")


def _split_top_level(piece: str, start: int):
    """Signal pieces split at top-level commas; an unclosed '(' is closed at the next signal."""
    depth = 0
    seg = start
    for i in range(start, len(piece)):
        ch = piece[i]
        if ch == "(":
            if depth >= 1:
                m = _UNCLOSED_BEFORE.search(piece, seg, i)
                if m:
                    yield seg, m.start()
                    seg = m.start() + 1
                    depth = 0
            depth += 1
        elif ch == ")":
            depth = max(0, depth - 1)
        elif ch in ",;" and depth == 0:
            # a decimal comma ("7,26") is not a separator
            if ch == "," and 0 < i < len(piece) - 1 and piece[i - 1].isdigit() and piece[i + 1].isdigit():
                continue
            yield seg, i
            seg = i + 1
    yield seg, len(piece)


def _syntax_error(ctx: Context, exc: UnexpectedInput, offset: int, piece: str, skipped=False) -> None:
    pos = getattr(exc, "pos_in_stream", None)
    if pos is None:
        token = getattr(exc, "token", None)
        pos = getattr(token, "start_pos", None)
    if pos is None or pos < offset:
        pos = offset + len(piece.rstrip())
    pos = min(pos, offset + len(piece))
    if isinstance(exc, UnexpectedToken) and exc.token.type == "$END" or isinstance(exc, UnexpectedEOF):
        what = "the text ends too early"
        end = pos + 1
    elif isinstance(exc, UnexpectedCharacters):
        ch = ctx.text[pos : pos + 1]
        what = f"unexpected {ch!r}"
        end = pos + 1
    else:
        token = exc.token
        what = f"unexpected {str(token).strip()!r}"
        end = pos + max(1, len(str(token).rstrip()))
    expected = _expected(exc)
    hint = _hint(piece, exc, expected)
    start_piece = offset + (len(piece) - len(piece.lstrip()))
    end_piece = offset + len(piece.rstrip())
    if piece.count("(") > piece.count(")"):
        unclosed = offset + _last_unclosed(piece)
        pos, end = unclosed, unclosed + 1
    if skipped:
        message = f"could not read this signal ({what}); it was skipped: {' '.join(piece.split())!r}"
        span = ctx.span(start_piece, max(end_piece, start_piece + 1))
        at = ctx.span(pos, max(end, pos + 1))
        ctx.diagnostics.append(
            Diagnostic("syntax", "error", message, at if at.start < span.end else span,
                       expected=expected, hint=hint, data={"skipped": ctx.text[start_piece:end_piece]})
        )
    else:
        message = f"could not read this item ({what}); it was skipped"
        ctx.diagnostics.append(
            Diagnostic("syntax", "error", message, ctx.span(pos, max(end, pos + 1)),
                       expected=expected, hint=hint, data={"skipped": ctx.text[start_piece:end_piece]})
        )


def _last_unclosed(piece: str) -> int:
    stack = []
    for i, ch in enumerate(piece):
        if ch == "(":
            stack.append(i)
        elif ch == ")" and stack:
            stack.pop()
    return stack[-1] if stack else len(piece.rstrip())


def _expected(exc: UnexpectedInput) -> tuple[str, ...]:
    names = getattr(exc, "expected", None) or getattr(exc, "allowed", None) or ()
    out = []
    for name in sorted(names):
        label = EXPECTED_NAMES.get(str(name))
        if label and label not in out:
            out.append(label)
    return tuple(out)


def _hint(piece: str, exc: UnexpectedInput, expected) -> str:
    if piece.count("(") > piece.count(")"):
        return "a parenthesis is opened but not closed; add the missing ')'"
    if piece.count(")") > piece.count("("):
        return "there is a ')' without its '('"
    if "a closing parenthesis ')'" in expected:
        return "separate the details inside the parentheses with commas, and close them with ')'"
    if re.search(r"\d\s*$", piece) and "the unit Hz" in expected:
        return "write the coupling constant with its unit, e.g. J = 7.1 Hz"
    return "compare with a well-formed signal such as 7.26 (d, J = 8.4 Hz, 2H)"
