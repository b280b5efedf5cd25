"""Styles: documented base, small override tables, user styles from TOML."""

import ast
import inspect

import pytest

from peakproof import styles
from peakproof.styles import BUILTIN, StyleError, find_project_style, load_style_file
from peakproof.styles.base import SETTING_NAMES, Style


def test_every_base_constant_has_an_attribute_docstring():
    tree = ast.parse(inspect.getsource(Style))
    body = tree.body[0].body
    documented = set()
    for node, following in zip(body, body[1:]):
        if isinstance(node, (ast.AnnAssign, ast.Assign)) and isinstance(following, ast.Expr):
            if isinstance(following.value, ast.Constant) and isinstance(following.value.value, str):
                target = node.target if isinstance(node, ast.AnnAssign) else node.targets[0]
                documented.add(target.id)
    assert set(SETTING_NAMES) <= documented, set(SETTING_NAMES) - documented


def test_at_least_five_builtin_styles_with_distinct_settings():
    assert len(BUILTIN) >= 5
    settings = [repr(sorted((k, repr(v)) for k, v in s.settings().items() if k not in
                            ("name", "description"))) for s in BUILTIN.values()]  # fmt: skip
    assert len(set(settings)) == len(settings)


def test_builtin_styles_override_only_a_few_settings():
    for style in BUILTIN.values():
        overridden = [k for k in vars(style) if k in SETTING_NAMES and k not in ("name", "description")]
        assert 0 < len(overridden) <= 10, (style.name, overridden)


def test_user_style_extends_and_merges_tables(tmp_path):
    path = tmp_path / "journal.toml"
    path.write_text('extends = "count-first"\nname = "our-journal"\nrange_dash = "-"\n'
                    '[lexicon]\nquint = "quint"\n', encoding="utf-8")  # fmt: skip
    style = load_style_file(path)
    assert style.name == "our-journal"
    assert style.range_dash == "-"
    assert style.lexicon["quint"] == "quint" and style.lexicon["sext"] == "h"  # kept from parent
    assert style.detail_fields[0] == "count"


@pytest.mark.parametrize("body, words", [
    ('range_dash = "-"\n', "extends"),
    ('extends = "nope"\n', "not a built-in"),
    ('extends = "count-first"\nrange_dahs = "-"\n', "unknown style setting"),
    ('extends = "count-first"\nshift_order = "sideways"\n', "choose one of"),
    ('extends = "count-first"\n[lexicon]\nzz = "z"\n', "unknown keys"),
    ('extends = "count-first"\nion_spaces = "yes"\n', "must be a bool"),
    ('extends = = \n', "not valid TOML"),
])  # fmt: skip
def test_bad_user_styles_say_what_is_wrong(tmp_path, body, words):
    path = tmp_path / "bad.toml"
    path.write_text(body, encoding="utf-8")
    with pytest.raises(StyleError, match=words):
        load_style_file(path)


def test_project_style_from_pyproject(tmp_path):
    (tmp_path / "pyproject.toml").write_text(
        '[tool.peakproof.style]\nextends = "equation-delta"\nname = "lab"\ntrailing_unit = ""\n',
        encoding="utf-8")  # fmt: skip
    (tmp_path / "sub").mkdir()
    style = find_project_style(tmp_path / "sub")
    assert style.name == "lab" and style.trailing_unit == "" and style.delta == "δ ="


def test_unknown_style_name_lists_the_choices():
    with pytest.raises(StyleError, match="letters-first"):
        styles.get_style("nope")
