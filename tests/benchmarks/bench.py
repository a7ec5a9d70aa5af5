"""Benchmark (``make bench``): ratios measured in one run, printed as a table. A script, not a test.

1. Throughput over HTTP: gunicorn (2 workers) on 127.0.0.1, the load generator of load.py with a few client
   threads for a few seconds per route. Each calculation route is compared with the trivial JSON endpoint
   /health measured in the same run (before and after, averaged), so the ratio does not depend on the machine.
   Targets: cooling check >= 0.5 of /health, scale-up with 5 scales >= 0.25; a 50 x 50 operating window
   costs at most 20 cooling checks (the ratio of their throughputs in the same run).
2. In-process median time of one request through the Flask test client (no network, no gunicorn).
3. In-process median of the calculations alone, including the vectorised network on 200 candidate jackets
   (one vessel shell, jacket designs varied) and on a 100-vessel fleet (target: each under 1 s).
4. The floor of a cooling check request: /health, the request with its calculation precomputed (what Flask,
   the rate limiter, the schemas and the presentation cost), the calculation alone and the whole request,
   round-robin in one process.

The machine may be shared: only ratios measured within one run mean anything, and the in-process
figures are medians.

Routes not yet in openapi.yaml, or without a body in tests/benchmarks/requests.py, print "not available yet".

    python tests/benchmarks/bench.py [--seconds 3] [--clients 4]
"""
from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path
from typing import Callable

if not __package__:  # run as a script: import from tests/ and the project, not from this folder
    _HERE = Path(__file__).resolve().parent
    # this folder's requests.py must not shadow the HTTP library of the same name for anything else
    sys.path[:] = [p for p in sys.path if Path(p or ".").resolve() != _HERE]
    sys.path[:0] = [str(_HERE.parent), str(_HERE.parents[1])]

from benchmarks.load import run_load  # noqa: E402
from benchmarks.requests import Example, available  # noqa: E402
from serving import UNLIMITED, gunicorn  # noqa: E402

BASELINE = "/health"
# route -> minimum throughput relative to /health (None: measured and shown, no target)
THROUGHPUT_TARGETS: dict[str, float | None] = {
    "/v1/properties": None,
    "/v1/cooling-check": 0.5,
    "/v1/scale-up": 0.25,  # the example has 5 scales
    "/v1/operating-window": None,  # 50 x 50 grid; its target is in cooling checks (WINDOW_TARGET)
}
#: A 50 x 50 operating window costs at most this many cooling checks.
WINDOW_TARGET = 20.0
IN_PROCESS = ["/v1/properties", "/v1/cooling-check", "/v1/scale-up", "/v1/jacket-sizing", "/v1/operating-window"]


def throughput(base: str, example: Example, clients: int, seconds: float) -> tuple[float, int]:
    """Requests per second (2xx only counted as success; any error aborts the benchmark)."""
    run_load(base, [example], clients=clients, seconds=min(0.5, seconds), max_requests=10_000)  # warm-up
    result = run_load(base, [example], clients=clients, seconds=seconds, max_requests=1_000_000)
    if result.errors:
        raise SystemExit(f"{example} failed during the benchmark: {result.error_samples[:3]}")
    return result.throughput, result.requests


