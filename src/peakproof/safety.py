"""The one module every write passes through: re-read, compare, re-format, then write atomically.

Before any byte is written the new text is parsed again and its data compared with the
input's; then it is formatted a second time, which must change nothing.  The comparison is
on what chemists wrote — numbers with their decimals, letters, counts, assignments, notes,
header conditions, mass-spec and analysis values — and :data:`ALLOWED_CHANGES` lists the only
differences a style may make.  Any other difference raises :class:`UnsafeFormat` with a diff,
and nothing is written.
"""

from __future__ import annotations

import difflib
import os
import pprint
import tempfile
from dataclasses import dataclass

from .emit import _RANGE, Change, Plan, plan_edits
from .model import Document, Signal, Spectrum
from .styles.base import Style

#: What a style may change without changing the data, and how the comparison forgets it.
ALLOWED_CHANGES: dict[str, str] = {
    "spelling": "the glyphs and words of δ, '=', Hz, ppm, dashes, minus signs, separators and "
    "multiplicity letters (p/quint, h/sext, hept/sept, bs/br s): compared after normalising",
    "order of details": "the order of multiplicity, J, integration and assignment inside ( )",
    "signal order": "the order of the signals of a list (compared as a sorted list)",
    "range direction": "7.36–7.28 versus 7.28–7.36 (ranges compared low to high)",
    "decimal commas": "7,26 becomes 7.26 (numbers compared as value and decimals)",
    "header form": "1H NMR (…) δ versus δH (…); header conditions compared by value",
    "item separators": "'; ' or '. ' between the items of a block",
    "rounding": "only with --round: shifts and J rounded to the style's decimals, never padded",
}



class UnsafeFormat(Exception):
    """The formatter's output does not read back as the input's data (a bug of ours)."""

    def __init__(self, message: str, diff: str):
        super().__init__(message)
        self.message = message
        self.diff = diff


@dataclass(frozen=True)
class Result:
    """A checked formatting of one text."""

    text: str
    plan: Plan
    fixes: tuple[str, ...] = ()

    @property
    def changed(self) -> bool:
        return bool(self.plan.edits)

    @property
    def changes(self) -> tuple[Change, ...]:
        return self.plan.changes


# ---- what "the same data" means ----------------------------------------------------------
def written_number(text: str, decimals: int | None = None) -> tuple[float, int]:
    """A written number as (value, decimals shown); rounded to ``decimals`` when given."""
    clean = text.strip().replace(",", ".").replace("\u2212", "-")
    places = len(clean) - clean.index(".") - 1 if "." in clean else 0
    value = float(clean)
    if decimals is not None and places > decimals:
        return round(value, decimals), decimals
    return value, places


def fingerprint(doc: Document, style: type[Style] | None = None, rounding: bool = False):
    """The document's data with the allowed changes forgotten; equal fingerprints = same data."""
    return tuple(_block_print(b, style if rounding else None) for b in doc.blocks)


def _block_print(block, style):
    return (
        block.compound,
        tuple(_spectrum_print(s, style) for s in block.spectra),
        tuple(m.data() for m in block.mass_spec),
        tuple(a.data() for a in block.analyses),
        tuple(o.data() for o in block.others),
    )


def _spectrum_print(s: Spectrum, style):
    decimals = style.shift_decimals(s.nucleus) if style else None
    j_decimals = style.j_decimals if style else None
    sizes: dict[int, int] = {}
    for sig in s.signals:
        if sig.group:
            sizes[sig.group] = sizes.get(sig.group, 0) + 1
    signals = sorted(
        (_signal_print(sig, decimals, j_decimals, sizes.get(sig.group, 1)) for sig in s.signals),
        key=repr,
    )
    return (
        s.nucleus, s.decoupled, s.frequency_mhz, s.solvent, s.solvent_normalized, s.temperature_k,
        s.reference, tuple(" ".join(c.split()) for c in s.conditions), tuple(signals),
    )  # fmt: skip


def _signal_print(sig: Signal, decimals, j_decimals, group_size: int):
    if sig.range is not None:
        m = _RANGE.match(sig.shift_text)
        bounds = [written_number(m.group(1), decimals), written_number(m.group(2), decimals)]
        shift = tuple(sorted(bounds))
    else:
        shift = (written_number(sig.shift_text, decimals),)
    couplings = tuple(
        (written_number(c.text or repr(c.value), j_decimals), c.nuclei, c.bonds, c.label)
        for c in sig.couplings
    )
    return (
        shift,
        sig.multiplicity.data() if sig.multiplicity else None,
        couplings,
        sig.count,
        sig.count_nucleus,
        sig.assignment,
        sig.notes,
        group_size,
    )


