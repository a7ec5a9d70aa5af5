"""Load test (``make load``): gunicorn on 127.0.0.1 and a thread-per-client load generator.

Each client thread keeps one http.client connection (re-opened when the server closes it; gunicorn's sync
workers close after every response) and sends the request mix of tests/benchmarks/requests.py round-robin
until the time or the request budget runs out. Every request in the mix is valid, so any non-2xx answer or
connection error counts as an error and the script exits 1.

Traffic goes to loopback only: the script starts its own server, and ``--url`` accepts 127.0.0.1/localhost
addresses and nothing else. Bounded: ``--seconds`` (default 30) and ``--max-requests`` (default 100000).

    python tests/benchmarks/load.py --clients 32 --seconds 30
"""
from __future__ import annotations

import argparse
import http.client
import sys
import threading
import time
from collections import Counter
from dataclasses import dataclass, field
from pathlib import Path
from urllib.parse import urlsplit

if not __package__:  # run as a script: import from tests/ and the project, not from this folder
    _HERE = Path(__file__).resolve().parent
    # this folder's requests.py must not shadow the HTTP library of the same name for anything else
    sys.path[:] = [p for p in sys.path if Path(p or ".").resolve() != _HERE]
    sys.path[:0] = [str(_HERE.parent), str(_HERE.parents[1])]

from benchmarks.requests import Example, load_mix  # noqa: E402
from serving import gunicorn  # noqa: E402

LOOPBACK = {"127.0.0.1", "localhost"}
REQUEST_TIMEOUT = 30.0  # s; one request never holds a client longer than this
MAX_ERRORS_KEPT = 20


@dataclass
class LoadResult:
    requests: int = 0
    elapsed: float = 0.0
    latencies: list[float] = field(default_factory=list)  # s, successful and failed alike
    statuses: Counter = field(default_factory=Counter)
    errors: int = 0
    error_samples: list[str] = field(default_factory=list)
    connections: int = 0

    @property
    def throughput(self) -> float:
        return self.requests / self.elapsed if self.elapsed > 0 else 0.0

    def percentile(self, q: float) -> float:
        """Nearest-rank percentile of the latencies, in s (nan when none)."""
        if not self.latencies:
            return float("nan")
        ordered = sorted(self.latencies)
        rank = max(1, -(-len(ordered) * q // 100))  # ceil(n*q/100), at least 1
        return ordered[int(rank) - 1]


def loopback_host_port(base_url: str) -> tuple[str, int]:
    """Host and port of ``base_url``; refuses anything but a loopback http address."""
    parts = urlsplit(base_url)
    if parts.scheme != "http" or parts.hostname not in LOOPBACK:
        raise ValueError(f"load is sent to loopback only (http://127.0.0.1:PORT), not {base_url!r}")
    return "127.0.0.1", parts.port or 80


def run_load(base_url: str, mix: list[Example], clients: int, seconds: float, max_requests: int) -> LoadResult:
    """Send ``mix`` round-robin from ``clients`` threads until ``seconds`` pass or ``max_requests`` are sent."""
    if not mix:
        raise ValueError("no requests to send")
    host, port = loopback_host_port(base_url)
    result = LoadResult()
    lock = threading.Lock()
    budget = [max_requests]

    def take_one() -> bool:
        with lock:
            if budget[0] <= 0:
                return False
            budget[0] -= 1
            return True

    def client(index: int, deadline: float) -> None:
        latencies, statuses, errors, samples, opened = [], Counter(), 0, [], 0
        connection = None
        position = index  # clients start at different places in the mix
        while time.monotonic() < deadline and take_one():
            example = mix[position % len(mix)]
            position += 1
            body = example.encoded()
            headers = {"Accept": "application/json"}
            if body is not None:
                headers["Content-Type"] = "application/json"
            if connection is None or connection.sock is None:
                connection = connection or http.client.HTTPConnection(host, port, timeout=REQUEST_TIMEOUT)
                opened += 1
            started = time.perf_counter()
            try:
                connection.request(example.method, example.path, body=body, headers=headers)
                response = connection.getresponse()
                payload = response.read()
                status = response.status
            except (OSError, http.client.HTTPException) as exc:
                latencies.append(time.perf_counter() - started)
                errors += 1
                statuses["connection error"] += 1
                samples.append(f"{example}: {type(exc).__name__}: {exc}")
                connection.close()
                connection = None
                continue
            latencies.append(time.perf_counter() - started)
            statuses[status] += 1
            if not 200 <= status < 300:
                errors += 1
                samples.append(f"{example} -> {status}: {payload[:300].decode(errors='replace')}")
        if connection is not None:
            connection.close()
        with lock:
            result.latencies.extend(latencies)
            result.statuses.update(statuses)
            result.errors += errors
            result.error_samples.extend(samples[:MAX_ERRORS_KEPT - len(result.error_samples)])
            result.connections += opened

    started = time.monotonic()
    deadline = started + seconds
    threads = [threading.Thread(target=client, args=(i, deadline), daemon=True) for i in range(clients)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(seconds + REQUEST_TIMEOUT + 5)
    result.elapsed = time.monotonic() - started
    result.requests = len(result.latencies)
    return result


def report(result: LoadResult, clients: int) -> str:
    statuses = ", ".join(f"{k}: {v}" for k, v in sorted(result.statuses.items(), key=lambda kv: str(kv[0])))
    lines = [
        f"clients          {clients}",
        f"requests         {result.requests} in {result.elapsed:.1f} s over {result.connections} connections",
        f"errors           {result.errors}",
        f"statuses         {statuses}",
        f"latency p50      {1000 * result.percentile(50):.1f} ms",
        f"latency p99      {1000 * result.percentile(99):.1f} ms",
        f"throughput       {result.throughput:.1f} requests/s",
    ]
    lines += [f"  error: {sample}" for sample in result.error_samples]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--clients", type=int, default=32, help="concurrent client threads (default 32)")
    parser.add_argument("--seconds", type=float, default=30.0, help="duration in s (default 30)")
    parser.add_argument("--max-requests", type=int, default=100_000, help="request budget (default 100000)")
    parser.add_argument("--workers", type=int, default=2, help="gunicorn workers of the server started here")
    parser.add_argument("--url", help="an already running server on loopback, e.g. http://127.0.0.1:8000")
    args = parser.parse_args(argv)
    if not (1 <= args.clients <= 1024 and 0 < args.seconds <= 3600 and args.max_requests >= 1):
        parser.error("need 1-1024 clients, 0-3600 seconds and a positive request budget")
    if args.url:
        try:
            loopback_host_port(args.url)
        except ValueError as exc:
            parser.error(str(exc))
    mix = load_mix()
    if not mix:
        print("no load-mix route is available yet (see tests/benchmarks/requests.py)")
        return 1
    print("mix: " + ", ".join(f"{example}" for example in dict.fromkeys(mix)))
    if args.url:
        result = run_load(args.url, mix, args.clients, args.seconds, args.max_requests)
    else:
        with gunicorn(workers=args.workers) as base:
            print(f"server: gunicorn, {args.workers} workers, {base}")
            result = run_load(base, mix, args.clients, args.seconds, args.max_requests)
    print(report(result, args.clients))
    return 1 if result.errors else 0


if __name__ == "__main__":
    sys.exit(main())
