"""Liquid properties against published tables (values from memory where marked)."""
import math
import time

import CoolProp.CoolProp as CP
import pytest

from calc import properties
from calc.properties import LibraryLiquid, liquid_properties, liquid_range
from calc.validity import InputError


def test_iapws95_verification_point():
    # IAPWS-95 release (2018 revision), Table 7, single-phase check values, from memory:
    # T = 300 K, rho = 996.5560 kg/m3 -> p = 0.0992418352 MPa. The table lists cv, not cp, so only
    # the density is checked here; cp is checked against steam-table values below.
    state = liquid_properties("water", 300.0, pressure=0.0992418352e6)
    assert state.density == pytest.approx(996.5560, rel=1e-7)


def _pressure_for_density(temperature, density):
    water = CP.AbstractState("HEOS", "Water")
    water.update(CP.DmassT_INPUTS, density, temperature)
    return water.p()


def test_iapws2008_viscosity_and_iapws2011_conductivity_check_values():
    # IAPWS 2008 viscosity release, Table 4 check value (from memory): T = 298.15 K, rho = 998 kg/m3,
    # mu = 889.735100 uPa s. IAPWS 2011 conductivity release, check value (from memory): same state,
    # lambda = 607.712 mW/(m K).
    pressure = _pressure_for_density(298.15, 998.0)
    state = liquid_properties("water", 298.15, pressure=pressure)
    assert state.viscosity == pytest.approx(889.735100e-6, rel=1e-6)
    assert state.thermal_conductivity == pytest.approx(0.607712, rel=1e-4)


@pytest.mark.parametrize("celsius, density, cp, viscosity, conductivity", [
    # Saturated/atmospheric liquid water, steam-table values (IAPWS-95/2008/2011), from memory.
    (5.0, 999.97, 4205.0, 1.5182e-3, 0.5705),
    (25.0, 997.05, 4181.3, 0.8900e-3, 0.6065),
    (50.0, 988.03, 4181.4, 0.5465e-3, 0.6406),
    (80.0, 971.79, 4196.8, 0.3540e-3, 0.6670),
])
def test_water_at_one_atmosphere(celsius, density, cp, viscosity, conductivity):
    state = liquid_properties("water", celsius + 273.15)
    assert state.density == pytest.approx(density, rel=2e-4)
    assert state.heat_capacity == pytest.approx(cp, rel=2e-3)
    assert state.viscosity == pytest.approx(viscosity, rel=5e-3)
    assert state.thermal_conductivity == pytest.approx(conductivity, rel=1e-2)
    assert state.prandtl == pytest.approx(state.heat_capacity * state.viscosity / state.thermal_conductivity)


@pytest.mark.parametrize("fluid, fraction, freezing_c, tolerance", [
    # ASHRAE Handbook - Fundamentals, glycol solution tables, freezing points by mass fraction, from memory.
    ("ethylene_glycol", 0.30, -15.4, 1.5),
    ("ethylene_glycol", 0.50, -37.8, 2.5),
    ("propylene_glycol", 0.30, -12.7, 1.0),
    ("propylene_glycol", 0.50, -33.8, 2.5),
])
def test_glycol_freezing_points(fluid, fraction, freezing_c, tolerance):
    low, _ = liquid_range(fluid, fraction)
    assert low - 273.15 == pytest.approx(freezing_c, abs=tolerance)


def test_glycol_brine_density_and_viscosity():
    # ASHRAE Handbook - Fundamentals, ethylene glycol tables (from memory): 30 % by mass at 20 degC,
    # density about 1.04 g/cm3, viscosity about 2.2 mPa s. Glycol raises viscosity, lowers cp (common practice).
    brine = liquid_properties("ethylene_glycol", 293.15, 0.30)
    water = liquid_properties("water", 293.15)
    assert brine.density == pytest.approx(1040, rel=0.01)
    assert brine.viscosity == pytest.approx(2.2e-3, rel=0.1)
    assert brine.viscosity > 2 * water.viscosity and brine.heat_capacity < water.heat_capacity


def test_boiling_point_rises_with_pressure():
    # Steam tables (from memory): water boils at 99.97 degC at 1 atm and 151.8 degC at 5 bar.
    assert liquid_range("water")[1] - 273.15 == pytest.approx(99.97, abs=0.02)
    assert liquid_range("water", pressure=5e5)[1] - 273.15 == pytest.approx(151.83, abs=0.05)
    assert liquid_properties("water", 400.0, pressure=5e5).density == pytest.approx(937.6, rel=1e-3)


