"""One large paste never stops the server: the diff costs what the change costs, requests run
at once, and work past the time budget is answered with advice to use the command line."""

from __future__ import annotations

import http.client
import json
import threading
import time

import pytest

from peakproof.web import TOKEN_HEADER, make_server
from peakproof.web import app as web_app

from .demo import demo_text


@pytest.fixture
def server():
    server = make_server("127.0.0.1", 0)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    yield server
    server.shutdown()
    server.server_close()


def _post(server, route, body, timeout=300):
    connection = http.client.HTTPConnection("127.0.0.1", server.port, timeout=timeout)
    try:
        connection.request("POST", route, body=json.dumps(body).encode(), headers={
            "Content-Type": "application/json", TOKEN_HEADER: server.app.config["PEAKPROOF_TOKEN"]})
        response = connection.getresponse()
        return response.status, json.loads(response.read())
    finally:
        connection.close()


def test_a_small_request_answers_within_a_second_while_a_large_one_runs(server):
    large = demo_text() * 60  # ~ several hundred KB of characterization data
    small = "1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H)."
    _post(server, "/api/check", {"text": small})  # warm: the rules load on first use
    big_result: list = []
    worker = threading.Thread(target=lambda: big_result.append(
        _post(server, "/api/format", {"text": large, "style": "letters-first"})))
    started = time.monotonic()
    worker.start()
    time.sleep(0.5)
    try:
        t0 = time.monotonic()
        status, payload = _post(server, "/api/check", {"text": small}, timeout=30)
        elapsed = time.monotonic() - t0
        assert status == 200 and payload["compounds"]
        assert worker.is_alive(), "the large request ended too soon to prove anything"
        assert elapsed < 1.0, f"the small request waited {elapsed:.2f} s behind the large one"
    finally:
        worker.join()
    assert big_result[0][0] == 200, big_result
    assert time.monotonic() - started > 1.0


def test_diff_of_a_long_single_line_costs_little():
    """Word matching is quadratic in a line's length: a huge one-line paste is shown whole."""
    before = "1H NMR δ " + ", ".join(f"{7 + i % 100 / 100:.2f} (s, 1H)" for i in range(40_000))
    after = before.replace("(s, 1H)", "(1H, s)")
    t0 = time.monotonic()
    rows = web_app.line_diff(before, after)
    assert time.monotonic() - t0 < 2.0
    assert len(rows) == 1
    assert "".join(p["text"] for p in rows[0]["parts"] if p["op"] != "ins") == before
    assert "".join(p["text"] for p in rows[0]["parts"] if p["op"] != "del") == after


def test_diff_of_many_changed_lines_is_cut_with_a_message():
    before = "\n".join(f"H{i}: 1H NMR δ 7.26 (s, 1H)" for i in range(50_000))
    after = before.replace("(s, 1H)", "(1H, s)")
    t0 = time.monotonic()
    rows = web_app.line_diff(before, after)
    assert time.monotonic() - t0 < 5.0
    assert len(rows) == web_app.DIFF_MAX_ROWS + 1
    last = rows[-1]["parts"][0]
    assert last["op"] == "cut" and f"{50_000 - web_app.DIFF_MAX_ROWS} more" in last["text"]
    # the rows shown are exact word-level changes of their lines
    assert rows[0]["line"] == 1
    assert {"op": "ins", "text": "1H, s"} in rows[0]["parts"]


def test_work_past_the_time_budget_is_a_clear_413(server, monkeypatch):
    monkeypatch.setattr(web_app, "TIME_BUDGET_S", 0.05)
    status, payload = _post(server, "/api/format", {"text": demo_text() * 40})
    assert status == 413
    assert "too large for the page" in payload["error"] and "command line" in payload["error"]
