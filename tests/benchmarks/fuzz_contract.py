"""The long contract-fuzzing runs: schemathesis with all checks against a live gunicorn, SECONDS (240) for
the examples and random generation, then SECONDS for the coverage phase (boundary values of every field).

    .venv/bin/python tests/benchmarks/fuzz_contract.py [SECONDS]

Prints schemathesis' reports; exit status 0 when neither run found a failure of any check.
"""
from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from live_fuzz import run  # noqa: E402

if __name__ == "__main__":
    seconds = int(sys.argv[1]) if len(sys.argv) > 1 else 240
    status = 0
    for phases in ("examples,fuzzing", "coverage"):
        result = run(seconds, phases)
        print(result.stdout)
        print(result.stderr, file=sys.stderr)
        status = status or result.returncode
    sys.exit(status)
