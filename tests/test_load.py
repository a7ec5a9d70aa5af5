"""A short load run against gunicorn on loopback: every valid request of the mix answers 2xx under concurrency.

Reference: the service contract (openapi.yaml) says these requests are valid; "no errors under concurrent
load" is common practice, no source. Bounded: 8 clients, 5 s, at most 3000 requests.
"""
import pytest

from benchmarks.load import loopback_host_port, run_load
from benchmarks.requests import available, load_mix
from serving import gunicorn


@pytest.mark.slow
def test_short_load_run_has_no_errors():
    mix = load_mix()
    assert mix, "the load mix has no available route"
    with gunicorn(workers=2) as base:
        result = run_load(base, mix, clients=8, seconds=5.0, max_requests=3000)
    assert result.errors == 0, result.error_samples
    assert result.requests >= 20  # the server really answered, not just a few requests before a stall
    assert result.statuses.keys() <= set(range(200, 300))


def test_load_refuses_addresses_other_than_loopback():
    for url in ("http://10.0.0.5:8000", "https://127.0.0.1:8000", "http://example.org"):
        with pytest.raises(ValueError):
            loopback_host_port(url)
    assert loopback_host_port("http://localhost:8123") == ("127.0.0.1", 8123)


def test_load_counts_a_rejected_request_as_an_error():
    """The generator can fail: an invalid body (422) is an error, so a clean run means every answer was 2xx."""
    from benchmarks.requests import Example

    good = available("/v1/properties")
    bad = Example("POST", "/v1/properties", {"fluid": "water", "temperature": "-50 degC"})  # frozen water
    with gunicorn(workers=1) as base:
        result = run_load(base, [good, bad], clients=2, seconds=2.0, max_requests=20)
    assert result.requests == 20
    assert result.errors == 10 and result.statuses[422] == 10
