"""Hostile and extreme input gets a 4xx problem naming the field, never a 500, a hang or a stack trace.

References: RFC 9457 (problem details); IEEE 754 binary64 (1e308 near the largest finite double, 5e-324 the
smallest subnormal); CoolProp's IAPWS-95 water as the oracle for a glycol solution at mass fraction 0.
"""
import copy
import json
import math

import pytest
from marshmallow import ValidationError

from calc.validity import InputError, finite_or_input_error
from schemas import units
from schemas.units import check_unit_text, parse_quantity
from serving import ROOT

CHECK = json.loads((ROOT / "examples" / "cooling_check_production.json").read_text())


def _problem(response, field: str) -> dict:
    assert response.status_code == 422, response.get_data(as_text=True)[:400]
    assert response.mimetype == "application/problem+json"
    fields = [e["field"] for e in response.json["errors"]]
    assert field in fields, fields
    return next(e for e in response.json["errors"] if e["field"] == field)


@pytest.mark.parametrize("text", [
    "1 K**9**9**9",  # pint would evaluate 9**9**9 (hundreds of millions of digits)
    "1 K^9^9", "1 m**2**2", "1 m^99", "1 m^1e3", "1 ((((m))))", "1 m^", "1 m^(2", "1 2 m", "1 m)",
])
def test_unit_text_outside_the_grammar_never_reaches_pint(text, monkeypatch):
    def refuse(*args, **kwargs):  # pragma: no cover - reached only if the grammar check lets it through
        raise AssertionError("pint saw hostile unit text")

    monkeypatch.setattr(units.UREG, "parse_units", refuse)
    with pytest.raises(ValidationError):
        parse_quantity("temperature", text)


def test_the_grammar_keeps_the_units_engineers_write():
    # common practice, no source: how units are written in process data sheets and spreadsheets
    for unit in ["m^3/h", "W/(m^2*K)", "J/(kg*K)", "kg m^-3", "1/s", "m**2", "degC", "kJ/mol", "m^(-1)", "%"]:
        check_unit_text(unit)
    assert parse_quantity("volume flow", "18 m^3/h") == pytest.approx(0.005, rel=1e-12)  # definition of m^3/h


@pytest.mark.parametrize("text", ["١٢ m", "12 µm", "１２ m", "12 m²"])
def test_quantity_text_is_ascii_only(text):
    with pytest.raises(ValidationError, match="ASCII"):
        parse_quantity("length", text)


def test_the_chained_exponent_is_a_422_naming_the_field(client):
    body = copy.deepcopy(CHECK)
    body["process_temperature"] = "1 K**9**9**9"
    assert "exponent" in _problem(client.post("/v1/cooling-check", json=body), "process_temperature")["message"]


def test_pint_caches_stay_bounded(monkeypatch):
    monkeypatch.setattr(units, "PINT_CACHE_LIMIT", 5)
    prefixes = ["k", "M", "m", "c", "d", "u", "n", "G", "p", "h"]
    for prefix in prefixes:
        parse_quantity("length", f"1 {prefix}m")
    assert len(units.UREG._cache.parse_unit) <= len(units._PINT_BASELINE["parse_unit"]) + 5 + 1


@pytest.mark.parametrize("value", [10 ** 400, 1e308, -1e308, 5e-324, "1e308 m"])
def test_extreme_numbers_in_a_quantity_field_are_422s_naming_it(client, value):
    body = copy.deepcopy(CHECK)
    body["vessel"]["diameter"] = value
    message = _problem(client.post("/v1/cooling-check", json=body), "vessel.diameter")["message"]
    assert " m " in message or "m (" in message or "finite" in message  # the unit or the reason is stated


def test_bounds_state_unit_and_reason(client):
    body = copy.deepcopy(CHECK)
    body["vessel"]["diameter"] = 2e3
    message = _problem(client.post("/v1/cooling-check", json=body), "vessel.diameter")["message"]
    assert message.startswith("must be at most 1000 m (") and "vessel" in message


