"""Every numeric leaf of every contract example set to every extreme value, sent to the app in-process.

Prints requests and statuses by value class and by route, every server error (with its route, leaf and
value), and the slowest answers. Exit status 1 if any answer is a 5xx other than a budget 503.

    .venv/bin/python tests/benchmarks/fuzz_extremes.py [--limit N] [--seed S]

Not a test: the full run sends several thousand requests (minutes on two cores); ``make test`` runs a
seeded sample of the same cases (tests/test_extreme_inputs.py).
"""
from __future__ import annotations

import argparse
import random
import sys
import time
from collections import Counter, defaultdict
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from extreme_inputs import cases, encode  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--limit", type=int, default=0, help="send at most this many cases (a seeded sample)")
    parser.add_argument("--seed", type=int, default=20261203)
    args = parser.parse_args()

    import logging

    from api import create_app

    logging.getLogger("coolmargin").setLevel(logging.CRITICAL)  # the 500s are counted here, not logged
    client = create_app({"TESTING": False, "SIMULATION_WALL_TIME": 5.0}).test_client()
    every = list(cases())
    if args.limit:
        every = random.Random(args.seed).sample(every, min(args.limit, len(every)))
    by_class: dict[str, Counter] = defaultdict(Counter)
    by_route: dict[str, Counter] = defaultdict(Counter)
    failures, timings = [], []
    started = time.perf_counter()
    for route, leaf, label, body in every:
        t0 = time.perf_counter()
        response = client.post(route, data=encode(body), content_type="application/json")
        elapsed = time.perf_counter() - t0
        by_class[label][response.status_code] += 1
        by_route[route][response.status_code] += 1
        timings.append((elapsed, route, leaf, label, response.status_code))
        if response.status_code >= 500 and response.status_code != 503:
            failures.append((route, leaf, label, response.status_code))
    total = time.perf_counter() - started
    print(f"{len(every)} requests in {total:.1f} s")
    for title, table in (("by value class", by_class), ("by route", by_route)):
        print(f"\n{title}:")
        for key, statuses in sorted(table.items()):
            shown = " ".join(f"{code}x{n}" for code, n in sorted(statuses.items()))
            print(f"  {key:<28} {sum(statuses.values()):>5}  {shown}")
    print("\nslowest answers:")
    for elapsed, route, leaf, label, status in sorted(timings, reverse=True)[:8]:
        print(f"  {elapsed * 1e3:8.1f} ms  {status}  {route}  {leaf} = {label}")
    print(f"\nserver errors: {len(failures)}")
    for failure in failures[:50]:
        print("  ", *failure)
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
