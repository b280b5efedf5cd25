"""Checker settings: ``[tool.peakproof]`` in the nearest ``pyproject.toml``, or a given TOML file.

Keys (kebab-case; ``_`` is accepted for ``-``)::

    [tool.peakproof]
    select = ["multiplicity", "PP601"]      # rule names, codes or family names
    ignore = ["shift-order"]
    fail-on = "warning"
    coupling-tolerance = 0.3                # Hz, J values that count as the same coupling
    near-miss = 1.0                         # Hz, J values that look like a mistyped partner
    hrms-ppm = 5.0                          # found vs calcd, ppm
    hrms-mz = 0.003                         # or in m/z units (used instead of ppm when set)
    ea-tolerance = 0.4                      # elemental analysis, absolute %
    shift-order = "descending"              # or "either"
    max-findings-per-rule = 20              # per rule and block; the rest become one "and N more" note
    [tool.peakproof.severity]
    coupling-no-partner = "warning"

Unknown keys are reported with the closest known key, never silently ignored.  A file given
with ``--config`` may hold the table as ``[tool.peakproof]`` or at its top level.
"""

from __future__ import annotations

import difflib
import os
import tomllib
from dataclasses import dataclass, field, fields, replace
from pathlib import Path
from typing import Any


class ConfigError(Exception):
    """A settings file that cannot be used; ``str()`` says what, where and what to do."""


@dataclass(frozen=True)
class Config:
    select: tuple[str, ...] = ()  # empty: every rule
    ignore: tuple[str, ...] = ()
    severity: dict[str, str] = field(default_factory=dict)  # rule name or code → severity
    fail_on: str = "error"
    coupling_tolerance: float = 0.3
    near_miss: float = 1.0
    hrms_ppm: float = 5.0
    hrms_mz: float | None = None
    ea_tolerance: float = 0.4
    shift_order: str = "descending"
    solvent_tolerance_1h: float = 0.02
    solvent_tolerance_13c: float = 0.1
    frequency_tolerance: float = 1.0  # MHz, or 1 % of the expected value when larger
    carbon_deficit: float = 0.25  # fraction of the formula's carbons missing before a note
    max_findings_per_rule: int = 20  # per rule and block; 0 means no cap
    formula: str | None = None
    style: Any = None  # the Style class the text is written in (form rules follow it), or None
    path: str | None = None  # the file the settings came from
    problems: tuple[str, ...] = ()  # unknown keys and similar, for the user

    def with_overrides(self, **changes: Any) -> Config:
        return replace(self, **{k: v for k, v in changes.items() if v is not None})


_FLOAT_KEYS = {
    "coupling_tolerance",
    "near_miss",
    "hrms_ppm",
    "hrms_mz",
    "ea_tolerance",
    "solvent_tolerance_1h",
    "solvent_tolerance_13c",
    "frequency_tolerance",
    "carbon_deficit",
}
_CHOICES = {"fail_on": ("error", "warning", "note"), "shift_order": ("descending", "either")}
KNOWN_KEYS = tuple(f.name.replace("_", "-") for f in fields(Config) if f.name not in ("path", "problems"))


def find_pyproject(start: str | os.PathLike) -> Path | None:
    """The nearest ``pyproject.toml`` at or above ``start`` (a file or a folder)."""
    here = Path(start).resolve()
    if not here.is_dir():
        here = here.parent
    for folder in (here, *here.parents):
        candidate = folder / "pyproject.toml"
        if candidate.is_file():
            return candidate
    return None


