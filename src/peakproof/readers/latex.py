"""LaTeX → plain text for the parser, every character mapped back to the .tex line:column.

This is not a TeX engine: it knows the markup chemists use in characterization data and
treats everything else leniently.  Choices:

* Only the body is read when ``\\begin{document}`` is present; the preamble is skipped.
* Comments (``%`` to end of line, not ``\\%``) are removed; a line holding only a comment
  vanishes with its newline, an end-of-line comment leaves the newline (the parser joins lines).
* Math shifts (``$``, ``\\(``, ``\\[``) are dropped; inside math ``-`` is a minus sign (−) and
  ``^``/``_`` scripts become plain characters (``$^{13}$C`` → 13C, ``CDCl$_3$`` → CDCl3).
* Symbol commands (``\\delta``, ``\\times``, ``\\degree``, ``\\pm`` …) become Unicode; a space
  after them is kept (TeX would swallow it) since ``\\delta 7.26`` means "δ 7.26"; only
  after the degree sign is it swallowed, as TeX does (``\\degree C`` → °C).
  ``\\circ`` is read as ° because in this trade it nearly always is.
* Formatting commands (``\\textit``, ``\\emph``, ``\\textbf``, ``\\mathrm``, ``\\ce``,
  ``\\textsuperscript`` …) keep their argument's text.  ``\\SI{400}{\\mega\\hertz}`` and
  ``\\qty`` give "400 MHz", ``\\si``/``\\unit`` the unit alone, ``\\num`` the number.
* ``\\section{…}`` and its relatives (starred or not) give their title on a line of its own.
* ``\\label``, ``\\index``, ``\\vspace``, ``\\includegraphics`` … vanish with their arguments;
  ``\\ref{key}`` and friends keep the key as text (the number is not known without TeX);
  ``\\cite{key}`` gives "[key]".
* Unknown commands are dropped but their braced arguments' text is kept.
"""

from __future__ import annotations

import re
import unicodedata

from .base import LineColumnLocator, ReaderError, SourceText, TextBuilder
from .text import decode_text

