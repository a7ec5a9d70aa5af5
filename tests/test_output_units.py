"""Answers in the reader's units: presets, per-field overrides, CSV dialect, significant figures.

Conversion factors are checked against published definitions, not against the code's own pint calls:
NIST SP 811 (2008), Appendix B: 1 Btu_IT/h = 0.29307107 W, 1 gal (US) = 3.785411784e-3 m^3 (exact),
1 psi = 6894.757 Pa, 1 lb = 0.45359237 kg (exact), 1 ft = 0.3048 m (exact); t/degF = 1.8 t/degC + 32.
"""
import json
from pathlib import Path

import pytest

from api.http import Presentation, text_value
from schemas.units import KINDS, parse_quantity

ROOT = Path(__file__).resolve().parents[1]
CHECK = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())
SCALE_UP = json.loads((ROOT / "examples" / "scale_up_demo.json").read_text())


@pytest.fixture(scope="module")
def answers(app):
    client = app.test_client()
    return {preset: client.post(f"/v1/cooling-check?output_units={preset}", json=CHECK).json
            for preset in ("si", "metric", "us")}


def test_us_and_metric_presets_match_published_factors(answers):
    si, metric, us = answers["si"], answers["metric"], answers["us"]
    assert us["units"]["cooling_capacity"] == "BTU/h" and metric["units"]["cooling_capacity"] == "kW"
    # NIST SP 811 App. B: 1 Btu_IT/h = 0.29307107 W. The written BTU is ISO 31-4's 1055.056 J, 1.4e-7 from
    # the Btu_IT (1055.05585 J): far below any engineering tolerance, so rel 1e-6 here.
    assert us["cooling_capacity"] == pytest.approx(si["cooling_capacity"] / 0.29307107, rel=1e-6)
    assert metric["cooling_capacity"] == pytest.approx(si["cooling_capacity"] / 1e3, rel=1e-12)
    # t/degF = 1.8 t/degC + 32 (definition of the Fahrenheit scale).
    assert us["units"]["coolant_outlet_temperature"] == "degF"
    assert us["coolant_outlet_temperature"] == pytest.approx(1.8 * si["coolant_outlet_temperature"] + 32, rel=1e-12)
    # Flows: kg/s -> lb/h with 1 lb = 0.45359237 kg (exact).
    assert us["units"]["limits.required_coolant_flow"] == "lb/h"
    assert us["limits"]["required_coolant_flow"] == pytest.approx(
        si["limits"]["required_coolant_flow"] * 3600 / 0.45359237, rel=1e-12)
    # Times in minutes; U in Btu/(h ft^2 degF): 1 Btu_IT/(h ft^2 degF) = 5.678263 W/(m^2 K) (NIST SP 811).
    assert metric["limits"]["minimum_dosing_time"] == pytest.approx(si["limits"]["minimum_dosing_time"] / 60)
    u_si = si["heat_transfer"]["overall_coefficient"]
    assert us["heat_transfer"]["overall_coefficient"] == pytest.approx(u_si / 5.678263, rel=1e-6)
    # What is not a quantity is untouched.
    assert us["margin"] == si["margin"] and us["adequate"] is si["adequate"]


def test_every_written_unit_reads_back_as_input(answers):
    """Round trip: each value of the US answer, sent back as "value unit" text, is the SI answer's value."""
    from schemas.cooling import CoolingCheckResultSchema
    from schemas.base import kind_map

    si, us = answers["si"], answers["us"]
    kinds = kind_map(CoolingCheckResultSchema())
    checked = 0
    for path, kind in kinds.items():
        node_si, node_us = si, us
        for part in path.split("."):
            if not isinstance(node_si, dict) or part not in node_si:
                break
            node_si, node_us = node_si[part], node_us[part]
        else:
            if isinstance(node_si, float) and KINDS[kind].api_unit:
                back = parse_quantity(kind, f"{node_us!r} {us['units'][path]}")
                assert back == pytest.approx(parse_quantity(kind, node_si), rel=1e-9, abs=1e-12), path
                checked += 1
    assert checked >= 15


