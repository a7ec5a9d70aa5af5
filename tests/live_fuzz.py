"""Schemathesis with every check against a live gunicorn (the container's config) on a free loopback port.

Shared by tests/test_live_fuzz.py (bounded, inside ``make test``) and tests/benchmarks/fuzz_contract.py
(the long run). Reference: the OpenAPI 3.1 contract (openapi.yaml) and RFC 9457 problem details.
"""
from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from serving import ROOT, gunicorn

SEED = 20261203
CONFIG = Path(__file__).resolve().parent / "schemathesis.toml"


def run(seconds: int, phases: str = "examples,coverage,fuzzing", workers: int = 2) -> subprocess.CompletedProcess:
    """Run schemathesis' ``phases`` on every operation for at most ``seconds`` and return the run.

    The time budget covers every phase; the coverage phase alone (every bound of every field) takes
    about four minutes on two cores, so a short run reaches only part of it.
    """
    executable = Path(sys.executable).with_name("schemathesis")
    # short simulation budget, so a generated simulation cannot hold a worker for long
    with gunicorn(env={"COOLMARGIN_SIMULATION_WALL_TIME": "2"}, workers=workers) as base:
        return subprocess.run(
            [str(executable), "--config-file", str(CONFIG), "run", str(ROOT / "openapi.yaml"), "--url", base,
             "--checks", "all", "--max-time", str(seconds), "--seed", str(SEED), "--no-shrink",
             "--generation-database", "none", "--workers", "2", "--phases", phases],
            cwd=ROOT, capture_output=True, text=True, timeout=seconds * 4 + 300)
