"""Formatted plain text written back in a Markdown or LaTeX file's own markup.

The formatter works on the reader's plain text (``1H NMR (400 MHz, CDCl3) δ 7.26 …``).  To
rewrite a ``.md`` or ``.tex`` file, each edit is mapped back to the source range it covers
(:func:`source_range`), and its new text is rendered in the markup the document already uses
(:func:`detect` fills a small :class:`Conventions` table: ``$^{1}$H`` or
``\\textsuperscript{1}H``, ``$\\delta$`` or ``δ``, ``\\textit{J}`` or ``$J$``, ``CDCl$_3$``,
``<sup>1</sup>H``, ``*J*``, entities …).  :func:`place_edits` proves every placed edit by
reading the new source back with the same reader; an edit that does not read back as its
plain text is tried once more with no markup but escapes, and otherwise left as written.
"""

from __future__ import annotations

import html
import re
from collections import Counter
from dataclasses import dataclass, field

FORMATS = ("md", "tex")


@dataclass(frozen=True)
class Conventions:
    """How one document writes the pieces of a data block (templates take the text as {})."""

    format: str
    superscript: str = "{}"  # a mass number: 1 → $^{1}$
    subscript: str = "{}"  # a formula count: 3 → $_{3}$
    formula: str = "{}"  # a whole formula token: \ce{CDCl3}
    italic_j: str = "J"
    delta: str = "δ"
    delta_sub: str = "δ{}"  # δ with a nucleus letter: δH
    unit_space: str = " "  # between a number and Hz / MHz
    siunitx: bool = False  # 400 MHz → \SI{400}{\mega\hertz}
    symbols: dict[str, str] = field(default_factory=dict)  # plain character → markup
    escape_brackets: bool = False  # Markdown: [ → \[

    def table(self) -> dict[str, str]:
        """The conventions as a small table of examples, for messages and tests."""
        return {
            "1H": render("1H NMR", self)[: -len(" NMR")], "CDCl3": render("CDCl3", self),
            "J": self.italic_j, "δ": self.delta, "δH": self.delta_sub.format("H"),
            "400 MHz": render("400 MHz", self), "–": self.symbols.get("–", "–"),
            "−": self.symbols.get("−", "−"),
        }


# ---- detection ---------------------------------------------------------------------------
# Each feature: (regex that finds the convention in the source, value); the most frequent wins,
# the first entry is the default when the document shows none.
_TEX_FEATURES: dict[str, list[tuple[str | None, str]]] = {
    "superscript": [
        (None, "{}"),
        (r"\$\^\{\d+\}\$", "$^{{{}}}$"),
        (r"\$\^\d\$", "$^{}$"),
        (r"\\textsuperscript\{\d+\}", "\\textsuperscript{{{}}}"),
        (r"\\\(\^\{\d+\}\\\)", "\\(^{{{}}}\\)"),
    ],
    "subscript": [
        (None, "{}"),
        (r"\$_\{\d+\}\$", "$_{{{}}}$"),
        (r"\$_\d\$", "$_{}$"),
        (r"\\textsubscript\{\d+\}", "\\textsubscript{{{}}}"),
        (r"\\\(_\{\d+\}\\\)", "\\(_{{{}}}\\)"),
    ],
    "formula": [(None, "{}"), (r"\\ce\{", "\\ce{{{}}}")],
    "italic_j": [
        (None, "J"),
        (r"\\textit\{J\}", "\\textit{J}"),
        (r"\\emph\{J\}", "\\emph{J}"),
        (r"\$J\$", "$J$"),
        (r"\\\(J\\\)", "\\(J\\)"),
    ],
    "delta": [
        (r"\$\\delta\$", "$\\delta$"),
        (r"\\\(\\delta\\\)", "\\(\\delta\\)"),
        (r"δ", "δ"),
    ],
    "unit_space": [(None, " "), (r"\d~M?Hz\b", "~"), (r"\d\\,M?Hz\b", "\\,")],
    "–": [(r"\d--\d", "--"), (r"\\textendash\b", "\\textendash{}"), (r"\d–\d", "–")],
    "−": [(r"\$-\$", "$-$"), (r"\\textminus\b", "\\textminus{}"), (r"−", "−")],
    "°": [(r"\\textdegree\b", "\\textdegree{}"), (r"\$\^\{?\\circ\}?\$", "$^{\\circ}$"),
          (r"°", "°")],  # fmt: skip
    "×": [(r"\$\\times\$", "$\\times$"), (r"\\texttimes\b", "\\texttimes{}"), (r"×", "×")],
}
_TEX_MATH_SYMBOLS = {"±": "$\\pm$", "·": "$\\cdot$", "≈": "$\\approx$", "μ": "$\\mu$"}
_TEX_ESCAPES = {
    "\\": "\\textbackslash{}", "{": "\\{", "}": "\\}", "$": "\\$", "&": "\\&", "#": "\\#",
    "%": "\\%", "_": "\\_", "^": "\\textasciicircum{}", "~": "\\textasciitilde{}",
}  # fmt: skip

