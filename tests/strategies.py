"""Hypothesis strategies that write valid characterization blocks with their expected projection.

``blocks()`` draws a text such as ``1H NMR (400 MHz, CDCl3) δ 7.31 (dd, J = 8.4, 2.1 Hz, 1H), …``
together with the projection (see ``tests/corpus/__init__.py:project``) a correct parser must
return for it. The expectation is built from the drawn data, never from the text, following the
normalisation conventions of the parser's brief.
"""

from __future__ import annotations

from typing import Any

from hypothesis import strategies as st

#: Written forms of each normalised multiplicity with no J (name → forms).
NO_J_FORMS = {
    "s": ["s", "singlet"],
    "m": ["m", "multiplet"],
    "br s": ["br s", "br. s", "brs", "bs", "broad s", "broad singlet"],
    "br": ["br"],
    "br m": ["br m"],
}
#: Letters for first-order patterns: normalised component → written forms.
LETTER_FORMS = {
    "d": ["d"],
    "t": ["t"],
    "q": ["q"],
    "quint": ["quint", "p", "pent", "quin", "quintet"],
    "sext": ["sext", "h", "sextet"],
    "sept": ["sept", "hept", "septet"],
}
WORDS = {"d": "doublet", "t": "triplet", "q": "quartet"}
#: Single-J patterns that are not plain letters: name → forms.
ONE_J_SPECIAL = {
    "app t": ["app t", "app. t", "apparent t", "pseudo-t", "pseudo t"],
    "br d": ["br d"],
    "ABq": ["ABq", "AB q", "AB quartet"],
    "AB": ["AB system", "AB pattern"],
}
#: (written, canonical) solvents.
SOLVENTS = [
    ("CDCl3", "CDCl3"), ("DMSO-d6", "DMSO-d6"), ("d6-DMSO", "DMSO-d6"), ("(CD3)2SO", "DMSO-d6"),
    ("CD3OD", "CD3OD"), ("methanol-d4", "CD3OD"), ("MeOD", "CD3OD"), ("D2O", "D2O"),
    ("acetone-d6", "acetone-d6"), ("(CD3)2CO", "acetone-d6"), ("C6D6", "C6D6"),
    ("benzene-d6", "C6D6"), ("CD2Cl2", "CD2Cl2"), ("CD3CN", "CD3CN"),
    ("acetonitrile-d3", "CD3CN"), ("THF-d8", "THF-d8"), ("toluene-d8", "toluene-d8"),
    ("CDCl3/CD3OD 4:1", "CDCl3/CD3OD 4:1"),
]
#: 1H frequency → the 13C frequencies written beside it (IUPAC Ξ ratio 25.145020 %,
#: Harris et al., Pure Appl. Chem. 2001, 73, 1795; rounded as authors write them).
FREQUENCIES = {300: ["75", "75.5"], 400: ["100.6", "101", "100"], 500: ["125.7", "126", "125"],
               600: ["150.9", "151"]}
#: (written, kelvin) temperatures.
TEMPERATURES = [("298 K", 298.0), ("25 °C", 298.15), ("323 K", 323.0), ("−20 °C", 253.15)]
#: HRMS ions: (written ion, normalised ion, ion formula, calcd).  Calcd values from molmass
#: (monoisotopic masses, electron mass subtracted for cations / added for anions).
IONS = [
    ("[M + Na]+", "[M+Na]+", "C12H14O3Na", "229.0835"),
    ("[M+H]+", "[M+H]+", "C12H15O3", "207.1016"),
    ("(M+H)+", "[M+H]+", "C10H13O2", "165.0910"),
    ("[M]+•", "[M]+•", "C14H12O", "196.0883"),
    ("[M−H]−", "[M-H]-", "C10H11O3", "179.0714"),
]
METHODS = [("(ESI)", "ESI"), ("(ESI-TOF)", "ESI-TOF"), ("(EI)", "EI"), ("-ESI", "ESI"),
           ("(APCI)", "APCI"), ("(ESI+)", "ESI+")]
ASSIGNMENTS = ["ArH", "H-3", "OCH3", "CH2", "NCH2", "H-2'", "OCH2CH3", "CH=CH"]
NOTES = ["major rotamer", "minor rotamer", "exchangeable", "overlapped"]


