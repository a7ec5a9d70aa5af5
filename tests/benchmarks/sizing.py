"""Jacket-sizing benchmark: candidates evaluated per request and time per request, in one run. A script, not a test.

Measures, in-process (no network, no gunicorn), the median wall time of
1. one heat-transfer network solve of the demo shell with one jacket (the unit of work of a candidate);
2. the sizing calculation alone (``calc.sizing.jacket_sizing.jacket_sizing``) for the demo request
   (examples/jacket_sizing_request.json) and for the same duty made harder (no jacket alone suffices, so
   jacket + coil combinations are evaluated too);
3. the whole request through the Flask test client (schemas, JSON), for the demo request;
and prints candidates per request, ms per request, ms per candidate and its ratio to one network solve.
Goal (issue 13): a full sizing of ~200 candidates in under 1 s in-process.

    python tests/benchmarks/sizing.py [--repeats 7]
"""
from __future__ import annotations

import argparse
import copy
import json
import statistics
import sys
import time
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))


def _median(call, repeats: int) -> float:
    call()  # warm-up: imports, property tables, caches
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        call()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--repeats", type=int, default=7)
    args = parser.parse_args(argv)

    from api import create_app
    from calc.films.jacket_side import JacketSpec
    from calc.network.heat_transfer import heat_transfer
    from calc.sizing.jacket_sizing import jacket_sizing
    from schemas.sizing import JacketSizingRequestSchema

    body = json.loads((ROOT / "examples" / "jacket_sizing_request.json").read_text())
    harder = copy.deepcopy(body)
    harder["heat_release"]["dosing_time"] = "60 min"
    app = create_app()
    with app.app_context():
        demo, hard = JacketSizingRequestSchema().load(body), JacketSizingRequestSchema().load(harder)

    one = replace(demo["vessel"], jacket=JacketSpec("half_pipe", pipe_diameter=0.0525, pipe_pitch=0.09))
    network = _median(lambda: heat_transfer(one, demo["charge"], demo["coolant"], demo["process_temperature"]),
                      args.repeats * 10)
    print(f"one network solve (half-pipe jacket): {1000 * network:.2f} ms")
    print(f"{'case':<46}{'candidates':>11}{'ms/request':>12}{'ms/candidate':>14}{'x network':>11}")
    for label, a in (("demo (a jacket alone suffices)", demo), ("harder duty (jacket + coil evaluated)", hard)):
        def run(a=a):
            return jacket_sizing(a["vessel"], a["charge"], a["coolant"], a["process_temperature"], a["heat_release"],
                                 a["safety_factor"], a["options"])
        count = len(run().candidates)
        seconds = _median(run, args.repeats)
        print(f"{label:<46}{count:>11}{1000 * seconds:>12.1f}{1000 * seconds / count:>14.2f}"
              f"{seconds / count / network:>11.2f}")
    client = app.test_client()
    seconds = _median(lambda: client.post("/v1/jacket-sizing", json=body), args.repeats)
    print(f"{'demo through the Flask test client':<46}{'':>11}{1000 * seconds:>12.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
