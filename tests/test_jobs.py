"""Large screenings as jobs on the real Redis (127.0.0.1:6379) and the real catalogue (SQLite and PostgreSQL).

Oracles: a job's ranked rows must equal the same screening answered in the request (the queue moves the
work, it does not compute differently); 202 Accepted with Location, RFC 9110 §15.3.3; ``Prefer:
respond-async`` and ``Preference-Applied``, RFC 7240 §4.1 and §3. Every test uses a queue name of its own,
deleted afterwards, so parallel runs on the shared Redis never take each other's jobs.
"""
from __future__ import annotations

import os
import shlex
import subprocess
import sys
import uuid
from pathlib import Path

import pytest
import yaml
from rq.job import Job as RqJob

from api import create_app, jobs
from calc.checks import screening as screening_calc
from api.storage import Catalogue
from plant import load_plant
from serving import ROOT

REDIS_URL = os.environ.get("COOLMARGIN_TEST_REDIS_URL", "redis://127.0.0.1:6379/0")
ASYNC = {"Prefer": "respond-async"}
STEP = {"step": {"ref": "AC-7-FAST"}}


def _app(database_url: str, **settings):
    return create_app({"TESTING": True, "DATABASE_URL": database_url, "QUEUE_URL": REDIS_URL,
                       "QUEUE_NAME": f"coolmargin-test-{uuid.uuid4().hex}", **settings})


@pytest.fixture()
def queued(database_url):
    """The app with a job queue of its own on the real Redis, and the demo plant loaded."""
    app = _app(database_url)
    client = app.test_client()
    load_plant(client)
    yield app, client
    work = jobs.queue(app)
    work.delete(delete_jobs=True)
    app.extensions["coolmargin.catalogue"].dispose()


def _ranked(answer: dict) -> list[tuple]:
    return [(r["rank"], r["tag"], r["verdict"], r.get("margin"), r.get("minimum_dosing_time"),
             r.get("maximum_coolant_inlet_temperature"), r.get("controlling")) for r in answer["rows"]]


def test_a_job_reports_progress_and_ends_with_the_synchronous_ranking(queued, monkeypatch):
    app, client = queued
    sync = client.post("/v1/screenings", json=STEP)  # 8 vessels, under SCREENING_SYNC_VESSELS: in the request
    assert sync.status_code == 201
    accepted = client.post("/v1/screenings", json=STEP, headers=ASYNC)
    assert accepted.status_code == 202 and accepted.headers["Preference-Applied"] == "respond-async"
    location = accepted.headers["Location"]
    assert location == f"/v1/screenings/{accepted.json['id']}" and accepted.headers["Retry-After"]
    assert accepted.json["status"] == "queued" and accepted.json["progress"] == {"done": 0, "total": 8}
    assert client.get(location).json["status"] == "queued"
    assert client.get(location + "?format=csv").status_code == 409  # no table before it is finished
    listed = client.get("/v1/screenings").json["items"][0]
    assert listed["status"] == "queued" and listed["counts"] is None

    seen = []  # every state the job writes to its row, as the database receives it
    update = Catalogue.update_screening

    def recording(self, screening_id, **values):
        seen.append((values.get("status"), values.get("done"), values.get("total")))
        return update(self, screening_id, **values)

    monkeypatch.setattr(Catalogue, "update_screening", recording)
    monkeypatch.setattr(screening_calc, "BATCH", 4)  # progress after every batch checked together
    jobs.work(app, burst=True, fork=False)
    assert seen[:-1] == [("running", 0, 8), ("running", 4, 8), ("running", 8, 8)]  # batches of 4
    assert seen[-1] == ("done", 8, 8)

    done = client.get(location)
    assert done.status_code == 200 and done.json["status"] == "complete"
    assert done.json["progress"] == {"done": 8, "total": 8}
    assert _ranked(done.json) == _ranked(sync.json)
    assert done.json["records"] == sync.json["records"]
    # the previous run of the same request is the synchronous one, and nothing changed since
    assert done.json["changes"]["previous_id"] == sync.json["id"] and done.json["changes"]["items"] == []
    assert any("licensed engineer" in caution for caution in done.json["cautions"])
    assert client.get(location + "?format=csv").get_data(as_text=True) == \
        client.get(f"/v1/screenings/{sync.json['id']}?format=csv").get_data(as_text=True)