def _number(value: float, decimals: int, comma: bool) -> str:
    text = f"{abs(value):.{decimals}f}"
    if comma:
        text = text.replace(".", ",")
    return text


@st.composite
def shifts(draw, low: float, high: float, decimals: int) -> float:
    """A shift rounded to ``decimals`` places."""
    scale = 10**decimals
    return draw(st.integers(round(low * scale), round(high * scale))) / scale


@st.composite
def multiplicities(draw):
    """(written form, normalised name, number of J values it takes)."""
    kind = draw(st.sampled_from(["none", "one", "letters", "letters", "letters"]))
    if kind == "none":
        name = draw(st.sampled_from(sorted(NO_J_FORMS)))
        return draw(st.sampled_from(NO_J_FORMS[name])), name, 0
    if kind == "one":
        name = draw(st.sampled_from(sorted(ONE_J_SPECIAL)))
        return draw(st.sampled_from(ONE_J_SPECIAL[name])), name, 1
    size = draw(st.integers(1, 3))
    if size == 1:
        letter = draw(st.sampled_from(sorted(LETTER_FORMS)))
        forms = LETTER_FORMS[letter] + ([WORDS[letter]] if letter in WORDS else [])
        return draw(st.sampled_from(forms)), letter, 1
    letters = draw(st.lists(st.sampled_from(["d", "t", "q"]), min_size=size, max_size=size))
    name = "".join(letters)
    written = name
    if size == 2 and draw(st.booleans()):
        written = f"{WORDS[letters[0]]} of {WORDS[letters[1]]}s"
    return written, name, size


@st.composite
def couplings(draw, n: int, comma: bool, spacing: str) -> tuple[str, list[float]]:
    """Written J list for ``n`` constants and their values, in the order written."""
    values = sorted(
        (draw(st.integers(5, 180)) / 10 for _ in range(n)), reverse=draw(st.booleans())
    )
    nums = [_number(v, 1, comma) for v in values]
    eq = "=" if spacing == "compact" else " = "
    hz = "Hz" if spacing == "compact" else " Hz"
    if comma:  # with decimal commas only unambiguous forms: one value, or numbered J's
        if n == 1:
            form = draw(st.sampled_from(["J = {0} Hz", "J {0} Hz", "3JHH = {0} Hz"]))
            return form.replace(" = ", eq).replace(" Hz", hz).format(*nums), values
        return ", ".join(f"J{i + 1}{eq}{x}{hz}" for i, x in enumerate(nums)), values
    forms = ["equals", "equals-each-hz", "no-equals", "bare", "no-hz"]
    if n == 1:
        forms += ["typed-hh", "typed-paren"]
    if n >= 2:
        forms += ["numbered"]
    form = draw(st.sampled_from(forms))
    joined = ", ".join(nums)
    text = {
        "equals": f"J{eq}{joined}{hz}",
        "equals-each-hz": f"J{eq}" + ", ".join(x + hz for x in nums),
        "no-equals": f"J {joined}{hz}",
        "bare": f"{joined}{hz}",
        "no-hz": f"J{eq}{joined}",
        "typed-hh": f"3JHH{eq}{joined}{hz}",
        "typed-paren": f"3J(H,H){eq}{joined}{hz}",
        "numbered": ", ".join(f"J{i + 1}{eq}{x}{hz}" for i, x in enumerate(nums)),
    }[form]
    return text, values


