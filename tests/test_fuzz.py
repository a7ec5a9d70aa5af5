"""Contract fuzzing: schemathesis generates requests from openapi.yaml for every operation and sends them to
the application in-process (WSGI). Reference: the OpenAPI 3.1 contract itself and RFC 9457 (problem details).

Checks on every response, valid or invalid request alike:
- no 5xx (schemathesis ``not_a_server_error``): bad input is a 4xx, never a crash;
- the status code, content type and body conform to what the contract documents for that operation;
- every 4xx is ``application/problem+json`` with the Problem shape (type, title, status equal to the HTTP
  status, detail, errors[] of {field, message}).

Bounded and reproducible for CI: a fixed number of examples per operation (schemathesis' coverage phase adds
a deterministic set of boundary cases), fixed seed, derandomized generation, no example database, no
shrinking, simulations with a short wall-time budget, and a total budget (FUZZ_BUDGET) past which every
further case fails at once. With ~15 operations the file takes about 20 s on two cores; cases, time and
statuses per operation are printed with ``pytest -s tests/test_fuzz.py``.
"""
from __future__ import annotations

import importlib
import json
import pkgutil
import time
from collections import Counter

import pytest
import schemathesis
from hypothesis import HealthCheck, Phase, settings
from schemathesis.checks import not_a_server_error
from schemathesis.specs.openapi.checks import (
    content_type_conformance,
    response_schema_conformance,
    status_code_conformance,
)

from api import create_app
from serving import ROOT

# Examples per operation in the fuzzing phase; total time grows linearly with this and the number of operations.
MAX_EXAMPLES = 25
FUZZ_BUDGET = 150.0  # s for all the calls together, so `make test` stays fast as the contract grows
# s for one operation: past it, its remaining cases are not sent (a jacket sizing evaluates ~100 designs per
# valid request, ~0.5 s; the coverage phase sends many valid variants of the example)
OPERATION_BUDGET = 12.0
SEED = 20240611  # fixed: the same cases on every machine

# Hypothesis mixes constants found in the loaded project modules into generated data. Import them all first,
# so the cases do not depend on which other test files happen to be in the session.
for _package in ("api", "calc", "schemas"):
    for _module in pkgutil.walk_packages(importlib.import_module(_package).__path__, _package + "."):
        importlib.import_module(_module.name)

# The app as served, with the calculation budgets shortened so a generated simulation cannot run for long
# nor a generated operating window hold many points.
APP = create_app({"SIMULATION_WALL_TIME": 2.0, "MAX_WINDOW_POINTS": 64})  # grids above 64 points: 413

CONFIG = schemathesis.Config.from_dict({
    "seed": SEED,
    # The coverage phase's boundary cases (every bound of every field: thousands since each quantity has its
    # physical range) run against a live server in tests/test_live_fuzz.py; here the examples and generation.
    "phases": {"coverage": {"enabled": False}},
    # no shrinking: a failure is reported as found (with its curl line), which keeps a failing run short too
    "generation": {"mode": "all", "deterministic": True, "max-examples": MAX_EXAMPLES, "database": "none",
                   "no-shrink": True},
})
# Loaded from the file rather than from GET /openapi.yaml: schemathesis leaves out the operation a schema was
# fetched from, and that route belongs in the run too.
SCHEMA = schemathesis.openapi.from_path(ROOT / "openapi.yaml", config=CONFIG)
SCHEMA.app = APP  # requests go to the app in-process through its WSGI interface

PROBLEM_KEYS = {"type": str, "title": str, "status": int, "detail": str, "errors": list}


@schemathesis.check
def client_errors_are_problems(ctx, response, case):
    """Every 4xx is RFC 9457 problem+json, its status matches the HTTP status, and errors name fields."""
    if not 400 <= response.status_code < 500:
        return None
    content_type = (response.headers.get("content-type") or [""])[0]
    assert content_type.split(";")[0].strip() == "application/problem+json", (
        f"{response.status_code} came as {content_type!r}, not application/problem+json")
    try:
        body = json.loads(response.content)
    except ValueError:
        raise AssertionError(f"{response.status_code} body is not JSON: {response.content[:200]!r}") from None
    for key, kind in PROBLEM_KEYS.items():
        assert isinstance(body.get(key), kind), f"problem member {key!r} missing or not {kind.__name__}: {body}"
    assert body["status"] == response.status_code, body
    for item in body["errors"]:
        assert isinstance(item.get("field"), str) and isinstance(item.get("message"), str), body
    return None


