"""The catalogue under stress, on SQLite and the real PostgreSQL: concurrent writers through a real
multi-process gunicorn, a writer killed inside its transaction, and the database down.

References: RFC 9110 §13.1.1 and §15.5.13 (If-Match, 412: the loser of a race re-reads and retries, so no
update is lost); RFC 9110 §15.6.4 (503 with Retry-After) and RFC 9457 (problem details); atomic transactions
(a killed writer leaves nothing half-written) are the databases' documented guarantee, common practice, no
source.
"""
from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import threading
import urllib.error
import urllib.request

import pytest

from plant import record
from serving import ROOT, gunicorn

WRITERS = 16
CHANGES_EACH = 3


def _call(base: str, method: str, path: str, body: dict | None = None, headers: dict | None = None):
    data = None if body is None else json.dumps(body).encode()
    request = urllib.request.Request(base + path, data=data, method=method,
                                     headers={"Content-Type": "application/json", **(headers or {})})
    try:
        with urllib.request.urlopen(request, timeout=60) as response:
            return response.status, dict(response.headers), json.loads(response.read() or b"null")
    except urllib.error.HTTPError as error:
        return error.code, dict(error.headers), json.loads(error.read() or b"null")


@pytest.mark.slow
def test_sixteen_concurrent_writers_lose_no_revision(database_url):
    with gunicorn(env={"COOLMARGIN_DATABASE_URL": database_url}, workers=4) as base:
        vessel = record("vessel", "Puffin") | {"utility": None}
        status, _, _ = _call(base, "POST", "/v1/vessels", vessel)
        assert status == 201
        outcomes: list[tuple[int, int]] = []  # (writer, 412s met)
        errors: list[str] = []

        def writer(number: int) -> None:
            stale = 0
            for change in range(CHANGES_EACH):
                for _attempt in range(200):
                    _, headers, _ = _call(base, "GET", "/v1/vessels/Puffin")
                    status, _, body = _call(base, "PATCH", "/v1/vessels/Puffin",
                                            {"notes": f"writer {number} change {change}"},
                                            {"If-Match": headers["ETag"]})
                    if status == 200:
                        break
                    if status != 412:
                        errors.append(f"writer {number}: {status} {body}")
                        return
                    stale += 1
                else:
                    errors.append(f"writer {number} never got its change in")
            outcomes.append((number, stale))

        threads = [threading.Thread(target=writer, args=(n,)) for n in range(WRITERS)]
        for thread in threads:
            thread.start()
        for thread in threads:
            thread.join()
        assert errors == []
        status, _, history = _call(base, "GET", "/v1/vessels/Puffin/revisions")
        items = history["items"]
        assert [item["revision"] for item in items] == list(range(1, 1 + WRITERS * CHANGES_EACH + 1))
        notes = [item["content"].get("notes") for item in items[1:]]
        expected = {f"writer {n} change {c}" for n in range(WRITERS) for c in range(CHANGES_EACH)}
        assert sorted(notes) == sorted(expected)  # every change is a revision of its own; none overwritten
        assert sum(stale for _, stale in outcomes) > 0  # the writers did race (and were told so)

        # sixteen creators of one tag: exactly one wins
        results: list[int] = []

        def creator() -> None:
            results.append(_call(base, "POST", "/v1/vessels", vessel | {"tag": "R-777"})[0])

        threads = [threading.Thread(target=creator) for _ in range(WRITERS)]
        for thread in threads:
            thread.start()
        for thread in threads:
            thread.join()
        assert sorted(results) == [201] + [409] * (WRITERS - 1)


_KILLED_WRITER = """
import os, sys, time
import api.storage as storage
from api.storage import Catalogue

def stall(connection):
    print("inside", flush=True)
    time.sleep(60)

catalogue = Catalogue(sys.argv[1])
catalogue.upgrade()
storage._before_commit = stall
if sys.argv[2] == "create":
    catalogue.create("vessel", "K-1", {"tag": "K-1"}, {}, "killed")
else:
    catalogue.revise("vessel", "Puffin", 1, "killed", body={"tag": "Puffin", "notes": "half"})
"""


@pytest.mark.parametrize("operation", ["create", "revise"])
def test_a_writer_killed_inside_its_transaction_leaves_no_partial_record(database_url, operation):
    from api.storage import Catalogue

    catalogue = Catalogue(database_url)
    try:
        catalogue.upgrade()
        catalogue.create("vessel", "Puffin", {"tag": "Puffin"}, {}, "alice")
        child = subprocess.Popen([sys.executable, "-c", _KILLED_WRITER, database_url, operation], cwd=ROOT,
                                 stdout=subprocess.PIPE, text=True, env=dict(os.environ, PYTHONPATH=str(ROOT)))
        assert child.stdout.readline().strip() == "inside"  # the rows are written, not committed
        child.send_signal(signal.SIGKILL)
        child.wait(timeout=30)
        child.stdout.close()
        assert [h.number for h in catalogue.history("vessel", "Puffin")] == [1]
        assert catalogue.get("vessel", "Puffin").current == 1
        assert catalogue.counts() == {"vessel": 1}
        with pytest.raises(Exception, match="no vessel"):
            catalogue.get("vessel", "K-1")
        # and the catalogue still takes writes (no lock left behind)
        assert catalogue.revise("vessel", "Puffin", 1, "alice", body={"tag": "Puffin", "notes": "ok"}).number == 2
    finally:
        catalogue.dispose()


@pytest.mark.parametrize("url", ["postgresql+psycopg://postgres@127.0.0.1:1/test",
                                 "sqlite:////proc/no-such-place/catalogue.sqlite3"])
def test_database_down_is_503_on_record_routes_and_calculations_keep_working(url):
    import logging

    from api import create_app

    app = create_app({"TESTING": True, "DATABASE_URL": url})  # starts although the database is down
    client = app.test_client()
    seen: list[logging.LogRecord] = []
    catcher = logging.Handler()
    catcher.emit = seen.append
    logging.getLogger("coolmargin").addHandler(catcher)
    try:
        for response in (client.get("/v1/vessels"), client.get("/v1/vessels/Puffin"),
                         client.post("/v1/steps", json=record("step", "AC-7-PROD")),
                         client.post("/v1/screenings", json={"step": {"ref": "AC-7-PROD"}}),
                         client.post("/v1/cooling-check", json={"vessel": {"ref": "Puffin"},
                                                                "step": {"ref": "AC-7-PROD"}})):
            assert response.status_code == 503 and response.mimetype == "application/problem+json"
            assert int(response.headers["Retry-After"]) >= 1 and response.json["status"] == 503
            assert "Traceback" not in response.get_data(as_text=True)
        inline = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
        assert client.post("/v1/cooling-check", json=inline).status_code == 200
        assert client.get("/health").status_code == 200
        refusals = [r for r in seen if "catalogue request refused" in r.getMessage()]
        assert refusals and not [r for r in seen if r.exc_info]  # an outage is no internal error
    finally:
        logging.getLogger("coolmargin").removeHandler(catcher)
        app.extensions["coolmargin.catalogue"].dispose()