GREEK = {
    "alpha": "α", "beta": "β", "gamma": "γ", "delta": "δ", "epsilon": "ϵ", "varepsilon": "ε",
    "zeta": "ζ", "eta": "η", "theta": "θ", "vartheta": "ϑ", "iota": "ι", "kappa": "κ",
    "lambda": "λ", "mu": "μ", "nu": "ν", "xi": "ξ", "pi": "π", "rho": "ρ", "sigma": "σ",
    "tau": "τ", "upsilon": "υ", "phi": "ϕ", "varphi": "φ", "chi": "χ", "psi": "ψ",
    "omega": "ω", "Gamma": "Γ", "Delta": "Δ", "Theta": "Θ", "Lambda": "Λ", "Xi": "Ξ",
    "Pi": "Π", "Sigma": "Σ", "Phi": "Φ", "Psi": "Ψ", "Omega": "Ω",
}  # fmt: skip
SYMBOLS = {
    **GREEK,
    "times": "×", "texttimes": "×", "pm": "±", "textpm": "±", "mp": "∓", "degree": "°",
    "textdegree": "°", "circ": "°", "textmu": "μ", "micro": "μ", "cdot": "·",
    "textperiodcentered": "·", "approx": "≈", "sim": "∼", "le": "≤", "leq": "≤", "ge": "≥",
    "geq": "≥", "neq": "≠", "to": "→", "rightarrow": "→", "leftarrow": "←",
    "rightleftharpoons": "⇌", "AA": "Å", "angstrom": "Å", "ldots": "…", "dots": "…",
    "textellipsis": "…", "textendash": "–", "textemdash": "—", "textminus": "−",
    "prime": "′", "infty": "∞", "textbackslash": "\\", "ss": "ß", "o": "ø", "O": "Ø",
    "ae": "æ", "AE": "Æ", "l": "ł", "L": "Ł", "i": "ı", "textregistered": "®",
    "texttrademark": "™", "copyright": "©", "S": "§", "P": "¶", "dag": "†", "ddag": "‡",
    "textasciitilde": "~", "textasciicircum": "^", "textbar": "|", "textless": "<",
    "textgreater": ">", "textquotedbl": '"', "textquotesingle": "'", "celsius": "°C",
    "ppm": "ppm", "hbar": "ħ", "partial": "∂", "nabla": "∇", "sum": "∑", "int": "∫",
    "langle": "⟨", "rangle": "⟩", "lbrace": "{", "rbrace": "}",
    # spacing
    "quad": " ", "qquad": " ", "enspace": " ", "thinspace": " ", "space": " ", "nobreakspace": " ",
    "newline": "\n", "par": "\n", "linebreak": "\n", "break": "\n", "item": "",
}  # fmt: skip
CONTROL_SYMBOLS = {
    ",": " ", ";": " ", ":": " ", " ": " ", "!": "", "-": "", "/": "", "@": "",
    "%": "%", "&": "&", "#": "#", "_": "_", "$": "$", "{": "{", "}": "}", "|": "‖",
}  # fmt: skip
ACCENTS = {
    "'": "\u0301", "`": "\u0300", "^": "\u0302", '"': "\u0308", "~": "\u0303", "=": "\u0304",
    ".": "\u0307", "u": "\u0306", "v": "\u030c", "H": "\u030b", "c": "\u0327", "r": "\u030a",
    "k": "\u0328",
}  # fmt: skip
KEEP_ARGUMENT = {
    "textit", "emph", "textbf", "textrm", "textsf", "texttt", "textup", "textnormal", "textsc",
    "textmd", "textsl", "underline", "mathrm", "mathit", "mathbf", "mathsf", "mathtt",
    "mathnormal", "boldsymbol", "text", "mbox", "hbox", "ensuremath", "textsuperscript",
    "textsubscript", "ce", "footnote", "caption", "operatorname", "uline", "textcolor",
}  # fmt: skip
TEXT_MODE_ARGUMENT = {"text", "mbox", "hbox", "textrm", "textit", "textbf", "textup", "textnormal"}
REFERENCE = {"ref", "eqref", "cref", "Cref", "autoref", "pageref", "nameref"}
CITATION = {"cite", "citep", "citet", "citeauthor", "supercite"}
DROP = {  # command → number of mandatory arguments dropped with it
    "label": 1, "index": 1, "vspace": 1, "hspace": 1, "includegraphics": 1, "usepackage": 1,
    "documentclass": 1, "bibliography": 1, "bibliographystyle": 1, "pagestyle": 1,
    "thispagestyle": 1, "setlength": 2, "addtolength": 2, "setcounter": 2, "newcommand": 2,
    "renewcommand": 2, "providecommand": 2, "DeclareSIUnit": 2, "sisetup": 1, "input": 1,
    "include": 1, "phantom": 1, "hphantom": 1, "vphantom": 1, "color": 1, "url": 1,
    "left": 0, "right": 0, "big": 0, "Big": 0, "bigl": 0, "bigr": 0, "displaystyle": 0,
    "noindent": 0, "centering": 0, "maketitle": 0, "clearpage": 0, "newpage": 0,
    "small": 0, "footnotesize": 0, "scriptsize": 0, "large": 0, "Large": 0, "normalsize": 0,
    "itshape": 0, "bfseries": 0, "rmfamily": 0, "upshape": 0, "mdseries": 0, "relax": 0,
    "medskip": 0, "smallskip": 0, "bigskip": 0, "hfill": 0, "vfill": 0, "selectfont": 0,
    "tableofcontents": 0, "toprule": 0, "midrule": 0, "bottomrule": 0, "hline": 0,
}  # fmt: skip
SECTIONS = {"part", "chapter", "section", "subsection", "subsubsection", "paragraph",
            "subparagraph"}  # fmt: skip
TABULAR = {"tabular": 1, "array": 1, "tabularx": 2, "longtable": 1, "tabulary": 2}
SI_PREFIXES = {
    "yocto": "y", "zepto": "z", "atto": "a", "femto": "f", "pico": "p", "nano": "n",
    "micro": "μ", "milli": "m", "centi": "c", "deci": "d", "deca": "da", "hecto": "h",
    "kilo": "k", "mega": "M", "giga": "G", "tera": "T", "peta": "P",
}  # fmt: skip
SI_UNITS = {
    "hertz": "Hz", "ppm": "ppm", "percent": "%", "degreeCelsius": "°C", "celsius": "°C",
    "degree": "°", "kelvin": "K", "gram": "g", "mole": "mol", "molar": "M", "Molar": "M",
    "litre": "L", "liter": "L", "metre": "m", "meter": "m", "second": "s", "minute": "min",
    "hour": "h", "day": "d", "tesla": "T", "dalton": "Da", "pascal": "Pa", "bar": "bar",
    "atmosphere": "atm", "joule": "J", "calorie": "cal", "watt": "W", "volt": "V",
    "ampere": "A", "ohm": "Ω", "angstrom": "Å", "electronvolt": "eV", "torr": "Torr",
    "mmHg": "mmHg", "equivalent": "equiv",
}  # fmt: skip
_SWALLOW_SPACE = {"degree", "textdegree", "circ"}  # "\\degree C" is °C, as TeX prints it
_PLAIN = re.compile(r"[^\\%$\{\}^_~\-`'&\r\n]+")
_WHOLE_LINE_COMMENT = re.compile(r"[ \t]*%[^\r\n]*(?:\r\n|\r|\n)?")
_SPACES = re.compile(r"[ \t]*")
_WORD = re.compile(r"[A-Za-z]+")