_MD_FEATURES: dict[str, list[tuple[str | None, str]]] = {
    "superscript": [(None, "{}"), (r"<sup>\d+</sup>", "<sup>{}</sup>")],
    "subscript": [(None, "{}"), (r"<sub>\d+</sub>", "<sub>{}</sub>")],
    "italic_j": [(None, "J"), (r"(?<![*\\])\*J\*(?!\*)", "*J*"), (r"(?<!\w)_J_(?!\w)", "_J_")],
}
_ENTITY = re.compile(r"&(?:#[0-9]{1,7}|#[xX][0-9a-fA-F]{1,6}|[A-Za-z][A-Za-z0-9]{1,31});")


def _most_used(source: str, options: list[tuple[str | None, str]]) -> str:
    counts = Counter()
    for pattern, value in options:
        if pattern is not None:
            counts[value] += len(re.findall(pattern, source))
    best = counts.most_common(1)
    return best[0][0] if best and best[0][1] else options[0][1]


def detect(fmt: str, source: str) -> Conventions:
    """The conventions ``source`` (a .md or .tex file's text) already uses."""
    if fmt == "tex":
        found = {name: _most_used(source, options) for name, options in _TEX_FEATURES.items()}
        unicode_greek = found["delta"] == "δ"
        symbols = {ch: found[ch] for ch in ("–", "−", "°", "×")}
        symbols["—"] = "---" if symbols["–"] == "--" else "\\textemdash{}"
        if not unicode_greek:
            from .readers.latex import GREEK

            symbols.update({ch: f"$\\{name}$" for name, ch in GREEK.items() if name != "delta"})
            symbols.update(_TEX_MATH_SYMBOLS)
        delta = found["delta"]
        if delta.startswith("$"):
            delta_sub = "$\\delta_{{\\mathrm{{{}}}}}$"
        elif delta.startswith("\\("):
            delta_sub = "\\(\\delta_{{\\mathrm{{{}}}}}\\)"
        else:
            delta_sub = "δ" + ("\\textsubscript{{{}}}" if "textsub" in found["subscript"]
                               else "$_{{\\mathrm{{{}}}}}$")  # fmt: skip
        return Conventions(
            "tex", superscript=found["superscript"], subscript=found["subscript"],
            formula=found["formula"], italic_j=found["italic_j"], delta=delta,
            delta_sub=delta_sub, unit_space=found["unit_space"],
            siunitx=bool(re.search(r"\\(?:SI|qty)\s*\{[^{}]*\}\s*\{\\(?:mega)?hertz\}", source)),
            symbols=symbols,
        )  # fmt: skip
    if fmt == "md":
        found = {name: _most_used(source, options) for name, options in _MD_FEATURES.items()}
        spelled: dict[str, Counter] = {}
        for m in _ENTITY.finditer(source):
            decoded = html.unescape(m.group())
            if decoded != m.group() and len(decoded) == 1 and ord(decoded) > 127:
                spelled.setdefault(decoded, Counter())[m.group()] += 1
        symbols = {ch: counts.most_common(1)[0][0] for ch, counts in spelled.items()}
        delta = symbols.get("δ", "δ")
        sub = found["subscript"]
        return Conventions(
            "md", superscript=found["superscript"], subscript=sub, italic_j=found["italic_j"],
            delta=delta, delta_sub=delta + (sub if sub != "{}" else "{}"), symbols=symbols,
            escape_brackets=bool(re.search(r"\\\[", source)),
        )  # fmt: skip
    raise ValueError(f"no markup renderer for {fmt!r}")


