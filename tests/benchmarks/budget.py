"""The largest legal scale-up batch, in process: how long it holds a worker and how much memory it takes.

50 cases (COOLMARGIN_MAX_BATCH_CASES) of the demo scale-up, each with 20 targets (COOLMARGIN_MAX_SCALES):
its two explicit vessels and 18 similar vessels from 0.01 to 40 m3. Prints the wall time, the cases
computed and cut off by the time budget, the peak Python memory (tracemalloc) and the answer's size.
A script, not a test:

    python tests/benchmarks/budget.py [--budget 20]      # the default request budget
    python tests/benchmarks/budget.py --budget 1e9       # no practical budget
"""
from __future__ import annotations

import argparse
import json
import sys
import time
import tracemalloc
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def batch() -> dict:
    demo = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())
    volumes = [0.01 * (4000.0 ** (i / 17)) for i in range(18)]  # 0.01 .. 40 m3
    case = dict(demo, targets=demo["targets"] + [{"volume": v} for v in volumes])
    assert len(case["targets"]) == 20
    return {"cases": [case] * 50}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--budget", type=float, default=None, help="COOLMARGIN_REQUEST_BUDGET in s (default: the app's)")
    args = parser.parse_args(argv)
    from api import create_app

    config = {"RATE_LIMIT": ""}
    if args.budget is not None:
        config["REQUEST_BUDGET"] = args.budget
    client = create_app(config).test_client()
    body = batch()
    tracemalloc.start()
    started = time.perf_counter()
    response = client.post("/v1/scale-up", json=body)
    elapsed = time.perf_counter() - started
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    statuses = Counter(case["status"] for case in response.json["cases"])
    print(f"code             {Path(sys.modules['api'].__file__).parent.parent}")
    print(f"budget           {args.budget if args.budget is not None else 'app default'} s")
    print(f"held             {elapsed:.1f} s")
    print(f"cases            {dict(statuses)}")
    print(f"peak memory      {peak / 1e6:.1f} MB (tracemalloc)")
    print(f"answer           {len(response.data) / 1e6:.1f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
