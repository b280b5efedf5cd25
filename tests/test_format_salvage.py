"""One block whose rewrite cannot be proven is left as written; the others are still formatted."""

import peakproof
import peakproof.safety as safety
from peakproof.cli import main
from peakproof.emit import Plan

TEXT = (
    "1H NMR (400 MHz, CDCl3) δ 3.80 (s, 3H), 7.26 (d, J = 8.4 Hz, 2H).\n\n"
    "1H NMR (400 MHz, CDCl3) δ 1.25 (t, J = 7.1 Hz, 3H), 4.12 (q, J = 7.1 Hz, 2H).\n"
)


def _corrupt_first_block(monkeypatch):
    """Make the emitter's rewrite of the first block change a number (as a bug would)."""
    real = safety.plan_edits

    def plan_with_a_bug(doc, style, **kwargs):
        plan = real(doc, style, **kwargs)
        first = doc.blocks[0].span
        edits = tuple((s, e, new.replace("3.80", "3.81")) if first.start <= s < first.end else (s, e, new)
                      for s, e, new in plan.edits)
        return Plan(edits, plan.changes)

    monkeypatch.setattr(safety, "plan_edits", plan_with_a_bug)


def test_bad_block_is_kept_and_good_block_formatted(monkeypatch):
    """The second block is rewritten, the first left byte for byte, and a 'kept' change says why."""
    _corrupt_first_block(monkeypatch)
    result = peakproof.format_text(TEXT, "letters-first")
    first, second = TEXT.split("\n\n")
    assert result.text.startswith(first + "\n\n")  # untouched, bytes and all
    assert "4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H)" in result.text  # descending now
    kept = [c for c in result.changes if c.kind == "kept"]
    assert 1 == len(kept) and "block 1" in kept[0].message


def test_cli_writes_the_safe_part(monkeypatch, tmp_path, capsys):
    """In place: the file gets the safe rewrite, the kept block is listed, exit code 0."""
    _corrupt_first_block(monkeypatch)
    path = tmp_path / "si.txt"
    path.write_text(TEXT, encoding="utf-8")
    assert 0 == main(["format", str(path), "--style", "letters-first"])
    written = path.read_text(encoding="utf-8")
    assert "3.80 (s, 3H), 7.26" in written and "4.12 (q" in written.split("\n\n")[1][:40]
    assert "left block 1 as written" in capsys.readouterr().err