def plain(conventions: Conventions) -> Conventions:
    """The fallback: no markup, only what must be escaped."""
    return Conventions(conventions.format, escape_brackets=conventions.escape_brackets,
                       delta="$\\delta$" if conventions.format == "tex" else "δ",
                       delta_sub="$\\delta_{{\\mathrm{{{}}}}}$" if conventions.format == "tex"
                       else "δ{}")  # fmt: skip


# ---- rendering ---------------------------------------------------------------------------
_ISOTOPE = r"\d{1,3}[A-Z][a-z]?"
_TOKENS = re.compile(
    rf"(?P<header>(?<![\w.]){_ISOTOPE}(?:\{{{_ISOTOPE}(?:,\s?{_ISOTOPE})*\}})?(?=\s?NMR\b))"
    r"|(?P<deltasub>δ(?P<dletter>[A-Z])(?![a-z]))"
    r"|(?P<typedj>(?<![\w.])(?P<bonds>\d)J(?![a-z]))"
    r"|(?P<j>(?<![A-Za-z])J(?![a-z]))"
    r"|(?P<hz>(?<![\w.])(?P<hznum>[−-]?\d+(?:\.\d+)?) (?P<hzunit>M?Hz)(?![A-Za-z]))"
    r"|(?P<formula>(?<![\w])(?:[A-Z][a-z]?\d*){2,}(?:-d\d+)?(?![\w]))"
    r"|(?P<solventd>(?<![\w])[A-Za-z]+-d\d+(?![\w]))"
)
_MASS_NUMBER = re.compile(r"(\d{1,3})([A-Z][a-z]?)")


def render(text: str, conv: Conventions) -> str:
    """``text`` (plain) written in the document's markup."""
    out, pos = [], 0
    for m in _TOKENS.finditer(text):
        out.append(_escape(text[pos : m.start()], conv))
        out.append(_token(m, conv))
        pos = m.end()
    out.append(_escape(text[pos:], conv))
    return "".join(out)


def _token(m: re.Match, conv: Conventions) -> str:
    whole = m.group()
    if m.group("header"):
        def label(part: str) -> str:
            return _MASS_NUMBER.sub(
                lambda n: conv.superscript.format(n.group(1)) + n.group(2), part)

        nucleus, _, decoupled = whole.partition("{")
        if not decoupled:
            return label(nucleus)
        left, right = ("\\{", "\\}") if conv.format == "tex" else ("{", "}")
        return label(nucleus) + left + label(decoupled[:-1]) + right
    if m.group("deltasub"):
        return conv.delta_sub.format(m.group("dletter"))
    if m.group("typedj"):
        return conv.superscript.format(m.group("bonds")) + conv.italic_j
    if m.group("j"):
        return conv.italic_j
    if m.group("hz"):
        number, unit = m.group("hznum"), m.group("hzunit")
        if conv.siunitx and conv.format == "tex":
            macro = "\\mega\\hertz" if unit == "MHz" else "\\hertz"
            return f"\\SI{{{number.replace('−', '-')}}}{{{macro}}}"
        return _escape(number, conv) + conv.unit_space + unit
    if m.group("formula") or m.group("solventd"):
        if not re.search(r"[A-Za-z]\d", whole):
            return _escape(whole, conv)
        if conv.formula != "{}":
            return conv.formula.format(whole)
        return re.sub(r"(?<=[A-Za-z])(\d+)", lambda n: conv.subscript.format(n.group(1)), whole)
    return _escape(whole, conv)