def data_diff(before, after) -> str:
    a = pprint.pformat(before, width=100).splitlines()
    b = pprint.pformat(after, width=100).splitlines()
    return "\n".join(difflib.unified_diff(a, b, "input data", "output data", lineterm=""))


# ---- checked formatting ------------------------------------------------------------------
def checked_format(
    text: str, style: type[Style], *, round_numbers: bool = False, path: str | None = None,
    doc: Document | None = None,
) -> Result:  # fmt: skip
    """Format ``text`` in ``style``, proving the result safe; raises :class:`UnsafeFormat`."""
    from .parsing import parse

    doc = doc if doc is not None else parse(text, path=path)
    plan = plan_edits(doc, style, round_numbers=round_numbers)
    new_text = plan.apply(text)
    if not plan.edits:
        return Result(new_text, plan)
    try:
        _prove(doc, text, plan, style, round_numbers, path)
    except UnsafeFormat as failure:
        # One odd block must not cost the whole document: keep the blocks whose rewrite is
        # proven on its own, leave the others as written (and say so), then prove the whole again.
        plan, left = _salvage(doc, text, plan, style, round_numbers, path, failure)
        new_text = plan.apply(text)
        _prove(doc, text, plan, style, round_numbers, path, untouched=left)
    return Result(new_text, plan)


def _prove(doc, text, plan, style, round_numbers, path, untouched=()) -> None:
    """Raise :class:`UnsafeFormat` unless ``plan`` keeps the data and a second pass is a no-op.

    ``untouched``: original spans deliberately left as written; a second pass may still want to
    rewrite those, which is not a failure of the first."""
    from .parsing import parse

    new_text = plan.apply(text)
    if not plan.edits:
        return
    verify(doc, new_text, style, round_numbers=round_numbers)
    again = plan_edits(parse(new_text, path=path), style, round_numbers=round_numbers)
    if untouched:
        moved = [_moved(span, plan.edits) for span in untouched]
        edits = tuple(e for e in again.edits if not any(a <= e[0] and e[1] <= b for a, b in moved))
        again = type(again)(edits, again.changes)
    if again.edits:
        second = again.apply(new_text)
        diff = "\n".join(difflib.unified_diff(
            new_text.splitlines(), second.splitlines(), "first pass", "second pass", lineterm=""))  # fmt: skip
        raise UnsafeFormat("formatting the output again changes it (not idempotent)", diff)


def _moved(span, edits) -> tuple[int, int]:
    """Where an untouched span of the original sits after ``edits`` (which do not overlap it)."""
    shift_start = sum(len(new) - (end - start) for start, end, new in edits if end <= span.start)
    return span.start + shift_start, span.end + shift_start


def _salvage(doc, text, plan, style, round_numbers, path, failure: UnsafeFormat):
    """The plan restricted to blocks whose edits are proven safe one block at a time."""
    from .emit import Change, Plan

    kept_edits: list[tuple[int, int, str]] = []
    notes: list[Change] = []
    for block in doc.blocks:
        own = tuple(e for e in plan.edits if block.span.start <= e[0] and e[1] <= block.span.end)
        if not own:
            continue
        others = tuple(b.span for b in doc.blocks if b is not block)
        try:
            _prove(doc, text, Plan(own, ()), style, round_numbers, path, untouched=others)
        except UnsafeFormat:
            label = f"compound {block.compound}" if block.compound else f"block {block.index + 1}"
            notes.append(Change("kept", f"left {label} as written: its rewrite did not read back as "
                                        "the same data (please report it)", block.span))  # fmt: skip
            continue
        kept_edits.extend(own)
    if not notes or not kept_edits:  # no single block to blame, or every block: a real fault
        raise failure
    inside = [c for c in plan.changes if any(k[0] <= c.span.start < k[1] for k in kept_edits)]
    return Plan(tuple(kept_edits), tuple(inside) + tuple(notes)), tuple(n.span for n in notes)


