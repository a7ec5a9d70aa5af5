"""/v1/operating-window: each grid point is the single cooling check there; the boundary is where margin = SF.

References: the cooling check itself (definition: a window point is the check with that value in its request,
which test_cooling.py and test_vectorised.py tie to published values), and two facts of the trade marked
"common practice, no source": a warmer coolant inlet and a shorter dosing time never raise the margin.
"""
import json

import pytest
from hypothesis import given, settings, strategies as st

from serving import ROOT
from test_hostile_input import _set as _with  # a copy of the body with one dotted field replaced

EXAMPLE = json.loads((ROOT / "examples" / "operating_window_production.json").read_text())
CHECK = {k: v for k, v in EXAMPLE.items() if k != "axes"}


def _window(client, axes, **extra):
    response = client.post("/v1/operating-window", json=dict(CHECK, axes=axes, **extra))
    assert response.status_code == 200, response.get_data(as_text=True)
    return response.json


def test_every_grid_point_is_the_single_cooling_check_there(client):
    body = client.post("/v1/operating-window", json=EXAMPLE).json
    assert len(body["points"]) == 24 * 15 and body["units"]["points.dosing_time"] == "s"
    assert body["cautions"] and any("calorimetry" in c for c in body["cautions"])
    for index in (0, 17, 100, 359):
        point = body["points"][index]
        single = _with(_with(CHECK, "heat_release.dosing_time", point["dosing_time"]),
                       "coolant.inlet_temperature", point["coolant_inlet_temperature"])
        check = client.post("/v1/cooling-check", json=single).json
        assert point["margin"] == pytest.approx(check["margin"], rel=1e-9)
        assert point["adequate"] == check["adequate"]
        assert point["cooling_capacity"] == pytest.approx(check["cooling_capacity"], rel=1e-9)
    # the request's own point is the request's check
    own = client.post("/v1/cooling-check", json=CHECK).json
    assert body["current"]["margin"] == pytest.approx(own["margin"], rel=1e-12)


def test_boundary_points_give_the_safety_factor_when_checked(client):
    body = client.post("/v1/operating-window", json=EXAMPLE).json
    assert body["boundary"], "the demo window crosses the safety factor"
    for point in body["boundary"][::5]:
        single = _with(_with(CHECK, "heat_release.dosing_time", point["dosing_time"]),
                       "coolant.inlet_temperature", point["coolant_inlet_temperature"])
        assert client.post("/v1/cooling-check", json=single).json["margin"] == pytest.approx(1.3, rel=1e-6)


def test_network_axes_process_temperature_and_speed_match_the_check(client):
    axes = [{"quantity": "process_temperature", "from": 35, "to": 60, "points": 6},
            {"quantity": "vessel.agitator.speed", "from": "60 rpm", "to": "120 rpm", "points": 4}]
    body = _window(client, axes)
    for point in body["points"][::5]:
        single = _with(_with(CHECK, "process_temperature", point["process_temperature"]),
                       "vessel.agitator.speed", point["agitator_speed"])
        check = client.post("/v1/cooling-check", json=single).json
        assert point["margin"] == pytest.approx(check["margin"], rel=1e-9)


def test_volume_flow_axis_matches_the_check_and_warmer_coolant_is_not_a_cooling_state(client):
    axes = [{"quantity": "coolant.flow", "from": "6 m^3/h", "to": "30 m^3/h", "points": 5},
            {"quantity": "coolant.inlet_temperature", "from": 0, "to": 50, "points": 6}]
    body = _window(client, axes)
    assert body["axes"][0]["field"] == "coolant_volume_flow"
    hot = [p for p in body["points"] if p["coolant_inlet_temperature"] >= 45.0]
    assert hot and all(p["margin"] is None and p["adequate"] is None and p["note"] for p in hot)
    point = body["points"][7]
    single = _with(_with(CHECK, "coolant.flow", f"{point['coolant_volume_flow']} m^3/s"),
                   "coolant.inlet_temperature", point["coolant_inlet_temperature"])
    assert point["margin"] == pytest.approx(client.post("/v1/cooling-check", json=single).json["margin"], rel=1e-9)


