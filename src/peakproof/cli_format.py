"""``peakproof format``, ``peakproof export`` and ``peakproof styles``.

Exit codes of ``format``: 0 done (or nothing to change); 1 ``--check`` found files that would
change; 2 a usage problem or an unreadable file; 3 a rewrite could not be proven — the output did
not read back as the input's data, so nothing was written for that file; 4 an internal error
(a bug, reported without a traceback); 5 a read-only file, left alone.
"""

from __future__ import annotations

import difflib
import sys

from .cli import EXIT_INTERNAL, EXIT_OK, EXIT_READ_ONLY, EXIT_UNPROVEN, EXIT_USAGE

EXIT_WOULD_CHANGE = 1


def add_arguments(name, parser) -> None:
    if name == "styles":
        parser.add_argument("--style-file", metavar="FILE.toml", help="also show this user style")
        parser.epilog = "User styles: [tool.peakproof.style] in pyproject.toml, or --style-file."
        return
    parser.add_argument("files", nargs="+", metavar="FILE",
                        help="a .txt/.md/.tex/.docx/.pdf file, or - for stdin")  # fmt: skip
    parser.add_argument("--input-format", choices=("txt", "md", "tex", "docx", "pdf"), default=None,
                        help="read the files as this format, whatever their extension")  # fmt: skip
    if name == "export":
        parser.add_argument("--to", "--format", dest="to", choices=("json", "jsonl", "csv"), default="json",
                            help="json: the parse shape; jsonl/csv: one record per line")  # fmt: skip
        parser.add_argument("--per", choices=("signal", "spectrum"), default="signal",
                            help="one record per NMR signal (default) or per spectrum")  # fmt: skip
        parser.add_argument("-o", "--output", metavar="FILE", help="write here instead of stdout")
        parser.add_argument("--jobs", "-j", type=int, default=1, metavar="N",
                            help="read files in N parallel processes (0: one per core)")
        parser.add_argument("--no-recursive", dest="recursive", action="store_false",
                            help="do not look inside sub-folders of a folder argument")
        parser.add_argument("--no-progress", dest="progress", action="store_false",
                            help="never draw the progress bar (drawn only on a terminal)")
        return
    parser.add_argument("--style", metavar="NAME",
                        help="output style (see 'peakproof styles'); default: the project's "
                        "[tool.peakproof.style], else letters-first")  # fmt: skip
    parser.add_argument("--style-file", metavar="FILE.toml",
                        help="a user style: extends = \"<built-in>\" plus overrides")  # fmt: skip
    parser.add_argument("--check", action="store_true",
                        help="write nothing; exit 1 if any file would change")  # fmt: skip
    parser.add_argument("--diff", action="store_true",
                        help="write nothing; print a unified diff of the changes")  # fmt: skip
    parser.add_argument("--fix", action="store_true",
                        help="also apply the checker's suggested fixes, listing each one")  # fmt: skip
    parser.add_argument("--round", action="store_true",
                        help="round shifts and J to the style's decimals (reported; never pads)")  # fmt: skip
    parser.add_argument("-q", "--quiet", action="store_true", help="do not list the changes")
    parser.epilog = ("exit codes: 0 ok, 1 --check found changes, 2 usage or unreadable file, "
                     "3 rewrite not proven (nothing written), 4 internal error, 5 read-only file")  # fmt: skip


def run(args) -> int:
    if args.command == "styles":
        return _run_styles(args)
    if args.command == "export":
        return _run_export(args)
    return _run_format(args)


# ---- styles ------------------------------------------------------------------------------
_SAMPLE = ("1H NMR (400 MHz, CDCl3) δ 1.25 (t, J = 7.1 Hz, 3H), 4.12 (q, J = 7.1 Hz, 2H, OCH2), "
           "7.36–7.28 (m, 5H)")  # fmt: skip


