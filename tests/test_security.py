"""Bearer-token authentication, the CORS allow-list, security headers and secret-free logs.

References: RFC 6750 (bearer tokens: the Authorization header, the WWW-Authenticate challenge and its
error="invalid_token"), RFC 9457 (problem+json), the WHATWG Fetch standard (CORS preflight: OPTIONS with
Access-Control-Request-Method, answered by Access-Control-Allow-Origin/-Methods/-Headers) and the OWASP
Secure Headers project (nosniff, X-Frame-Options DENY, Referrer-Policy no-referrer, Cache-Control no-store).
"""
import hmac
import json
import logging
import urllib.error
import urllib.request

import pytest

from api import create_app, security

TOKEN = "s3cret-Token-4f9a81"  # invented test tokens
OTHER = "second-token-77c0"
ORIGIN = "https://plant-sheets.example"


def _app(**config):
    return create_app({"TESTING": True, "AUTH_TOKENS": "", "AUTH_TOKENS_FILE": "", "CORS_ORIGINS": "", **config})


@pytest.fixture()
def locked():
    return _app(AUTH_TOKENS=f"{TOKEN}, {OTHER}").test_client()


def _bearer(token):
    return {"Authorization": f"Bearer {token}"}


def test_service_is_open_when_no_token_is_configured():
    client = _app().test_client()
    assert client.get("/v1/fluids").status_code == 200


@pytest.mark.parametrize("headers, error", [
    ({}, None),
    (_bearer("wrong-token"), "invalid_token"),
    ({"Authorization": f"Basic {TOKEN}"}, None),  # another scheme is no bearer token
    ({"Authorization": "Bearer "}, None),
    (_bearer(TOKEN + "x"), "invalid_token"),  # a prefix of the supplied value is not enough
])
def test_missing_or_wrong_token_is_a_401_problem_with_the_bearer_challenge(locked, headers, error):
    response = locked.get("/v1/fluids", headers={"X-Request-ID": "req-401", **headers})
    assert response.status_code == 401
    assert response.mimetype == "application/problem+json"  # RFC 9457
    assert response.json["status"] == 401 and response.json["instance"] == "urn:request:req-401"
    challenge = response.headers["WWW-Authenticate"]
    assert challenge.startswith('Bearer realm="coolmargin"')  # RFC 6750 section 3
    assert ('error="invalid_token"' in challenge) == (error is not None)
    assert response.headers["Cache-Control"] == "no-store"
    assert TOKEN not in response.get_data(as_text=True)


def test_401_on_post_and_unknown_paths_too(locked):
    assert locked.post("/v1/properties", json={"fluid": "water", "temperature": 25}).status_code == 401
    assert locked.get("/v1/no-such-thing").status_code == 401  # nothing about the API leaks unauthenticated


@pytest.mark.parametrize("token", [TOKEN, OTHER])
def test_every_configured_token_is_accepted(locked, token):
    response = locked.get("/v1/properties?fluid=water&temperature=25", headers=_bearer(token))
    assert response.status_code == 200 and response.json["density"] == pytest.approx(997.05, rel=1e-4)
    # IAPWS-95 density of water at 25 degC, from memory


def test_scheme_is_case_insensitive(locked):
    assert locked.get("/v1/fluids", headers={"Authorization": f"bearer {TOKEN}"}).status_code == 200  # RFC 6750


def test_tokens_from_environment_variable(monkeypatch):
    monkeypatch.setenv("COOLMARGIN_AUTH_TOKENS", f"{TOKEN},{OTHER}")
    client = create_app({"TESTING": True}).test_client()
    assert client.get("/v1/fluids").status_code == 401
    assert client.get("/v1/fluids", headers=_bearer(OTHER)).status_code == 200


def test_tokens_from_file_with_comments(tmp_path, monkeypatch):
    path = tmp_path / "tokens"
    path.write_text(f"# spreadsheet users\n{TOKEN}\n\n  {OTHER}   # plant historian\n#disabled-token\n")
    monkeypatch.setenv("COOLMARGIN_AUTH_TOKENS_FILE", str(path))
    monkeypatch.delenv("COOLMARGIN_AUTH_TOKENS", raising=False)
    client = create_app({"TESTING": True}).test_client()
    assert client.get("/v1/fluids", headers=_bearer(TOKEN)).status_code == 200
    assert client.get("/v1/fluids", headers=_bearer(OTHER)).status_code == 200
    assert client.get("/v1/fluids", headers=_bearer("disabled-token")).status_code == 401
    assert client.get("/v1/fluids", headers=_bearer("# spreadsheet users")).status_code == 401


