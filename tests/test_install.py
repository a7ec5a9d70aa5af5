"""A clean install: the wheel alone, in a fresh virtualenv outside the checkout, gives a working service.

The contract (openapi.yaml), the docs template and the gunicorn settings must travel inside the wheel;
before they did, ``/docs`` and ``/openapi.yaml`` answered 500 and ``coolmargin serve`` failed.
"""
import json
import os
import shutil
import subprocess
import sys
import time
import urllib.request

import pytest

from serving import ROOT, free_port, wait_until_up

CONSTRAINTS = ROOT / "docker" / "constraints.txt"


def _get(url: str) -> tuple[int, str, bytes]:
    with urllib.request.urlopen(url, timeout=30) as response:
        return response.status, response.headers.get_content_type(), response.read()


@pytest.mark.slow
def test_wheel_in_a_fresh_virtualenv_serves_docs_contract_and_a_check(tmp_path):
    wheels, venv, elsewhere = tmp_path / "wheels", tmp_path / "venv", tmp_path / "elsewhere"
    elsewhere.mkdir()
    env = dict(os.environ, PIP_DISABLE_PIP_VERSION_CHECK="1")
    env.pop("PYTHONPATH", None)
    # Build from a copy of the sources, as from a clean clone: no stale build/ directory can leak into it.
    source = tmp_path / "source"
    shutil.copytree(ROOT, source, symlinks=True,
                    ignore=shutil.ignore_patterns(".git", ".venv*", "build", "*.egg-info", "__pycache__", "tests"))
    subprocess.run([sys.executable, "-m", "pip", "wheel", "--quiet", "--no-deps", "-w", str(wheels), str(source)],
                   check=True, env=env, timeout=600, cwd=elsewhere)
    (wheel,) = wheels.glob("coolmargin-*.whl")
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True)
    started = time.monotonic()
    subprocess.run([str(venv / "bin" / "python"), "-m", "pip", "install", "--quiet", "-c", str(CONSTRAINTS),
                    str(wheel)], check=True, env=env, timeout=900, cwd=elsewhere)
    print(f"wheel install with dependencies: {time.monotonic() - started:.1f} s")
    port = free_port()
    server = subprocess.Popen([str(venv / "bin" / "coolmargin"), "serve", "--port", str(port)], cwd=elsewhere,
                              env=dict(env, COOLMARGIN_WORKERS="1", COOLMARGIN_ACCESS_LOG="/dev/null"),
                              stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    base = f"http://127.0.0.1:{port}"
    try:
        wait_until_up(base)
        status, kind, body = _get(base + "/openapi.yaml")
        assert (status, kind) == (200, "application/yaml")
        assert body == (ROOT / "openapi.yaml").read_bytes()  # the very contract of the checkout
        status, kind, body = _get(base + "/docs")
        assert (status, kind) == (200, "text/html") and b"/v1/cooling-check" in body
        request = urllib.request.Request(base + "/v1/cooling-check",
                                         data=(ROOT / "examples" / "cooling_check_production.json").read_bytes(),
                                         headers={"Content-Type": "application/json"})
        with urllib.request.urlopen(request, timeout=60) as response:
            answer = json.loads(response.read())
        # The same numbers as from the checkout: the demo's production check (README, margin 1.79).
        assert answer["adequate"] is True and answer["margin"] == pytest.approx(1.79, abs=0.05)
        assert any("calorimetry" in caution for caution in answer["cautions"])
    finally:
        server.terminate()
        server.wait(timeout=30)
    installed = subprocess.run([str(venv / "bin" / "python"), "-c", "import api; print(api.__file__)"],
                               capture_output=True, text=True, cwd=elsewhere, check=True).stdout
    assert str(ROOT) not in installed  # really the wheel, not the checkout
