"""``peakproof check FILE…``, ``peakproof rules`` and ``peakproof explain NAME|CODE``."""

from __future__ import annotations

import json
import re
import sys

from .cli import EXIT_FINDINGS, EXIT_INTERNAL, EXIT_OK, EXIT_USAGE


def add_arguments(name, parser) -> None:
    if name == "rules":
        parser.add_argument("--format", choices=("text", "json"), default="text", help="output format")
        return
    if name == "explain":
        parser.add_argument("rule", metavar="NAME|CODE", help="a rule name (e.g. multiplicity-j-count) or code (PP101)")
        return
    parser.add_argument("files", nargs="+", metavar="FILE", help="a .txt/.md/.tex/.docx/.pdf file, or - for stdin")
    parser.add_argument("--format", choices=("text", "json", "sarif"), default="text", help="output format")
    parser.add_argument("--fail-on", choices=("error", "warning", "note"), default=None,
                        help="lowest severity that makes the exit status 1 (default: error)")
    parser.add_argument("--select", action="append", default=None, metavar="RULES",
                        help="only these rules (names, codes or families, comma-separated)")
    parser.add_argument("--ignore", action="append", default=None, metavar="RULES",
                        help="skip these rules (names, codes or families, comma-separated)")
    parser.add_argument("--formula", default=None, help="the compound's molecular formula, e.g. C12H14O3")
    parser.add_argument("--style", default=None, metavar="NAME",
                        help="the style the text is written in (see 'peakproof styles'); form rules "
                             "such as shift order and units follow it")
    parser.add_argument("--structures", default=None, metavar="FILE",
                        help="structures by compound label: CSV/TSV 'label,smiles', an SD file, or a folder of LABEL.mol")
    parser.add_argument("--config", default=None, metavar="FILE",
                        help="settings file (default: [tool.peakproof] of the nearest pyproject.toml)")
    parser.add_argument("--coupling-tolerance", type=float, default=None, metavar="HZ",
                        help="J values within this many Hz count as one coupling (default 0.3)")
    parser.add_argument("--hrms-ppm", type=float, default=None, metavar="PPM",
                        help="HRMS found vs calcd tolerance in ppm (default 5)")
    parser.add_argument("--hrms-mz", type=float, default=None, metavar="MZ",
                        help="HRMS tolerance in m/z units instead of ppm (e.g. 0.003)")
    parser.add_argument("--ea-tolerance", type=float, default=None, metavar="PERCENT",
                        help="elemental analysis found vs calcd, absolute %% (default 0.4)")
    parser.add_argument("--input-format", choices=("txt", "md", "tex", "docx", "pdf"), default=None,
                        help="read the files as this format, whatever their extension")
    parser.add_argument("--quiet", action="store_true", help="text output without excerpts")
    from .batch import add_arguments as add_batch_arguments

    add_batch_arguments(parser)


def run(args) -> int:
    if args.command == "rules":
        return _list_rules(args)
    if args.command == "explain":
        return _explain(args)
    return _check(args)


def _list_rules(args) -> int:
    from .rules import all_rules

    rules = all_rules()
    if args.format == "json":
        payload = [{"name": r.name, "code": r.code, "severity": r.severity, "family": r.family,
                    "message": r.message, "rationale": r.rationale, "source": r.source} for r in rules]
        json.dump(payload, sys.stdout, ensure_ascii=False, indent=1)
        sys.stdout.write("\n")
        return EXIT_OK
    width = max(len(r.name) for r in rules)
    family = None
    for r in rules:
        if r.family != family:
            family = r.family
            print(f"{family.replace('_', ' ')}:")
        doc = " ".join((r.__doc__ or r.message).split())
        print(f"  {r.code}  {r.name:<{width}}  {r.severity:<7}  {doc}")
    return EXIT_OK