class _LineAwareBuilder(TextBuilder):
    """A builder that can owe a line break: it is paid before the next visible text, and
    cancelled by a newline from the source (so ``\\section{A}\\label{a}`` + newline gives
    one line break, not a blank line)."""

    __slots__ = ("owed",)

    def __init__(self) -> None:
        super().__init__()
        self.owed: int | None = None

    def _append(self, text, key, src, linear) -> None:
        if self.owed is not None and text:
            if text[0] == "\n":
                self.owed = None
            elif not text.strip(" \t"):
                return
            else:
                owed, self.owed = self.owed, None
                super()._append("\n", key, owed, True)
        super()._append(text, key, src, linear)


#: Groups, arguments and math inside one another deeper than this are refused (no data block
#: nests more than a handful; the bound keeps the reader far from Python's recursion limit).
MAX_NESTING = 150


class _Converter:
    def __init__(self, src: str):
        self.src = src
        self.out = _LineAwareBuilder()
        self.depth = 0

    # -- scanning helpers --------------------------------------------------------------
    def close_brace(self, i: int, end: int) -> int:
        """Index of the ``}`` matching the ``{`` at ``i`` (``end`` if unbalanced)."""
        depth, src = 0, self.src
        while i < end:
            c = src[i]
            if c == "\\":
                i += 2
                continue
            if c == "{":
                depth += 1
            elif c == "}":
                depth -= 1
                if depth == 0:
                    return i
            i += 1
        return end

    def skip_spaces(self, i: int, end: int) -> int:
        return min(_SPACES.match(self.src, i).end(), end)

    def group(self, i: int, end: int) -> tuple[int, int, int] | None:
        """A braced group (or a single token) at ``i``: (content start, content end, next)."""
        i = self.skip_spaces(i, end)
        if i >= end:
            return None
        if self.src[i] == "{":
            close = self.close_brace(i, end)
            return i + 1, close, min(close + 1, end)
        if self.src[i] == "\\":
            word = _WORD.match(self.src, i + 1)
            stop = word.end() if word else i + 2
            return i, min(stop, end), min(stop, end)
        return i, i + 1, i + 1

    def optional(self, i: int, end: int) -> tuple[int, int, int] | None:
        j = self.skip_spaces(i, end)
        if j < end and self.src[j] == "[":
            close = self.src.find("]", j, end)
            if close != -1:
                return j + 1, close, close + 1
        return None

    def skip_optional(self, i: int, end: int) -> int:
        opt = self.optional(i, end)
        return opt[2] if opt else i

    def newline_unless_at_line_start(self, src: int) -> None:
        if self.out.length and self.out.tail(1) != "\n":
            self.out.put("\n", src)

    def closing_math(self, i: int, end: int, delimiter: str) -> int:
        src = self.src
        while i < end:
            j = src.find(delimiter, i, end)
            if j == -1:
                return -1
            backslashes = len(src[:j]) - len(src[:j].rstrip("\\"))
            if backslashes % 2 == 0:
                return j
            i = j + 1
        return -1

    # -- main loop ---------------------------------------------------------------------
    def run(self, i: int, end: int, math: bool = False) -> None:
        """Convert ``src[i:end]``; nested groups recurse, bounded by :data:`MAX_NESTING`."""
        if self.depth >= MAX_NESTING:
            line = self.src.count("\n", 0, i) + 1
            raise ReaderError(f"the LaTeX nests groups more than {MAX_NESTING} deep (line {line})",
                              "No NMR data nests so deep; remove the extra braces.")  # fmt: skip
        self.depth += 1
        try:
            self._run(i, end, math)
        finally:
            self.depth -= 1

    def _run(self, i: int, end: int, math: bool) -> None:
        src, out = self.src, self.out
        while i < end:
            if i == 0 or src[i - 1] in "\r\n":
                comment = _WHOLE_LINE_COMMENT.match(src, i, end)
                if comment:
                    i = comment.end()
                    continue
            plain = _PLAIN.match(src, i, end)
            if plain:
                out.copy(plain.group(), i)
                i = plain.end()
                continue
            c = src[i]
            if c == "\\":
                i = self.command(i, end, math)
            elif c == "%":
                eol = i
                while eol < end and src[eol] not in "\r\n":
                    eol += 1
                i = eol
            elif c == "$":
                delimiter = "$$" if src.startswith("$$", i) else "$"
                close = self.closing_math(i + len(delimiter), end, delimiter)
                if close == -1:
                    out.copy("$", i)
                    i += 1
                else:
                    self.run(i + len(delimiter), close, True)
                    i = close + len(delimiter)
            elif c == "{":
                close = self.close_brace(i, end)
                self.run(i + 1, close, math)
                i = close + 1
            elif c == "}":
                i += 1
            elif c in "^_":
                i = self.script(i + 1, end, math)
            elif c == "~":
                out.put(" ", i)
                i += 1
            elif c == "-":
                if math:
                    out.put("−", i)
                    i += 1
                elif src.startswith("---", i):
                    out.put("—", i)
                    i += 3
                elif src.startswith("--", i):
                    out.put("–", i)
                    i += 2
                else:
                    out.copy("-", i)
                    i += 1
            elif c in "`'" and src.startswith(c * 2, i) and not math:
                out.put("“" if c == "`" else "”", i)
                i += 2
            elif c == "&":
                out.put(" ", i)
                i += 1
            elif c == "\r":
                out.put("\n", i)
                i += 2 if src.startswith("\r\n", i) else 1
            else:  # "\n", a lone quote
                out.copy(c, i)
                i += 1

    def script(self, i: int, end: int, math: bool) -> int:
        found = self.group(i, end)
        if found is None:
            return end
        start, stop, after = found
        if self.src[start] == "\\":
            self.command(start, stop, math)
        else:
            self.run(start, stop, math)
        return after

    def command(self, i: int, end: int, math: bool) -> int:
        src, out = self.src, self.out
        word = _WORD.match(src, i + 1, end)
        if not word:  # control symbol: \, \% \\ \' ...
            if i + 1 >= end:
                return end
            sym = src[i + 1]
            if sym == "\\":
                out.put("\n", i)
                j = i + 2
                if j < end and src[j] == "*":
                    j += 1
                return self.skip_optional(j, end)
            if sym in ACCENTS and not (math and sym in ",;:!"):
                return self.accent(i, i + 2, end, ACCENTS[sym])
            if sym in "([":
                closing = "\\)" if sym == "(" else "\\]"
                close = self.closing_math(i + 2, end, closing)
                if close != -1:
                    self.run(i + 2, close, True)
                    return close + 2
                return i + 2
            if sym in ")]":
                return i + 2
            if sym in CONTROL_SYMBOLS:
                out.put(CONTROL_SYMBOLS[sym], i)
            elif sym in "\r\n":
                out.put(" ", i)
            else:
                out.copy(sym, i + 1)
            return i + 2
        name, j = word.group(), word.end()
        if name in ACCENTS and len(name) == 1 and name not in SYMBOLS:
            return self.accent(i, j, end, ACCENTS[name])
        if name in SECTIONS:
            j = self.skip_spaces(j, end)
            if j < end and src[j] == "*":
                j += 1
            j = self.skip_optional(j, end)
            found = self.group(j, end)
            self.newline_unless_at_line_start(i)
            if found:
                self.run(found[0], found[1], False)
                j = found[2]
            out.owed = j
            return j
        if name in ("begin", "end"):
            found = self.group(j, end)
            if not found:
                return j
            env = src[found[0] : found[1]].rstrip("*")
            j = found[2]
            if name == "begin":
                j = self.skip_optional(j, end)
                for _ in range(TABULAR.get(env, 0)):
                    arg = self.group(j, end)
                    j = arg[2] if arg else j
            return j
        if name in SYMBOLS:
            if name == "item":
                self.newline_unless_at_line_start(i)
                opt = self.optional(j, end)
                if opt:
                    self.run(opt[0], opt[1], math)
                    out.put(" ", opt[1])
                    return self.skip_spaces(opt[2], end)
                return self.skip_spaces(j, end)
            out.put(SYMBOLS[name], i)
            if src.startswith("{}", j):
                j += 2  # \textdegree{}C
            elif name in _SWALLOW_SPACE:
                j = self.skip_spaces(j, end)
            return j
            return j
        if name in KEEP_ARGUMENT:
            if name == "textcolor":
                colour = self.group(j, end)
                j = colour[2] if colour else j
            j = self.skip_optional(j, end)
            found = self.group(j, end)
            if not found:
                return j
            self.run(found[0], found[1], math and name not in TEXT_MODE_ARGUMENT)
            return found[2]
        if name in REFERENCE or name in CITATION:
            j = self.skip_optional(self.skip_optional(j, end), end)
            found = self.group(j, end)
            if not found:
                return j
            if name in CITATION:
                out.put("[", i)
            out.copy(src[found[0] : found[1]], found[0])
            if name in CITATION:
                out.put("]", found[1])
            return found[2]
        if name in DROP:
            j = self.skip_optional(j, end)
            for _ in range(DROP[name]):
                found = self.group(j, end)
                j = self.skip_optional(found[2], end) if found else j
            if name in ("left", "right", "big", "Big", "bigl", "bigr") and j < end:
                if src[j] == ".":
                    j += 1
            return j
        if name in ("si", "unit"):
            j = self.skip_optional(j, end)
            found = self.group(j, end)
            if found:
                self.units(found[0], found[1])
                return found[2]
            return j
        if name in ("SI", "qty"):
            j = self.skip_optional(j, end)
            number = self.group(j, end)
            if not number:
                return j
            self.run(number[0], number[1], True)
            j = self.skip_optional(number[2], end)
            unit = self.group(j, end)
            if unit:
                out.put(" ", unit[0])
                self.units(unit[0], unit[1])
                return unit[2]
            return j
        if name in ("num", "ang"):
            j = self.skip_optional(j, end)
            found = self.group(j, end)
            if found:
                self.run(found[0], found[1], True)
                if name == "ang":
                    out.put("°", found[1])
                return found[2]
            return j
        if name in ("SIrange", "qtyrange", "numrange"):
            j = self.skip_optional(j, end)
            low, high = self.group(j, end), None
            if low:
                self.run(low[0], low[1], True)
                high = self.group(low[2], end)
            if high:
                out.put("–", high[0])
                self.run(high[0], high[1], True)
                j = high[2]
                if name != "numrange":
                    unit = self.group(j, end)
                    if unit:
                        out.put(" ", unit[0])
                        self.units(unit[0], unit[1])
                        j = unit[2]
            return j
        return j  # unknown: drop the name; any braced argument is read as text

    def accent(self, i: int, j: int, end: int, mark: str) -> int:
        found = self.group(j, end)
        if not found:
            return j
        base = self.src[found[0] : found[1]]
        if base in ("\\i", "\\j"):
            base = base[1]
        if len(base) == 1:
            self.out.put(unicodedata.normalize("NFC", base + mark), i)
        else:
            self.run(found[0], found[1], False)
        return found[2]

    def units(self, start: int, end: int) -> None:
        """siunitx unit macros → symbols: prefix joins its unit, units are space-separated."""
        src, out = self.src, self.out
        prefix, prefix_at, after_unit = "", start, False
        i = start
        while i < end:
            if src[i] == "\\":
                word = _WORD.match(src, i + 1, end)
                name = word.group() if word else src[i + 1 : i + 2]
                stop = word.end() if word else i + 2
                if name in SI_PREFIXES:
                    prefix, prefix_at = SI_PREFIXES[name], i if not prefix else prefix_at
                elif name in SI_UNITS:
                    at = prefix_at if prefix else i
                    out.put((" " if after_unit else "") + prefix + SI_UNITS[name], at)
                    prefix, after_unit = "", True
                elif name == "per":
                    out.put("/", i)
                    after_unit = False
                elif name in ("squared", "cubed"):
                    out.put("²" if name == "squared" else "³", i)
                i = stop
            elif src[i] in "{} \t":
                i += 1
            else:
                plain = re.compile(r"[^\\{}]+").match(src, i, end)
                out.copy(plain.group(), i)
                after_unit = True
                i = plain.end()


def latex_to_text(original: str) -> TextBuilder:
    convert = _Converter(original)
    begin = re.search(r"\\begin\s*\{document\}", original)
    start = begin.end() if begin else 0
    stop_match = re.search(r"\\end\s*\{document\}", original)
    stop = stop_match.start() if stop_match and stop_match.start() >= start else len(original)
    if begin and original.startswith(("\n", "\r\n", "\r"), start):
        start += 2 if original.startswith("\r\n", start) else 1
    convert.run(start, stop)
    return convert.out


def read_latex(data: bytes, name: str = "") -> SourceText:
    original, notes = decode_text(data, name)
    out = latex_to_text(original)
    return SourceText(out.text(), "tex", name, notes, LineColumnLocator(out.map, original, "tex"))