def _run_styles(args) -> int:
    from . import parse
    from .emit import Emitter
    from .styles import BUILTIN, StyleError, find_project_style, load_style_file

    styles = dict(BUILTIN)
    try:
        project = find_project_style()
        if project is not None:
            styles[project.name] = project
        if args.style_file:
            user = load_style_file(args.style_file)
            styles[user.name] = user
    except StyleError as exc:
        print(f"peakproof: {exc}", file=sys.stderr)
        return EXIT_USAGE
    doc = parse(_SAMPLE)
    spectrum = doc.blocks[0].spectra[0] if doc.blocks and doc.blocks[0].spectra else None
    for name, style in styles.items():
        print(f"{name}: {style.description}")
        if spectrum is not None:
            print(f"    {Emitter(style, _SAMPLE).emit(spectrum)}")
    return EXIT_OK


# ---- export ------------------------------------------------------------------------------
def _run_export(args) -> int:
    from .api import InputError, parse_path
    from .batch import names_several
    from .export import export
    from .safety import ReadOnlyFile, write_atomically

    batch = args.jobs != 1 or names_several(args.files)
    if batch and args.to == "jsonl":
        return _stream_export(args)
    if batch:  # json and csv gather everything: expand folders and globs, then go on
        from .batch import expand_inputs

        files, problems = expand_inputs(args.files, recursive=args.recursive)
        for problem in problems:
            print(f"peakproof: {problem.to_json().get('error', problem)}", file=sys.stderr)
        args.files = files
    docs, status = [], EXIT_OK
    for path in args.files:
        try:
            docs.append(parse_path(path, fmt=args.input_format)[1])
        except InputError as exc:
            print(f"peakproof: {exc}", file=sys.stderr)
            status = EXIT_USAGE
    if not docs:
        return status
    text = export(docs, args.to, args.per)
    if args.output:
        try:
            write_atomically(args.output, text.encode("utf-8"))
        except ReadOnlyFile as exc:
            print(f"peakproof: {exc}", file=sys.stderr)
            return EXIT_READ_ONLY
    else:
        sys.stdout.write(text)
    return status


def _stream_export(args) -> int:
    """One JSON line per record, file by file, in parallel: constant memory on large corpora."""
    import json
    from functools import partial

    from .batch import export_worker, run_files

    out = open(args.output, "w", encoding="utf-8") if args.output else sys.stdout

    def emit(record):
        if "error" in record:
            print(f"peakproof: {record['error']}", file=sys.stderr)
            return
        for row in record.get("records", ()):
            out.write(json.dumps({"file": record["file"], **row}, ensure_ascii=False) + "\n")
        out.flush()

    try:
        summary = run_files(args.files, partial(export_worker, per=args.per), jobs=args.jobs,
                            recursive=args.recursive, progress=args.progress, on_record=emit)
    finally:
        if out is not sys.stdout:
            out.close()
    return EXIT_USAGE if summary.unreadable_count else EXIT_OK


# ---- format ------------------------------------------------------------------------------
def _resolve_style(args):
    from .styles import DEFAULT, find_project_style, get_style, load_style_file

    if args.style_file:
        user = load_style_file(args.style_file)
        if args.style and args.style != user.name:
            return get_style(args.style, {user.name: user})
        return user
    project = find_project_style()
    users = {project.name: project} if project is not None else {}
    if args.style:
        return get_style(args.style, users)
    return project or get_style(DEFAULT)


def _run_format(args) -> int:
    from .styles import StyleError

    try:
        style = _resolve_style(args)
    except StyleError as exc:
        print(f"peakproof: {exc}", file=sys.stderr)
        return EXIT_USAGE
    check = None
    if args.fix:
        try:
            from .checker import check
        except ImportError:
            print("peakproof: --fix needs the checker (peakproof.checker), which this "
                  "installation does not have; run without --fix", file=sys.stderr)  # fmt: skip
            return EXIT_USAGE
    status = EXIT_OK
    counts = {"changed": 0, "unchanged": 0, "failed": 0}
    for path in args.files:
        code = _format_one(path, style, args, check, counts)
        status = max(status, code, key=_rank)
    if not args.quiet and len(args.files) > 1 or counts["failed"]:
        verb = "to restyle" if (args.check or args.diff) else "restyled"
        print(f"peakproof format: {counts['changed']} {verb}, {counts['unchanged']} already in style"
              + (f", {counts['failed']} not proven" if counts["failed"] else ""), file=sys.stderr)  # fmt: skip
    return status


