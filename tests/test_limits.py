"""Rate limits per client: memory by default, the real Redis on 127.0.0.1:6379 when configured.

References: RFC 6585 section 4 (429 Too Many Requests, "MAY include a Retry-After header"), RFC 9110
section 10.2.3 (Retry-After in delay-seconds), RFC 9457 (problem details), RFC 7239 / the de-facto
X-Forwarded-For header (only trusted from a configured number of proxies: common practice, no source).
Redis keys use a prefix of their own per test run, and are removed afterwards.
"""
import uuid

import pytest
import redis

from api import create_app

TOKEN, OTHER = "plant-7-line-2-aaaaaaaaaaaaaaaa", "plant-9-pilot-bbbbbbbbbbbbbbbb"
REDIS_URL = "redis://127.0.0.1:6379/0"


def _app(**config):
    base = {"TESTING": True, "RATE_LIMIT": "3 per minute", "AUTH_TOKENS": "", "AUTH_TOKENS_FILE": ""}
    return create_app({**base, **config})


def _statuses(client, count, path="/v1/fluids", **kwargs):
    return [client.get(path, **kwargs).status_code for _ in range(count)]


def test_a_client_over_its_limit_gets_a_429_problem_with_retry_after():
    client = _app().test_client()
    assert _statuses(client, 3) == [200, 200, 200]
    response = client.get("/v1/fluids")
    assert response.status_code == 429  # RFC 6585 section 4
    assert response.mimetype == "application/problem+json"
    assert 1 <= int(response.headers["Retry-After"]) <= 61  # RFC 9110 10.2.3; the window is one minute
    assert "more than 3 per 1 minute" in response.json["detail"] and response.json["instance"]


def test_memory_counting_starts_no_thread_per_request_and_still_expires(monkeypatch):
    # The library's memory storage starts a 10 ms timer thread after a hit whenever the last one has ended;
    # ours sweeps on the request (a thread per request is overhead, common practice, no source).
    import threading
    import time

    from api import limits

    client = _app(RATE_LIMIT="100 per second").test_client()
    client.get("/v1/fluids")
    time.sleep(0.05)  # the one timer the library's constructor starts has run
    threads = threading.active_count()
    for _ in range(5):
        assert client.get("/v1/fluids").status_code == 200
        assert threading.active_count() == threads
    storage = client.application.extensions["coolmargin.limiter"].storage
    assert isinstance(storage, limits.InlineMemory)
    monkeypatch.setattr(limits, "SWEEP_SECONDS", 0.0)
    time.sleep(1.05)  # every entry is now past its one-second window: the next request sweeps them away
    storage.next_sweep = 0.0
    assert client.get("/v1/fluids").status_code == 200
    assert [len(events) for events in storage.events.values()] == [1]  # only the entry of that request


def test_probes_are_never_limited():
    client = _app(RATE_LIMIT="1 per minute").test_client()
    assert _statuses(client, 10, "/health") == [200] * 10
    assert set(_statuses(client, 5, "/ready")) == {200}


def test_each_token_has_its_own_bucket_and_bad_tokens_count_per_address():
    client = _app(AUTH_TOKENS=f"{TOKEN},{OTHER}").test_client()
    assert _statuses(client, 4, headers={"Authorization": f"Bearer {TOKEN}"}) == [200, 200, 200, 429]
    assert _statuses(client, 3, headers={"Authorization": f"Bearer {OTHER}"}) == [200, 200, 200]
    # made-up tokens share their address's bucket: rotating them does not escape the limit
    guesses = [client.get("/v1/fluids", headers={"Authorization": f"Bearer guess-{i}"}).status_code for i in range(4)]
    assert guesses == [401, 401, 401, 429]


def test_forwarded_addresses_count_only_behind_a_trusted_proxy():
    spoofing = _app().test_client()
    assert [spoofing.get("/v1/fluids", headers={"X-Forwarded-For": f"10.0.0.{i}"}).status_code
            for i in range(4)] == [200, 200, 200, 429]
    proxied = _app(TRUSTED_PROXIES=1).test_client()
    for address in ("192.0.2.10", "192.0.2.11"):
        assert _statuses(proxied, 3, headers={"X-Forwarded-For": address}) == [200, 200, 200]
    assert _statuses(proxied, 1, headers={"X-Forwarded-For": "192.0.2.10"}) == [429]


def test_an_empty_limit_turns_limiting_off():
    assert set(_statuses(_app(RATE_LIMIT="").test_client(), 10)) == {200}


@pytest.fixture()
def redis_prefix():
    prefix = f"coolmargin-serve-test-{uuid.uuid4().hex[:12]}"
    yield prefix
    connection = redis.Redis.from_url(REDIS_URL)
    keys = list(connection.scan_iter(f"*{prefix}*"))
    if keys:
        connection.delete(*keys)


def test_redis_storage_shares_the_counts_between_processes(redis_prefix):
    # two app instances stand for two gunicorn workers (or two replicas) using the same Redis
    config = {"RATE_LIMIT_STORAGE": REDIS_URL, "RATE_LIMIT_PREFIX": redis_prefix}
    first, second = _app(**config).test_client(), _app(**config).test_client()
    assert _statuses(first, 2) == [200, 200]
    assert _statuses(second, 2) == [200, 429]
    assert _statuses(first, 1) == [429]
    assert list(redis.Redis.from_url(REDIS_URL).scan_iter(f"*{redis_prefix}*"))  # the counts live in Redis
    # memory storage does not share: a second process starts from zero
    alone = _app().test_client(), _app().test_client()
    assert _statuses(alone[0], 3) == [200] * 3 and _statuses(alone[1], 3) == [200] * 3