def _explain(args) -> int:
    from .rules import rule_for

    try:
        rule = rule_for(args.rule)
    except KeyError as exc:
        print(f"peakproof: {exc.args[0]}", file=sys.stderr)
        return EXIT_USAGE
    print(rule.documentation())
    return EXIT_OK


def _split(values) -> tuple[str, ...]:
    return tuple(p.strip() for v in values or () for p in v.split(",") if p.strip())


def _settings(args, first_file: str):
    from .config import ConfigError, load_config
    from .formula import FormulaError, parse_formula

    near = first_file if first_file != "-" else "."
    config = load_config(args.config, near=near if args.config is None else None)
    overrides = {
        "fail_on": args.fail_on,
        "coupling_tolerance": args.coupling_tolerance,
        "hrms_ppm": args.hrms_ppm,
        "hrms_mz": args.hrms_mz,
        "ea_tolerance": args.ea_tolerance,
        "formula": args.formula,
    }
    if args.style is not None:
        from .styles import StyleError, find_project_style, get_style

        try:
            project = find_project_style(near)
            user = {project.name: project} if project is not None else None
            overrides["style"] = get_style(args.style, user)
        except StyleError as exc:
            raise ConfigError(f"--style: {exc}") from None
    if args.select:
        overrides["select"] = _split(args.select)
    if args.ignore:
        overrides["ignore"] = config.ignore + _split(args.ignore)
    config = config.with_overrides(**overrides)
    for key in ("coupling_tolerance", "hrms_ppm", "hrms_mz", "ea_tolerance"):
        value = getattr(config, key)
        if value is not None and value < 0:
            raise ConfigError(f"--{key.replace('_', '-')} must not be negative")
    if config.formula:
        try:
            parse_formula(config.formula)
        except FormulaError as exc:
            raise ConfigError(f"--formula {config.formula!r}: {exc}") from None
    from .rules import resolve_names

    for key in ("select", "ignore"):
        for name in getattr(config, key):
            if key == "ignore" and (name == "syntax" or name.startswith("repair")):
                continue  # parse diagnostics, not registered rules
            try:
                resolve_names([name])
            except KeyError as exc:
                raise ConfigError(f"--{key}: {exc.args[0]}") from None
    return config


def _wants_batch(args) -> bool:
    """Folders, globs, --jobs or --jsonl: stream file by file (constant memory, summary table)."""
    from .batch import names_several

    return bool(args.jsonl) or args.jobs != 1 or names_several(args.files)


def _batch_check(args, config) -> int:
    from functools import partial

    from .batch import check_worker, run_files
    from .checker import at_or_above

    worst = {"status": EXIT_OK}

    def show(record):
        if "error" in record:
            print(f"peakproof: {record['error']}", file=sys.stderr)
            return
        for f in record.get("findings", ()):
            where = f.get("where") or f"{f['line']}:{f['column']}"
            m = re.match(r"^line (\d+), column (\d+)$", where)
            if m:  # text formats keep the path:line:column convention
                where = f"{m.group(1)}:{m.group(2)}"
            if args.format == "text" and not args.jsonl == "-":
                print(f"{record['file']}:{where}: {f['severity']} {f['rule']} {f['message']}")
            if at_or_above(f["severity"], config.fail_on):
                worst["status"] = EXIT_FINDINGS

    out = None
    if args.jsonl == "-":
        out = sys.stdout
    elif args.jsonl:
        out = open(args.jsonl, "w", encoding="utf-8")
    try:
        summary = run_files(args.files, partial(check_worker, config=config), jobs=args.jobs,
                            jsonl=out, per=args.jsonl_per, recursive=args.recursive,
                            progress=args.progress, on_record=show)
    finally:
        if out is not None and out is not sys.stdout:
            out.close()
    return EXIT_USAGE if summary.unreadable_count else worst["status"]


def _block_finder(doc):
    """``find(offset)``: the block whose span holds ``offset``, or None, by bisection over the
    blocks' starts (blocks are in document order and do not overlap), so a report is linear in
    its findings rather than findings × blocks."""
    import bisect

    blocks = doc.blocks
    starts = [b.span.start for b in blocks]

    def find(offset):
        i = bisect.bisect_right(starts, offset) - 1
        if i >= 0 and offset <= blocks[i].span.end:
            return blocks[i]
        return None

    return find