def in_process_median(example: Example, seconds: float, max_calls: int = 200) -> tuple[float, int]:
    """Median wall time (s) of one request through the Flask test client, and how many calls were timed."""
    from api import create_app

    client = create_app({"RATE_LIMIT": UNLIMITED}).test_client()

    def call() -> None:
        response = client.open(example.path, method=example.method, json=example.body)
        if response.status_code != 200:
            raise SystemExit(f"{example} -> {response.status_code}: {response.get_data(as_text=True)[:300]}")

    call()  # warm-up: imports, property tables, caches
    times: list[float] = []
    deadline = time.monotonic() + seconds
    while len(times) < max_calls and (len(times) < 5 or time.monotonic() < deadline):
        started = time.perf_counter()
        call()
        times.append(time.perf_counter() - started)
    return statistics.median(times), len(times)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--seconds", type=float, default=3.0, help="measuring time per route (default 3 s)")
    parser.add_argument("--clients", type=int, default=4, help="client threads (default 4)")
    args = parser.parse_args(argv)
    if not (0 < args.seconds <= 60 and 1 <= args.clients <= 64):
        parser.error("need 0-60 s per route and 1-64 clients")

    baseline = available(BASELINE)
    measured = {route: available(route) for route in THROUGHPUT_TARGETS}
    misses = 0
    with gunicorn(workers=2) as base:
        print(f"gunicorn, 2 sync workers, {base}; {args.clients} client threads, {args.seconds:g} s per route")
        before, _ = throughput(base, baseline, args.clients, args.seconds)
        figures = {route: throughput(base, example, args.clients, args.seconds)
                   for route, example in measured.items() if example is not None}
        after, _ = throughput(base, baseline, args.clients, args.seconds)
    reference = (before + after) / 2

    print(f"\nThroughput over HTTP (trivial JSON endpoint {BASELINE}: {before:.0f} before, {after:.0f} after, "
          f"mean {reference:.0f} requests/s)")
    print(f"{'route':<22}{'requests/s':>12}{'requests':>10}{'ratio':>8}{'target':>9}  verdict")
    for route, target in THROUGHPUT_TARGETS.items():
        if route not in figures:
            print(f"{route:<22}{'':>12}{'':>10}{'':>8}{'':>9}  not available yet")
            continue
        rate, count = figures[route]
        ratio = rate / reference
        verdict = "-" if target is None else ("meets target" if ratio >= target else "BELOW TARGET")
        misses += verdict == "BELOW TARGET"
        target_text = "" if target is None else f">= {target:g}"
        print(f"{route:<22}{rate:>12.0f}{count:>10}{ratio:>8.2f}{target_text:>9}  {verdict}")

    if "/v1/operating-window" in figures and "/v1/cooling-check" in figures:
        cost = figures["/v1/cooling-check"][0] / figures["/v1/operating-window"][0]
        verdict = "meets target" if cost <= WINDOW_TARGET else "BELOW TARGET"
        misses += verdict == "BELOW TARGET"
        print(f"50 x 50 operating window = {cost:.1f} cooling checks (target <= {WINDOW_TARGET:g})  {verdict}")

    print("\nIn-process median time of one request (Flask test client, no network)")
    print(f"{'route':<22}{'median ms':>12}{'calls':>10}")
    for route in IN_PROCESS:
        example = available(route)
        if example is None:
            print(f"{route:<22}{'':>12}{'':>10}  not available yet")
            continue
        median, calls = in_process_median(example, args.seconds)
        print(f"{route:<22}{1000 * median:>12.2f}{calls:>10}")
    print("\nIn-process median of the calculation alone (no HTTP, no schemas)")
    for label, seconds in calculation_medians():
        print(f"{label:<56}{1000 * seconds:>10.2f} ms")
    print("\nThe floor of a cooling check request (in-process, interleaved medians, the same rate limiter as served)")
    floor = request_floor()
    health = floor["/health"]
    for label, seconds in floor.items():
        print(f"{label:<56}{1000 * seconds:>10.2f} ms  = {health / seconds:>5.2f} x /health")
    print("  a request costs at least its frame: with the calculation free, a check would reach "
          f"{health / floor['cooling check, calculation precomputed (the frame)']:.2f} x /health")
    if misses:
        print(f"\n{misses} route(s) below the throughput target")
    return 0


def calculation_medians(repeats: int = 21) -> list[tuple[str, float]]:
    """Median times of the calc functions behind the main routes, with their inputs parsed once."""
    from api import create_app
    from calc.checks import cooling_check
    from calc.safety import dynamics
    from calc.checks import scaleup
    from calc.safety import tank_model
    from schemas.cooling import CoolingCheckRequestSchema, ScaleUpRequestSchema
    from schemas.safety import SimulationRequestSchema, simulation_input

    from benchmarks.requests import EXAMPLES, SIX_HOUR_FAILURE

    from calc.network.heat_transfer import heat_transfer
    from calc.network.vectorised import heat_transfer_many

    with create_app().app_context():
        check = CoolingCheckRequestSchema().load(EXAMPLES["/v1/cooling-check"].body)
        path = ScaleUpRequestSchema().load(EXAMPLES["/v1/scale-up"].body)
        run = SimulationRequestSchema().load(SIX_HOUR_FAILURE)
    candidates, fleet = _candidates(check, 200), _fleet(check, 100)
    cases = [
        ("cooling check (network + 3 solved limits)", lambda: cooling_check.cooling_check(
            check["vessel"], check["charge"], check["coolant"], check["process_temperature"],
            check["heat_release"], check["safety_factor"])),
        (f"scale-up, {1 + len(path['targets'])} scales", lambda: scaleup.scale_up(
            path["reference"], path["targets"], path["rule"], path["charge"], path["coolant"],
            path["process_temperature"], path["heat_release"], path["safety_factor"], path["coolant_flow_rule"])),
        ("6 h semi-batch, cooling fails at 3 h (target < 100)", lambda: dynamics.simulate(
            simulation_input(run, tank_model.Budget(output_points=run["output_points"])))),
        ("network alone, scalar path (one state)", lambda: heat_transfer(
            check["vessel"], check["charge"], check["coolant"], check["process_temperature"])),
        ("vectorised network, 200 candidate jackets (< 1000 ms)", lambda: heat_transfer_many(candidates)),
        ("vectorised network, 100-vessel fleet (< 1000 ms)", lambda: heat_transfer_many(fleet)),
    ]
    out = []
    for label, call in cases:
        call()
        times = []
        for _ in range(repeats):
            start = time.perf_counter()
            call()
            times.append(time.perf_counter() - start)
        out.append((label, statistics.median(times)))
    return out