def _internal_error(name: str, exc, counts) -> int:
    """Say that a rewrite could not be proven safe; nothing is written."""
    counts["failed"] += 1
    print(f"peakproof: {name}: rewrite not proven: {exc.message}; nothing was written.",
          file=sys.stderr)  # fmt: skip
    if exc.diff:
        print(exc.diff, file=sys.stderr)
    return EXIT_UNPROVEN


def _rank(code: int) -> int:
    return {EXIT_OK: 0, EXIT_WOULD_CHANGE: 1, EXIT_USAGE: 2, EXIT_READ_ONLY: 3, EXIT_UNPROVEN: 4,
            EXIT_INTERNAL: 5}.get(code, 2)  # fmt: skip


def _format_one(path, style, args, check, counts) -> int:
    from . import parse
    from .api import InputError, read_source
    from .safety import ReadOnlyFile, UnsafeFormat, apply_fixes, checked_format, write_atomically

    try:
        source = read_source(path, fmt=args.input_format)
    except InputError as exc:
        print(f"peakproof: {exc}", file=sys.stderr)
        return EXIT_USAGE
    name = source.name if path != "-" else "<stdin>"
    text = source.text
    fixes: list[str] = []
    try:
        work = text
        if check is not None:
            try:
                findings = check(parse(text, path=name))
            except Exception as exc:  # the checker is another module: say so, do not crash
                print(f"peakproof: {name}: --fix: the checker failed ({type(exc).__name__}: "
                      f"{exc}); nothing was written; run without --fix", file=sys.stderr)  # fmt: skip
                return EXIT_USAGE
            work, fixes = apply_fixes(text, findings)
        result = checked_format(work, style, round_numbers=args.round, path=name)
        if fixes:  # the fixes changed the data on purpose: check the fixed text reads cleanly
            from .safety import verify

            verify(parse(work), result.text, style, round_numbers=args.round)
    except UnsafeFormat as exc:
        counts["failed"] += 1
        print(f"peakproof: {name}: rewrite not proven: {exc.message}; nothing was written. "
              "Please report this with the diff below.", file=sys.stderr)  # fmt: skip
        if exc.diff:
            print(exc.diff, file=sys.stderr)
        return EXIT_UNPROVEN
    final = result.text
    if not args.quiet:
        for line in fixes:
            print(f"{name}: fixed: {line}", file=sys.stderr)
        for change in result.changes:
            where = source.locate(change.span.start) if source.format in ("docx", "pdf") else None
            if where is not None:  # Word and PDF: the place as the user sees it
                print(f"{name}:{where.describe()}: {change.kind}: {change.message}", file=sys.stderr)
            else:
                print(change.line(name), file=sys.stderr)
    changed = final != text
    rewritten = None  # a .md/.tex file's new bytes, in its own markup
    if changed and path != "-" and source.format in ("md", "tex"):
        try:
            rewritten = _markup_bytes(path, source, text, result.plan.edits if not fixes
                                      else _line_edits(text, final), style, args, name,
                                      bool(fixes))  # fmt: skip
        except UnsafeFormat as exc:
            return _internal_error(name, exc, counts)
        except (OSError, ValueError) as exc:
            print(f"peakproof: {name}: cannot rewrite the file ({exc}); nothing was written",
                  file=sys.stderr)  # fmt: skip
            return EXIT_USAGE
        changed = rewritten[1] is not None
    counts["changed" if changed else "unchanged"] += 1
    if args.diff and changed:
        before, after = (text, final) if rewritten is None else (
            b.decode("utf-8-sig") for b in rewritten)  # fmt: skip
        sys.stdout.writelines(difflib.unified_diff(
            before.splitlines(keepends=True), after.splitlines(keepends=True),
            f"{name} (original)", f"{name} (formatted)"))  # fmt: skip
    if args.check or args.diff:
        if changed and args.check and not args.quiet:
            print(f"{name}: not in style yet (format would restyle it)", file=sys.stderr)
        return EXIT_WOULD_CHANGE if (changed and args.check) else EXIT_OK
    if path == "-" or source.format == "pdf":
        if source.format == "pdf" and not args.quiet:
            print(f"{name}: PDF files are not rewritten; the formatted text follows", file=sys.stderr)
        sys.stdout.write(final)
        return EXIT_OK
    if not changed:
        if rewritten is not None and not args.quiet:
            print(f"{name}: left as written", file=sys.stderr)
        return EXIT_OK
    if rewritten is not None:
        try:
            write_atomically(path, rewritten[1])
        except ReadOnlyFile as exc:
            print(f"peakproof: {name}: {exc}", file=sys.stderr)
            return EXIT_READ_ONLY
        except OSError as exc:
            print(f"peakproof: {name}: cannot write the file ({exc}); nothing was written",
                  file=sys.stderr)  # fmt: skip
            return EXIT_USAGE
        if not args.quiet:
            print(f"{name}: restyled", file=sys.stderr)
        return EXIT_OK
    edits = result.plan.edits if not fixes else _line_edits(text, final)
    try:
        written = _write(path, source, text, edits, style, args, name, fixed=bool(fixes))
    except UnsafeFormat as exc:
        counts["changed"] -= 1
        return _internal_error(name, exc, counts)
    except ReadOnlyFile as exc:
        counts["changed"] -= 1
        counts["unchanged"] += 1
        print(f"peakproof: {name}: {exc}", file=sys.stderr)
        return EXIT_READ_ONLY
    except (OSError, ValueError) as exc:
        print(f"peakproof: {name}: cannot write the file ({exc}); nothing was written",
              file=sys.stderr)  # fmt: skip
        return EXIT_USAGE
    if not written:
        counts["changed"] -= 1
        counts["unchanged"] += 1
    if not args.quiet:
        print(f"{name}: restyled" if written else f"{name}: left as written", file=sys.stderr)
    return EXIT_OK


