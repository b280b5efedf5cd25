"""Text formatted in a built-in style draws no form notes when checked under that style: the form
rules (shift order, units of J) read the configured style instead of one fixed convention."""

from __future__ import annotations

from pathlib import Path

import pytest

import peakproof
from peakproof.cli import main
from peakproof.config import Config, ConfigError, config_from_table
from peakproof.styles import BUILTIN, get_style

DEMO = Path(__file__).resolve().parents[2] / "examples" / "demo_si.txt"
STYLE_RULES = {"shift-order", "missing-hz"}


def _rules(text: str, style=None) -> list[str]:
    return [d.rule for d in peakproof.check(text, config=Config(style=style)).diagnostics]


@pytest.mark.parametrize("name", sorted(BUILTIN))
def test_formatted_demo_is_quiet_under_its_own_style(name):
    original = DEMO.read_text("utf-8")
    formatted = peakproof.format_text(original, name).text
    under_style = _rules(formatted, get_style(name))
    assert not STYLE_RULES & set(under_style), name
    # every other finding of the formatted text is one the original already had (planted ones)
    before = _rules(original)
    for rule in set(under_style):
        assert under_style.count(rule) <= before.count(rule), (name, rule)


def test_ascending_style_flags_a_descending_list_and_keeps_quiet_on_ascending():
    ascending = get_style("ascending-bare-j")
    down = "1H NMR (400 MHz, CDCl3) δ 7.10 (s, 1H), 3.81 (s, 3H), 2.20 (s, 3H)."
    up = "1H NMR (400 MHz, CDCl3) δ 2.20 (s, 3H), 3.81 (s, 3H), 7.10 (s, 1H)."
    found = [d for d in peakproof.check(down, config=Config(style=ascending)).diagnostics
             if d.rule == "shift-order"]
    assert len(found) == 1 and "ascending order" in found[0].message
    assert "shift-order" not in _rules(up, ascending)
    assert "shift-order" in _rules(up)  # the default convention is high to low


def test_missing_hz_still_found_without_a_unitless_style():
    text = "1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1, 2H), 1.25 (t, J = 7.1 Hz, 3H)."
    assert "missing-hz" in _rules(text)
    assert "missing-hz" in _rules(text, get_style("letters-first"))
    assert "missing-hz" not in _rules(text, get_style("subscript-delta"))


def test_style_setting_in_pyproject_and_on_the_command_line(tmp_path, capsys):
    assert config_from_table({"style": "ascending-bare-j"}).style is get_style("ascending-bare-j")
    user = config_from_table({"style": {"extends": "count-first", "shift_order": "as-written"}}).style
    assert user.shift_order == "as-written"
    with pytest.raises(ConfigError, match="unknown style"):
        config_from_table({"style": "no-such-style"})
    path = tmp_path / "si.txt"
    path.write_text("1H NMR (400 MHz, CDCl3) δ 2.20 (s, 3H), 7.10 (s, 1H).\n", "utf-8")
    main(["check", str(path), "--select", "shift-order"])
    assert "shift-order" in capsys.readouterr().out
    assert main(["check", str(path), "--select", "shift-order", "--style", "ascending-bare-j"]) == 0
    assert "shift-order" not in capsys.readouterr().out
    assert main(["check", str(path), "--style", "nonesuch"]) == 2
