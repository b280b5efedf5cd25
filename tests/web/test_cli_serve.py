"""``peakproof serve``: options, the loopback default and the warning when binding elsewhere."""

from __future__ import annotations

import json
import re
import threading
import urllib.request

import pytest

import peakproof.web
from peakproof.cli import main


class _Stopped:
    """Wraps the real server: records it, answers one request, then stops like Ctrl+C."""

    def __init__(self, monkeypatch):
        self.servers = []
        real = peakproof.web.make_server

        def make(host, port, max_request_mb):
            server = real(host, port, max_request_mb)
            self.servers.append((server, host, port, max_request_mb))

            def serve_forever():
                raise KeyboardInterrupt

            server.serve_forever = serve_forever
            return server

        monkeypatch.setattr(peakproof.web, "make_server", make)


def test_serve_binds_loopback_by_default(monkeypatch, capsys):
    stopped = _Stopped(monkeypatch)
    assert main(["serve", "--port", "0"]) == 0
    server, host, port, max_mb = stopped.servers[0]
    assert host == "127.0.0.1" and max_mb == 20
    err = capsys.readouterr().err
    assert f"http://127.0.0.1:{server.port}/" in err
    assert "warning" not in err


def test_serve_warns_when_other_computers_can_reach_it(monkeypatch, capsys):
    _Stopped(monkeypatch)
    assert main(["serve", "--host", "0.0.0.0", "--port", "0"]) == 0
    err = capsys.readouterr().err
    assert "warning" in err and "other computers" in err and "--host 127.0.0.1" in err


def test_serve_passes_the_size_limit(monkeypatch):
    stopped = _Stopped(monkeypatch)
    assert main(["serve", "--port", "0", "--max-mb", "2.5"]) == 0
    assert stopped.servers[0][3] == 2.5


@pytest.mark.parametrize("argv, words", [
    (["serve", "--port", "70000"], "--port 70000"),
    (["serve", "--port", "0", "--max-mb", "0"], "--max-mb"),
])  # fmt: skip
def test_serve_refuses_bad_options(argv, words, capsys):
    assert main(argv) == 2
    assert words in capsys.readouterr().err


def test_serve_reports_a_port_in_use(capsys):
    taken = peakproof.web.make_server("127.0.0.1", 0)
    try:
        assert main(["serve", "--port", str(taken.port)]) == 2
    finally:
        taken.server_close()
    err = capsys.readouterr().err
    assert f"cannot listen on 127.0.0.1:{taken.port}" in err and "Traceback" not in err


def test_the_served_page_answers_over_http():
    server = peakproof.web.make_server("127.0.0.1", 0)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    try:
        base = f"http://127.0.0.1:{server.port}"
        with urllib.request.urlopen(base + "/", timeout=30) as response:
            page = response.read()
        assert b"peakproof" in page
        # the page's session token, which its script sends with every POST
        token = re.search(rb'name="peakproof-token" content="([^"]+)"', page).group(1).decode()
        body = json.dumps({"text": "1H NMR (400 MHz, CDCl3) δ 3.82 (s, J = 1.2 Hz, 3H)"}).encode()
        request = urllib.request.Request(base + "/api/check", data=body,
                                         headers={"Content-Type": "application/json",
                                                  peakproof.web.TOKEN_HEADER: token})  # fmt: skip
        with urllib.request.urlopen(request, timeout=30) as response:
            rules = [f["rule"] for f in json.load(response)["findings"]]
        assert "singlet-with-j" in rules  # a singlet cannot show a coupling (common practice)
    finally:
        server.shutdown()
        server.server_close()
