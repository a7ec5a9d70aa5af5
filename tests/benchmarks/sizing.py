"""Jacket-sizing benchmark: candidates evaluated per request and time per request, in one run. A script, not a test.

Measures, in-process (no network, no gunicorn), the median wall time of
1. one heat-transfer network solve of the demo shell with one jacket (the unit of work of a candidate);
2. the sizing calculation alone (``calc.sizing.jacket_sizing.jacket_sizing``) for the demo request
   (examples/jacket_sizing_request.json) and for the same duty made harder (no jacket alone suffices, so
   jacket + coil combinations are evaluated too);
   and for the harder duty over wider option lists (about 200 candidates), with the margin bands of the
   feasible candidates (the default) and of every candidate (``options.margin_bands = "all"``);
3. the same ~200 candidates one by one on the scalar path (flow limit, then the readable network solve: how
   the sizing evaluated them before it used the vectorised network), and the ratio of the two;
4. the whole request through the Flask test client (schemas, JSON), for the demo request;
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
    from calc.network.flow_limit import flow_limit
    from calc.network.heat_transfer import assemble, heat_transfer
    from calc.sizing.jacket_sizing import jacket_sizing
    from schemas.sizing import JacketSizingRequestSchema

    body = json.loads((ROOT / "examples" / "jacket_sizing_request.json").read_text())
    harder = copy.deepcopy(body)
    harder["heat_release"]["dosing_time"] = "60 min"
    wide = copy.deepcopy(harder)  # about 200 candidates: more gaps, baffle pitches, pipe sizes and zones
    wide["options"] = {"gaps": ["25 mm", "30 mm", "38 mm", "50 mm", "75 mm", "100 mm"],
                       "baffle_pitches": ["100 mm", "125 mm", "150 mm", "200 mm", "300 mm", "400 mm"],
                       "pipe_sizes": ["1-1/4", "1-1/2", "2", "2-1/2", "3", "4"], "zones": [1, 2, 3, 4, 5, 6]}
    app = create_app()
    with app.app_context():
        demo, hard = JacketSizingRequestSchema().load(body), JacketSizingRequestSchema().load(harder)
        many = JacketSizingRequestSchema().load(wide)
        every = JacketSizingRequestSchema().load(dict(wide, options=dict(wide["options"], margin_bands="all")))

    one = replace(demo["vessel"], jacket=JacketSpec("half_pipe", pipe_diameter=0.0525, pipe_pitch=0.09))
    network = _median(lambda: heat_transfer(one, demo["charge"], demo["coolant"], demo["process_temperature"]),
                      args.repeats * 10)
    print(f"one network solve (half-pipe jacket): {1000 * network:.2f} ms")
    print(f"{'case':<56}{'candidates':>11}{'ms/request':>12}{'ms/candidate':>14}{'x network':>11}")
    for label, a in (("demo (a jacket alone suffices)", demo), ("harder duty (jacket + coil evaluated)", hard),
                     ("harder duty, wider option lists", many),
                     ("same, a margin band on every candidate", every)):
        def run(a=a):
            return jacket_sizing(a["vessel"], a["charge"], a["coolant"], a["process_temperature"], a["heat_release"],
                                 a["safety_factor"], a["options"])
        answer = run()
        count, banded = len(answer.candidates), sum(c.margin_band is not None for c in answer.candidates)
        seconds = _median(run, args.repeats)
        label = f"{label} [{banded} bands]"
        print(f"{label:<56}{count:>11}{1000 * seconds:>12.1f}{1000 * seconds / count:>14.2f}"
              f"{seconds / count / network:>11.2f}")
    # the same candidates of the widest case one by one on the scalar path (as before the vectorised pass): the
    # flow limit, then the readable network solve at the flow the utility can push
    a = many
    result = jacket_sizing(a["vessel"], a["charge"], a["coolant"], a["process_temperature"], a["heat_release"],
                           a["safety_factor"], a["options"])
    shell = replace(a["vessel"], jacket=None, coils=(), coverage=result.candidates[0].coverage)

    def one_by_one():
        for c in result.candidates:
            design = replace(shell, jacket=c.jacket, coils=() if c.coil is None else (c.coil,))
            limit = flow_limit(assemble(design, a["charge"], a["coolant"], a["process_temperature"]).streams,
                               a["coolant"])
            coolant = a["coolant"]
            if limit.mass_flow is not None and limit.mass_flow < coolant.mass_flow():
                coolant = coolant.with_mass_flow(limit.mass_flow)
            heat_transfer(design, a["charge"], coolant, a["process_temperature"])
    count = len(result.candidates)
    scalar = _median(one_by_one, max(1, args.repeats // 2))
    vector = _median(lambda: jacket_sizing(a["vessel"], a["charge"], a["coolant"], a["process_temperature"],
                                           a["heat_release"], a["safety_factor"], a["options"]), args.repeats)
    print(f"{'same, scalar path one by one (no bands)':<56}{count:>11}{1000 * scalar:>12.1f}"
          f"{1000 * scalar / count:>14.2f}{scalar / count / network:>11.2f}")
    print(f"whole sizing (vectorised, with bands) / scalar path one by one: {vector / scalar:.2f}")
    client = app.test_client()
    seconds = _median(lambda: client.post("/v1/jacket-sizing", json=body), args.repeats)
    print(f"{'demo through the Flask test client':<56}{'':>11}{1000 * seconds:>12.1f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
