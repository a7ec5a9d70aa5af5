"""/health latency while slow uploads are open, on gunicorn with docker/gunicorn.conf.py (loopback only).

Opens N connections that announce a 100 kB body and send one byte, then times /health M times.
A script, not a test (tests/test_serving.py checks the 2 s bound):

    python tests/benchmarks/slow_clients.py [--uploads 8] [--probes 20] [--worker-class sync]
"""
from __future__ import annotations

import argparse
import statistics
import sys
from pathlib import Path

if not __package__:
    sys.path[:0] = [str(Path(__file__).resolve().parents[1])]

from serving import gunicorn, slow_uploads, timed_get  # noqa: E402


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--uploads", type=int, default=8)
    parser.add_argument("--probes", type=int, default=20)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--worker-class", default="gthread")
    parser.add_argument("--timeout", type=float, default=5.0, help="s before a probe counts as failed")
    args = parser.parse_args(argv)
    with gunicorn(workers=args.workers, env={"COOLMARGIN_WORKER_CLASS": args.worker_class}) as base:
        with slow_uploads(base, args.uploads):
            results = []
            for _ in range(args.probes):
                try:
                    status, seconds, *_ = timed_get(base + "/health", timeout=args.timeout)
                except OSError:
                    status, seconds = 0, args.timeout
                results.append((status, seconds))
    times = sorted(seconds for _, seconds in results)
    failed = sum(1 for status, _ in results if status != 200)
    print(f"worker class     {args.worker_class}, {args.workers} workers")
    print(f"slow uploads     {args.uploads}")
    print(f"probes           {len(results)}, failed or over {args.timeout:g} s: {failed}")
    print(f"/health median   {1000 * statistics.median(times):.1f} ms")
    print(f"/health max      {1000 * times[-1]:.1f} ms")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
