"""Contract fuzzing against a live server: schemathesis with all its checks finds no server error and no
contract mismatch. Bounded to about a minute; tests/benchmarks/fuzz_contract.py runs longer.
Reference: the OpenAPI 3.1 contract (openapi.yaml); RFC 9457 (problem details)."""
import pytest

from live_fuzz import run

BUDGET = 45  # s of generation after the examples and coverage phases


@pytest.mark.slow
def test_live_server_keeps_the_contract_under_fuzzing():
    result = run(BUDGET)
    summary = result.stdout[-6000:]
    assert "Server error" not in result.stdout and "ST201" not in result.stdout, summary
    assert result.returncode == 0, summary