def _finding_json(d, source, find_block) -> dict:
    """A finding in the published shape, plus its compound and, for Word and PDF, its place there."""
    out = d.to_json()
    block = find_block(d.span.start)
    out["compound"] = block.compound if block is not None else None
    if source.format in ("docx", "pdf"):
        where = source.locate(d.span.start)
        if where is not None:
            out["where"] = where.describe()
            out["location"] = where.to_json()
    return out


def _check(args) -> int:
    from . import __version__
    from .api import InputError, parse_path
    from .checker import at_or_above, check_document
    from .config import ConfigError
    from .report import finding_lines, summary_line

    try:
        config = _settings(args, args.files[0])
    except ConfigError as exc:
        print(f"peakproof: {exc}", file=sys.stderr)
        return EXIT_USAGE
    for problem in config.problems:
        print(f"peakproof: {problem}", file=sys.stderr)
    if getattr(args, "structures", None) and _wants_batch(args):
        print("peakproof: --structures matches labels within one document; give the files one at a time "
              "(not with folders, globs, --jobs or --jsonl)", file=sys.stderr)
        return EXIT_USAGE
    if _wants_batch(args):
        if args.format == "text":
            return _batch_check(args, config)
        from .batch import expand_inputs  # json/sarif gather everything: expand, then go on

        files, problems = expand_inputs(args.files, recursive=args.recursive)
        for problem in problems:
            print(f"peakproof: {problem.to_json().get('error', problem)}", file=sys.stderr)
        args.files = files
    status = EXIT_OK
    reports = []
    documents = []
    counts = {"error": 0, "warning": 0, "note": 0}
    for path in args.files:
        try:
            source, doc = parse_path(path, fmt=args.input_format)
        except InputError as exc:
            print(f"peakproof: {exc}", file=sys.stderr)
            status = EXIT_USAGE
            continue
        if getattr(args, "structures", None):
            from .api import check as api_check
            from .api import match_structures
            from .structures import matching_report

            try:
                matching = match_structures(doc, args.structures)
            except InputError as exc:
                print(f"peakproof: {exc}", file=sys.stderr)
                return EXIT_USAGE
            for line in matching_report(matching):
                print(f"peakproof: {line}", file=sys.stderr)
            result = api_check(doc, config=config, structures=matching)
        else:
            result = check_document(doc, config)
        reports.append((source, result.diagnostics))
        for d in result.diagnostics:
            counts[d.severity] += 1
            if d.rule == "internal-error":  # a bug of ours, not a finding: its own exit code
                status = EXIT_INTERNAL
            elif at_or_above(d.severity, config.fail_on) and status == EXIT_OK:
                status = EXIT_FINDINGS
        if args.format == "json":
            find_block = _block_finder(doc)
            documents.append({"path": source.name,
                              "findings": [_finding_json(d, source, find_block) for d in result.diagnostics],
                              "networks": result.networks})
        elif args.format == "text":
            if not doc.blocks and not result.diagnostics:
                print(f"{source.name}: no characterization data found")
            for line in finding_lines(source, result.diagnostics, show_source=not args.quiet, document=doc):
                print(line)
    if args.format == "json":
        payload = {"schema": "peakproof-check/1", "version": __version__, "fail_on": config.fail_on,
                   "summary": counts, "documents": documents}
        json.dump(payload, sys.stdout, ensure_ascii=False, indent=1)
        sys.stdout.write("\n")
    elif args.format == "sarif":
        from .sarif import to_sarif

        json.dump(to_sarif(reports, version=__version__), sys.stdout, ensure_ascii=False, indent=1)
        sys.stdout.write("\n")
    elif reports:
        print(summary_line(counts, len(reports)))
    return status