def test_large_selections_and_spent_budgets_become_jobs(queued):
    app, client = queued
    app.config["SCREENING_SYNC_VESSELS"] = 5
    by_size = client.post("/v1/screenings", json=STEP)
    assert by_size.status_code == 202 and "Preference-Applied" not in by_size.headers
    assert by_size.json["progress"]["total"] == 8
    small = client.post("/v1/screenings", json=STEP | {"vessels": ["Puffin", "Gannet"]})
    assert small.status_code == 201 and small.json["status"] == "complete"
    # a screening that ran out of its budget in the request is handed to the queue instead of answering partial
    app.config["SCREENING_WALL_TIME"] = 0.0
    spent = client.post("/v1/screenings", json=STEP | {"vessels": ["Puffin", "Gannet"]})
    assert spent.status_code == 202
    app.config["SCREENING_WALL_TIME"] = 20.0
    jobs.work(app, burst=True, fork=False)
    finished = client.get(spent.headers["Location"]).json
    assert finished["status"] == "complete" and _ranked(finished) == _ranked(small.json)
    assert client.get(by_size.headers["Location"]).json["status"] == "complete"


def test_a_job_whose_selection_vanished_fails_and_says_why(queued):
    app, client = queued
    accepted = client.post("/v1/screenings", json={**STEP, "vessels": {"tag": "Puf*"}}, headers=ASYNC)
    assert accepted.status_code == 202
    assert client.delete("/v1/vessels/Puffin").status_code == 200  # retired before a worker took the job
    jobs.work(app, burst=True, fork=False)
    failed = client.get(accepted.headers["Location"])
    assert failed.status_code == 200 and failed.json["status"] == "failed"
    assert "no stored vessel matches" in failed.json["failure"]
    assert client.get(accepted.headers["Location"] + "?format=svg").status_code == 409


def test_a_job_lost_by_the_queue_is_reported_failed(queued):
    app, client = queued
    accepted = client.post("/v1/screenings", json=STEP, headers=ASYNC)
    RqJob.fetch(accepted.json["id"], connection=jobs.queue(app).connection).cancel()
    lost = client.get(accepted.headers["Location"]).json
    assert lost["status"] == "failed" and "lost" in lost["failure"]
    flushed = client.post("/v1/screenings", json=STEP, headers=ASYNC)
    RqJob.fetch(flushed.json["id"], connection=jobs.queue(app).connection).delete()  # as if Redis was emptied
    gone = client.get(flushed.headers["Location"]).json
    assert gone["status"] == "failed" and "not on the queue" in gone["failure"]
    jobs.work(app, burst=True, fork=False)  # nothing left to run: the failed screenings stay failed
    assert client.get(accepted.headers["Location"]).json["status"] == "failed"


def test_without_a_queue_the_screening_runs_in_the_request_and_says_so(store_client):
    load_plant(store_client)
    answer = store_client.post("/v1/screenings", json=STEP | {"vessels": ["Puffin"]}, headers=ASYNC)
    assert answer.status_code == 201 and "Preference-Applied" not in answer.headers
    assert "no_job_queue" in {w["code"] for w in answer.json["warnings"]}


def test_without_a_queue_a_spent_budget_answers_partial_and_names_the_setting(database_url):
    app = create_app({"TESTING": True, "DATABASE_URL": database_url, "SCREENING_WALL_TIME": 0.0})
    client = app.test_client()
    try:
        load_plant(client)
        partial = client.post("/v1/screenings", json=STEP | {"vessels": ["Puffin", "Gannet"]})
        assert partial.status_code == 201 and partial.json["status"] == "partial"
        budget = next(w for w in partial.json["warnings"] if w["code"] == "screening_budget")
        assert "COOLMARGIN_QUEUE_URL" in budget["message"]
    finally:
        app.extensions["coolmargin.catalogue"].dispose()


