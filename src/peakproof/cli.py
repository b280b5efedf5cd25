"""The command line: ``peakproof COMMAND …``.

Each command lives in its own module with ``add_arguments(parser)`` and ``run(args) -> int``;
only the chosen command's module is imported, so start-up stays quick.
"""

from __future__ import annotations

import argparse
import importlib
import sys

#: command name → (module, one-line description)
COMMANDS: dict[str, tuple[str, str]] = {
    "parse": ("peakproof.cli_parse", "read data blocks and print what was understood"),
    "check": ("peakproof.cli_check", "check data blocks and report problems"),
    "rules": ("peakproof.cli_check", "list the checker's rules"),
    "explain": ("peakproof.cli_check", "print one rule's documentation"),
    "format": ("peakproof.cli_format", "rewrite data blocks in one consistent style"),
    "export": ("peakproof.cli_format", "export parsed data as JSON, JSON Lines or CSV"),
    "styles": ("peakproof.cli_format", "list the output styles"),
    "simulate": ("peakproof.cli_simulate", "simulate the spectrum a description implies"),
    "plot": ("peakproof.cli_simulate", "draw the implied spectrum as PNG or SVG"),
    "serve": ("peakproof.cli_serve", "start the local web page"),
}

EXIT_OK, EXIT_FINDINGS, EXIT_USAGE = 0, 1, 2
#: ``format``: a rewrite could not be proven to keep the data, so nothing was written.
EXIT_UNPROVEN = 3
#: a bug inside peakproof (reported as an ``internal-error`` diagnostic, never a traceback).
EXIT_INTERNAL = 4
#: ``format``: the file is read-only (no write bit in its mode); it is left alone.
EXIT_READ_ONLY = 5


def _top_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="peakproof",
        description="Read, check, reformat and simulate NMR characterization data.",
        epilog="Run 'peakproof COMMAND --help' for a command's options.",
    )
    parser.add_argument("--version", action="version", version=_version())
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (_, help_text) in COMMANDS.items():
        sub.add_parser(name, help=help_text, add_help=False)
    return parser


def _version() -> str:
    from . import __version__

    return f"peakproof {__version__}"


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or argv[0] not in COMMANDS:
        parser = _top_parser()
        if not argv:
            parser.print_help()
            return EXIT_USAGE
        try:
            parser.parse_args(argv)
        except SystemExit as exc:
            return int(exc.code or 0)
        return EXIT_USAGE
    name = argv[0]
    module = importlib.import_module(COMMANDS[name][0])
    parser = argparse.ArgumentParser(prog=f"peakproof {name}", description=COMMANDS[name][1])
    module.add_arguments(name, parser)
    try:
        args = parser.parse_args(argv[1:])
    except SystemExit as exc:
        return int(exc.code or 0) if exc.code in (0, None) else EXIT_USAGE
    args.command = name
    try:
        return module.run(args)
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return EXIT_OK
    except Exception as exc:  # a bug of ours: one line for people, never a traceback
        where = getattr(exc, "__traceback__", None)
        while where is not None and where.tb_next is not None:
            where = where.tb_next
        place = f" ({where.tb_frame.f_code.co_filename.rsplit('/', 1)[-1]}:{where.tb_lineno})" if where else ""
        print(f"peakproof {name}: internal-error: {type(exc).__name__}: {exc}{place}; this is a bug "
              "in peakproof, not in your file: please report it with the input", file=sys.stderr)  # fmt: skip
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
