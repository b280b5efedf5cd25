"""The server answers only its own page: foreign Host (DNS rebinding), foreign Origin, no token.

Through a real server on a free loopback port and real HTTP (urllib), as a browser would reach it.
"""

from __future__ import annotations

import http.client
import json
import re
import threading

import pytest

from peakproof.web import TOKEN_HEADER, make_server

POST_ROUTES = ["/api/check", "/api/format", "/api/plot", "/api/upload"]
TEXT = "1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H)."


@pytest.fixture(scope="module")
def server():
    server = make_server("127.0.0.1", 0)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    yield server
    server.shutdown()
    server.server_close()


def _request(server, method, path, headers=None, body=None):
    connection = http.client.HTTPConnection("127.0.0.1", server.port, timeout=60)
    try:
        connection.request(method, path, body=body, headers=headers or {})
        response = connection.getresponse()
        return response.status, response.read()
    finally:
        connection.close()


def _body(route):
    """A valid body for ``route`` (multipart for the upload)."""
    if route == "/api/upload":
        boundary = "peakproofboundary"
        data = (f"--{boundary}\r\nContent-Disposition: form-data; name=\"file\"; "
                f"filename=\"si.txt\"\r\nContent-Type: text/plain\r\n\r\n{TEXT}\r\n"
                f"--{boundary}--\r\n").encode()  # fmt: skip
        return data, f"multipart/form-data; boundary={boundary}"
    return json.dumps({"text": TEXT, "block": 0}).encode("utf-8"), "application/json"


def _own(server):
    return {"Host": f"127.0.0.1:{server.port}", TOKEN_HEADER: server.app.config["PEAKPROOF_TOKEN"]}


def test_page_carries_the_session_token(server):
    status, page = _request(server, "GET", "/", {"Host": f"127.0.0.1:{server.port}"})
    assert status == 200
    token = re.search(rb'name="peakproof-token" content="([^"]+)"', page).group(1).decode()
    assert token == server.app.config["PEAKPROOF_TOKEN"] and len(token) >= 24


@pytest.mark.parametrize("route", POST_ROUTES)
def test_own_page_requests_pass(server, route):
    body, kind = _body(route)
    headers = {**_own(server), "Content-Type": kind, "Origin": f"http://127.0.0.1:{server.port}",
               "Sec-Fetch-Site": "same-origin"}
    status, answer = _request(server, "POST", route, headers, body)
    assert status == 200, answer


@pytest.mark.parametrize("host", ["evil.example:{port}", "127.0.0.1:1", "localhost.evil.example",
                                  "attacker.test"])
@pytest.mark.parametrize("method,route", [("GET", "/"), ("GET", "/api/styles"),
                                          ("POST", "/api/check")])
def test_foreign_host_is_refused(server, host, method, route):
    """DNS rebinding: another name resolving to 127.0.0.1 reaches the socket, not the page."""
    body, kind = _body(route)
    headers = {**_own(server), "Content-Type": kind, "Host": host.format(port=server.port)}
    status, answer = _request(server, method, route, headers, body if method == "POST" else None)
    assert status == 403
    assert b"own address" in answer
    assert server.app.config["PEAKPROOF_TOKEN"].encode() not in answer


def test_other_loopback_name_at_the_same_port_is_accepted(server):
    status, _ = _request(server, "GET", "/api/styles", {"Host": f"localhost:{server.port}"})
    assert status == 200


@pytest.mark.parametrize("route", POST_ROUTES)
@pytest.mark.parametrize("origin", ["http://evil.example", "null", "http://127.0.0.1:1",
                                    "https://127.0.0.1:{port}"])
def test_foreign_origin_is_refused_on_every_post(server, route, origin):
    body, kind = _body(route)
    headers = {**_own(server), "Content-Type": kind, "Origin": origin.format(port=server.port)}
    status, answer = _request(server, "POST", route, headers, body)
    assert status == 403, answer
    assert b"another site" in answer


@pytest.mark.parametrize("route", POST_ROUTES)
@pytest.mark.parametrize("site", ["cross-site", "same-site"])
def test_cross_site_fetch_is_refused_on_every_post(server, route, site):
    body, kind = _body(route)
    headers = {**_own(server), "Content-Type": kind, "Sec-Fetch-Site": site}
    status, answer = _request(server, "POST", route, headers, body)
    assert status == 403, answer


@pytest.mark.parametrize("route", POST_ROUTES)
@pytest.mark.parametrize("token", [None, "", "wrong-token"])
def test_post_without_the_session_token_is_refused(server, route, token):
    body, kind = _body(route)
    headers = {"Host": f"127.0.0.1:{server.port}", "Content-Type": kind}
    if token is not None:
        headers[TOKEN_HEADER] = token
    status, answer = _request(server, "POST", route, headers, body)
    assert status == 403, answer
    assert b"session token" in answer and b"reload" in answer
