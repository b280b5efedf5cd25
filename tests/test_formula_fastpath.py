"""Plain element-count formulas are read without the grammar; both readings agree."""

from hypothesis import given
from hypothesis import strategies as st

import peakproof.formula as F

SYMBOLS = ["C", "H", "N", "O", "F", "Na", "Cl", "Br", "S", "P", "Si", "K", "B", "I", "Pt", "Sn", "D", "Xx", "Q"]


@given(st.lists(st.tuples(st.sampled_from(SYMBOLS), st.one_of(st.just(""), st.integers(0, 40).map(str))),
                min_size=1, max_size=7))
def test_shortcut_agrees_with_grammar(parts):
    """Same counts, text and charge, or the same refusal (unknown symbol, zero count)."""
    text = "".join(symbol + digits for symbol, digits in parts)
    try:
        fast = F.parse_formula(text)
    except F.FormulaError:
        fast = None
    try:
        slow = F._build(F._get_parser().parse(text), text)
    except Exception:
        slow = None
    assert (fast is None) == (slow is None)
    if fast is not None:
        assert (fast, fast.text, fast.charge) == (slow, slow.text, slow.charge)
