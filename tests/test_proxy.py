"""docker/compose.yaml's proxy, run natively: Debian's nginx with docker/nginx.conf in front of a real gunicorn.

There is no Docker engine on the build machines. These tests run docker/nginx.Dockerfile's CMD and
HEALTHCHECK with docker/nginx.conf, rewritten only to loopback ports and a temporary directory, in front
of gunicorn started with docker/gunicorn.conf.py. `.ci/run` (via `make nginx`) installs nginx.
References: RFC 9110 sections 15.5.14 (413), 15.5.15 (414), 15.6.3 (502), 15.6.5 (504); RFC 6585
sections 4 (429) and 5 (431); RFC 9457 (problem details); buffering slow clients in a reverse proxy in
front of a threaded application server is common practice, no source.
"""
import contextlib
import json
import os
import re
import shutil
import signal
import socket
import subprocess
import threading
import time
import urllib.request
from pathlib import Path

import pytest
import yaml

from api import DEFAULTS
from serving import ROOT, free_port, gunicorn, raw_request, slow_uploads, timed_get

pytestmark = pytest.mark.slow
CONF = (ROOT / "docker" / "nginx.conf").read_text()
DOCKERFILE = (ROOT / "docker" / "nginx.Dockerfile").read_text().replace("\\\n", " ")
NGINX = shutil.which("nginx") or "/usr/sbin/nginx"


def _instruction(keyword: str) -> list[str]:
    line = next(line for line in DOCKERFILE.splitlines() if line.startswith(keyword + " "))
    return json.loads(line[line.index("["):])


@contextlib.contextmanager
def nginx(upstream: str, tmp_path: Path, **rewrites: str):
    """Run the image's CMD with docker/nginx.conf, rewritten to loopback ports and ``tmp_path``; yield its URL.

    ``rewrites`` replaces further text of the configuration (shorter timeouts, a lower rate) by name:
    each key names a regular expression in ``_REWRITES``.
    """
    assert os.path.exists(NGINX), "nginx is not installed: run `make nginx` (Debian's nginx package)"
    port = free_port()
    prefix = tmp_path / "nginx"
    prefix.mkdir()
    conf = CONF.replace("/tmp/nginx", str(prefix)).replace("coolmargin:8000", upstream)
    conf = conf.replace("listen 8080;", f"listen 127.0.0.1:{port};")
    for name, value in rewrites.items():
        conf, count = re.subn(_REWRITES[name], value, conf)
        assert count == 1, name
    conf_path = tmp_path / "nginx.conf"
    conf_path.write_text(conf)
    command = _instruction("CMD")
    script = command[2].replace("/tmp/nginx", str(prefix)).replace("/etc/coolmargin/nginx.conf", str(conf_path))
    if os.geteuid() == 0:  # as root nginx would hand its workers to 'nobody', who cannot use tmp_path
        script = script.replace("daemon off;", "daemon off; user root;")
    log = (tmp_path / "nginx.log").open("wb")
    process = subprocess.Popen(command[:2] + [script], stdout=log, stderr=subprocess.STDOUT)
    base = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 20
        while True:
            try:
                socket.create_connection(("127.0.0.1", port), timeout=1).close()
                break
            except OSError:
                assert process.poll() is None, (tmp_path / "nginx.log").read_text()
                assert time.monotonic() < deadline, "nginx did not start"
                time.sleep(0.1)
        yield base
    finally:
        process.send_signal(signal.SIGTERM)
        try:
            process.wait(timeout=10)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()
        log.close()


_REWRITES = {
    "read_timeout": r"proxy_read_timeout 45s;",
    "rate": r"rate=50r/s;",
    "burst": r"burst=100 nodelay;",
}


def _assert_problem(status: int, headers: dict, body: bytes, expected: int) -> dict:
    assert status == expected, (status, body[:300])
    assert headers["Content-Type"] == "application/problem+json"
    problem = json.loads(body)
    assert problem["status"] == expected and problem["title"] and problem["detail"]
    assert problem["instance"] == f"urn:request:{headers['X-Request-ID']}"
    return problem


@pytest.fixture(scope="module")
def service():
    """gunicorn with one worker of two threads: one request that reached it would make /ready say busy."""
    with gunicorn(workers=1, env={"COOLMARGIN_THREADS": "2"}) as base:
        yield base


def test_proxy_passes_requests_and_the_request_id(service, tmp_path):
    with nginx(service.rsplit("//", 1)[1], tmp_path) as proxy:
        request = urllib.request.Request(proxy + "/v1/properties?fluid=water&temperature=25",
                                         headers={"X-Request-ID": "plant-7.check-42"})
        with urllib.request.urlopen(request, timeout=10) as response:
            assert response.headers["X-Request-ID"] == "plant-7.check-42"
            assert json.loads(response.read())["density"] == pytest.approx(997.05, rel=1e-4)  # IAPWS-95, from memory
        # the service's own problems pass through unchanged
        status, _, body, headers = timed_get(proxy + "/v1/properties?fluid=water&temperature=-50")
        assert status == 422 and headers["Content-Type"] == "application/problem+json"
        assert json.loads(body)["errors"]


def test_slow_uploads_are_buffered_away_from_gunicorn(service, tmp_path):
    with nginx(service.rsplit("//", 1)[1], tmp_path) as proxy:
        with slow_uploads(proxy, 8):
            # gunicorn has seen none of the eight: its two threads are free, so it is ready
            assert timed_get(service + "/ready")[0] == 200
            status, seconds, *_ = timed_get(proxy + "/health", timeout=5)
            assert status == 200 and seconds < 2.0
        # the same check fails without the proxy: one slow upload straight to gunicorn takes a thread
        with slow_uploads(service, 1):
            assert timed_get(service + "/ready")[0] == 503


