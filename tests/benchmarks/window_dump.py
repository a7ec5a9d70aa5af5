"""Operating-window answer, measured: ``.venv/bin/python -m tests.benchmarks.window_dump``.

Prints, in one process: the whole request of a 50 x 50 window of the production example, and the time
to dump its 2,500 grid points (plus the boundary) with ``schemas.window.PointList`` against the plain
schema path (``fields.Nested(WindowPointSchema)`` per point), and that difference as a share of the
request. Not a test: the numbers are for the record (issue 10), nothing asserts on timings.
"""
from __future__ import annotations

import json
from pathlib import Path

from marshmallow import fields

from api import create_app
from api.window import _request, _result
from calc.checks.operating_window import operating_window
from schemas import window
from tests.benchmarks.margin_band import timed

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


class SchemaPathResult(window.OperatingWindowResultSchema):
    """The same answer with each point dumped by marshmallow's Nested machinery."""

    points = fields.List(fields.Nested(window.WindowPointSchema))
    boundary = fields.List(fields.Nested(window.WindowPointSchema))


def _rows(result) -> dict:
    """The window with its points as plain rows (SI), which the Nested schema path dumps."""
    names = [window.axis_field(axis) for axis in result.axes]

    def row(point) -> dict:
        out = dict(zip(names, point.values), margin=point.margin, adequate=point.adequate,
                   cooling_capacity=point.cooling_capacity, heat_load=point.heat_load,
                   coolant_outlet_temperature=point.coolant_outlet_temperature)
        return out | ({"note": point.note} if point.note else {})
    return {"axes": result.axes, "points": [row(p) for p in result.points],
            "boundary": [row(p) for p in result.boundary]}


def main() -> None:
    body = json.loads((EXAMPLES / "operating_window_production.json").read_text())
    for axis in body["axes"]:
        axis["points"] = 50
    app = create_app({"TESTING": True})
    client = app.test_client()
    assert client.post("/v1/operating-window", json=body).status_code == 200
    args = _request.load(body)
    result = operating_window(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                              args["heat_release"], tuple(args["axes"]), args["safety_factor"])
    rows, nested = _rows(result), SchemaPathResult(only=("points", "boundary"))
    fast_only = window.OperatingWindowResultSchema(only=("points", "boundary"))
    assert fast_only.dump(result) == nested.dump(rows)  # the same answer both ways
    request = timed(lambda: client.post("/v1/operating-window", json=body), 7)
    fast = timed(lambda: fast_only.dump(result), 15)
    slow = timed(lambda: nested.dump(rows), 15)
    whole = timed(lambda: _result.dump(result), 15)
    print(f"50 x 50 window, {len(result.points)} points + {len(result.boundary)} boundary points")
    print(f"whole request (in-process): {request * 1e3:.0f} ms")
    print(f"result dump, PointList: {whole * 1e3:.1f} ms (points and boundary alone {fast * 1e3:.1f} ms)")
    print(f"points and boundary through Nested(WindowPointSchema): {slow * 1e3:.1f} ms, "
          f"{100 * (slow - fast) / request:.0f} % of the request more")


if __name__ == "__main__":
    main()
