"""The web page's endpoints, through Flask's test client (no browser)."""

from __future__ import annotations

import io
import json
import threading
import urllib.request

import pytest

from peakproof.web import TOKEN_HEADER, create_app, is_loopback, make_server

from .demo import DEMO_DOCX, demo_text, planted_ranges


def page_client(app):
    """A test client that sends the page's session token, as the page's script does."""
    client = app.test_client()
    client.environ_base["HTTP_" + TOKEN_HEADER.upper().replace("-", "_")] = app.config[
        "PEAKPROOF_TOKEN"]
    return client


@pytest.fixture(scope="module")
def client():
    return page_client(create_app())


@pytest.fixture(scope="module")
def demo_check(client):
    response = client.post("/api/check", json={"text": demo_text()})
    assert response.status_code == 200
    return response.get_json()


# ---- the page and its files ---------------------------------------------------------------
def test_page_is_served_with_a_strict_content_policy(client):
    response = client.get("/")
    assert response.status_code == 200
    assert response.mimetype == "text/html"
    policy = response.headers["Content-Security-Policy"]
    assert "script-src 'self'" in policy and "unsafe-inline" not in policy
    assert b'src="/static/app.js"' in response.data
    # offline: nothing is loaded from another host
    assert b"http://" not in response.data and b"https://" not in response.data


@pytest.mark.parametrize("name", ["app.js", "style.css"])
def test_static_assets(client, name):
    response = client.get(f"/static/{name}")
    assert response.status_code == 200
    assert b"http://" not in response.data and b"https://" not in response.data


@pytest.mark.parametrize("path", ["/static/app.py", "/static/..%2fapp.py", "/static/../app.py",
                                  "/static/%2e%2e/__init__.py", "/api/nothing"])
def test_no_other_files_are_served(client, path):
    response = client.get(path)
    assert response.status_code == 404
    assert b"create_app" not in response.data


def test_styles_lists_the_builtin_styles(client):
    from peakproof.styles import BUILTIN, DEFAULT

    payload = client.get("/api/styles").get_json()
    assert [s["name"] for s in payload["styles"]] == list(BUILTIN)
    assert payload["default"] == DEFAULT
    assert all(s["description"] for s in payload["styles"])


# ---- checking -------------------------------------------------------------------------------
def test_check_returns_what_the_checker_finds(demo_check):
    from peakproof import parse
    from peakproof.checker import check

    expected = [d.to_json() for d in check(parse(demo_text(), path="pasted text"))]
    got = [{k: v for k, v in f.items() if k not in ("id", "block", "rationale", "source")}
           for f in demo_check["findings"]]  # fmt: skip
    assert got == expected
    assert demo_check["totals"] == {s: sum(f["severity"] == s for f in expected)
                                    for s in ("error", "warning", "note")}  # fmt: skip


def test_every_planted_error_is_covered_by_a_finding(demo_check):
    text = demo_text()
    spans = [(f["span"]["start"], f["span"]["end"]) for f in demo_check["findings"]]
    for compound, start, end in planted_ranges(text):
        assert any(s < end and start < e for s, e in spans), (compound, text[start:end])


def test_segments_rebuild_the_text_and_mark_each_span_exactly(demo_check):
    text = demo_text()
    assert "".join(s["text"] for s in demo_check["segments"]) == text
    for f in demo_check["findings"]:
        covered = "".join(s["text"] for s in demo_check["segments"] if f["id"] in s["ids"])
        assert covered == text[f["span"]["start"] : f["span"]["end"]], f["rule"]


def test_findings_carry_rationale_source_and_compound(demo_check):
    compounds = {c["block"]: c["label"] for c in demo_check["compounds"]}
    assert list(compounds.values())[:2] == ["1a", "1b"]
    for f in demo_check["findings"]:
        assert f["rationale"] and f["source"], f["rule"]
        assert f["block"] in compounds
    hrms = [f for f in demo_check["findings"] if f["rule"] == "hrms-calcd"]
    # planted_errors.toml: compound 1a's calcd 219.0433 is the mass without the electron
    assert compounds[hrms[0]["block"]] == "1a"


