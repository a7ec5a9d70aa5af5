"""The container's recipe, run natively: same install command, same gunicorn config, real HTTP.

There is no Docker engine on the build machines, so these tests keep docker/Dockerfile honest by
executing its steps here: the pip install line in a fresh virtualenv, the CMD with its config, and
the HEALTHCHECK command against the running server.
"""
import fnmatch
import json
import os
import re
import shlex
import subprocess
import sys
import urllib.request
from pathlib import Path

import pytest

from serving import ROOT, gunicorn

DOCKERFILE = (ROOT / "docker" / "Dockerfile").read_text()


def _instructions(keyword: str) -> list[str]:
    joined = DOCKERFILE.replace("\\\n", " ")
    return [line.strip()[len(keyword):].strip() for line in joined.splitlines()
            if line.strip().upper().startswith(keyword + " ")]


def _get_json(url: str) -> dict:
    with urllib.request.urlopen(url, timeout=10) as response:
        return json.loads(response.read())


@pytest.mark.slow
def test_gunicorn_with_container_config_serves_health_and_properties():
    with gunicorn() as base:
        assert _get_json(base + "/health")["status"] == "ok"
        body = _get_json(base + "/v1/properties?fluid=water&temperature=25")
        assert body["density"] == pytest.approx(997.05, rel=1e-4)  # IAPWS-95, from memory


def _ignored(relative: str, patterns: list[str]) -> bool:
    parts = relative.split("/")
    for pattern in patterns:
        bare = pattern.removeprefix("**/")
        candidates = ["/".join(parts[i:j]) for i in range(len(parts)) for j in range(i + 1, len(parts) + 1)] \
            if pattern.startswith("**/") else ["/".join(parts[:j]) for j in range(1, len(parts) + 1)]
        if any(fnmatch.fnmatchcase(candidate, bare) for candidate in candidates):
            return True
    return False


def test_build_context_leaves_out_virtualenvs_history_and_caches():
    """docker/Dockerfile.dockerignore (BuildKit's per-Dockerfile ignore file) keeps the context small."""
    ignore = ROOT / "docker" / "Dockerfile.dockerignore"
    patterns = [line.strip() for line in ignore.read_text().splitlines() if line.strip() and not line.startswith("#")]
    kept, total = [], 0
    for path in ROOT.rglob("*"):
        relative = path.relative_to(ROOT).as_posix()
        if path.is_file() and not path.is_symlink() and not _ignored(relative, patterns):
            kept.append(relative)
            total += path.stat().st_size
    assert {"pyproject.toml", "README.md", "openapi.yaml", "docker/constraints.txt", "api/cli.py"} <= set(kept)
    assert not [k for k in kept if k.startswith((".venv", ".git/", "tests/")) or "__pycache__" in k]
    assert total < 5_000_000, total  # the sources and the contract; was 480 MB with .venv and .git


def test_image_and_make_use_the_same_pinned_versions():
    constraints = (ROOT / "docker" / "constraints.txt").read_text()
    pinned = {line.split("==")[0].lower().replace("_", "-") for line in constraints.splitlines() if "==" in line}
    declared = re.findall(r'^\s+"([A-Za-z0-9_.-]+)[><=]', (ROOT / "pyproject.toml").read_text(), re.MULTILINE)
    assert declared and {name.lower().replace("_", "-") for name in declared} <= pinned
    assert "-c docker/constraints.txt" in " ".join(_instructions("RUN"))
    assert "-c $(CONSTRAINTS)" in (ROOT / "Makefile").read_text()


def test_dockerfile_shape():
    assert DOCKERFILE.startswith("# ") and "FROM python:3.11-slim" in DOCKERFILE
    assert _instructions("USER") and _instructions("USER")[0] != "root"
    assert _instructions("HEALTHCHECK") and "/health" in _instructions("HEALTHCHECK")[0]
    assert json.loads(_instructions("CMD")[0])[:3] == ["gunicorn", "--config", "docker/gunicorn.conf.py"]


@pytest.mark.slow
def test_dockerfile_steps_natively(tmp_path):
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True)
    bin_dir = venv / "bin"
    env = dict(os.environ, PATH=f"{bin_dir}:{os.environ['PATH']}", PIP_DISABLE_PIP_VERSION_CHECK="1")
    env.pop("PYTHONPATH", None)
    installs = [r for r in _instructions("RUN") if "pip install" in r]
    assert installs, "the Dockerfile must install the project with pip"
    for command in installs:
        subprocess.run(command, shell=True, cwd=ROOT, env=env, check=True, timeout=900)
    cmd = json.loads(_instructions("CMD")[0])
    cmd[0] = str(bin_dir / cmd[0])
    healthcheck = _instructions("HEALTHCHECK")[0].split(" CMD ", 1)[1]
    with gunicorn(cmd, env={"PATH": env["PATH"]}) as base:
        port = base.rsplit(":", 1)[1]
        probe = healthcheck.replace("127.0.0.1:8000", f"127.0.0.1:{port}")
        assert subprocess.run(shlex.split(probe), env=env, timeout=30).returncode == 0
        assert _get_json(base + "/v1/properties?fluid=toluene&temperature=40")["density"] > 800