def request_floor(rounds: int = 200) -> dict[str, float]:
    """Median times (s) of /health, of a cooling check request whose calculation returns a result computed
    beforehand (Flask, rate limiter, JSON, schema load, dump and presentation: the frame), of the calculation
    alone and of the whole request, measured round-robin in one process. Not a cache: the precomputed result
    stands in for the calculation only here, to show what the frame costs."""
    from api import create_app
    from calc.checks import cooling_check
    from schemas.cooling import CoolingCheckRequestSchema

    from benchmarks.requests import EXAMPLES

    body = EXAMPLES["/v1/cooling-check"].body
    app = create_app({"RATE_LIMIT": UNLIMITED})
    client = app.test_client()
    with app.app_context():
        args = CoolingCheckRequestSchema().load(body)
    call = (args["vessel"], args["charge"], args["coolant"], args["process_temperature"], args["heat_release"],
            args["safety_factor"])
    solved = cooling_check.cooling_check(*call)
    real = cooling_check.cooling_check

    def post(precomputed: bool) -> None:
        cooling_check.cooling_check = (lambda *_, **__: solved) if precomputed else real  # type: ignore[assignment]
        try:
            response = client.post("/v1/cooling-check", json=body)
        finally:
            cooling_check.cooling_check = real
        if response.status_code != 200:
            raise SystemExit(f"/v1/cooling-check -> {response.status_code}")

    cases: dict[str, Callable[[], object]] = {
        "/health": lambda: client.get("/health"),
        "cooling check, calculation precomputed (the frame)": lambda: post(True),
        "cooling check, the calculation alone": lambda: real(*call),
        "cooling check, the whole request": lambda: post(False),
    }
    times: dict[str, list[float]] = {label: [] for label in cases}
    for _ in range(rounds):
        for label, function in cases.items():
            start = time.perf_counter()
            function()
            times[label].append(time.perf_counter() - start)
    return {label: statistics.median(values) for label, values in times.items()}


def _candidates(check: dict, count: int) -> list[tuple]:
    """``count`` half-pipe jackets on the demo vessel (pipe size x pitch x zones; invented demo designs)."""
    from dataclasses import replace

    vessel = check["vessel"]
    designs = [(d, pitch, zones) for d in (0.06, 0.08, 0.1, 0.125, 0.15) for pitch in (1.2, 1.4, 1.6, 1.8, 2.0)
               for zones in (1, 2, 3, 4, 5, 6, 7, 8)][:count]
    return [(replace(vessel, jacket=replace(vessel.jacket, pipe_diameter=d, pipe_pitch=pitch * d, passes=zones)),
             check["charge"], check["coolant"], check["process_temperature"]) for d, pitch, zones in designs]


def _fleet(check: dict, count: int) -> list[tuple]:
    """``count`` similar vessels from 0.1 to 40 m3 with the demo contents at the same fill (invented demo fleet)."""
    from calc.checks.scaleup import _scaled_charge
    from calc.vessel import geometry

    vessel, charge = check["vessel"], check["charge"]
    brim = geometry.volume_at_level(vessel.shape, geometry.brim_height(vessel.shape))
    fleet = []
    for i in range(count):
        volume = 0.1 * (400.0 ** (i / (count - 1)))
        factor = (volume / brim) ** (1.0 / 3.0)
        fleet.append((vessel.scaled(factor), _scaled_charge(charge, factor ** 3),
                      check["coolant"].with_mass_flow(check["coolant"].mass_flow() * factor ** 2),
                      check["process_temperature"]))
    return fleet


if __name__ == "__main__":
    sys.exit(main())