def test_counts_per_rule_add_up(demo_check):
    rows = demo_check["counts"]
    assert sum(r["count"] for r in rows) == len(demo_check["findings"])
    by_rule: dict[str, int] = {}
    for f in demo_check["findings"]:
        by_rule[f["rule"]] = by_rule.get(f["rule"], 0) + 1
    assert {r["rule"]: r["count"] for r in rows} == by_rule
    ranks = [("error", "warning", "note").index(r["severity"]) for r in rows]
    assert ranks == sorted(ranks)


def test_offsets_past_the_basic_plane_stay_exact(client):
    # Python counts code points, JavaScript UTF-16 units: the page only uses the pieces.
    text = ("🧪 note 𝛿 1H NMR (400 MHz, CDCl3) δ 7.26 (d, J = 8.4 Hz, 2H), "
            "3.80 (s, J = 1.2 Hz, 3H).")
    payload = client.post("/api/check", json={"text": text}).get_json()
    assert "".join(s["text"] for s in payload["segments"]) == text
    singlet = [f for f in payload["findings"] if f["rule"] == "singlet-with-j"]
    assert singlet, payload["findings"]
    covered = "".join(s["text"] for s in payload["segments"] if singlet[0]["id"] in s["ids"])
    assert covered == text[singlet[0]["span"]["start"] : singlet[0]["span"]["end"]]
    assert covered  # a non-empty piece of the text


def test_script_in_the_text_comes_back_as_plain_json_text(client):
    text = "<script>window.hacked = 1</script> 1H NMR (400 MHz, CDCl3) δ 7.26 (s, J = 1.0 Hz, 1H)"
    response = client.post("/api/check", json={"text": text})
    assert response.status_code == 200
    assert response.mimetype == "application/json"
    assert response.get_json()["text"] == text
    assert "".join(s["text"] for s in response.get_json()["segments"]) == text


def test_empty_span_findings_become_point_pieces():
    from peakproof.web.app import segments

    findings = [{"id": 0, "span": {"start": 3, "end": 3}},
                {"id": 1, "span": {"start": 2, "end": 5}}]  # fmt: skip
    pieces = segments("abcdefg", findings)
    assert pieces == [
        {"text": "ab", "ids": []},
        {"text": "c", "ids": [1]},
        {"text": "", "ids": [0], "point": True},
        {"text": "de", "ids": [1]},
        {"text": "fg", "ids": []},
    ]


# ---- formatting -----------------------------------------------------------------------------
@pytest.mark.parametrize("style", ["letters-first", "count-first", "ascending-bare-j",
                                   "subscript-delta", "equation-delta"])
def test_format_in_each_style_matches_the_cli_engine(client, style):
    from peakproof.safety import checked_format
    from peakproof.styles import get_style

    text = demo_text()
    payload = client.post("/api/format", json={"text": text, "style": style}).get_json()
    assert payload["style"] == style
    assert payload["text"] == checked_format(text, get_style(style), path="pasted text").text
    # the diff rows rebuild both versions of every changed line
    before, after = text.split("\n"), payload["text"].split("\n")
    assert payload["diff"], "the demo is not written in every style already"
    for row in payload["diff"]:
        old = "".join(p["text"] for p in row["parts"] if p["op"] in ("equal", "del"))
        if row["line"] is not None:
            assert old == before[row["line"] - 1]
        new = "".join(p["text"] for p in row["parts"] if p["op"] in ("equal", "ins"))
        assert new in after


def test_format_of_already_formatted_text_has_no_diff(client):
    once = client.post("/api/format", json={"text": demo_text(), "style": "count-first"}).get_json()
    twice = client.post("/api/format", json={"text": once["text"], "style": "count-first"})
    assert twice.get_json()["diff"] == [] and twice.get_json()["changed"] is False


def test_unknown_style_is_a_400_naming_the_choices(client):
    response = client.post("/api/format", json={"text": "1H NMR δ 7.26 (s, 1H)", "style": "fancy"})
    assert response.status_code == 400
    message = response.get_json()["error"]
    assert "fancy" in message and "letters-first" in message


# ---- malformed and oversized requests ---------------------------------------------------------
@pytest.mark.parametrize("endpoint", ["/api/check", "/api/format", "/api/plot"])
@pytest.mark.parametrize("body, content_type, words", [
    (b"{not json", "application/json", "not valid JSON"),
    (b"[1, 2]", "application/json", "JSON object"),
    (b'{"text": 42}', "application/json", "'text'"),
    (b'{"other": "x"}', "application/json", "'text'"),
    (b"text=hello", "application/x-www-form-urlencoded", "send JSON"),
])  # fmt: skip
def test_malformed_json_is_a_400_with_a_message(client, endpoint, body, content_type, words):
    response = client.post(endpoint, data=body, content_type=content_type)
    assert response.status_code == 400
    assert words in response.get_json()["error"]


