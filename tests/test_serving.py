"""The real server under hostile clients: slow uploads, saturation, draining, hang-ups, control sockets.

Every test starts gunicorn with docker/gunicorn.conf.py on a free loopback port and stops it.
References: slow clients holding a server's workers ("slowloris") and probes that report a saturated
or draining server as not ready are common practice, no source; RFC 9110 section 15.6.4 (503) and
10.2.3 (Retry-After); the 2 s bound on /health is coolmargin's own requirement (issue: "keep
answering /health within 2 s while 8 slow uploads are open").
"""
import json
import os
import signal
import socket
import subprocess
import sys
import time
from pathlib import Path

import pytest

from serving import ROOT, gunicorn, raw_request, slow_uploads, timed_get

pytestmark = pytest.mark.slow
DEMO = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())


def test_health_answers_within_2_s_while_8_slow_uploads_are_open():
    with gunicorn(workers=2) as base:
        with slow_uploads(base, 8):
            timings = [timed_get(base + "/health", timeout=5) for _ in range(5)]
    assert [status for status, *_ in timings] == [200] * 5
    assert max(seconds for _, seconds, *_ in timings) < 2.0, timings


def test_the_sync_worker_fails_that_test():
    """The check above can fail: with one sync worker (the old configuration) one slow upload blocks /health."""
    with gunicorn(workers=1, env={"COOLMARGIN_WORKER_CLASS": "sync"}) as base:
        with slow_uploads(base, 1):
            with pytest.raises(OSError):  # timed out
                timed_get(base + "/health", timeout=2)


def test_ready_is_503_while_every_thread_is_busy_and_200_again_after():
    with gunicorn(workers=1, env={"COOLMARGIN_THREADS": "2"}) as base:
        assert timed_get(base + "/ready")[0] == 200
        with slow_uploads(base, 1):  # holds one of the two threads; the probe takes the other
            status, _, body, headers = timed_get(base + "/ready")
        assert status == 503 and headers["Content-Type"] == "application/problem+json"
        assert "busy" in json.loads(body)["detail"] and headers["Retry-After"] == "1"
        time.sleep(0.3)
        assert timed_get(base + "/ready")[0] == 200
        assert timed_get(base + "/health")[0] == 200


def test_ready_is_503_while_draining_after_sigterm_and_the_server_still_answers():
    with gunicorn(workers=1, env={"COOLMARGIN_DRAIN_SECONDS": "3"}) as base:
        base.process.send_signal(signal.SIGTERM)
        time.sleep(0.5)
        status, _, body, _ = timed_get(base + "/ready")
        assert status == 503 and "draining" in json.loads(body)["detail"]
        assert timed_get(base + "/health")[0] == 200  # still serving while the balancer takes it out
        assert timed_get(base + "/v1/properties?fluid=water&temperature=20")[0] == 200
        base.process.wait(timeout=15)  # then it stops by itself


def _post_and_hang_up(base: str, body: dict, after: float) -> None:
    host, port = base.rsplit("//", 1)[1].rsplit(":", 1)
    payload = json.dumps(body).encode()
    with socket.create_connection((host, int(port)), timeout=5) as sock:
        sock.sendall(b"POST /v1/scale-up HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\n"
                     + f"Content-Length: {len(payload)}\r\n\r\n".encode() + payload)
        time.sleep(after)


def test_a_client_that_hangs_up_frees_the_calculation_slot():
    # one worker, one calculation slot: a 50-case scale-up batch holds it for 7 s or more unless the
    # server notices the client has gone
    with gunicorn(workers=1, env={"COOLMARGIN_CALCULATION_SLOTS": "1"}) as base:
        _post_and_hang_up(base, {"cases": [DEMO] * 50}, after=1.0)
        status, seconds, _, _ = timed_get(base + "/v1/properties?fluid=water&temperature=20", timeout=30)
        assert status == 200 and seconds < 3.0, seconds
        time.sleep(0.3)
        assert "the caller went away" in base.log_text()


def test_each_instance_has_its_own_control_socket(tmp_path):
    gunicornc = str(Path(sys.executable).with_name("gunicornc"))
    with gunicorn(workers=1) as first, gunicorn(workers=1) as second:
        answers = []
        for base in (first, second):
            bind = base.rsplit("//", 1)[1]
            path = next(Path(p) for p in _control_sockets() if bind.replace(":", "_") in p.name)
            shown = subprocess.run([gunicornc, "-s", str(path), "-c", "show workers", "-j"], capture_output=True,
                                   text=True, timeout=20, check=True)
            answers.append(json.loads(shown.stdout))
        pids = [{w["pid"] for w in answer["workers"]} for answer in answers]
        assert len(pids[0]) == len(pids[1]) == 1 and not pids[0] & pids[1]


def _control_sockets():
    import tempfile

    folder = Path(os.environ.get("XDG_RUNTIME_DIR") or tempfile.gettempdir()) / f"coolmargin-{os.getuid()}"
    return list(folder.glob("gunicorn-*.ctl"))


def test_errors_gunicorn_answers_itself_are_problem_json():
    # RFC 9110 15.5.1 (400), 15.5.15 (414); RFC 6585 section 5 (431)
    with gunicorn(workers=1) as base:
        cases = {
            414: b"GET /v1/properties?" + b"a" * 9000 + b" HTTP/1.1\r\nHost: x\r\n\r\n",
            431: b"GET /health HTTP/1.1\r\nHost: x\r\nX-Note: " + b"a" * 9000 + b"\r\n\r\n",
            400: b"GET /health HTTP/1.1\r\nHost: x\r\nBad Header Name: 1\r\n\r\n",
        }
        for expected, request in cases.items():
            status, headers, body = raw_request(base, request)
            assert status == expected, body
            assert headers["Content-Type"] == "application/problem+json"
            problem = json.loads(body)
            assert problem["status"] == expected and problem["title"] and problem["detail"]
