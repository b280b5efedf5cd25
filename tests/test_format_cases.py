"""Case files (tests/cases/format/*.case): flags, input, '# output', expected output.

Each expected output was written out once and checked by eye against the conventions in
the trade guide's "Output conventions"; the test also formats the output again (no change).
"""

from __future__ import annotations

import shlex
from pathlib import Path

import pytest

from peakproof.safety import checked_format
from peakproof.styles import get_style, load_style_file

CASES = Path(__file__).parent / "cases" / "format"


def read_case(path: Path):
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    assert lines[0].startswith("# flags:"), path
    flags = shlex.split(lines[0][len("# flags:") :])
    split = lines.index("# output\n")
    return flags, "".join(lines[1:split]), "".join(lines[split + 1 :])


def style_for(flags):
    if flags[0] == "--style":
        return get_style(flags[1])
    assert flags[0] == "--style-file"
    return load_style_file(CASES / flags[1])


@pytest.mark.parametrize("path", sorted(CASES.glob("*.case")), ids=lambda p: p.stem)
def test_case(path):
    flags, source, expected = read_case(path)
    style = style_for(flags)
    result = checked_format(source, style)
    assert result.text == expected
    assert checked_format(expected, style).text == expected


def test_every_builtin_style_and_a_user_style_have_a_case():
    from peakproof.styles import BUILTIN

    covered = {" ".join(read_case(p)[0]) for p in CASES.glob("*.case")}
    for name in BUILTIN:
        assert f"--style {name}" in covered
    assert any(c.startswith("--style-file") for c in covered)
