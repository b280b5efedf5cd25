"""Formatting touches only data items: every other byte stays; damaged text comes out clean."""

from __future__ import annotations

import peakproof
from peakproof.emit import plan_edits
from peakproof.safety import checked_format
from peakproof.styles import BUILTIN

DOCUMENT = """\
# Supporting information — Halvorsen group, Institute of Applied Synthesis, Tarnwick

General. Reactions were run under N2; the ratio 4:1 (v/v) hexane/EtOAc was used throughout.
The formula C10H12O2 was assumed for 3a; note that 7.26 ppm is the residual CHCl3 signal.

Methyl ester 3a. Colourless oil (412 mg, 81%). Rf 0.42 (hexane/EtOAc 4:1); IR (neat) 1735, 1602 cm−1; 1H NMR (400 MHz, CDCl3) δ 3.80 (s, 3H, OCH3), 7.31 (d, J=8.4Hz, 2H), 6.90 (d, J = 8.4 Hz, 2H); 13C{1H} NMR (101 MHz, CDCl3) δ 55.3, 167.0, 130.1; HRMS (ESI) m/z [M + Na]+ calcd for C12H14O3Na 229.0835, found 229.0838.

Then the solution was stirred for 2 h at 25 °C and (E)-configured product 3b (x = 2) formed.
"""


def _outside(text: str, edits) -> list[str]:
    pieces, pos = [], 0
    for start, end, _ in sorted(edits):
        pieces.append(text[pos:start])
        pos = end
    pieces.append(text[pos:])
    return pieces


def test_bytes_outside_rewritten_spans_are_identical_in_every_style():
    doc = peakproof.parse(DOCUMENT)
    for style in BUILTIN.values():
        plan = plan_edits(doc, style)
        assert plan.edits, style.name
        result = checked_format(DOCUMENT, style)
        new = result.text
        # Walk the output: each untouched piece of the input must appear byte for byte, in
        # order, with exactly the emitted text between them.
        pos = 0
        for piece, edit in zip(_outside(DOCUMENT, plan.edits), list(plan.edits) + [None]):
            assert new.encode()[len(new[:pos].encode()):].startswith(piece.encode())
            pos += len(piece)
            if edit is not None:
                assert new[pos : pos + len(edit[2])] == edit[2]
                pos += len(edit[2])
        assert pos == len(new)
        # The prose and non-NMR items are among the untouched bytes.
        for kept in ("Rf 0.42 (hexane/EtOAc 4:1); IR (neat) 1735, 1602 cm−1;",
                     "General. Reactions were run", "(E)-configured product 3b (x = 2)"):
            assert kept in new


def test_only_item_spans_are_edited():
    doc = peakproof.parse(DOCUMENT)
    items = [i for b in doc.blocks for i in b.items]
    for start, end, _ in plan_edits(doc, BUILTIN["count-first"]).edits:
        inside = any(i.span.start <= start and end <= i.span.end + 4 for i in items)
        between = any(a.span.end <= start and end <= b.span.start for a, b in zip(items, items[1:]))
        assert inside or between, DOCUMENT[start:end]


DAMAGED = "1H NMR (400 MHz, CDCl3) d 7.31 (d, J ¼ 8.4 Hz, 2H), 3.80 (s, 3H); HRMS (ESI) m/z [M+H]+ calcd for C12H15O3 207.1016, found 207.1019."


def test_damaged_pdf_text_is_rewritten_clean_and_the_repairs_are_listed():
    result = checked_format(DAMAGED, BUILTIN["letters-first"])
    assert result.text.startswith("1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H)")
    assert "¼" not in result.text and " d 7.31" not in result.text
    repaired = [c.message for c in result.changes if c.kind == "repaired"]
    assert any("¼" in m for m in repaired) and any("'d'" in m for m in repaired), repaired


def test_rounding_is_opt_in_and_reported():
    text = "1H NMR (400 MHz, CDCl3) δ 7.264 (d, J = 8.43 Hz, 2H)."
    plain = checked_format(text, BUILTIN["letters-first"])
    assert "7.264" in plain.text and "8.43" in plain.text
    rounded = checked_format(text, BUILTIN["letters-first"], round_numbers=True)
    assert "7.26 (d, J = 8.4 Hz, 2H)" in rounded.text
    assert sorted(c.message for c in rounded.changes if c.kind == "rounded") == [
        "7.264 → 7.26", "8.43 → 8.4"]


def test_unreadable_signal_keeps_its_item_as_written():
    text = "1H NMR (400 MHz, CDCl3) δ 7.31 (d, J = 8.4 Hz, 2H), 3.80 (s, 3H, ((; 13C NMR (101 MHz, CDCl3) δ 55.3, 167.0."
    result = checked_format(text, BUILTIN["letters-first"])
    assert ", 3.80 (s, 3H, ((; " in result.text  # the unreadable part is never dropped
    assert result.text.endswith("δ 167.0, 55.3.")  # the readable items are still formatted
