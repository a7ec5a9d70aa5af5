"""Lint and types in the suite: ruff on the whole tree and mypy (strict) on calc, as configured in
pyproject.toml, so CI (which runs make test) fails on a finding exactly as make lint does."""
import subprocess
import sys

import pytest

from serving import ROOT

pytestmark = pytest.mark.slow


def _run(*command: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", *command], cwd=ROOT, capture_output=True, text=True, timeout=600)


def test_ruff_finds_nothing():
    result = _run("ruff", "check", "--no-cache", "api", "calc", "schemas", "tests")
    assert result.returncode == 0, result.stdout + result.stderr


def test_mypy_strict_on_calc_finds_nothing():
    result = _run("mypy", "--no-incremental", "--cache-dir", "/dev/null")
    assert result.returncode == 0, result.stdout + result.stderr