@pytest.mark.parametrize("endpoint", ["/api/check", "/api/format", "/api/plot"])
@pytest.mark.parametrize("opening, closing", [("[", "]"), ('{"a":', "}")])
def test_deeply_nested_json_is_a_400_with_a_message(client, endpoint, opening, closing):
    depth = 100_000  # far past Python's recursion limit (1000 by default)
    body = '{"text": ' + opening * depth + "1" + closing * depth + "}"
    response = client.post(endpoint, data=body, content_type="application/json")
    assert response.status_code == 400
    assert "nested too deeply" in response.get_json()["error"]
    # and the server still answers normally afterwards
    assert client.post(endpoint, json={"text": "1H NMR δ 7.26 (s, 1H)"}).status_code == 200


def test_wrong_method_is_refused_as_json(client):
    response = client.get("/api/check")
    assert response.status_code == 405
    assert response.get_json()["error"]


def test_oversized_request_is_a_413_with_the_limit():
    small = page_client(create_app(max_request_mb=0.01))  # 10 KiB
    response = small.post("/api/check", json={"text": "x" * 20_000})
    assert response.status_code == 413
    message = response.get_json()["error"]
    assert "0.01 MB" in message and "--max-mb" in message
    upload = small.post("/api/upload", data={"file": (io.BytesIO(b"y" * 20_000), "big.txt")})
    assert upload.status_code == 413


def test_requests_under_the_limit_pass():
    small = page_client(create_app(max_request_mb=0.01))
    assert small.post("/api/check", json={"text": "1H NMR δ 7.26 (s, 1H)"}).status_code == 200


# ---- uploads ----------------------------------------------------------------------------------
def test_upload_docx_gives_the_documents_text(client):
    from peakproof.api import read_source

    response = client.post("/api/upload", data={"file": (DEMO_DOCX.open("rb"), "demo_si.docx")})
    assert response.status_code == 200, response.get_json()
    payload = response.get_json()
    assert payload["format"] == "docx" and payload["name"] == "demo_si.docx"
    assert payload["text"] == read_source(str(DEMO_DOCX)).text
    checked = client.post("/api/check", json={"text": payload["text"]}).get_json()
    assert [c["label"] for c in checked["compounds"]][:2] == ["1a", "1b"]


def test_upload_name_is_never_used_as_a_path(client, tmp_path):
    secret = tmp_path / "secret.txt"
    secret.write_text("SECRET 1H NMR δ 1.00 (s, 1H)", encoding="utf-8")
    data = {"file": (io.BytesIO(b"1H NMR (400 MHz, CDCl3) \xce\xb4 7.26 (s, 1H)"), str(secret))}
    payload = client.post("/api/upload", data=data).get_json()
    assert payload["name"] == "secret.txt"
    assert "SECRET" not in payload["text"] and "7.26" in payload["text"]
    traversal = {"file": (io.BytesIO(b"1H NMR \xce\xb4 7.26 (s, 1H)"), "..\\..\\windows\\x.md")}
    name = client.post("/api/upload", data=traversal).get_json()["name"]
    # Werkzeug may already have flattened the name; either way no path component survives
    assert name.endswith("x.md") and "/" not in name and "\\" not in name


def test_uploads_stay_in_memory(client, monkeypatch):
    import tempfile

    import werkzeug.formparser

    def refuse(*args, **kwargs):
        raise AssertionError("an upload was written to a temporary file")

    for name in ("TemporaryFile", "NamedTemporaryFile", "SpooledTemporaryFile", "mkstemp"):
        monkeypatch.setattr(tempfile, name, refuse)
    monkeypatch.setattr(werkzeug.formparser, "SpooledTemporaryFile", refuse, raising=False)
    # well above Werkzeug's 500 kB spill-to-disk threshold
    big = ("1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H).\n" * 30_000).encode("utf-8")
    response = client.post("/api/upload", data={"file": (io.BytesIO(big), "big.txt")})
    assert response.status_code == 200, response.get_json()
    assert len(response.get_json()["text"]) == len(big.decode("utf-8"))