def _escape(text: str, conv: Conventions) -> str:
    if conv.format == "tex":
        out = []
        for i, ch in enumerate(text):
            if ch in _TEX_ESCAPES:
                out.append(_TEX_ESCAPES[ch])
            elif ch == "δ":
                out.append(conv.delta)
            elif ch in conv.symbols:
                out.append(conv.symbols[ch])
            elif ch == "-" and text.startswith("-", i + 1):
                out.append("-{}")  # "--" would be read as an en dash
            elif ch in "`'" and text.startswith(ch, i + 1):
                out.append(ch + "{}")
            else:
                out.append(ch)
        return "".join(out)
    out = []
    for i, ch in enumerate(text):
        nxt = text[i + 1 : i + 2]
        if ch == "`":
            out.append("&#96;")  # code spans are read before escapes: \\` would open one
        elif ch in "*_\\":
            out.append("\\" + ch)
        elif ch == "[" and conv.escape_brackets:
            out.append("\\[")
        elif ch == "<" and re.match(r"[A-Za-z/!?]", nxt):
            out.append("\\<")
        elif ch == "&" and re.match(r"&(?:#\w+|[A-Za-z][A-Za-z0-9]*);", text[i:]):
            out.append("\\&")
        elif ch == "δ":
            out.append(conv.delta)
        elif ch in conv.symbols:
            out.append(conv.symbols[ch])
        else:
            out.append(ch)
    return "".join(out)


# ---- placing edits in the source ---------------------------------------------------------
def read_plain(fmt: str, source: str) -> tuple[str, object]:
    """The reader's plain text of ``source`` and its offset map."""
    if fmt == "tex":
        from .readers.latex import latex_to_text as convert
    else:
        from .readers.markdown import markdown_to_text as convert
    builder = convert(source)
    return builder.text(), builder.map


def _cuts_cleanly(fmt: str, source: str, start: int, end: int) -> bool:
    """Does ``source[start:end]`` hold whole markup constructs only (balanced, no half commands)?"""
    piece = source[start:end]
    if fmt == "tex":
        before = source[max(0, start - 40) : start]
        if re.search(r"(?<!\\)(?:\\\\)*\\[A-Za-z]*$", before) or before.endswith(("^", "_")):
            return False  # the piece would start inside a command, or be taken as its argument
        if re.search(r"(?<!\\)(?:\\\\)*\\[A-Za-z]*$", piece) and (
            piece.endswith("\\") or source[end : end + 1].isalpha()
        ):
            return False
        depth, math, i = 0, 0, 0
        while i < len(piece):
            c = piece[i]
            if c == "\\":
                if piece.startswith(("\\(", "\\)", "\\[", "\\]"), i):
                    math ^= 2 if piece[i + 1] in "()" else 4
                i += 2
                continue
            if c == "%":
                return False
            if c == "{":
                depth += 1
            elif c == "}":
                depth -= 1
                if depth < 0:
                    return False
            elif c == "$":
                math ^= 1
            i += 1
        return depth == 0 and math == 0
    # Markdown: tags, emphasis, code and entities must open and close inside the piece.
    if re.search(r"&[#A-Za-z0-9]*$", piece) and re.match(r"[#A-Za-z0-9]*;", source[end:]):
        return False
    if re.search(r"<[^>]*$", piece) or re.match(r"[^<]*>", piece):
        return False
    stripped = re.sub(r"\\.", "", piece)
    for tag in set(re.findall(r"</?([A-Za-z][A-Za-z0-9]*)", stripped)):
        if len(re.findall(rf"<{tag}\b", stripped)) != len(re.findall(rf"</{tag}\s*>", stripped)):
            return False
    if stripped.count("`") % 2 or stripped.count("*") % 2:
        return False
    if start > 0 and source[start - 1] == "\\" and not source[: start - 1].endswith("\\"):
        return False
    return not piece.endswith("\\") or piece.endswith("\\\\")


def source_range(fmt: str, source: str, offsets, text_len: int, start: int, end: int):
    """The source range ``[s, e)`` that the plain range ``[start, end)`` covers, or None.

    ``offsets(k)`` is where the construct giving plain character ``k`` begins.  Markup that
    gives no text (``$``, ``^{``, ``\\textit{`` …) may lie just outside; the range is widened
    over it only as far as needed to hold whole constructs.
    """
    first = offsets(start) if start < text_len else len(source)
    low = offsets(start - 1) + 1 if start > 0 else 0
    if end == start:
        return (first, first) if _cuts_cleanly(fmt, source, first, first) else None
    last = offsets(end - 1) + 1
    high = offsets(end) if end < text_len else len(source)
    for s in range(first, min(low, first) - 1, -1):
        if not _transparent(fmt, source[s:first]):
            break
        for e in range(last, max(high, last) + 1):
            tail = source[offsets(end - 1) : e]
            if _transparent(fmt, tail) and _cuts_cleanly(fmt, source, s, e):
                return s, e
    return None