def test_per_field_override_and_its_errors(client):
    answer = client.post("/v1/cooling-check?output_units=metric&unit.cooling_capacity=MW", json=CHECK).json
    assert answer["units"]["cooling_capacity"] == "MW" and answer["units"]["heat_load.total"] == "kW"
    assert answer["cooling_capacity"] == pytest.approx(answer["heat_load"]["total"] * answer["margin"] / 1e3)
    wrong = client.post("/v1/cooling-check?unit.cooling_capacity=degC", json=CHECK)
    assert wrong.status_code == 422 and wrong.json["errors"][0]["field"] == "unit.cooling_capacity"
    assert "not a unit of power" in wrong.json["errors"][0]["message"]
    unknown = client.post("/v1/cooling-check?unit.colour=m", json=CHECK)
    assert unknown.status_code == 422 and unknown.json["errors"][0]["field"] == "unit.colour"
    preset = client.post("/v1/cooling-check?output_units=imperial", json=CHECK)
    assert preset.status_code == 422 and preset.json["errors"][0]["field"] == "output_units"


def test_scale_up_csv_in_us_units_with_decimal_comma_and_three_figures(client):
    text = client.post("/v1/scale-up?format=csv&output_units=us&decimal=comma&digits=3",
                       json=SCALE_UP).get_data(as_text=True)
    header, first = text.splitlines()[:2]
    assert header.startswith("name;volume [gal];") and "cooling_capacity [BTU/h]" in header
    cells = dict(zip(header.split(";"), first.split(";")))
    assert cells["adequate"] == "TRUE"
    volume = float(cells["volume [gal]"].replace(",", "."))
    si = client.post("/v1/scale-up", json=SCALE_UP).json["scales"][0]["volume"]
    # 1 gal (US) = 3.785411784e-3 m^3 exactly (NIST SP 811); three significant figures asked.
    assert volume == float(f"{si / 3.785411784e-3:.3g}") and "," in cells["volume [gal]"]


def test_text_has_no_float_noise_and_spreadsheet_booleans():
    view = Presentation()
    assert text_value(24.99999999999909, view) == "25"  # the noise the issue quotes
    assert text_value(0.1 + 0.2, view) == "0.3"
    assert text_value(True, view) == "TRUE" and text_value(None, view) == ""
    assert text_value(1.8, Presentation(decimal_comma=True)) == "1,8"
    assert text_value(123456.789, Presentation(digits=3)) == "1.23e+05"


def test_single_value_and_chart_follow_the_units(client):
    value = client.post("/v1/cooling-check?field=coolant_outlet_temperature&output_units=us", json=CHECK)
    si = client.post("/v1/cooling-check", json=CHECK).json["coolant_outlet_temperature"]
    assert float(value.get_data(as_text=True)) == pytest.approx(1.8 * si + 32, rel=1e-9)
    svg = client.post("/v1/scale-up?format=svg&output_units=us", json=SCALE_UP).get_data(as_text=True)
    assert "<!-- BTU/h -->" in svg and "vessel volume, gal" in svg  # matplotlib keeps text as SVG comments


@pytest.mark.parametrize("field, text, expected", [
    ("process_temperature", "45 C", "did you mean '45 degC' ('C' is the coulomb)?"),
    ("coolant.flow", "20 m3/h", "write powers with ^: '20 m^3/h'"),
    ("vessel.diameter", "1,8 m", "'1,8 m' has a decimal comma: write '1.8 m'"),
    # A gauge reading plus the standard atmosphere (101 325 Pa by definition, ISO 2533) is the absolute pressure.
    ("coolant.pressure", "2 barg", "pressures here are absolute: add the atmospheric pressure to a gauge reading, "
                                   "e.g. '3.01325 bar'"),
])
def test_common_unit_habits_get_a_helpful_message(client, field, text, expected):
    body = json.loads(json.dumps(CHECK))
    node = body
    *parents, name = field.split(".")
    for part in parents:
        node = node[part]
    node[name] = text
    response = client.post("/v1/cooling-check", json=body)
    assert response.status_code == 422
    errors = {e["field"]: e["message"] for e in response.json["errors"]}
    assert expected in errors[field], errors