@st.composite
def proton_signals(draw, comma: bool, spacing: str) -> tuple[str, dict[str, Any]]:
    """One 1H signal: (text, expected signal)."""
    is_range = draw(st.integers(0, 5)) == 0
    if is_range:
        first = draw(shifts(0.5, 11.5, 2))
        second = draw(shifts(0.5, 11.5, 2).filter(lambda x: x != first))
        dash = draw(st.sampled_from(["–", "-", "—", " to ", " – "]))
        shift_text = _number(first, 2, comma) + dash + _number(second, 2, comma)
        written, name, nj = "m", "m", 0
        shift, rng = None, [first, second]
    else:
        value = draw(shifts(-0.9, 12.5, draw(st.sampled_from([2, 2, 2, 3]))))
        decimals = len(str(value).split(".")[1]) if "." in str(value) else 0
        decimals = max(decimals, 2)
        minus = draw(st.sampled_from(["-", "−"])) if value < 0 else ""
        shift_text = minus + _number(value, decimals, comma)
        written, name, nj = draw(multiplicities())
        shift, rng = value, None
    j_text, j_values = draw(couplings(nj, comma, spacing)) if nj else ("", [])
    count_value = draw(st.sampled_from([1, 1, 2, 2, 3, 4, 6, 9]))
    fractional = draw(st.integers(0, 9)) == 0
    if fractional:
        count_value = draw(st.sampled_from([0.4, 0.6, 1.2, 1.8]))
    count_num = _number(count_value, 1, comma) if fractional else str(count_value)
    count_text = count_num + draw(st.sampled_from(["H", "H", " H"]))
    assignment = draw(st.none() | st.sampled_from(ASSIGNMENTS))
    note = draw(st.none() | st.sampled_from(NOTES)) if draw(st.integers(0, 4)) == 0 else None

    mult_part = written + (", " + j_text if j_text else "")
    order = draw(st.sampled_from(["mult-first", "count-first"]))
    parts = [mult_part, count_text] if order == "mult-first" else [count_text, mult_part]
    if assignment:
        parts.append(assignment)
    if note:
        parts.append(note)
    sep = "," if spacing == "compact" else ", "
    details = sep.join(parts)
    if spacing == "compact":
        details = details.replace(", ", ",")
    text = f"{shift_text} ({details})" if spacing != "compact" else f"{shift_text}({details})"
    expected = {
        "shift": shift,
        "range": rng,
        "multiplicity": name,
        "j_hz": j_values,
        "count": float(count_value),
        "assignment": assignment,
    }
    return text, expected


def _spectrum(nucleus, decoupled, mhz, solvent, kelvin, signals):
    return {"nucleus": nucleus, "decoupled": decoupled, "frequency_mhz": mhz, "solvent": solvent,
            "temperature_k": kelvin, "signals": signals}


@st.composite
def proton_spectra(draw, mhz: int, solvent: tuple[str, str], comma: bool):
    """A whole 1H list with its header: (text, expected spectrum)."""
    spacing = "compact" if (not comma and draw(st.integers(0, 7)) == 0) else "normal"
    items = draw(st.lists(proton_signals(comma, spacing), min_size=1, max_size=8))
    temperature = draw(st.none() | st.sampled_from(TEMPERATURES))
    style = draw(st.sampled_from(["plain", "plain", "delta-h"]))
    if style == "delta-h":
        conditions = [f"{mhz} MHz", solvent[0]] + ([temperature[0]] if temperature else [])
        header = f"δH ({'; '.join(conditions)})"
        tail = ""
    else:
        nucleus = draw(st.sampled_from(["1H NMR", "¹H NMR", "1H-NMR", "1 H NMR"]))
        conditions = [f"{mhz} MHz", solvent[0]]
        if draw(st.booleans()):
            conditions.reverse()
        if temperature:
            conditions.insert(draw(st.integers(0, len(conditions))), temperature[0])
        delta = draw(st.sampled_from([" δ", " δ =", " δ (ppm)", ":", ": δ", " δ (ppm):"]))
        header = f"{nucleus} ({', '.join(conditions)}){delta}"
        tail = " ppm" if delta == " δ =" and draw(st.booleans()) else ""
    separator = draw(st.sampled_from([", ", "; "])) if not comma else ", "
    if spacing == "compact":
        separator = separator.strip()
    body = separator.join(t for t, _ in items)
    text = f"{header} {body}{tail}"
    expected = _spectrum("1H", [], float(mhz), solvent[1],
                         temperature[1] if temperature else None, [e for _, e in items])
    return text, expected


