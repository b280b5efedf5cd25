"""``peakproof serve``: the local web page, on this computer only unless told otherwise."""

from __future__ import annotations

import sys

from .cli import EXIT_OK, EXIT_USAGE


def add_arguments(name, parser) -> None:
    parser.add_argument("--host", default="127.0.0.1",
                        help="address to listen on (default 127.0.0.1: this computer only)",
                        )  # fmt: skip
    parser.add_argument("--port", type=int, default=8765,
                        help="port (default 8765; 0: any free one)")  # fmt: skip
    parser.add_argument("--open", action="store_true", help="open the page in the web browser")
    parser.add_argument("--max-mb", type=float, default=None, metavar="MB",
                        help="largest request or upload accepted, in MB (default 20)")  # fmt: skip


def run(args) -> int:
    try:
        from .web import DEFAULT_MAX_MB, is_loopback, make_server
    except ImportError as exc:
        print(f"peakproof: the web page needs Flask ({exc}); install it with "
              "'pip install flask'", file=sys.stderr)  # fmt: skip
        return EXIT_USAGE
    if not 0 <= args.port <= 65535:
        print(f"peakproof: --port {args.port}: choose a port from 1 to 65535", file=sys.stderr)
        return EXIT_USAGE
    max_mb = DEFAULT_MAX_MB if args.max_mb is None else args.max_mb
    if max_mb <= 0:
        print("peakproof: --max-mb must be more than 0", file=sys.stderr)
        return EXIT_USAGE
    if not is_loopback(args.host):
        print(f"peakproof: warning: listening on {args.host}, so other computers on the network "
              "can open this page and send it text; use --host 127.0.0.1 to keep it on this "
              "computer", file=sys.stderr)  # fmt: skip
    try:
        server = make_server(args.host, args.port, max_mb)
    except OSError as exc:
        print(f"peakproof: cannot listen on {args.host}:{args.port} ({exc.strerror or exc}); "
              "try another --port", file=sys.stderr)  # fmt: skip
        return EXIT_USAGE
    shown_host = f"[{args.host}]" if ":" in args.host else args.host
    url = f"http://{shown_host}:{server.port}/"
    print(f"peakproof: the page is at {url} (press Ctrl+C to stop)", file=sys.stderr)
    if args.open:
        import webbrowser

        webbrowser.open(url)
    try:
        server.serve_forever()
    except KeyboardInterrupt:
        print("peakproof: stopped", file=sys.stderr)
    finally:
        server.server_close()
    return EXIT_OK