def verify(before: Document, new_text: str, style: type[Style], *, round_numbers: bool = False):
    """Raise :class:`UnsafeFormat` unless ``new_text`` reads back as ``before``'s data."""
    from .parsing import parse

    after = parse(new_text)
    new_errors = _errors(after) - _errors(before)
    if new_errors:
        raise UnsafeFormat("the output has reading errors the input did not have",
                           "\n".join(sorted(new_errors)))  # fmt: skip
    a = fingerprint(before, style, rounding=round_numbers)
    b = fingerprint(after, style, rounding=round_numbers)
    if a != b:
        raise UnsafeFormat("the output does not read back as the same data", data_diff(a, b))


def _errors(doc: Document) -> set[str]:
    return {f"{d.rule}: {d.message}" for d in doc.diagnostics if d.severity == "error"}


# ---- checker fixes -----------------------------------------------------------------------
def apply_fixes(text: str, diagnostics) -> tuple[str, list[str]]:
    """Apply the machine-readable suggestions of ``diagnostics``; overlapping ones are skipped.

    A suggestion is ``{"description": str, "replace": [{"start", "end", "text"}, …]}`` in
    document offsets (or the model's ``{"span": Span, "replacement": str}``).
    """
    chosen: list[tuple[int, int, str]] = []
    applied: list[str] = []
    taken: list[tuple[int, int]] = []
    for d in sorted(diagnostics, key=lambda d: d.span.start):
        s = d.suggestion
        if not s:
            continue
        if "replace" in s:
            edits = [(int(r["start"]), int(r["end"]), str(r["text"])) for r in s["replace"]]
        elif "span" in s and "replacement" in s:
            span = s["span"]
            start, end = (span.start, span.end) if hasattr(span, "start") else (span["start"], span["end"])
            edits = [(start, end, str(s["replacement"]))]
        else:
            continue
        if any(a < e2 and s2 < b or a == b == s2 for a, b, _ in edits for s2, e2 in taken):
            applied.append(f"line {d.span.line}: skipped {d.rule} (overlaps an earlier fix)")
            continue
        chosen.extend(edits)
        taken.extend((a, b) for a, b, _ in edits)
        what = s.get("description") or d.message
        applied.append(f"line {d.span.line}: {d.rule}: {what}")
    from .emit import apply_edits

    return apply_edits(text, chosen), applied


# ---- writing -----------------------------------------------------------------------------
class ReadOnlyFile(OSError):
    """The file to rewrite has no write bit in its mode; it is left alone.

    Checked on the mode bits themselves, so the refusal holds for root too (whom the
    permission bits would not stop).
    """