@pytest.mark.parametrize("content", [None, "# only a comment\n\n"])
def test_unusable_token_file_stops_start_up_instead_of_running_open(tmp_path, content):
    path = tmp_path / "tokens"
    if content is not None:
        path.write_text(content)
    with pytest.raises(security.ConfigurationError, match="AUTH_TOKENS_FILE"):
        _app(AUTH_TOKENS_FILE=str(path))


def test_every_token_is_compared_with_no_early_exit(monkeypatch):
    calls, original = [], hmac.compare_digest

    def counting(a, b):
        calls.append(1)
        return original(a, b)

    monkeypatch.setattr(security.hmac, "compare_digest", counting)
    digests = [security._digest(t) for t in (TOKEN, OTHER, "third")]
    assert security.token_matches(TOKEN, digests)  # the first one matches ...
    assert len(calls) == 3  # ... and the other two are still compared
    assert not security.token_matches("nope", digests)


@pytest.mark.parametrize("path", ["/health", "/ready", "/docs", "/openapi.yaml"])
def test_probes_and_the_contract_stay_open(locked, path):
    assert locked.get(path).status_code == 200


# ---- CORS ----------------------------------------------------------------------------------------
@pytest.fixture()
def cors():
    return _app(AUTH_TOKENS=TOKEN, CORS_ORIGINS=f"{ORIGIN}, https://other.example").test_client()


def _preflight(client, origin, path="/v1/properties"):
    return client.options(path, headers={"Origin": origin, "Access-Control-Request-Method": "POST",
                                         "Access-Control-Request-Headers": "authorization, content-type"})


def test_preflight_from_an_allowed_origin_is_a_204_without_auth(cors):
    response = _preflight(cors, ORIGIN)
    assert response.status_code == 204 and response.get_data() == b""
    assert response.headers["Access-Control-Allow-Origin"] == ORIGIN
    assert {m.strip() for m in response.headers["Access-Control-Allow-Methods"].split(",")} == {"GET", "POST", "PUT", "PATCH",
                                                                                             "DELETE"}
    allowed = {h.strip().lower() for h in response.headers["Access-Control-Allow-Headers"].split(",")}
    assert {"content-type", "authorization", "x-request-id", "if-match"} <= allowed
    assert "Origin" in response.headers["Vary"]


def test_disallowed_origin_gets_no_cors_headers(cors):
    for response in (_preflight(cors, "https://evil.example"),
                     cors.get("/v1/fluids", headers={"Origin": "https://evil.example", **_bearer(TOKEN)})):
        assert "Access-Control-Allow-Origin" not in response.headers
        assert "Access-Control-Allow-Methods" not in response.headers


def test_origin_match_is_exact(cors):
    for near_miss in (ORIGIN + ".evil.example", ORIGIN.replace("https", "http"), ORIGIN + ":8443", "null"):
        assert "Access-Control-Allow-Origin" not in _preflight(cors, near_miss).headers


def test_actual_request_from_allowed_origin_echoes_it_and_exposes_the_request_id(cors):
    response = cors.get("/v1/fluids", headers={"Origin": ORIGIN, **_bearer(TOKEN)})
    assert response.status_code == 200
    assert response.headers["Access-Control-Allow-Origin"] == ORIGIN
    assert "X-Request-ID" in response.headers["Access-Control-Expose-Headers"]
    assert "Access-Control-Allow-Credentials" not in response.headers  # bearer tokens, never cookies
    refused = cors.get("/v1/fluids", headers={"Origin": ORIGIN})
    assert refused.status_code == 401 and refused.headers["Access-Control-Allow-Origin"] == ORIGIN  # readable


def test_wildcard_allows_any_origin():
    client = _app(CORS_ORIGINS="*").test_client()
    assert _preflight(client, "https://any.example").headers["Access-Control-Allow-Origin"] == "https://any.example"


def test_no_cors_headers_when_no_origin_is_configured():
    response = _preflight(_app().test_client(), ORIGIN)
    assert "Access-Control-Allow-Origin" not in response.headers


def test_preflight_for_an_unknown_path_is_not_answered(cors):
    assert _preflight(cors, ORIGIN, "/v1/no-such-thing").status_code == 404


