"""Contract fuzzing against a live server: schemathesis with all its checks finds no server error and no
contract mismatch. Bounded to about a minute; tests/benchmarks/fuzz_contract.py runs longer.
Reference: the OpenAPI 3.1 contract (openapi.yaml); RFC 9457 (problem details)."""
import pytest

from live_fuzz import run

BUDGET = 40  # s for the examples and random generation (the coverage phase runs in the long script)


@pytest.mark.slow
def test_live_server_keeps_the_contract_under_fuzzing():
    result = run(BUDGET, "examples,fuzzing")
    summary = result.stdout[-6000:]
    assert "Server error" not in result.stdout and "ST201" not in result.stdout, summary
    assert result.returncode == 0, summary