def test_errors_nginx_answers_itself_are_problem_json(service, tmp_path):
    with nginx(service.rsplit("//", 1)[1], tmp_path) as proxy:
        too_large = b"{" + b" " * DEFAULTS["MAX_CONTENT_LENGTH"] + b"}"
        request = (b"POST /v1/properties HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\n"
                   + f"Content-Length: {len(too_large)}\r\n\r\n".encode())
        _assert_problem(*raw_request(proxy, request), 413)  # refused on its Content-Length, before the body
        _assert_problem(*raw_request(proxy, b"GET /v1/properties?" + b"a" * 9000 + b" HTTP/1.1\r\nHost: x\r\n\r\n"), 414)
        _assert_problem(*raw_request(proxy, b"GET /health HTTP/1.1\r\nHost: x\r\nX-Note: " + b"a" * 9000 + b"\r\n\r\n"), 431)
        _assert_problem(*raw_request(proxy, b"NOT HTTP AT ALL\r\n\r\n"), 400)
        # the healthcheck of the proxy image, run as the image runs it
        healthcheck = _instruction("HEALTHCHECK")
        port = proxy.rsplit(":", 1)[1]
        probe = [healthcheck[0], healthcheck[1], healthcheck[2].replace("127.0.0.1/8080", f"127.0.0.1/{port}")]
        assert subprocess.run(probe, timeout=10).returncode == 0


def test_body_limit_and_line_limit_match_the_service():
    size = re.search(r"client_max_body_size (\d+)m;", CONF)
    assert size and int(size.group(1)) * 1024 * 1024 == DEFAULTS["MAX_CONTENT_LENGTH"]
    buffers = re.search(r"large_client_header_buffers \d+ (\d+)k;", CONF)
    gunicorn_line = 8190  # docker/gunicorn.conf.py limit_request_line default; the line's CRLF takes 2 bytes more
    assert buffers and int(buffers.group(1)) * 1024 == gunicorn_line + 2
    assert f"larger than {DEFAULTS['MAX_CONTENT_LENGTH']} bytes" in CONF


def test_gateway_errors_are_problem_json_with_retry_after(tmp_path):
    # an upstream that accepts and never answers (504), and one that is not there (502)
    silent = socket.socket()
    silent.bind(("127.0.0.1", 0))
    silent.listen(8)
    held = []
    stop = threading.Event()

    def accept():
        silent.settimeout(0.2)
        while not stop.is_set():
            try:
                held.append(silent.accept()[0])
            except OSError:
                continue

    thread = threading.Thread(target=accept, daemon=True)
    thread.start()
    try:
        upstream = f"127.0.0.1:{silent.getsockname()[1]}"
        with nginx(upstream, tmp_path, read_timeout="proxy_read_timeout 1s;") as proxy:
            status, _, body, headers = timed_get(proxy + "/health", timeout=15)
            _assert_problem(status, headers, body, 504)
            assert headers["Retry-After"].isdigit()
    finally:
        stop.set()
        thread.join(5)
        for sock in held:
            sock.close()
        silent.close()
    (tmp_path / "gone").mkdir()
    with nginx(f"127.0.0.1:{free_port()}", tmp_path / "gone") as proxy:
        status, _, body, headers = timed_get(proxy + "/health")
        _assert_problem(status, headers, body, 502)
        assert headers["Retry-After"].isdigit()


def test_rate_backstop_is_429_problem_json(service, tmp_path):
    with nginx(service.rsplit("//", 1)[1], tmp_path, rate="rate=1r/m;", burst="burst=1 nodelay;") as proxy:
        answers = [timed_get(proxy + "/health") for _ in range(4)]
    statuses = [status for status, *_ in answers]
    assert statuses[0] == 200 and 429 in statuses
    status, _, body, headers = next(a for a in answers if a[0] == 429)
    _assert_problem(status, headers, body, 429)
    assert headers["Retry-After"] == "1"


def test_compose_stack_puts_the_proxy_in_front():
    compose = yaml.safe_load((ROOT / "docker" / "compose.yaml").read_text())
    services = compose["services"]
    assert set(services) == {"proxy", "coolmargin", "database", "queue", "worker"}  # the job queue and its worker
    assert services["proxy"]["build"]["dockerfile"] == "docker/nginx.Dockerfile"
    assert all("ports" not in services[name] for name in set(services) - {"proxy"})  # only the proxy is published
    assert services["proxy"]["ports"][0].startswith("127.0.0.1:") and services["proxy"]["ports"][0].endswith(":8080")
    env = services["coolmargin"]["environment"]
    assert int(env["COOLMARGIN_MAX_CONTENT_LENGTH"]) == DEFAULTS["MAX_CONTENT_LENGTH"]
    assert env["COOLMARGIN_DATABASE_URL"].startswith("postgresql+psycopg://") and "@database:5432/" in env["COOLMARGIN_DATABASE_URL"]
    assert "coolmargin:8000" in CONF and "listen 8080;" in CONF  # the names and ports the stack uses
    grace = int(services["coolmargin"]["stop_grace_period"].rstrip("s"))
    assert grace > int(env["COOLMARGIN_DRAIN_SECONDS"]) + DEFAULTS["REQUEST_BUDGET"]