# ---- security headers ----------------------------------------------------------------------------
@pytest.mark.parametrize("path", ["/health", "/docs", "/v1/fluids", "/v1/no-such-thing"])
def test_security_headers_on_every_response(client, path):
    response = client.get(path)
    assert response.headers["X-Content-Type-Options"] == "nosniff"
    assert response.headers["X-Frame-Options"] == "DENY"
    assert response.headers["Referrer-Policy"] == "no-referrer"
    assert "frame-ancestors 'none'" in response.headers["Content-Security-Policy"]
    assert (response.headers.get("Cache-Control") == "no-store") == path.startswith("/v1/")


def test_csp_still_lets_the_docs_page_render(client):
    response = client.get("/docs")
    page = response.get_data(as_text=True)
    policy = dict(part.strip().split(" ", 1) for part in response.headers["Content-Security-Policy"].split(";"))
    assert "<style>" in page and policy["style-src"] == "'unsafe-inline'"
    # The policy forbids scripts and external resources: the page must not need any.
    assert policy["default-src"] == "'none'" and "script-src" not in policy
    assert "<script" not in page and "<link" not in page and 'src="http' not in page


# ---- logs ----------------------------------------------------------------------------------------
@pytest.fixture()
def captured(caplog):
    logger = logging.getLogger("coolmargin")  # does not propagate to the root logger caplog listens on
    logger.addHandler(caplog.handler)
    caplog.set_level(logging.INFO, logger="coolmargin")
    yield caplog
    logger.removeHandler(caplog.handler)


def test_logs_of_refused_and_failing_requests_hold_no_token(captured):
    app = _app(AUTH_TOKENS=TOKEN)

    def fails():  # an internal error whose message carries the header, as a careless library might
        from flask import request
        raise RuntimeError(f"upstream said no; headers were {dict(request.headers)!r}")

    app.add_url_rule("/v1/fails", "fails", fails)
    client = app.test_client()
    assert client.get("/v1/fluids", headers={"X-Request-ID": "wrong-1", **_bearer(TOKEN[:-1])}).status_code == 401
    response = client.get("/v1/fails", headers={"X-Request-ID": "boom-1", **_bearer(TOKEN)})
    assert response.status_code == 500 and TOKEN not in response.get_data(as_text=True)

    text = captured.text
    records = {getattr(r, "request_id", None): r for r in captured.records}
    assert {"wrong-1", "boom-1"} <= set(records)  # the lines carry the request id
    assert "token not recognised" in text and "RuntimeError" in text  # both were logged ...
    assert TOKEN not in text and TOKEN[:-1] not in text and "[redacted]" in text  # ... without the token


def test_redaction_of_header_shapes():
    app = create_app({"AUTH_TOKENS": TOKEN})  # noqa: F841 - its tokens are redacted while it lives
    for line in (f"Authorization: Bearer {TOKEN}", f"{{'Authorization': 'Bearer {TOKEN}'}}",
                 f"authorization={TOKEN}", f"token {TOKEN} seen", "Bearer abc.def-ghi"):
        cleaned = security.redact(line)
        assert TOKEN not in cleaned and "abc.def-ghi" not in cleaned and "[redacted]" in cleaned, line


@pytest.mark.slow
def test_gunicorn_access_log_is_one_json_object_a_line_without_secrets(tmp_path):
    from serving import gunicorn

    access = tmp_path / "access.log"
    env = {"COOLMARGIN_AUTH_TOKENS": TOKEN, "COOLMARGIN_ACCESS_LOG": str(access)}
    with gunicorn(env=env, workers=1) as base:
        for path, token in (("/v1/fluids", TOKEN), ("/v1/fluids", "wrong"),
                            ("/v1/properties?fluid=water&temperature=25", TOKEN),
                            ('/v1/x%5C%22%0A{"forged":1}', TOKEN)):
            request = urllib.request.Request(base + path, headers={**_bearer(token), "X-Request-ID": "gl-1"})
            try:
                urllib.request.urlopen(request, timeout=10).close()
            except urllib.error.HTTPError:
                pass
    lines = access.read_text().splitlines()
    assert len(lines) >= 5  # the readiness probe and the four calls
    entries = [json.loads(line) for line in lines]  # every line is valid JSON: no injected lines
    assert not any("forged" in entry for entry in entries)
    assert sorted(e["status"] for e in entries if e["request_id"] == "gl-1") == [200, 200, 401, 404]
    assert TOKEN not in access.read_text() and "Bearer" not in access.read_text()
