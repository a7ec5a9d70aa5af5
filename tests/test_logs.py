"""Every log line a server writes is one JSON object (application, gunicorn's error log, access log).

Reference: JSON Lines (one JSON text per line, jsonlines.org) and RFC 8259 (JSON); the request id
joining a log line to the answer's X-Request-ID and problem ``instance`` is coolmargin's own contract.
"""
import json
import logging
import sys
import time

import pytest

from api.logs import JsonFormatter
from serving import ROOT, gunicorn

DEMO = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())


def test_a_traceback_is_one_field_of_one_line():
    try:
        1 / 0
    except ZeroDivisionError:
        record = logging.LogRecord("coolmargin", logging.ERROR, __file__, 1, "case %d failed", (3,), sys.exc_info())
    record.request_id = "plant-7.check-42"
    line = JsonFormatter().format(record)
    assert "\n" not in line
    entry = json.loads(line)
    assert entry["message"] == "case 3 failed" and entry["level"] == "ERROR"
    assert entry["request_id"] == "plant-7.check-42"
    assert entry["traceback"].startswith("Traceback") and "ZeroDivisionError" in entry["traceback"]
    assert entry["traceback"].count("\n") >= 2  # the whole traceback, kept inside the field


@pytest.mark.slow
def test_a_real_server_writes_only_json_lines_with_request_ids():
    import urllib.request

    env = {"COOLMARGIN_ACCESS_LOG": "-", "COOLMARGIN_REQUEST_BUDGET": "0.05"}
    with gunicorn(workers=1, env=env) as base:
        request = urllib.request.Request(base + "/v1/scale-up", data=json.dumps({"cases": [DEMO] * 5}).encode(),
                                         headers={"Content-Type": "application/json", "X-Request-ID": "batch-77"})
        with urllib.request.urlopen(request, timeout=30) as response:
            assert 503 in {case["status"] for case in json.loads(response.read())["cases"]}
        for _ in range(50):  # the access line is written just after the answer
            text = base.log_text()
            if '"path":"/v1/scale-up"' in text:
                break
            time.sleep(0.1)
    lines = [line for line in text.splitlines() if line.strip()]
    entries = [json.loads(line) for line in lines]  # fails on any line that is not JSON
    assert any(e.get("logger") == "gunicorn.error" and "Booting worker" in e["message"] for e in entries)
    stopped = [e for e in entries if "request stopped" in e.get("message", "")]
    assert stopped and stopped[0]["request_id"] == "batch-77"
    access = [e for e in entries if e.get("path") == "/v1/scale-up"]
    assert access and access[0]["request_id"] == "batch-77" and access[0]["status"] == 200
