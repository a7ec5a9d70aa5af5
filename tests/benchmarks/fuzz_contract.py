"""The long contract-fuzzing run: schemathesis with all checks against a live gunicorn for four minutes.

    .venv/bin/python tests/benchmarks/fuzz_contract.py [SECONDS]

Prints schemathesis' report; exit status is schemathesis' (0: no failure of any check).
"""
from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from live_fuzz import run  # noqa: E402

if __name__ == "__main__":
    result = run(int(sys.argv[1]) if len(sys.argv) > 1 else 240)
    print(result.stdout)
    print(result.stderr, file=sys.stderr)
    sys.exit(result.returncode)
