"""``peakproof parse FILE``: what the reader understood, as a summary or as JSON."""

from __future__ import annotations

import sys

from .cli import EXIT_OK, EXIT_USAGE


def add_arguments(name, parser) -> None:
    parser.add_argument("files", nargs="+", metavar="FILE", help="a .txt/.md/.tex/.docx/.pdf file, or - for stdin")
    parser.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    parser.add_argument("--input-format", choices=("txt", "md", "tex", "docx", "pdf"), default=None,
                        help="read the files as this format, whatever their extension")


def run(args) -> int:
    from .api import InputError, parse_path
    from .report import diagnostic_lines

    status = EXIT_OK
    outputs = []
    for path in args.files:
        try:
            source, doc = parse_path(path, fmt=args.input_format)
        except InputError as exc:
            print(f"peakproof: {exc}", file=sys.stderr)
            status = EXIT_USAGE
            continue
        if args.format == "json":
            outputs.append(doc.to_json())
            continue
        print(summary(doc, source))
        for line in diagnostic_lines(source, doc.diagnostics, document=doc):
            print(line)
    if args.format == "json":
        import json

        payload = outputs[0] if len(outputs) == 1 else {"documents": outputs}
        json.dump(payload, sys.stdout, ensure_ascii=False, indent=1)
        sys.stdout.write("\n")
    return status


def summary(doc, source) -> str:
    lines = [f"{source.name}: {len(doc.blocks)} data block(s)"]
    for block in doc.blocks:
        where = f"line {block.span.line}"
        label = f"compound {block.compound}" if block.compound else f"block {block.index + 1}"
        lines.append(f"  {label} ({where})")
        for s in block.spectra:
            dec = "{" + ",".join(s.decoupled) + "}" if s.decoupled else ""
            freq = f"{s.frequency_mhz:g} MHz" if s.frequency_mhz else "no frequency"
            solv = s.solvent_normalized or "no solvent"
            lines.append(f"    {s.nucleus}{dec} NMR, {freq}, {solv}: {len(s.signals)} signal(s)")
        for m in block.mass_spec:
            lines.append(f"    HRMS {m.method or ''} {m.ion or ''} calcd {m.calcd} found {m.found}".replace("  ", " "))
        for a in block.analyses:
            lines.append(f"    elemental analysis {a.formula}: " + ", ".join(f"{e} {v}" for e, v in a.calcd))
        for o in block.others:
            lines.append(f"    {o.kind}: {o.text}")
    return "\n".join(lines)
