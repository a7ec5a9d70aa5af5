"""Every calculation runs on a clock: the request's budget, and a caller that hangs up.

References: RFC 9110 section 15.6.4 (503 Service Unavailable: "the server is currently unable to
handle the request due to a temporary overload") and section 10.2.3 (Retry-After, in delay-seconds);
RFC 9457 (problem details). That a batch keeps the cases it finished is coolmargin's own contract
(README, "Time budget").
"""
import json
import math
import time
from pathlib import Path

import pytest

from api import create_app
from calc.checks import scaleup
from calc.deadline import NEVER, Deadline, OutOfTime
from calc.safety.dynamics import simulate
from calc.safety.tank_model import Budget, CoolingFailure
from schemas.cooling import ScaleUpRequestSchema

from test_dynamics import semi_batch

ROOT = Path(__file__).resolve().parents[1]
DEMO = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())


def _demo_args():
    return ScaleUpRequestSchema().load(DEMO)


def _scale_up(args, deadline):
    return scaleup.scale_up(args["reference"], args["targets"], args["rule"], args["charge"], args["coolant"],
                            args["process_temperature"], args["heat_release"], args["safety_factor"],
                            args["coolant_flow_rule"], deadline=deadline)


def test_scale_up_stops_at_a_passed_deadline_and_runs_without_one():
    args = _demo_args()
    with pytest.raises(OutOfTime) as stopped:
        _scale_up(args, Deadline.after(0.0))
    assert not stopped.value.cancelled
    assert len(_scale_up(args, NEVER).scales) == 1 + len(DEMO["targets"])


def test_scale_up_stops_when_the_caller_hangs_up():
    with pytest.raises(OutOfTime) as stopped:
        _scale_up(_demo_args(), Deadline(math.inf, lambda: True))
    assert stopped.value.cancelled


def test_the_hang_up_probe_is_asked_at_most_every_probe_interval():
    asked = []
    deadline = Deadline(math.inf, lambda: asked.append(1) or False)
    for _ in range(10_000):
        deadline.check()
    assert len(asked) == 1  # 10,000 checks in far less than PROBE_INTERVAL cost one system call


def test_simulation_keeps_its_own_wall_time_and_the_callers_deadline():
    # the sooner of the two stops the run: a passed request deadline gives the partial result (status 2)
    run = simulate(semi_batch(budget=Budget(wall_time=60.0, deadline=Deadline.after(0.0)),
                              failure=CoolingFailure(None)))
    assert run.status == 2 and "time budget" in run.message


def _post(config, body):
    client = create_app({"TESTING": True, **config}).test_client()
    started = time.monotonic()
    response = client.post("/v1/scale-up", json=body)
    return response, time.monotonic() - started


def test_a_request_past_its_budget_is_a_503_problem_with_retry_after():
    response, _ = _post({"REQUEST_BUDGET": 1e-6}, DEMO)
    assert response.status_code == 503  # RFC 9110 15.6.4
    assert response.mimetype == "application/problem+json"
    assert response.headers["Retry-After"].isdigit()  # RFC 9110 10.2.3, delay-seconds
    assert response.json["title"] == "Time budget used up" and "COOLMARGIN_REQUEST_BUDGET" in response.json["detail"]


def test_a_batch_past_its_budget_keeps_the_cases_it_finished():
    # time one case (warm, the median of three: timing noise on a busy machine), then give the batch room
    # for about two of six
    _post({}, DEMO)  # warm: property tables and caches are built on first use
    timed = [_post({}, DEMO) for _ in range(3)]
    assert all(response.status_code == 200 for response, _ in timed)
    one, took = sorted(timed, key=lambda pair: pair[1])[1]
    response, elapsed = _post({"REQUEST_BUDGET": 2.5 * took}, {"cases": [DEMO] * 6})
    assert response.status_code == 200
    statuses = [case["status"] for case in response.json["cases"]]
    assert len(statuses) == 6 and statuses[0] == 200 and statuses[-1] == 503, statuses
    first_missing = statuses.index(503)
    assert set(statuses[:first_missing]) == {200} and set(statuses[first_missing:]) == {503}
    kept = response.json["cases"][0]["result"]
    assert kept["largest_adequate_volume"] == one.json["largest_adequate_volume"]  # the same answer, kept
    missing = response.json["cases"][-1]["problem"]
    # the last case was either never started or stopped by the clock mid-way
    assert missing["status"] == 503 and ("not computed" in missing["detail"] or "did not finish" in missing["detail"])
    assert elapsed < 6 * took  # the rest was not computed


def test_calculation_slots_are_handed_to_the_longest_waiter():
    import threading

    from api.runtime import Slots

    slots, order = Slots(1), []
    assert slots.acquire(timeout=0)

    def wait(name):
        if slots.acquire(timeout=10):
            order.append(name)
            slots.release()

    threads = []
    for name in "abc":
        threads.append(threading.Thread(target=wait, args=(name,)))
        threads[-1].start()
        time.sleep(0.05)  # a, b, c queue in that order
    assert not slots.acquire(timeout=0)  # a newcomer does not jump the queue
    slots.release()
    for thread in threads:
        thread.join(10)
    assert order == ["a", "b", "c"]
    assert slots.acquire(timeout=0)  # and the slot is free again afterwards
