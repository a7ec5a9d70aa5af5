"""Token rotation without a restart: the token file is re-read when it changes, in every process.

References: RFC 6750 section 3.1 (invalid_token answered with 401 and a WWW-Authenticate challenge);
rotating credentials without downtime, and keeping the old ones when a new file is unusable, is common
practice, no source.
"""
import logging
import os
import signal
import time
import urllib.error
import urllib.request

import pytest

from api import create_app, security
from serving import gunicorn

OLD, NEW = "line-2-reactor-token-0001", "line-2-reactor-token-0002"


def _write(path, text):
    path.write_text(text)
    stamp = time.time() + 5  # a distinct modification time even on coarse file-system clocks
    os.utime(path, (stamp, stamp))


def _status(client, token):
    return client.get("/v1/fluids", headers={"Authorization": f"Bearer {token}"}).status_code


@pytest.fixture()
def recheck_now(monkeypatch):
    monkeypatch.setattr(security, "TOKEN_RECHECK", 0.0)


def test_a_changed_token_file_takes_effect_without_a_restart(tmp_path, recheck_now):
    tokens = tmp_path / "tokens"
    _write(tokens, f"# rotated monthly\n{OLD}\n")
    client = create_app({"TESTING": True, "AUTH_TOKENS": "", "AUTH_TOKENS_FILE": str(tokens)}).test_client()
    assert (_status(client, OLD), _status(client, NEW)) == (200, 401)
    _write(tokens, f"{OLD}\n{NEW}\n")  # overlap while clients move over
    assert (_status(client, OLD), _status(client, NEW)) == (200, 200)
    _write(tokens, f"{NEW}\n")
    assert (_status(client, OLD), _status(client, NEW)) == (401, 200)


def test_an_unusable_new_file_keeps_the_tokens_in_force(tmp_path, recheck_now, caplog):
    tokens = tmp_path / "tokens"
    _write(tokens, f"{OLD}\n")
    client = create_app({"TESTING": True, "AUTH_TOKENS": "", "AUTH_TOKENS_FILE": str(tokens)}).test_client()
    with caplog.at_level(logging.ERROR, logger="coolmargin"):
        _write(tokens, "# emptied by mistake\n")
        assert _status(client, OLD) == 200  # never open, never locked out by a half-written file
        tokens.unlink()
        assert _status(client, OLD) == 200
    assert "cannot be used" in caplog.text
    _write(tokens, f"{NEW}\n")
    assert (_status(client, OLD), _status(client, NEW)) == (401, 200)


def _real_status(base, token):
    request = urllib.request.Request(base + "/v1/fluids", headers={"Authorization": f"Bearer {token}"})
    try:
        with urllib.request.urlopen(request, timeout=10) as response:
            return response.status
    except urllib.error.HTTPError as error:
        return error.code


@pytest.mark.slow
def test_rotation_on_a_real_server_by_file_change_and_by_sighup(tmp_path):
    tokens = tmp_path / "tokens"
    _write(tokens, f"{OLD}\n")
    with gunicorn(workers=2, env={"COOLMARGIN_AUTH_TOKENS_FILE": str(tokens), "COOLMARGIN_AUTH_TOKENS": ""}) as base:
        assert _real_status(base, OLD) == 200
        _write(tokens, f"{NEW}\n")
        time.sleep(security.TOKEN_RECHECK + 0.5)
        # every answer, whichever worker gives it, already uses the new file
        assert {_real_status(base, OLD) for _ in range(6)} == {401}
        assert {_real_status(base, NEW) for _ in range(6)} == {200}
        # SIGHUP replaces the workers (forked from the master, which read the old file): they use the new one
        base.process.send_signal(signal.SIGHUP)
        time.sleep(3)
        assert {_real_status(base, NEW) for _ in range(6)} == {200}
        assert _real_status(base, OLD) == 401
