"""Web API regressions found in review: odd but valid JSON never gives a server error."""

from __future__ import annotations

import pytest

pytest.importorskip("flask")

from peakproof.web.app import create_app  # noqa: E402


@pytest.fixture()
def client():
    # sends the page's per-session token, as the page's own script does
    app = create_app()
    client = app.test_client()
    client.environ_base["HTTP_X_PEAKPROOF_TOKEN"] = app.config["PEAKPROOF_TOKEN"]
    return client


# JSON allows "\ud800" (a lone UTF-16 surrogate, e.g. half an emoji cut by a clipboard); the
# reply could not be encoded as UTF-8 and the page got a 500.
LONE_SURROGATE = b'{"text": "1H NMR (400 MHz, CDCl3) \\ud800 7.26 (s, 1H), 3.81 (s, 3H)."}'


@pytest.mark.parametrize("endpoint", ["/api/check", "/api/format"])
def test_lone_surrogate_is_answered_not_a_server_error(client, endpoint):
    reply = client.post(endpoint, data=LONE_SURROGATE, content_type="application/json")
    assert reply.status_code == 200
    assert "\ufffd" in reply.get_json()["text"]


def test_lone_surrogate_keeps_finding_offsets(client):
    # the surrogate sits in the compound's name; the finding on 7.26 (CHCl3 in CDCl3, Gottlieb
    # 1997) must be highlighted at the same offsets as with an ordinary character there
    text = "Aryl ether X (4). 1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H), 3.81 (s, 3H)."
    raw = ('{"text": "' + text.replace("X", "\\ud800") + '"}').encode()
    reply = client.post("/api/check", data=raw, content_type="application/json").get_json()
    clean = client.post("/api/check", json={"text": text}).get_json()
    spans = [(f["rule"], f["span"]["start"], f["span"]["end"]) for f in clean["findings"]]
    assert spans and spans == [(f["rule"], f["span"]["start"], f["span"]["end"]) for f in reply["findings"]]


def test_plot_of_text_without_data_says_so(client):
    reply = client.post("/api/plot", json={"text": "The residue was purified by chromatography."})
    assert reply.status_code == 400
    assert "no NMR data" in reply.get_json()["error"]
