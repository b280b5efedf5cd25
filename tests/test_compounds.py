"""Compound labels, names and formulas found before each data block.

The compounds and formulas here are invented examples; the formulas are only matched as
text, so their chemistry does not matter to these tests.
"""

from __future__ import annotations

import pytest

from peakproof.parsing import parse

H1 = "1H NMR (400 MHz, CDCl3) δ 8.14 (d, J = 8.5 Hz, 2H), 3.91 (s, 3H)."
H1_B = "1H NMR (400 MHz, CDCl3) δ 2.36 (s, 3H)."


def compounds(text: str) -> list[tuple[str | None, str | None, str | None]]:
    """(compound, formula, the text the compound span covers) per block."""
    doc = parse(text)
    return [(b.compound, b.formula,
             text[b.compound_span.start : b.compound_span.end] if b.compound_span else None)
            for b in doc.blocks]  # fmt: skip


@pytest.mark.parametrize(
    "text,expected",
    [
        # a heading ending in a label; the intro sentence between is skipped
        (f"## Ethyl 4-cyanobenzoate (12)\nWhite solid (1.61 g, 92%).\n{H1}", ("12", None, "12")),
        # the same heading without Markdown marks (Word, PDF)
        (f"Ethyl 4-cyanobenzoate (12)\n{H1}", ("12", None, "12")),
        # a formula after the label, outside or inside the parentheses
        (f"## Ethyl 4-cyanobenzoate (12), C10H9NO2\n{H1}", ("12", "C10H9NO2", "12")),
        (f"Ethyl 4-cyanobenzoate (12; C10H9NO2)\n{H1}", ("12", "C10H9NO2", "12")),
        (f"Ethyl 4-cyanobenzoate (3a′)\n{H1}", ("3a′", None, "3a′")),
        (f"Ethyl 4-cyanobenzoate (S12)\n{H1}", ("S12", None, "S12")),
        # a Markdown heading without a label names the compound by its title
        (f"## Ethyl 4-cyanobenzoate\n{H1}",
         ("Ethyl 4-cyanobenzoate", None, "Ethyl 4-cyanobenzoate")),  # fmt: skip
        (f"## Ethyl 4-cyanobenzoate, C10H9NO2\n{H1}",
         ("Ethyl 4-cyanobenzoate", "C10H9NO2", "Ethyl 4-cyanobenzoate")),  # fmt: skip
        # "compound 7" in the text
        (f"Compound 7 was obtained as an oil. {H1}", ("7", None, "7")),
        # a label in the sentence that introduces the block
        (f"Ethyl 4-cyanobenzoate (12): white solid. {H1}", ("12", None, "12")),
        (f"Ethyl 4-cyanobenzoate (12; C10H9NO2): white solid. {H1}", ("12", "C10H9NO2", "12")),
        # a title alone on the line before the block
        (f"Methyl benzoate\n{H1}", ("Methyl benzoate", None, "Methyl benzoate")),
        # nothing that names a compound: quantities in parentheses are not labels
        (f"Sodium hydride (60% in oil, 2.0 equiv) was added (10 mL). {H1}", (None, None, None)),
        # the last lines of a wrapped sentence are not a title
        (f"The residue was purified by chromatography\nto give a colourless oil\n{H1}",
         (None, None, None)),  # fmt: skip
    ],
)
def test_one_block(text, expected):
    assert compounds(text) == [expected]


def test_each_block_looks_only_at_the_text_after_the_previous_block():
    text = f"Methyl benzoate (3)\n{H1}\n\nToluene\n{H1_B}\n\n{H1_B}"
    assert [c[0] for c in compounds(text)] == ["3", "Toluene", None]


def test_nearest_heading_wins():
    text = ("## General procedure A (Claisen acylation)\nStirred for 2 h.\n\n"
            f"## Methyl ester (1a)\n{H1}")
    assert compounds(text) == [("1a", None, "1a")]


def test_formula_falls_back_to_elemental_analysis():
    text = (f"## Ethyl 4-cyanobenzoate (12)\n{H1[:-1]}; "
            "Anal. Calcd for C10H9NO2: C, 68.57; H, 5.18; N, 8.00. "
            "Found: C, 68.50; H, 5.20; N, 7.95.")  # fmt: skip
    assert compounds(text) == [("12", "C10H9NO2", "12")]


def test_formula_by_the_name_beats_elemental_analysis():
    text = (f"## Ethyl 4-cyanobenzoate (12), C10H9NO2\n{H1[:-1]}; "
            "Anal. Calcd for C10H10NO2: C, 68.17; H, 5.72. Found: C, 68.10; H, 5.70.")  # fmt: skip
    assert compounds(text)[0][1] == "C10H9NO2"