CHECKS = [not_a_server_error, status_code_conformance, content_type_conformance, response_schema_conformance,
          client_errors_are_problems]

# Per operation: cases sent, seconds spent, statuses seen (printed at the end of the module with ``pytest -s``).
FUZZ_STATS: dict[str, dict] = {}


@pytest.fixture(scope="module", autouse=True)
def _fuzz_summary():
    yield
    for label, stats in sorted(FUZZ_STATS.items()):
        statuses = " ".join(f"{code}x{n}" for code, n in sorted(stats["statuses"].items()))
        unsent = f"  ({stats['not_sent']} not sent: operation budget)" if stats.get("not_sent") else ""
        print(f"\n{label:<32} {stats['cases']:>4} cases {stats['seconds']:6.2f} s  {statuses}{unsent}", end="")


@SCHEMA.parametrize()
@settings(max_examples=MAX_EXAMPLES, deadline=None, derandomize=True, database=None,
          phases=[Phase.explicit, Phase.reuse, Phase.generate, Phase.target], suppress_health_check=list(HealthCheck))
def test_every_operation_honours_the_contract(case):
    spent = sum(stats["seconds"] for stats in FUZZ_STATS.values())
    if spent > FUZZ_BUDGET:  # fails fast rather than letting `make test` grow without bound
        pytest.fail(f"fuzzing has taken {spent:.0f} s > {FUZZ_BUDGET:.0f} s: lower MAX_EXAMPLES or a route's cost")
    stats = FUZZ_STATS.setdefault(case.operation.label, {"cases": 0, "seconds": 0.0, "statuses": Counter()})
    if stats["seconds"] > OPERATION_BUDGET:
        stats["not_sent"] = stats.get("not_sent", 0) + 1
        return
    started = time.perf_counter()
    response = case.call()
    stats["cases"] += 1
    stats["seconds"] += time.perf_counter() - started
    stats["statuses"][response.status_code] += 1
    case.validate_response(response, checks=CHECKS)


def test_fuzzing_covers_every_operation_in_the_spec():
    """Guard against a filter or loader change silently dropping operations from the fuzz run."""
    import yaml

    spec = yaml.safe_load((ROOT / "openapi.yaml").read_text())
    in_spec = {f"{method.upper()} {path}" for path, item in spec["paths"].items()
               for method in item if method in {"get", "post", "put", "patch", "delete"}}
    fuzzed = {result.ok().label for result in SCHEMA.get_all_operations()}
    assert fuzzed == in_spec
    assert len(in_spec) >= 7


def _response(status: int, content_type: str, body: bytes):
    from schemathesis.core.transport import Response

    return Response(status_code=status, headers={"content-type": [content_type]}, content=body,
                    request=None, elapsed=0.0, verify=False)


GOOD_PROBLEM = {"type": "about:blank", "title": "Invalid input", "status": 422, "detail": "temperature: bad",
                "errors": [{"field": "temperature", "message": "bad"}]}


@pytest.mark.parametrize("status, content_type, body", [
    (404, "text/html; charset=utf-8", b"<p>Not Found</p>"),  # the framework's default error page
    (422, "application/json", json.dumps(GOOD_PROBLEM).encode()),  # right shape, wrong media type
    (400, "application/problem+json", json.dumps(GOOD_PROBLEM).encode()),  # status member disagrees
    (422, "application/problem+json", json.dumps({**GOOD_PROBLEM, "errors": None}).encode()),
    (422, "application/problem+json", json.dumps({**GOOD_PROBLEM, "errors": [{"message": "x"}]}).encode()),
])
def test_problem_check_refuses_a_malformed_client_error(status, content_type, body):
    """The custom check can fail (RFC 9457 shape plus our errors[] member), so a passing fuzz run means something."""
    with pytest.raises(AssertionError):
        client_errors_are_problems(None, _response(status, content_type, body), None)


def test_problem_check_accepts_a_problem_and_ignores_success():
    assert client_errors_are_problems(None, _response(422, "application/problem+json",
                                                      json.dumps(GOOD_PROBLEM).encode()), None) is None
    assert client_errors_are_problems(None, _response(200, "text/csv", b"a,b\n"), None) is None