def _line_edits(before: str, after: str) -> list[tuple[int, int, str]]:
    """Minimal edits from ``before`` to ``after``: per changed line, common ends trimmed."""
    a, b = before.splitlines(keepends=True), after.splitlines(keepends=True)
    starts = [0]
    for line in a:
        starts.append(starts[-1] + len(line))
    edits = []
    for op, i1, i2, j1, j2 in difflib.SequenceMatcher(None, a, b, autojunk=False).get_opcodes():
        if op == "equal":
            continue
        pairs = zip(range(i1, i2), range(j1, j2)) if (i2 - i1) == (j2 - j1) else [(None, None)]
        for i, j in pairs:
            old = a[i] if i is not None else "".join(a[i1:i2])
            new = b[j] if j is not None else "".join(b[j1:j2])
            offset = starts[i] if i is not None else starts[i1]
            p = 0
            while p < min(len(old), len(new)) and old[p] == new[p]:
                p += 1
            s = 0
            while s < min(len(old), len(new)) - p and old[-1 - s] == new[-1 - s]:
                s += 1
            edits.append((offset + p, offset + len(old) - s, new[p : len(new) - s]))
    return edits


def _write(path, source, text, edits, style, args, name, fixed=False) -> bool:
    """Write the edits into the file in its own format; False when none could be placed."""
    from . import parse
    from .emit import apply_edits
    from .readers import read_document
    from .safety import UnsafeFormat, verify, write_atomically, write_docx

    if source.format == "docx":
        write_docx(path, edits, apply_edits(text, edits))
        return True
    with open(path, "rb") as handle:
        raw = handle.read()
    bom = raw.startswith(b"\xef\xbb\xbf")
    try:
        original = raw[3 if bom else 0 :].decode("utf-8")
    except UnicodeDecodeError:
        raise ValueError("it is not UTF-8; save it as UTF-8 and format it again") from None
    placed, kept = _place_edits(source, original, text, edits)
    for start, _, _ in kept:
        line = text.count("\n", 0, start) + 1
        print(f"{name}:{line}: kept: the block holds markup the formatter cannot rewrite; "
              "left as written", file=sys.stderr)  # fmt: skip
    new_original = apply_edits(original, placed)
    data = (b"\xef\xbb\xbf" if bom else b"") + new_original.encode("utf-8")
    expected = apply_edits(text, [e for e in edits if e not in kept])
    read_back = read_document(data, fmt=source.format, name=name).text
    if read_back != expected:
        diff = "\n".join(difflib.unified_diff(expected.splitlines(), read_back.splitlines(),
                                              "intended", "read back", lineterm=""))  # fmt: skip
        raise UnsafeFormat("the rewritten file does not read back as the formatted text", diff)
    if kept:
        verify(parse(text), read_back, style, round_numbers=args.round)
    write_atomically(path, data)
    return True