def load_config(path: str | os.PathLike | None = None, *, near: str | os.PathLike | None = None) -> Config:
    """Settings from ``path``, else from the pyproject.toml nearest ``near``, else defaults."""
    if path is None:
        if near is None:
            return Config()
        found = find_pyproject(near)
        if found is None:
            return Config()
        path = found
    path = Path(path)
    try:
        raw = tomllib.loads(path.read_text("utf-8"))
    except FileNotFoundError:
        raise ConfigError(f"{path}: settings file not found") from None
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read settings ({exc.strerror or exc})") from None
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{path}: not valid TOML ({exc}); fix the file or pass another --config") from None
    table = raw.get("tool", {}).get("peakproof")
    if table is None:
        table = {} if path.name == "pyproject.toml" else {k: v for k, v in raw.items() if k != "tool"}
    return config_from_table(table, str(path))


def config_from_table(table: dict[str, Any], where: str = "<settings>") -> Config:
    """Build a :class:`Config` from a TOML table; type errors raise, unknown keys are kept as problems."""
    values: dict[str, Any] = {}
    problems: list[str] = []
    for key, value in table.items():
        name = key.replace("-", "_")
        if name not in {f.name for f in fields(Config)} or name in ("path", "problems"):
            close = difflib.get_close_matches(key.replace("_", "-"), KNOWN_KEYS, n=1, cutoff=0.6)
            hint = f"; did you mean '{close[0]}'?" if close else f"; known keys: {', '.join(KNOWN_KEYS)}"
            problems.append(f"{where}: unknown key '{key}' in [tool.peakproof]{hint}")
            continue
        values[name] = _convert(name, value, where, key)
    config = Config(**values, path=where)
    problems.extend(_check_rule_names(config, where))
    return replace(config, problems=tuple(problems))


def _convert(name: str, value: Any, where: str, key: str) -> Any:
    def bad(expected: str) -> ConfigError:
        return ConfigError(f"{where}: [tool.peakproof] {key} = {value!r}: expected {expected}")

    if name in ("select", "ignore"):
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            raise bad("a list of rule names or codes")
        return tuple(value)
    if name == "severity":
        if not isinstance(value, dict):
            raise bad('a table such as {shift-order = "warning"}')
        for rule, sev in value.items():
            if sev not in ("error", "warning", "note"):
                raise ConfigError(f"{where}: severity of {rule} is {sev!r}; use error, warning or note")
        return dict(value)
    if name in _FLOAT_KEYS:
        if isinstance(value, bool) or not isinstance(value, (int, float)) or value < 0:
            raise bad("a non-negative number")
        return float(value)
    if name in _CHOICES:
        if value not in _CHOICES[name]:
            raise bad(" or ".join(_CHOICES[name]))
        return value
    if name == "style":
        return _style_setting(value, where, bad)
    if name == "max_findings_per_rule":
        if isinstance(value, bool) or not isinstance(value, int) or value < 0:
            raise bad("a whole number of findings, 0 or more (0: no cap)")
        return value
    if name == "formula":
        if not isinstance(value, str):
            raise bad("a molecular formula such as 'C12H14O3'")
        return value
    return value  # pragma: no cover - every field is handled above


def _style_setting(value: Any, where: str, bad) -> Any:
    """``style = "count-first"`` names a built-in style; a ``[tool.peakproof.style]`` table is a
    user style (``extends`` a built-in), the one ``format`` writes in."""
    from .styles import StyleError, get_style, style_from_table

    try:
        if isinstance(value, str):
            return get_style(value)
        if isinstance(value, dict):
            return style_from_table(value, where)
    except StyleError as exc:
        raise ConfigError(f"{where}: [tool.peakproof] style: {exc}") from None
    raise bad("a built-in style's name or a [tool.peakproof.style] table")


def _check_rule_names(config: Config, where: str) -> list[str]:
    from .rules import resolve_names

    problems = []
    for key, names in (("select", config.select), ("ignore", config.ignore), ("severity", tuple(config.severity))):
        for name in names:
            try:
                resolve_names([name])
            except KeyError as exc:
                problems.append(f"{where}: {key}: {exc.args[0]}")
    return problems


__all__ = ["Config", "ConfigError", "KNOWN_KEYS", "config_from_table", "find_pyproject", "load_config"]
