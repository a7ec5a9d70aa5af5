"""Start gunicorn with the container's config on a free loopback port (used by tests and benchmarks)."""
from __future__ import annotations

import contextlib
import os
import socket
import subprocess
import sys
import tempfile
import time
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


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


@contextlib.contextmanager
def gunicorn(command: list[str] | None = None, env: dict | None = None, workers: int = 2):
    """Yield the base URL of a gunicorn started with docker/gunicorn.conf.py on 127.0.0.1."""
    port = free_port()
    environment = dict(os.environ)
    environment.update(env or {})
    environment.update(COOLMARGIN_BIND=f"127.0.0.1:{port}", COOLMARGIN_WORKERS=str(workers),
                       COOLMARGIN_ACCESS_LOG=environment.get("COOLMARGIN_ACCESS_LOG", "/dev/null"))
    command = command or [sys.executable, "-m", "gunicorn", "--config", "docker/gunicorn.conf.py", "api.wsgi:app"]
    log = tempfile.TemporaryFile()
    process = subprocess.Popen(command, cwd=ROOT, env=environment, stdout=log, stderr=subprocess.STDOUT)
    base = f"http://127.0.0.1:{port}"
    try:
        try:
            wait_until_up(base)
        except TimeoutError:
            log.seek(0)
            raise TimeoutError(log.read().decode(errors="replace")[-3000:]) from None
        yield base
    finally:
        log.close()
        process.terminate()
        try:
            process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            process.kill()
            process.wait()