@pytest.mark.parametrize("name, data, words", [
    ("old.doc", b"\xd0\xcf\x11\xe0", "Save As"),
    ("empty.txt", b"", "empty"),
    ("broken.docx", b"PK\x03\x04 not really a zip", "broken.docx"),
    ("picture.png", b"\x89PNG\r\n", ".png"),
])  # fmt: skip
def test_unreadable_uploads_are_400_with_advice(client, name, data, words):
    response = client.post("/api/upload", data={"file": (io.BytesIO(data), name)})
    assert response.status_code == 400
    assert words in response.get_json()["error"]


def test_upload_without_a_file_field(client):
    response = client.post("/api/upload", data={"other": "x"})
    assert response.status_code == 400
    assert "'file'" in response.get_json()["error"]


# ---- the server -------------------------------------------------------------------------------
def test_concurrent_requests_all_succeed():
    """The parser keeps state between calls; the server must not let requests interleave it."""
    server = make_server("127.0.0.1", 0)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    body = json.dumps({"text": demo_text(), "style": "letters-first"}).encode("utf-8")
    results: list[tuple[int, str]] = []

    def call(endpoint):
        request = urllib.request.Request(f"http://127.0.0.1:{server.port}{endpoint}", data=body,
                                         headers={"Content-Type": "application/json",
                                                  TOKEN_HEADER: server.app.config[
                                                      "PEAKPROOF_TOKEN"]})  # fmt: skip
        try:
            with urllib.request.urlopen(request, timeout=60) as response:
                results.append((response.status, endpoint))
        except urllib.error.HTTPError as exc:
            results.append((exc.code, exc.read().decode("utf-8")))

    try:
        workers = [threading.Thread(target=call, args=(e,))
                   for e in ["/api/format", "/api/check"] * 4]  # fmt: skip
        for w in workers:
            w.start()
        for w in workers:
            w.join()
    finally:
        server.shutdown()
        server.server_close()
    assert [code for code, _ in results] == [200] * 8, results


@pytest.mark.parametrize("host, loopback", [("127.0.0.1", True), ("127.3.4.5", True), ("::1", True),
                                            ("localhost", True), ("0.0.0.0", False),
                                            ("192.168.1.20", False), ("::", False)])  # fmt: skip
def test_is_loopback(host, loopback):
    assert is_loopback(host) is loopback


# ---- the spectrum picture ---------------------------------------------------------------------
def _png_size(data: bytes) -> tuple[int, int]:
    # PNG: 8-byte signature, then the IHDR chunk with big-endian width and height (ISO/IEC 15948)
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    return int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")


def test_plot_is_a_png_of_the_chosen_compound(client):
    import matplotlib.image
    import numpy as np

    from peakproof.web.app import PLOT_HEIGHT_PX, PLOT_WIDTH_PX

    response = client.post("/api/plot", json={"text": demo_text(), "block": 0})
    assert response.status_code == 200 and response.mimetype == "image/png"
    assert _png_size(response.data) == (PLOT_WIDTH_PX, PLOT_HEIGHT_PX)
    pixels = matplotlib.image.imread(io.BytesIO(response.data), format="png")
    dark = (pixels[..., :3].mean(axis=2) < 0.5).mean()
    assert 0.001 < dark < 0.2  # lines and labels drawn, not a blank or a filled picture
    other = client.post("/api/plot", json={"text": demo_text(), "block": 1})
    assert not np.array_equal(matplotlib.image.imread(io.BytesIO(other.data), format="png"), pixels)


@pytest.mark.parametrize("block, words", [(99, "no compound number 99"), (-1, "'block'"),
                                          ("1", "'block'"), (True, "'block'")])  # fmt: skip
def test_plot_of_a_missing_compound_is_a_400(client, block, words):
    response = client.post("/api/plot", json={"text": demo_text(), "block": block})
    assert response.status_code == 400
    assert words in response.get_json()["error"]


def test_plot_without_1h_data_is_a_400(client):
    text = "13C NMR (101 MHz, CDCl3) δ 128.4, 77.2."
    response = client.post("/api/plot", json={"text": text, "block": 0})
    assert response.status_code == 400
    assert "no 1H NMR signals" in response.get_json()["error"]
