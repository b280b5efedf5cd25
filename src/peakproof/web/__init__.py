"""The local web page: ``peakproof serve``.  Flask loads only when this package is imported."""

from __future__ import annotations

import ipaddress

from .app import DEFAULT_MAX_MB, TOKEN_HEADER, allow_hosts, create_app

__all__ = ["DEFAULT_MAX_MB", "TOKEN_HEADER", "allow_hosts", "create_app", "is_loopback", "make_server"]


def is_loopback(host: str) -> bool:
    """True for 127.0.0.0/8, ::1 and "localhost": addresses other machines cannot reach."""
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host.strip("[]")).is_loopback
    except ValueError:
        return False


def make_server(host: str = "127.0.0.1", port: int = 8765, max_request_mb: float = DEFAULT_MAX_MB):
    """A threaded WSGI server for the page (``port=0`` picks a free port: see ``.port``)."""
    import socket

    from werkzeug.serving import make_server as _make_server

    # Werkzeug reports a busy port by printing and exiting; try the address first so the
    # caller gets an OSError it can explain.
    family = socket.AF_INET6 if ":" in host else socket.AF_INET
    with socket.socket(family, socket.SOCK_STREAM) as probe:
        probe.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        probe.bind((host.strip("[]"), port))
    app = create_app(max_request_mb)
    try:
        server = _make_server(host, port, app, threaded=True)
    except SystemExit:
        raise OSError(f"cannot listen on {host}:{port}") from None
    if is_loopback(host):  # elsewhere the machine's own names are not known here
        allow_hosts(app, host, server.port)
    return server