@st.composite
def carbon_spectra(draw, mhz: int, solvent: tuple[str, str], comma: bool):
    """A 13C list: (text, expected spectrum)."""
    values = draw(st.lists(shifts(5.0, 215.0, 1), min_size=1, max_size=14, unique=True))
    values.sort(reverse=draw(st.integers(0, 5)) != 0)
    signals, parts = [], []
    for v in values:
        count = draw(st.sampled_from([None, None, None, 2, 3]))
        text = _number(v, 1, comma)
        if count:
            text += draw(st.sampled_from([f" ({count}C)", f" ({count} C)"]))
        parts.append(text)
        signals.append({"shift": v, "range": None, "multiplicity": None, "j_hz": [],
                        "count": float(count) if count else None, "assignment": None})
    nucleus, decoupled = draw(st.sampled_from([("13C{1H} NMR", ["1H"]), ("13C{¹H} NMR", ["1H"]),
                                               ("13C NMR", []), ("¹³C{¹H} NMR", ["1H"])]))
    freq = draw(st.sampled_from(FREQUENCIES[mhz]))
    conditions = [f"{freq} MHz", solvent[0]]
    if draw(st.booleans()):
        conditions.reverse()
    separator = "; " if comma else ", "
    text = f"{nucleus} ({', '.join(conditions)}) δ {separator.join(parts)}"
    return text, _spectrum("13C", decoupled, float(freq), solvent[1], None, signals)


@st.composite
def hrms(draw):
    """An HRMS sentence: (text, expected mass_spec record)."""
    written_ion, ion, formula, calcd = draw(st.sampled_from(IONS))
    method_text, method = draw(st.sampled_from(METHODS))
    delta = draw(st.integers(-9, 9)) / 10000
    found = f"{float(calcd) + delta:.4f}"
    calc_word = draw(st.sampled_from(["calcd for", "calc. for", "Calcd. for", "calcd. for"]))
    found_word = draw(st.sampled_from(["found", "found:", "Found"]))
    mz = draw(st.sampled_from(["m/z", "m/z:"]))
    if draw(st.booleans()):
        body = f"{mz} {written_ion} {calc_word} {formula} {calcd}, {found_word} {found}"
    else:
        body = f"{mz} {calc_word} {formula} {written_ion} {calcd}, {found_word} {found}"
    text = f"HRMS{' ' if method_text.startswith('(') else ''}{method_text} {body}"
    return text, {"method": method, "ion": ion, "formula": formula, "calcd": float(calcd),
                  "found": float(found)}


@st.composite
def blocks(draw) -> tuple[str, list[dict[str, Any]]]:
    """A valid characterization block and its expected projection (a one-block list)."""
    mhz = draw(st.sampled_from(sorted(FREQUENCIES)))
    solvent = draw(st.sampled_from(SOLVENTS))
    comma = draw(st.integers(0, 7)) == 0
    spectra_texts, spectra = [], []
    text, spectrum = draw(proton_spectra(mhz, solvent, comma))
    spectra_texts.append(text)
    spectra.append(spectrum)
    if draw(st.booleans()):
        text, spectrum = draw(carbon_spectra(mhz, solvent, comma))
        spectra_texts.append(text)
        spectra.append(spectrum)
    joiner = draw(st.sampled_from(["; ", ". ", "\n"]))
    text = joiner.join(spectra_texts)
    mass_spec = []
    if not comma and draw(st.booleans()):
        ms_text, record = draw(hrms())
        text += draw(st.sampled_from(["; ", ". ", "\n"])) + ms_text
        mass_spec.append(record)
    text += "."
    expected = [{"spectra": spectra, "mass_spec": mass_spec, "elemental_analysis": [],
                 "other": []}]
    return text, expected


#: Characters that often trip a peak grammar; used to mutate valid blocks.
TRICKY = "()[]{},;:=–—-−δ×.%°¹³⁺•\u00a0\u2009\u00ad\n 0123456789HJzdtqsm"


@st.composite
def mutated_blocks(draw) -> str:
    """A valid block with a few random deletions, insertions, duplications or a truncation."""
    text, _ = draw(blocks())
    for _ in range(draw(st.integers(1, 4))):
        if not text:
            break
        op = draw(st.sampled_from(["delete", "insert", "duplicate", "truncate", "swap"]))
        i = draw(st.integers(0, len(text) - 1))
        j = draw(st.integers(i, min(len(text), i + 12)))
        if op == "delete":
            text = text[:i] + text[j:]
        elif op == "insert":
            text = text[:i] + draw(st.text(st.sampled_from(TRICKY), min_size=1, max_size=4)) + text[i:]
        elif op == "duplicate":
            text = text[:j] + text[i:j] + text[j:]
        elif op == "truncate":
            text = text[:i]
        else:
            text = text[:i] + text[i:j][::-1] + text[j:]
    return text