def test_an_unreachable_queue_leaves_the_screening_in_the_request(database_url):
    app = create_app({"TESTING": True, "DATABASE_URL": database_url, "QUEUE_URL": "redis://127.0.0.1:1/0"})
    client = app.test_client()
    try:
        load_plant(client)
        answer = client.post("/v1/screenings", json=STEP | {"vessels": ["Puffin"]}, headers=ASYNC)
        assert answer.status_code == 201 and answer.json["status"] == "complete"
        assert "job_queue_unreachable" in {w["code"] for w in answer.json["warnings"]}
    finally:
        app.extensions["coolmargin.catalogue"].dispose()


@pytest.mark.slow
def test_compose_worker_command_runs_natively(tmp_path):
    """docker/compose.yaml's worker service, its command run here (forking rq worker, burst) on a queued job."""
    compose = yaml.safe_load((ROOT / "docker" / "compose.yaml").read_text())
    worker = compose["services"]["worker"]
    service = compose["services"]["coolmargin"]
    assert worker["build"] == service["build"] and "COOLMARGIN_QUEUE_URL" in service["environment"]
    assert worker["environment"]["COOLMARGIN_QUEUE_URL"] == service["environment"]["COOLMARGIN_QUEUE_URL"]
    command = shlex.split(worker["command"]) if isinstance(worker["command"], str) else list(worker["command"])
    assert command[:2] == ["coolmargin", "worker"]
    database_url = f"sqlite:///{tmp_path}/catalogue.sqlite3"
    app = _app(database_url)
    client = app.test_client()
    try:
        load_plant(client)
        accepted = client.post("/v1/screenings", json=STEP, headers=ASYNC)
        assert accepted.status_code == 202
        env = dict(os.environ, COOLMARGIN_QUEUE_URL=REDIS_URL, COOLMARGIN_QUEUE_NAME=app.config["QUEUE_NAME"],
                   COOLMARGIN_DATABASE_URL=database_url)
        executable = Path(sys.executable).parent / command[0]
        subprocess.run([str(executable), *command[1:], "--burst"], env=env, check=True, timeout=300,
                       capture_output=True)
        assert client.get(accepted.headers["Location"]).json["status"] == "complete"
    finally:
        jobs.queue(app).delete(delete_jobs=True)
        app.extensions["coolmargin.catalogue"].dispose()


def test_job_answers_conform_to_the_contract(queued):
    import json

    from openapi_core import Config, OpenAPI
    from test_openapi import SPEC_PATH, check_contract

    app, client = queued
    contract = OpenAPI.from_file_path(str(SPEC_PATH), config=Config(extra_media_type_deserializers={
        "application/problem+json": json.loads}))
    body = STEP | {"vessels": ["Puffin", "Lark"]}
    accepted = client.post("/v1/screenings", json=body, headers=ASYNC)
    check_contract(contract, accepted, body)
    check_contract(contract, client.get(accepted.headers["Location"]))
    check_contract(contract, client.get("/v1/screenings"))
    check_contract(contract, client.get(accepted.headers["Location"] + "?format=csv"))
    jobs.work(app, burst=True, fork=False)
    check_contract(contract, client.get(accepted.headers["Location"]))


def test_worker_command_without_a_reachable_queue_says_so(tmp_path, monkeypatch, capsys):
    from api.cli import EXIT_INVALID, EXIT_UNREACHABLE, main

    monkeypatch.delenv("COOLMARGIN_QUEUE_URL", raising=False)
    database = ["--database-url", f"sqlite:///{tmp_path}/catalogue.sqlite3"]
    assert main(["worker", *database]) == EXIT_INVALID
    assert "COOLMARGIN_QUEUE_URL" in capsys.readouterr().err
    assert main(["worker", *database, "--queue-url", "redis://127.0.0.1:1/0", "--burst"]) == EXIT_UNREACHABLE
    assert "unreachable" in capsys.readouterr().err