def _markup_bytes(path, source, text, edits, style, args, name, fixed):
    """``(the file's bytes, its new bytes or None when no edit could be placed)``."""
    with open(path, "rb") as handle:
        raw = handle.read()
    bom = raw.startswith(b"\xef\xbb\xbf")
    try:
        original = raw[3 if bom else 0 :].decode("utf-8")
    except UnicodeDecodeError:
        raise ValueError("it is not UTF-8; save it as UTF-8 and format it again") from None
    data, _ = _markup_source(source, original, text, edits, style, args, name, fixed)
    return raw, None if data is None else (b"\xef\xbb\xbf" if bom else b"") + data


def _markup_source(source, original, text, edits, style, args, name, fixed):
    """A .md/.tex file's new bytes with the edits rendered in its own markup, proven safe.

    Returns ``(bytes, kept)``, or ``(None, kept)`` when no edit could be placed.  Raises
    :class:`UnsafeFormat` when the new source does not read back as the intended data.
    """
    from .markup import place_edits
    from .safety import UnsafeFormat, verify_markup

    try:
        placement = place_edits(source.format, original, text, edits)
    except ValueError as exc:
        raise UnsafeFormat(f"the edits cannot be placed in the file ({exc})", "") from None
    for (start, _, _), why in placement.kept:
        where = source.locate(start)
        line = where.line if where is not None else text.count("\n", 0, start) + 1
        print(f"{name}:{line}: kept: left as written, {why}", file=sys.stderr)
    if not placement.source_edits:
        return None, placement.kept
    from .emit import apply_edits

    new_source = apply_edits(original, placement.source_edits)
    data = new_source.encode("utf-8")
    if not fixed:
        same_data_as = text
    else:  # the fixes changed the data on purpose; they were checked on the plain text
        same_data_as = None if placement.kept else apply_edits(text, edits)
    verify_markup(source.format, text, data, placement, style, round_numbers=args.round,
                  name=name, same_data_as=same_data_as)  # fmt: skip
    return data, placement.kept


def _place_edits(source, original: str, text: str, edits):
    """Edits in the reader's text → edits in the file's own text; those over markup are kept."""
    from .readers.base import line_starts

    starts = line_starts(original)

    def where(offset: int) -> int:
        loc = source.locate(offset)
        return starts[loc.line - 1] + loc.column - 1

    placed, kept = [], []
    for start, end, new in edits:
        if end > start:
            o_start, o_end = where(start), where(end - 1) + 1
        else:
            o_start = o_end = where(start) if start < len(text) else len(original)
        covered = original[o_start:o_end].replace("\r\n", "\n").replace("\r", "\n")
        if covered != text[start:end]:
            kept.append((start, end, new))
            continue
        if "\r\n" in original[o_start:o_end] or (
            "\r\n" in original and "\n" in new and original.count("\r\n") == original.count("\n")
        ):
            new = new.replace("\n", "\r\n")
        placed.append((o_start, o_end, new))
    return placed, kept
