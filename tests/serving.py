"""Start gunicorn with the container's config on a free loopback port (used by tests and benchmarks)."""
from __future__ import annotations

import contextlib
import os
import socket
import subprocess
import sys
import tempfile
import time
import urllib.error
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
#: A rate limit that load tests and benchmarks (all from one address) never reach; the limiter still runs.
UNLIMITED = "1000000 per minute"


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def wait_until_up(base_url: str, timeout: float = 60.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        try:
            with urllib.request.urlopen(base_url + "/health", timeout=2) as response:
                if response.status == 200:
                    return
        except OSError:
            time.sleep(0.2)
    raise TimeoutError(f"{base_url} did not answer /health within {timeout} s")


class Server(str):
    """The base URL of a running server, with its process and its combined log."""

    process: subprocess.Popen
    log: "tempfile._TemporaryFileWrapper"

    def log_text(self) -> str:
        self.log.flush()
        self.log.seek(0)
        return self.log.read().decode(errors="replace")


@contextlib.contextmanager
def gunicorn(command: list[str] | None = None, env: dict | None = None, workers: int = 2):
    """Yield the base URL (a :class:`Server`) of a gunicorn started with docker/gunicorn.conf.py on 127.0.0.1.

    Test servers stop at once on SIGTERM (no drain period) unless ``env`` sets COOLMARGIN_DRAIN_SECONDS.
    """
    port = free_port()
    environment = dict(os.environ)
    environment.setdefault("COOLMARGIN_DRAIN_SECONDS", "0")
    environment.setdefault("COOLMARGIN_RATE_LIMIT", UNLIMITED)  # load tests come from one address
    environment.update(env or {})
    environment.update(COOLMARGIN_BIND=f"127.0.0.1:{port}", COOLMARGIN_WORKERS=str(workers),
                       COOLMARGIN_ACCESS_LOG=environment.get("COOLMARGIN_ACCESS_LOG", "/dev/null"))
    command = command or [sys.executable, "-m", "gunicorn", "--config", "docker/gunicorn.conf.py", "api.wsgi:app"]
    log = tempfile.TemporaryFile()
    process = subprocess.Popen(command, cwd=ROOT, env=environment, stdout=log, stderr=subprocess.STDOUT)
    base = Server(f"http://127.0.0.1:{port}")
    base.process, base.log = process, log
    try:
        try:
            wait_until_up(base)
        except TimeoutError:
            raise TimeoutError(base.log_text()[-3000:]) from None
        yield base
    finally:
        log.close()
        process.terminate()
        try:
            process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()


@contextlib.contextmanager
def slow_uploads(base_url: str, count: int, path: str = "/v1/properties", length: int = 100_000):
    """Open ``count`` connections that announce a ``length``-byte JSON body and send only its first byte.

    They stay open (holding whatever reads their bodies) until the block ends. Loopback only.
    """
    host, port = base_url.rsplit("//", 1)[1].rsplit(":", 1)
    assert host == "127.0.0.1"
    head = (f"POST {path} HTTP/1.1\r\nHost: {host}\r\nContent-Type: application/json\r\n"
            f"Content-Length: {length}\r\n\r\n{{").encode()
    sockets = []
    try:
        for _ in range(count):
            sock = socket.create_connection((host, int(port)), timeout=5)
            sock.sendall(head)
            sockets.append(sock)
        time.sleep(0.3)  # let the server take them up
        yield sockets
    finally:
        for sock in sockets:
            sock.close()


def timed_get(url: str, timeout: float = 10.0) -> tuple[int, float, bytes, dict]:
    """(status, seconds, body, headers) of one GET; an HTTP error status is returned, not raised."""
    started = time.monotonic()
    try:
        with urllib.request.urlopen(url, timeout=timeout) as response:
            return response.status, time.monotonic() - started, response.read(), dict(response.headers)
    except urllib.error.HTTPError as error:
        return error.code, time.monotonic() - started, error.read(), dict(error.headers)


def raw_request(base_url: str, data: bytes, timeout: float = 10.0) -> tuple[int, dict, bytes]:
    """Send raw bytes (a request no HTTP library would send) to a loopback server; (status, headers, body)."""
    host, port = base_url.rsplit("//", 1)[1].rsplit(":", 1)
    assert host == "127.0.0.1"
    with socket.create_connection((host, int(port)), timeout=timeout) as sock:
        sock.sendall(data)
        answer = b""
        while chunk := sock.recv(65536):
            answer += chunk
    head, _, body = answer.partition(b"\r\n\r\n")
    lines = head.decode("latin-1").split("\r\n")
    return int(lines[0].split()[1]), dict(line.split(": ", 1) for line in lines[1:] if ": " in line), body