def write_atomically(path: str | os.PathLike, data: bytes) -> None:
    """Write ``data`` to ``path`` so that a crash leaves the old or the new bytes, never a mix.

    The file is respected as it stands:

    - a **symlink** is written through: the link stays a link and its target gets the new
      bytes (the temporary file is made beside the target, so the final rename stays on one
      file system);
    - a file with no write bit (for example mode 0444) is refused with :class:`ReadOnlyFile`
      before anything is written;
    - **mode and owner** are kept (the owner as far as the caller may set it);
    - a file with **hard links** (link count above 1) keeps its inode, so every name still
      shows the new bytes: the new bytes are first written to a temporary file beside it and
      fsynced, then copied over the original in place and fsynced, then the temporary file is
      removed. The tradeoff: a crash during the in-place copy can leave the original part
      written, but the complete new bytes are then still in the ``.peakproof-*.tmp`` file
      beside it, from which the file can be restored; a rename would instead break the links.
    - a file of link count 1 is replaced by rename (atomic).

    A path that does not exist yet is created (mode from the umask, as ``open`` would).
    """
    real = os.path.realpath(os.fspath(path))
    before = _writable_stat(real)
    folder = os.path.dirname(real)
    fd, tmp = tempfile.mkstemp(prefix=".peakproof-", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        _install(tmp, real, before)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def _writable_stat(real: str):
    """``os.stat`` of the file to be rewritten (None when it does not exist); refuse read-only."""
    try:
        st = os.stat(real)
    except FileNotFoundError:
        return None
    if not st.st_mode & 0o222:
        raise ReadOnlyFile(f"{real} is read-only (mode {st.st_mode & 0o7777:04o}); "
                           "nothing was written; make it writable (chmod u+w) to format it")  # fmt: skip
    return st


def _install(tmp: str, real: str, before) -> None:
    """Put the complete, fsynced ``tmp`` in the place of ``real`` (see :func:`write_atomically`)."""
    if before is not None and before.st_nlink > 1:
        with open(tmp, "rb") as src, open(real, "r+b") as dst:
            while chunk := src.read(1 << 20):
                dst.write(chunk)
            dst.truncate()
            dst.flush()
            os.fsync(dst.fileno())
        os.unlink(tmp)
        return
    if before is not None:
        os.chmod(tmp, before.st_mode & 0o7777)
        try:
            os.chown(tmp, before.st_uid, before.st_gid)
        except PermissionError:  # not ours to give away: the caller's owner stays
            pass
    os.replace(tmp, real)
    _fsync_folder(os.path.dirname(real))


def _fsync_folder(folder: str) -> None:
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def write_docx(path: str | os.PathLike, edits, expected_text: str) -> None:
    """Rewrite only the runs the edits cover; the result is read back before it replaces ``path``.

    The file is put in place as :func:`write_atomically` says (symlinks written through, hard
    links, mode and owner kept, read-only files refused).
    """
    from .readers import read_document, write_docx_runs

    real = os.path.realpath(os.fspath(path))
    before = _writable_stat(real)
    folder = os.path.dirname(real)
    fd, tmp = tempfile.mkstemp(prefix=".peakproof-", suffix=".docx", dir=folder)
    os.close(fd)
    try:
        write_docx_runs(real, tmp, edits)
        if read_document(tmp, fmt="docx").text != expected_text:
            raise UnsafeFormat("the rewritten Word file does not read back as the new text", "")
        with open(tmp, "rb+") as handle:
            os.fsync(handle.fileno())
        _install(tmp, real, before)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


# ---- Markdown and LaTeX sources ------------------------------------------------------------
def verify_markup(
    fmt: str, text: str, data: bytes, placement, style: type[Style], *,
    round_numbers: bool = False, name: str = "", same_data_as: str | None = None,
) -> None:  # fmt: skip
    """Raise :class:`UnsafeFormat` unless the rewritten .md/.tex ``data`` is exactly what was meant.

    ``text`` is the reader's text of the file before; ``placement`` (from
    :func:`peakproof.markup.place_edits`) says which plain edits were placed and which kept.
    The new file is read back with the same reader and must give the plain text with the
    placed edits applied; its data must equal that text's data, and ``same_data_as``'s (the
    text before, or after --fix the fixed text) under the allowed changes; a second format
    pass may change only what was left as written.
    """
    from .emit import apply_edits
    from .parsing import parse
    from .readers import read_document

    expected = apply_edits(text, placement.accepted)
    read_back = read_document(data, fmt=fmt, name=name).text
    if read_back != expected:
        raise UnsafeFormat("the rewritten file does not read back as the formatted text",
                           _text_diff(expected, read_back, "intended", "read back"))  # fmt: skip
    after = parse(read_back)
    intended = parse(expected)
    if after.data() != intended.data():
        raise UnsafeFormat("the rewritten file's data differ from the formatted data",
                           data_diff(intended.data(), after.data()))  # fmt: skip
    if same_data_as is not None:
        verify(parse(same_data_as), read_back, style, round_numbers=round_numbers)
    again = plan_edits(after, style, round_numbers=round_numbers)
    kept_ranges = [_moved_range(a, b, placement.accepted) for (a, b, _), _ in placement.kept]
    stray = [(a, b, new) for a, b, new in again.edits
             if not any(a < ke and b > ks or a == b == ks for ks, ke in kept_ranges)]  # fmt: skip
    if stray:
        raise UnsafeFormat("formatting the rewritten file again changes it (not idempotent)",
                           _text_diff(read_back, apply_edits(read_back, stray),
                                      "first pass", "second pass"))  # fmt: skip


def _moved_range(start: int, end: int, edits) -> tuple[int, int]:
    """``[start, end)`` of the text before ``edits`` (none inside it), in the text after them."""
    shift = sum(len(new) - (b - a) for a, b, new in edits if b <= start)
    return start + shift, end + shift


def _text_diff(a: str, b: str, name_a: str, name_b: str) -> str:
    return "\n".join(difflib.unified_diff(a.splitlines(), b.splitlines(), name_a, name_b,
                                          lineterm=""))  # fmt: skip
