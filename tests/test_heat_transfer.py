"""The assembled heat-transfer network: balances that must close and trends that must hold."""
import json
from dataclasses import replace

import pytest
from hypothesis import given, settings, strategies as st

from calc.films import process_side
from calc.network.heat_transfer import heat_transfer
from schemas.heat_transfer import HeatTransferRequestSchema
from serving import ROOT

REQUEST = json.loads((ROOT / "examples" / "heat_transfer_request.json").read_text())


def _case(**changes):
    body = dict(REQUEST, **changes)
    args = HeatTransferRequestSchema().load(body)
    return args["vessel"], args["charge"], args["coolant"], args["process_temperature"]


def test_coolant_and_wall_balances_close():
    vessel, charge, coolant, temperature = _case()
    result = heat_transfer(vessel, charge, coolant, temperature)
    jacket = result.stream("jacket")
    balance = jacket.balance
    # Definition of the single-pass balance: m c_p (T_out - T_in) = U A LMTD = duty.
    assert balance.heat_capacity_rate * (balance.outlet_temperature - balance.inlet_temperature) == pytest.approx(
        balance.duty, rel=1e-9)
    assert jacket.ua * balance.log_mean_temperature_difference == pytest.approx(balance.duty, rel=1e-9)
    # Series resistances (definition): the flux through the process film, to the surface it wets
    # (the fouling layer's face), equals U (T_r - T_coolant,mean) at the solved wall temperature.
    for surface in jacket.surfaces:
        flux_film = surface.process_film.h * (temperature - surface.process_wall_temperature)
        flux_overall = surface.overall.U * (temperature - jacket.mean_temperature)
        assert flux_film == pytest.approx(flux_overall, rel=1e-5)


def test_wall_viscosity_lowers_the_film_when_cooling():
    # Sieder & Tate (1936) factor (mu/mu_w)^0.14: a cooled wall is more viscous, so h falls below the
    # isothermal value (common practice, no source, for the direction).
    vessel, charge, coolant, temperature = _case()
    result = heat_transfer(vessel, charge, coolant, temperature)
    shell = result.stream("jacket").surfaces[0]
    bulk = result.process_properties
    isothermal = process_side.process_film_jacket(vessel.agitator.impeller, result.agitation.reynolds, bulk,
                                                  bulk.viscosity, vessel.shape.diameter, result.fill.liquid_level)
    assert shell.process_wall_temperature < temperature
    assert shell.process_film.h < isothermal.h


@settings(max_examples=25, deadline=None)
@given(st.floats(min_value=0.5, max_value=3.0), st.floats(min_value=-10.0, max_value=-0.5))
def test_more_flow_and_colder_coolant_never_lower_the_duty(flow_factor, colder):
    # Monotonic trends of the trade (common practice, no source): more coolant flow, or a colder inlet,
    # never removes less heat.
    vessel, charge, coolant, temperature = _case()
    base = heat_transfer(vessel, charge, coolant, temperature).duty
    more = heat_transfer(vessel, charge, coolant.with_mass_flow(coolant.mass_flow() * max(flow_factor, 1.0)),
                         temperature).duty
    cold = heat_transfer(vessel, charge, replace(coolant, inlet_temperature=coolant.inlet_temperature + colder),
                         temperature).duty
    assert more >= base * (1 - 1e-12) and cold > base


def test_wall_below_the_contents_freezing_point_is_flagged_not_refused():
    vessel, charge, coolant, temperature = _case(
        charge={"fluid": "water", "volume": "5 m^3"}, process_temperature="8 degC",
        coolant={"fluid": "ethylene_glycol", "mass_fraction": 0.4, "inlet_temperature": "-20 degC", "flow": "15 m^3/h"})
    result = heat_transfer(vessel, charge, coolant, temperature)
    assert result.duty > 0
    assert "wall_below_freezing_point" in {w.code for w in result.warnings}


def test_coolant_warmer_than_the_contents_is_refused():
    from calc.validity import InputError

    vessel, charge, coolant, _ = _case()
    with pytest.raises(InputError) as err:
        heat_transfer(vessel, charge, coolant, coolant.inlet_temperature - 1.0)
    assert err.value.field == "coolant.inlet_temperature"


def test_every_coil_counts_in_the_coil_film_coefficients():
    # Definition of an area-weighted mean film coefficient (common practice, no source): with two
    # coils of different tube sizes, h_coil = sum(h_i A_i) / sum(A_i) over both, not the first coil's h.
    vessel = dict(REQUEST["vessel"], coils=[
        {"tube_outer_diameter": "40 mm", "tube_wall": "3 mm", "helix_diameter": "1.4 m", "turns": 6,
         "pitch": "90 mm", "elevation": "0.5 m"},
        {"tube_outer_diameter": "70 mm", "tube_wall": "4 mm", "helix_diameter": "1.3 m", "turns": 4,
         "pitch": "140 mm", "elevation": "1.2 m"}])
    result = heat_transfer(*_case(vessel=vessel))
    coils = [s for stream in result.streams if stream.name.startswith("coil_") for s in stream.surfaces]
    assert len(coils) == 2
    for side in ("process", "service"):
        films = [getattr(c, f"{side}_film").h for c in coils]
        assert films[0] != pytest.approx(films[1], rel=1e-3)  # the two coils really differ
        expected = sum(h * c.area for h, c in zip(films, coils)) / sum(c.area for c in coils)
        assert getattr(result.film_coefficients, f"{side}_coil") == pytest.approx(expected, rel=1e-12)
    assert "coil_1" in [s.name for s in result.streams]