def test_out_of_range_states_are_input_errors():
    with pytest.raises(InputError) as err:
        liquid_properties("water", 380.0)
    assert err.value.field == "temperature"
    with pytest.raises(InputError) as err:
        LibraryLiquid("ethylene_glycol", 0.7, fraction_field="coolant.mass_fraction").at(290.0)
    assert err.value.field == "coolant.mass_fraction"
    with pytest.raises(InputError):
        liquid_properties("ethylene_glycol", 290.0)  # no mass fraction given
    with pytest.raises(InputError):
        liquid_properties("toluene", 290.0, 0.2)  # pure fluid with a mass fraction


def test_every_library_fluid_answers_at_room_temperature():
    for fluid in properties.FLUIDS:
        fraction = 0.3 if properties.FLUIDS[fluid].mass_fraction_range else None
        low, high = liquid_range(fluid, fraction)
        temperature = min(max(298.15, low + 1.0), high - 1.0)
        state = liquid_properties(fluid, temperature, fraction)
        assert all(math.isfinite(v) and v > 0 for v in
                   (state.density, state.heat_capacity, state.viscosity, state.thermal_conductivity)), fluid


def test_api_answers_json_csv_and_one_value(client):
    body = client.get("/v1/properties?fluid=water&temperature=25").json
    assert body["density"] == pytest.approx(997.05, rel=1e-4)  # IAPWS-95, from memory
    assert body["units"]["density"] == "kg/m^3" and body["units"]["temperature"] == "degC"
    csv = client.get("/v1/properties?fluid=water&temperature=25", headers={"Accept": "text/csv"})
    assert csv.mimetype == "text/csv" and "density [kg/m^3]" in csv.get_data(as_text=True).splitlines()[0]
    one = client.get("/v1/properties?fluid=water&temperature=77%20degF&field=density")
    assert one.mimetype == "text/plain" and float(one.get_data(as_text=True)) == pytest.approx(997.05, rel=1e-4)


def test_fluid_library_lists_sources(client):
    items = client.get("/v1/fluids").json["items"]
    ids = {item["id"] for item in items}
    assert {"water", "ethylene_glycol", "propylene_glycol", "toluene"} <= ids
    assert all(item["source"] for item in items)


def test_cached_lookups_are_fast():
    # Not a benchmark: guards against losing the memo (a cold CoolProp state costs ~0.1 ms).
    liquid_properties("water", 301.0)
    start = time.perf_counter()
    for _ in range(2000):
        liquid_properties("water", 301.0)
    assert (time.perf_counter() - start) / 2000 < 1e-4


# ---- property tables (calc.properties.PropertyTable): what the heat-transfer network reads

_TABLE_CASES = [(fluid, None) for fluid, info in properties.FLUIDS.items() if info.mass_fraction_range is None] + [
    ("ethylene_glycol", 0.1), ("ethylene_glycol", 0.3), ("ethylene_glycol", 0.6),
    ("propylene_glycol", 0.25), ("propylene_glycol", 0.5)]


@pytest.mark.parametrize("fluid, fraction", _TABLE_CASES)
def test_property_table_agrees_with_coolprop_point_by_point(fluid, fraction):
    # oracle: CoolProp itself (IAPWS / reference EOS / Melinder tables) at 200 seeded random states over the
    # whole tabulated range, ends included; goal 1e-4 relative on the four properties the films use
    import numpy as np

    table = properties.property_table(fluid, fraction)
    low, high = table.span
    temperatures = np.concatenate([[low, high], np.random.default_rng(7).uniform(low, high, 200)])
    got = table.states(temperatures)
    info = properties.FLUIDS[fluid]
    state = CP.AbstractState(info.backend, info.coolprop_name)
    if fraction is not None:
        state.set_mass_fractions([fraction])
    worst = 0.0
    for i, t in enumerate(temperatures):
        state.update(CP.PT_INPUTS, properties.STANDARD_PRESSURE, float(t))
        exact = (state.rhomass(), state.cpmass(), state.viscosity(), state.conductivity())
        table_values = (got.density[i], got.heat_capacity[i], got.viscosity[i], got.thermal_conductivity[i])
        worst = max(worst, max(abs(g / e - 1.0) for g, e in zip(table_values, exact)))
    assert worst <= 1e-4, (fluid, worst)
    # the table is adaptive, not padded: far fewer points than its bound (memory stays small)
    assert len(table.temperature) < properties.TABLE_MAX_POINTS


def test_table_state_is_the_array_answer_and_checks_the_range():
    import numpy as np

    water = LibraryLiquid("water")
    one = water.at(318.15)
    many = water.states(np.array([300.0, 318.15]))
    assert (one.density, one.viscosity) == (many.density[1], many.viscosity[1])  # bit for bit
    with pytest.raises(InputError, match="temperature"):
        water.at(380.0)  # above the boiling point at 1 atm (IAPWS-95: 373.12 K)
