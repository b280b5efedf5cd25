"""Output styles: the built-in ones, and user styles from TOML that extend one of them.

A user style lives in ``pyproject.toml`` under ``[tool.peakproof.style]`` or in a file given
to ``--style-file``::

    extends = "count-first"      # a built-in style
    name = "our-journal"         # optional; how --style and messages call it
    range_dash = "–"
    [lexicon]                    # tables are merged over the parent's
    quint = "quint"
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from .ascending_bare_j import AscendingBareJ
from .base import CHOICES, SETTING_NAMES, Style
from .count_first import CountFirst
from .equation_delta import EquationDelta
from .letters_first import LettersFirst
from .subscript_delta import SubscriptDelta

BUILTIN: dict[str, type[Style]] = {
    s.name: s for s in (LettersFirst, CountFirst, AscendingBareJ, SubscriptDelta, EquationDelta)
}
DEFAULT = "letters-first"


class StyleError(ValueError):
    """A style that cannot be used; ``str()`` says what and where, and what to do."""


def get_style(name: str, user: dict[str, type[Style]] | None = None) -> type[Style]:
    """A built-in style, or one of ``user`` (styles read from TOML), by name."""
    styles = {**BUILTIN, **(user or {})}
    if name not in styles:
        raise StyleError(f"unknown style {name!r}; choose one of: {', '.join(styles)}")
    return styles[name]


def style_from_table(table: dict[str, Any], where: str) -> type[Style]:
    """Build a style class from a TOML table: ``extends`` a built-in, then overrides."""
    table = dict(table)
    parent_name = table.pop("extends", None)
    if parent_name is None:
        raise StyleError(f"{where}: a user style needs 'extends = \"<style>\"' "
                         f"(one of: {', '.join(BUILTIN)})")  # fmt: skip
    if parent_name not in BUILTIN:
        raise StyleError(f"{where}: extends = {parent_name!r} is not a built-in style "
                         f"(one of: {', '.join(BUILTIN)})")  # fmt: skip
    parent = BUILTIN[parent_name]
    name = table.pop("name", f"{parent_name}+{Path(where).name}")
    overrides: dict[str, Any] = {
        "name": str(name),
        "description": str(table.pop("description", f"{parent_name} with overrides from {where}")),
    }
    for key, value in table.items():
        if key not in SETTING_NAMES:
            close = [n for n in SETTING_NAMES if n.startswith(key[:4])]
            hint = f"; did you mean {close[0]!r}?" if close else ""
            raise StyleError(f"{where}: unknown style setting {key!r}{hint}")
        base_value = getattr(parent, key)
        if isinstance(base_value, dict):
            if not isinstance(value, dict):
                raise StyleError(f"{where}: {key} must be a table such as [{key}]")
            unknown = set(value) - set(base_value)
            if unknown and key != "decimals":
                raise StyleError(f"{where}: [{key}] has unknown keys {sorted(unknown)}; "
                                 f"known: {sorted(base_value)}")  # fmt: skip
            value = {**base_value, **value}
        elif isinstance(base_value, tuple):
            if not isinstance(value, list) or sorted(value) != sorted(base_value):
                raise StyleError(f"{where}: {key} must list exactly {list(base_value)} in some order")
            value = tuple(value)
        elif type(value) is not type(base_value):
            raise StyleError(f"{where}: {key} must be a {type(base_value).__name__}, "
                             f"not {value!r}")  # fmt: skip
        if key in CHOICES and value not in CHOICES[key]:
            raise StyleError(f"{where}: {key} = {value!r}; choose one of {CHOICES[key]}")
        overrides[key] = value
    return type(f"UserStyle_{parent.__name__}", (parent,), overrides)


def load_style_file(path: str | os.PathLike) -> type[Style]:
    """A user style from a ``.toml`` file (the whole file is the style table)."""
    import tomllib

    try:
        with open(path, "rb") as handle:
            table = tomllib.load(handle)
    except OSError as exc:
        raise StyleError(f"{path}: cannot read the style file ({exc.strerror})") from None
    except tomllib.TOMLDecodeError as exc:
        raise StyleError(f"{path}: not valid TOML ({exc})") from None
    if "tool" in table and "peakproof" in table["tool"]:  # a pyproject.toml given directly
        table = table["tool"]["peakproof"].get("style", {})
    return style_from_table(table, str(path))


def find_project_style(start: str | os.PathLike = ".") -> type[Style] | None:
    """The ``[tool.peakproof.style]`` of the nearest pyproject.toml above ``start``, if any."""
    import tomllib

    folder = Path(start).resolve()
    for candidate in (folder, *folder.parents):
        pyproject = candidate / "pyproject.toml"
        if pyproject.is_file():
            try:
                with open(pyproject, "rb") as handle:
                    table = tomllib.load(handle)
            except (OSError, tomllib.TOMLDecodeError) as exc:
                raise StyleError(f"{pyproject}: cannot read it ({exc})") from None
            style = table.get("tool", {}).get("peakproof", {}).get("style")
            if style is None:
                return None
            return style_from_table(style, str(pyproject))
    return None


__all__ = ["BUILTIN", "DEFAULT", "Style", "StyleError", "find_project_style", "get_style",
           "load_style_file", "style_from_table"]  # fmt: skip
