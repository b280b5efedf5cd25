"""The local web page: ``peakproof serve``.  Flask loads only when this package is imported."""

from __future__ import annotations

import ipaddress

from .app import DEFAULT_MAX_MB, create_app

__all__ = ["DEFAULT_MAX_MB", "create_app", "is_loopback", "make_server"]


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
    from werkzeug.serving import make_server as _make_server

    return _make_server(host, port, create_app(max_request_mb), threaded=True)
