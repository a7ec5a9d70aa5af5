"""Quantity parsing against pint's own unit definitions and the SI definitions behind them."""
import math

import pytest
from hypothesis import given, strategies as st
from marshmallow import ValidationError

from schemas.base import error_list, unflatten
from schemas.units import UREG, from_si, parse_quantity


@pytest.mark.parametrize("kind, text, expected", [
    ("length", "6 ft", 6 * 0.3048),  # international foot = 0.3048 m exactly (1959 agreement)
    ("agitator speed", "150 rpm", 2.5),  # 150 revolutions per minute = 2.5 per second
    ("volume flow", "20 m^3/h", 20 / 3600),
    ("temperature", "25 degC", 298.15),  # kelvin = degC + 273.15 (SI definition)
    ("temperature", "77 degF", 298.15),  # degF = degC * 9/5 + 32
    ("temperature difference", "10 degC", 10.0),  # a difference in degC is a difference in K
    ("viscosity", "5 cP", 0.005),  # centipoise = 1e-3 Pa s
    ("pressure", "2 bar", 2e5),
    ("molar enthalpy", "-120 kJ/mol", -120e3),
    ("heat-transfer coefficient", "100 BTU/(h*ft^2*degR)", 100 * 5.678263),  # 1 BTU/(h ft2 F) = 5.678263 W/(m2 K), pint's IT BTU
    ("volume", "250 L", 0.25),
])
def test_text_with_unit_is_converted_as_pint_defines_it(kind, text, expected):
    assert math.isclose(parse_quantity(kind, text), expected, rel_tol=1e-6)
    number, unit = text.split(" ", 1)
    if kind not in ("agitator speed", "temperature difference"):
        pint_value = UREG.Quantity(float(number), unit).to_base_units().magnitude
        assert math.isclose(parse_quantity(kind, text), pint_value, rel_tol=1e-12), "pint is the reference"


def test_bare_numbers_are_in_the_default_unit():
    assert parse_quantity("temperature", 25) == pytest.approx(298.15)
    assert parse_quantity("agitator speed", "90") == pytest.approx(1.5)  # rpm by default
    assert parse_quantity("length", "2.2") == 2.2


@pytest.mark.parametrize("kind, text, message", [
    ("length", "3 kg", "expected a length, got 'kg'"),
    ("temperature", "5 m", "expected a temperature, got 'm'"),
    ("length", "3 wiggles", "unknown unit 'wiggles'"),
    ("length", "3 furlongs-ish", "a sign inside unit text 'furlongs-ish' belongs to an exponent only"),
])
def test_wrong_units_are_refused_with_a_clear_message(kind, text, message):
    with pytest.raises(ValidationError) as err:
        parse_quantity(kind, text)
    assert err.value.messages == [message]


@given(st.floats(min_value=-200, max_value=2000, allow_nan=False))
def test_temperature_round_trip(value):
    assert from_si("temperature", parse_quantity("temperature", value)) == pytest.approx(value, abs=1e-9)


def test_unflatten_builds_nested_objects_and_lists():
    assert unflatten({"vessel.diameter": "2.2", "vessel.coils[1].turns": "8", "coolant.flow": "20 m^3/h"}) == {
        "vessel": {"diameter": "2.2", "coils": [{}, {"turns": "8"}]}, "coolant": {"flow": "20 m^3/h"}}
    with pytest.raises(ValidationError):
        unflatten({"vessel": "1", "vessel.diameter": "2"})


def test_error_paths_are_dotted():
    assert error_list({"coolant": {"flow": ["bad"]}, "_schema": ["whole"]}) == [
        {"field": "coolant.flow", "message": "bad"}, {"field": "(body)", "message": "whole"}]
