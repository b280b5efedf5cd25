"""The base output style: every choice the emitter makes, each one a documented constant.

A built-in or user style is a subclass that overrides a few of these; dictionaries are
overridden by spreading the base (``lexicon = {**Style.lexicon, "quint": "p"}``) so a style
states only what differs.  The emitter reads nothing but these attributes.
"""

from __future__ import annotations

from typing import Any, ClassVar


class Style:
    """Multiplicity first, signals high to low: ``7.26 (d, J = 8.4 Hz, 2H, ArH)``."""

    name: ClassVar[str] = "base"
    """The name given to ``--style``."""

    description: ClassVar[str] = "the base every style overrides"
    """One line for ``peakproof styles``."""

    # ---- spectrum header ---------------------------------------------------------------------
    header_form: ClassVar[str] = "nucleus"
    """``"nucleus"`` writes ``1H NMR (…) δ``; ``"subscript"`` writes ``δH (…)`` (1H, 13C, 19F,
    31P, 11B, 15N only; other nuclei and decoupled spectra fall back to the nucleus form)."""

    nucleus_template: ClassVar[str] = "{nucleus}{decoupling} NMR"
    """How a nucleus header is written; ``{decoupling}`` is empty for coupled spectra."""

    decoupling_template: ClassVar[str] = "{{{nuclei}}}"
    """The decoupling label: ``{1H}`` by default (``{nuclei}`` is the comma-joined list)."""

    header_fields: ClassVar[tuple[str, ...]] = (
        "frequency", "solvent", "temperature", "reference", "conditions",
    )  # fmt: skip
    """Order of the conditions inside the header's parentheses."""

    delta: ClassVar[str] = "δ"
    """What stands between the header and the first shift: ``δ``, ``δ =``, or ``""``."""

    trailing_unit: ClassVar[str] = ""
    """Written after the last signal of a list, e.g. ``" ppm"`` after ``δ = … ``."""

    # ---- signals ------------------------------------------------------------------------------
    shift_order: ClassVar[str] = "descending"
    """``"descending"``, ``"ascending"`` or ``"as-written"``: the order of the signal list."""

    range_direction: ClassVar[str] = "descending"
    """``"descending"`` (7.36–7.28), ``"ascending"`` (7.28–7.36) or ``"as-written"``."""

    range_dash: ClassVar[str] = "–"
    """The dash between the bounds of a range (an en dash, common practice)."""

    minus: ClassVar[str] = "−"
    """The minus sign of negative shifts (U+2212, common practice in typeset text)."""

    decimals: ClassVar[dict[str, int]] = {"1H": 2, "13C": 1, "19F": 1, "31P": 1, "*": 2}
    """Decimals per nucleus that ``--round`` rounds shifts to (never pads); ``*`` is any other."""

    j_decimals: ClassVar[int] = 1
    """Decimals that ``--round`` rounds coupling constants to (never pads)."""

    detail_fields: ClassVar[tuple[str, ...]] = (
        "multiplicity", "couplings", "count", "assignment", "notes",
    )  # fmt: skip
    """Order of the details inside a signal's parentheses."""

    separators: ClassVar[dict[str, str]] = {
        "signals": ", ",
        "details": ", ",
        "before_assignment": ", ",
        "conditions": ", ",
        "group": ", ",
    }
    """Between signals; between details; before the assignment and notes; between header
    conditions; between the shifts of signals written together (``7.30, 7.26 (2 × d…)``)."""

    # ---- couplings ----------------------------------------------------------------------------
    j: ClassVar[dict[str, Any]] = {
        "label": "J",
        "equals": " = ",
        "unit": " Hz",
        "typed": "{bonds}J({a},{b})",
        "numbered": "J{label}",
    }
    """Coupling syntax: the plain label, what joins label and value, the unit written after
    each group of values, the form of a typed coupling (written only when the data says which
    nuclei or bonds), and the form of a numbered one (``J1``)."""

    # ---- multiplicity -------------------------------------------------------------------------
    lexicon: ClassVar[dict[str, str]] = {
        "s": "s", "d": "d", "t": "t", "q": "q", "m": "m", "quint": "quint", "sext": "sext",
        "sept": "sept", "oct": "oct", "non": "non", "br s": "br s", "br": "br",
        "broad": "br ", "apparent": "app ", "ABq": "ABq", "AB": "AB", "times": " × ",
    }  # fmt: skip
    """Spelling of each normalised multiplicity piece: letters, the broad singlet, the broad
    and apparent prefixes, AB patterns and the ``×`` of ``2 × d``."""

    # ---- integration --------------------------------------------------------------------------
    count_template: ClassVar[str] = "{n}{nucleus}"
    """``2H`` (``"{n}{nucleus}"``) or ``2 H`` (``"{n} {nucleus}"``)."""

    # ---- other items --------------------------------------------------------------------------
    item_separator: ClassVar[str] = "; "
    """Between the items of a block, where only a separator stood (never across prose)."""

    ms_template: ClassVar[str] = (
        "HRMS[ ({method})] m/z[ {ion}][ calcd[ for {formula}][ {calcd}]][, found {found}]"
    )
    """The HRMS sentence; a ``[…]`` part is left out when a field inside it is unknown."""

    ion_spaces: ClassVar[bool] = False
    """Write ``[M + Na]+`` (True) or ``[M+Na]+`` (False)."""

    ea_template: ClassVar[str] = "Anal. Calcd[ for {formula}]: {calcd}. Found: {found}"
    """The elemental-analysis sentence."""

    ea_element: ClassVar[str] = "{element}, {value}"
    """One element's value in an elemental analysis."""

    ea_separator: ClassVar[str] = "; "
    """Between elements of an elemental analysis."""

    # ---- helpers ------------------------------------------------------------------------------
    @classmethod
    def settings(cls) -> dict[str, Any]:
        """Every documented constant and its value in this style."""
        return {name: getattr(cls, name) for name in SETTING_NAMES}

    @classmethod
    def shift_decimals(cls, nucleus: str) -> int:
        return cls.decimals.get(nucleus, cls.decimals.get("*", 2))


#: The names a style (built-in or from TOML) may set, with the type each must have.
SETTING_NAMES: tuple[str, ...] = tuple(
    name
    for name, value in vars(Style).items()
    if not name.startswith("_") and not callable(value) and not isinstance(value, classmethod)
)

CHOICES: dict[str, tuple[str, ...]] = {
    "header_form": ("nucleus", "subscript"),
    "shift_order": ("descending", "ascending", "as-written"),
    "range_direction": ("descending", "ascending", "as-written"),
}
"""Settings that take one of a few words."""