@settings(max_examples=8, deadline=None, derandomize=True)
@given(st.floats(-15.0, 20.0), st.floats(0.5, 6.0))
def test_margin_falls_with_warmer_coolant_and_shorter_dosing(coldest, hours):
    from api import create_app

    client = create_app({"TESTING": True}).test_client()
    # common practice, no source: a warmer coolant inlet and a faster dose never raise the margin
    axes = [{"quantity": "heat_release.dosing_time", "from": f"{hours} h", "to": f"{hours / 3} h", "points": 3},
            {"quantity": "coolant.inlet_temperature", "from": coldest, "to": coldest + 15, "points": 4}]
    points = _window(client, axes)["points"]
    grid = [[points[4 * i + j]["margin"] for j in range(4)] for i in range(3)]
    for row in grid:
        assert all(a > b for a, b in zip(row, row[1:]))
    for column in zip(*grid):
        assert all(a > b for a, b in zip(column, column[1:]))


def test_csv_has_one_row_per_point_and_svg_draws_the_map(client):
    csv = client.post("/v1/operating-window?format=csv", json=EXAMPLE).get_data(as_text=True).splitlines()
    assert len(csv) == 1 + 24 * 15
    assert csv[0].startswith("dosing_time [s],coolant_inlet_temperature [degC],margin,adequate")
    svg = client.post("/v1/operating-window?format=svg", json=EXAMPLE)
    assert svg.mimetype == "image/svg+xml" and b"<svg" in svg.data[:400]
    # colour-blind safe (api.charts): the house amber-to-ink map, not red against green, and the inadequate
    # region hatched as well as coloured (common practice, no source: never colour alone)
    from api import charts
    from matplotlib.colors import to_hex

    colours = charts.margin_colours()
    assert to_hex(colours(0.0)) == charts.AMBER and to_hex(colours(1.0)) == charts.INK
    assert b"<pattern" in svg.data and b"current operating point" in svg.data


@pytest.mark.parametrize("axes, status, field", [
    ([{"quantity": "coolant.flow", "from": 1, "to": 2, "points": 60},
      {"quantity": "coolant.inlet_temperature", "from": 1, "to": 20, "points": 60}], 413, "axes"),
    ([{"quantity": "coolant.flow", "from": 1, "to": 2, "points": 3},
      {"quantity": "coolant.flow", "from": 1, "to": 20, "points": 3}], 422, "axes[1].quantity"),
    ([{"quantity": "coolant.flow", "from": "2 kg", "to": 2, "points": 3},
      {"quantity": "process_temperature", "from": 30, "to": 40, "points": 3}], 422, "axes[0].from"),
    ([{"quantity": "vessel.wall.thickness", "from": 1, "to": 2, "points": 3},
      {"quantity": "process_temperature", "from": 30, "to": 40, "points": 3}], 422, "axes[0].quantity"),
    ([{"quantity": "process_temperature", "from": 30, "to": 40, "points": 1},
      {"quantity": "coolant.flow", "from": 1, "to": 2, "points": 3}], 422, "axes[0].points"),
    ([{"quantity": "process_temperature", "from": 30, "to": 200, "points": 3},
      {"quantity": "coolant.flow", "from": 1, "to": 2, "points": 3}], 422, "axes[0].to"),
    ([{"quantity": "process_temperature", "from": 30, "to": 40, "points": 3}], 422, "axes"),
])
def test_bad_axes_are_problems_naming_the_field(client, axes, status, field):
    response = client.post("/v1/operating-window", json=dict(CHECK, axes=axes))
    assert response.status_code == status and response.mimetype == "application/problem+json"
    assert field in [e["field"] for e in response.json["errors"]], response.json


def test_dosing_axis_needs_the_dosing_model(client):
    body = dict(CHECK, heat_release={"model": "specific_power", "power_per_mass": 20},
                axes=[{"quantity": "heat_release.dosing_time", "from": "1 h", "to": "2 h", "points": 3},
                      {"quantity": "coolant.flow", "from": 1, "to": 2, "points": 3}])
    response = client.post("/v1/operating-window", json=body)
    assert response.status_code == 422 and response.json["errors"][0]["field"] == "axes[0].quantity"


def test_the_grid_point_cap_is_configurable():
    from api import create_app

    small = create_app({"TESTING": True, "MAX_WINDOW_POINTS": 100}).test_client()
    response = small.post("/v1/operating-window", json=EXAMPLE)  # 360 points
    assert response.status_code == 413 and response.json["errors"][0]["field"] == "axes"