def test_integers_refuse_fractions(client):
    body = copy.deepcopy(CHECK)
    body["vessel"]["agitator"]["count"] = 1.5
    assert "whole number" in _problem(client.post("/v1/cooling-check", json=body), "vessel.agitator.count")["message"]
    body["vessel"]["agitator"]["count"] = 1.0  # a whole number written as a float is still one
    assert client.post("/v1/cooling-check", json=body).status_code == 200


def test_glycol_at_mass_fraction_zero_is_plain_water(client):
    import CoolProp.CoolProp as CP

    answer = client.get("/v1/properties?fluid=ethylene_glycol&mass_fraction=0&temperature=20")
    assert answer.status_code == 200
    water = CP.PropsSI("D", "T", 293.15, "P", 101325, "Water")  # IAPWS-95 via CoolProp
    assert answer.json["density"] == pytest.approx(water, rel=5e-3)  # the brine table at x = 0, within 0.5 %


@pytest.mark.parametrize("query, field", [
    ("fluid=n_hexane&temperature=20001&pressure=6.36e-253", "pressure"),  # found by the seeded fuzz run
    ("fluid=water&temperature=20&pressure=5", "pressure"),  # below water's triple-point pressure
    ("fluid=n_hexane&temperature=20&pressure=1.5", "temperature"),  # liquid only from -95 to -94 degC there
])
def test_property_states_coolprop_cannot_reach_are_422s(client, query, field):
    _problem(client.get(f"/v1/properties?{query}"), field)


def test_query_names_nested_thousands_deep_are_refused(client):
    response = client.get("/v1/cooling-check?" + "a." * 2700 + "b=1")
    assert response.status_code == 422 and "nested deeper" in response.json["errors"][0]["message"]


def test_a_numerical_breakdown_names_the_most_extreme_input():
    def overflowing(args):
        return math.exp(args["x"])

    with pytest.raises(InputError) as error:
        finite_or_input_error(overflowing, {"x": 1e6}, {"vessel.diameter": 2.0, "heat_release.dosing_time": 1e6})
    assert error.value.field == "heat_release.dosing_time" and "OverflowError" in error.value.message


def _example(name: str) -> dict:
    return json.loads((ROOT / "examples" / name).read_text())


def _set(body: dict, dotted: str, value) -> dict:
    body = copy.deepcopy(body)
    node = body
    *parents, last = dotted.split(".")
    for key in parents:
        node = node[key]
    node[last] = value
    return body


@pytest.mark.parametrize("route, example, changes", [
    # products of bounded inputs that overflow an exponential or a power inside calc
    ("/v1/agitation", "agitation_request.json", {"vessel.agitator.speed": "99999 rpm", "vessel.diameter": 999}),
    ("/v1/heat-transfer", "heat_transfer_request.json", {"coolant.flow": "1e-15 m^3/s", "vessel.wall.thickness": 999}),
    ("/v1/thermal-safety", "thermal_safety_production.json",
     {"decomposition.activation_energy": "9999999 J/mol", "decomposition.onset_power": "1e8 W/kg"}),
    ("/v1/cstr-steady-states", "cstr_steady_states.json", {"activation_energy": "9999999 J/mol", "rate_constant": 1e30}),
])
def test_overflowing_combinations_answer_a_number_or_a_named_problem(client, route, example, changes):
    body = _example(example)
    for dotted, value in changes.items():
        body = _set(body, dotted, value)
    response = client.post(route, json=body)
    assert response.status_code in (200, 422), response.get_data(as_text=True)[:300]
    if response.status_code == 422:
        assert response.json["errors"] and all(e["field"] for e in response.json["errors"])
    else:
        json.loads(response.get_data(as_text=True), parse_constant=lambda name: pytest.fail(f"{name} in JSON"))