# Markup the renderer writes itself: a range may be widened over it, never over other markup
# (a \textbf{…} or **…** around the data is the author's and stays).
_RENDERED_COMMANDS = {
    "textsuperscript", "textsubscript", "textit", "emph", "ce", "SI", "qty", "mathrm", "delta",
    "hertz", "mega", "textminus", "textendash", "textemdash", "textdegree", "texttimes", "times",
    "circ", "pm", "cdot", "approx", "mu",
}  # fmt: skip


def _transparent(fmt: str, markup: str) -> bool:
    if fmt == "tex":
        from .readers.latex import GREEK

        return all(name in _RENDERED_COMMANDS or name in GREEK
                   for name in re.findall(r"\\([A-Za-z]+)", markup))  # fmt: skip
    tags = re.findall(r"</?([A-Za-z][A-Za-z0-9]*)", markup)
    return all(t.lower() in ("sup", "sub") for t in tags) and "**" not in markup \
        and "__" not in markup  # fmt: skip


@dataclass
class Placement:
    """Edits moved into the source, and the plain edits left as written (with why)."""

    source_edits: list[tuple[int, int, str]]
    accepted: list[tuple[int, int, str]]
    kept: list[tuple[tuple[int, int, str], str]]
    conventions: Conventions


def place_edits(fmt: str, source: str, text: str, edits) -> Placement:
    """Plain-text ``edits`` on ``text`` (the reader's text of ``source``) as source edits.

    Every accepted edit is proven: the source with it applied reads back as ``text`` with
    the plain edit applied.  A proof that fails is retried without markup, else the edit is
    kept (left as written) with a reason.
    """
    from .emit import apply_edits

    read_text, offset_map = read_plain(fmt, source)
    if read_text != text:
        raise ValueError("the file changed since it was read; format it again")
    conv = detect(fmt, source)

    def offsets(k: int) -> int:
        return offset_map.lookup(k)[1]

    candidates = []
    kept: list[tuple[tuple[int, int, str], str]] = []
    for edit in sorted(edits):
        found = source_range(fmt, source, offsets, len(text), edit[0], edit[1])
        if found is None:
            kept.append((edit, "its markup cannot be cut cleanly around the data"))
            continue
        candidates.append((edit, found))

    def render_all(conventions_for) -> list[tuple[int, int, str]]:
        return [(s, e, _newlines(render(edit[2], conventions_for(edit)), source, s, e))
                for edit, (s, e) in candidates]  # fmt: skip

    # Fast path: everything at once in the document's conventions.
    placed = render_all(lambda _: conv)
    expected = apply_edits(text, [edit for edit, _ in candidates])
    if _no_overlap(placed) and read_plain(fmt, apply_edits(source, placed))[0] == expected:
        return Placement(placed, [edit for edit, _ in candidates], kept, conv)
    # Slow path: prove each edit alone, falling back to no markup.
    good, accepted = [], []
    for edit, (s, e) in candidates:
        want = apply_edits(text, [edit])
        for conventions in (conv, plain(conv)):
            new = _newlines(render(edit[2], conventions), source, s, e)
            if read_plain(fmt, source[:s] + new + source[e:])[0] == want:
                good.append((s, e, new))
                accepted.append(edit)
                break
        else:
            kept.append((edit, "the rewritten markup did not read back as the formatted text"))
    if not _no_overlap(good):
        raise ValueError("two edits cover the same markup")
    return Placement(good, accepted, sorted(kept), conv)


def _no_overlap(edits) -> bool:
    ordered = sorted(edits)
    return all(a[1] <= b[0] for a, b in zip(ordered, ordered[1:]))


def _newlines(new: str, source: str, s: int, e: int) -> str:
    if "\n" in new and ("\r\n" in source[s:e] or source.count("\r\n") == source.count("\n") > 0):
        return new.replace("\n", "\r\n")
    return new


__all__ = ["Conventions", "detect", "render", "place_edits", "source_range", "Placement", "plain"]
