"""The utility's limits (available pressure difference, maximum velocity, maximum flow) bound the solved limits."""
import json
import math
from dataclasses import replace
from pathlib import Path

import pytest

from calc.checks.cooling_check import cooling_check
from calc.hydraulics.paths import pressure_drop, velocity_factor
from calc.network.flow_limit import flow_limit
from calc.network.heat_transfer import heat_transfer
from schemas.cooling import CoolingCheckRequestSchema

BODY = json.loads((Path(__file__).parents[1] / "examples" / "cooling_check_production.json").read_text())


def _args(**coolant):
    body = json.loads(json.dumps(BODY))
    body["coolant"].update(coolant)
    return CoolingCheckRequestSchema().load(body)


def _check(args):
    return cooling_check(args["vessel"], args["charge"], args["coolant"], args["process_temperature"],
                         args["heat_release"], args["safety_factor"])


def test_pressure_limit_is_where_the_pressure_drop_equals_the_available_difference():
    args = _args(available_pressure_drop="0.3 bar")
    coolant = args["coolant"]
    result = heat_transfer(args["vessel"], args["charge"], coolant, args["process_temperature"])
    limit = flow_limit(result.streams, coolant)
    assert limit.binding == "available_pressure_drop" and limit.stream == "jacket"
    stream = result.stream("jacket")
    inlet = coolant.liquid.at(coolant.inlet_temperature)
    assert pressure_drop(stream.path, limit.mass_flow, inlet).pressure_drop == pytest.approx(0.3e5, rel=1e-9)
    # at the solved mean temperature (warmer, thinner coolant) the same flow needs less: the limit is conservative
    at_limit = heat_transfer(args["vessel"], args["charge"], coolant.with_mass_flow(limit.mass_flow),
                             args["process_temperature"])
    assert at_limit.stream("jacket").pressure_drop <= 0.3e5


def test_velocity_and_total_flow_limits():
    args = _args(maximum_velocity="1 m/s")
    coolant = args["coolant"]
    result = heat_transfer(args["vessel"], args["charge"], coolant, args["process_temperature"])
    limit = flow_limit(result.streams, coolant)
    density = coolant.liquid.at(coolant.inlet_temperature).density
    assert limit.binding == "maximum_velocity"
    assert velocity_factor(result.stream("jacket").path) * limit.mass_flow / density == pytest.approx(1.0, rel=1e-12)
    both = _args(maximum_velocity="1 m/s", maximum_flow="5 m^3/h")["coolant"]
    limit = flow_limit(result.streams, both)
    assert limit.binding == "maximum_flow" and limit.stream is None
    assert limit.mass_flow == pytest.approx(5.0 / 3600.0 * density, rel=1e-12)


def test_required_flow_not_reachable_within_the_available_pressure_difference():
    # A tight header (0.05 bar) on the production example with a doubled heat release
    body = json.loads(json.dumps(BODY))
    body["coolant"]["available_pressure_drop"] = "0.05 bar"
    body["heat_release"]["dosing_time"] = "0.5 h"
    args = CoolingCheckRequestSchema().load(body)
    check = _check(args)
    flow = check.limits.required_coolant_flow
    assert not flow.reachable
    assert flow.message.startswith("not reachable within the available pressure difference (jacket)")
    assert any(w.code == "pressure_drop_exceeds_available" for w in check.warnings)
    # the coolant-temperature limit is solved at the largest flow the header pushes, not at the given flow
    inlet = check.limits.maximum_coolant_inlet_temperature
    assert "the largest flow within the available pressure difference" in inlet.message


def test_required_flow_within_the_limit_and_the_fixed_cap_is_gone():
    loose = _check(_args(available_pressure_drop="3 bar"))
    free = _check(_args())
    needed = loose.limits.required_coolant_flow
    assert needed.reachable and "within the available pressure difference" in needed.message
    # same answer as without limits, when the limit does not bind (both solved to 1e-10)
    assert needed.value == pytest.approx(free.limits.required_coolant_flow.value, rel=1e-8)
    assert "no available pressure difference" not in needed.message


def test_no_limits_keeps_the_old_search_and_says_so():
    body = json.loads(json.dumps(BODY))
    body["heat_release"]["dosing_time"] = "0.2 h"
    args = CoolingCheckRequestSchema().load(body)
    flow = _check(args).limits.required_coolant_flow  # margin 0.22: no flow is enough
    assert not flow.reachable
    assert "the utility gave no available pressure difference" in flow.message


def test_coolant_schema_takes_the_limits_with_units():
    coolant = _args(available_pressure_drop="2 bar", maximum_velocity="3 ft/s", maximum_flow="30 m^3/h")["coolant"]
    assert coolant.available_pressure_drop == pytest.approx(2e5)
    assert coolant.maximum_velocity == pytest.approx(0.9144)
    density = coolant.liquid.at(coolant.inlet_temperature).density
    assert coolant.maximum_mass_flow() == pytest.approx(30 / 3600 * density, rel=1e-12)
    assert replace(coolant, maximum_flow=None).maximum_mass_flow() is None
    assert math.isclose(coolant.with_mass_flow(1.0).available_pressure_drop, 2e5)
