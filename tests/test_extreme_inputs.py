"""Every numeric leaf of every contract example set to extreme values: no answer is a server error.

A seeded sample of tests/extreme_inputs.py's cases (all of them: tests/benchmarks/fuzz_extremes.py).
References: IEEE 754 binary64 limits (5e-324, 1e308); RFC 9457 problem details for every refusal.
"""
import random

import pytest

from extreme_inputs import EXTREMES, cases, encode

SEED = 20261203
SAMPLE = 150  # with the hostile texts, about 20 s on two cores; the full set is ~2,350 cases


def _sample():
    every = list(cases())
    hostile_text = [c for c in every if isinstance(EXTREMES[c[2]], str)]
    # every hostile text on one leaf of each route, plus a seeded sample of the rest
    first_of_route = {}
    for case in hostile_text:
        first_of_route.setdefault((case[0], case[2]), case)
    rest = [c for c in every if c not in first_of_route.values()]
    return list(first_of_route.values()) + random.Random(SEED).sample(rest, SAMPLE)


@pytest.fixture(scope="module")
def quiet_client():
    import logging

    from api import create_app

    logging.getLogger("coolmargin").setLevel(logging.CRITICAL)
    yield create_app({"TESTING": False, "SIMULATION_WALL_TIME": 2.0}).test_client()
    logging.getLogger("coolmargin").setLevel(logging.NOTSET)


def test_no_extreme_value_is_a_server_error(quiet_client):
    failures, refused = [], 0
    for route, leaf, label, body in _sample():
        response = quiet_client.post(route, data=encode(body), content_type="application/json")
        if response.status_code >= 500 and response.status_code != 503:
            failures.append(f"{route} {leaf}={label}: {response.status_code}")
        elif response.status_code == 422:
            refused += 1
            assert response.mimetype == "application/problem+json" and response.json["errors"], (route, leaf)
    assert failures == []
    assert refused > 100  # the extremes are refused, not silently computed


def test_hostile_values_are_refused_naming_the_leaf(quiet_client):
    for route, leaf, label, body in cases():
        if label == "chained_exponent" and leaf.count(".") >= 1:
            response = quiet_client.post(route, data=encode(body), content_type="application/json")
            assert response.status_code == 422
            named = response.json["errors"][0]["field"]
            expected = leaf.split(".")
            assert named.replace("[", ".").replace("]", "").split(".") == expected, (named, leaf)
            return
    raise AssertionError("no nested leaf found")  # pragma: no cover
