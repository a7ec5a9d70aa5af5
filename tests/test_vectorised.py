"""The vectorised network (calc.network.vectorised) against the scalar specification (calc.network.heat_transfer).

The reference here is the project's own readable scalar path, which the other test modules check against
published values (VDI Heat Atlas examples, Incropera & DeWitt, CoolProp): the vector path must give the same
duty, U A and outlet temperature to 1e-9 on every example request and on hypothesis-drawn vessels, and must
do so element by element when many states and many different vessels share one pass.
"""
import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from marshmallow import ValidationError
from hypothesis import given, settings, strategies as st

from calc.films import jacket_side
from calc.network.heat_transfer import assemble, heat_transfer
from calc.network.vectorised import heat_transfer_many, solve_many
from calc.validity import InputError
from calc.vessel import geometry
from test_invariants import SETTINGS, cases

DRAWS = settings(SETTINGS, max_examples=40)

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
RELATIVE = 1e-9


def _agree(vector, index, scalar):
    assert vector.duty[index] == pytest.approx(scalar.duty, rel=RELATIVE, abs=1e-9)
    assert vector.ua[index] == pytest.approx(scalar.ua, rel=RELATIVE, abs=1e-12)
    assert vector.area[index] == pytest.approx(scalar.area, rel=1e-12, abs=1e-15)
    main = scalar.stream("jacket") or (scalar.streams[0] if scalar.streams else None)
    if main is not None:
        assert vector.outlet_temperature[index] == pytest.approx(main.balance.outlet_temperature, rel=RELATIVE)
    assert vector.controlling[index] == scalar.controlling
    # both stop at the same iteration, or both run out of iterations (then both say so)
    assert vector.converged[index] == all(w.code != "iteration_not_converged" for w in scalar.warnings)


def _example_states():
    """(vessel, charge, coolant, process temperature) of every example request that has them."""
    from api import create_app
    from schemas.cooling import CoolingCheckRequestSchema, ScaleUpRequestSchema
    from schemas.heat_transfer import HeatTransferRequestSchema

    states = []
    with create_app().app_context():
        for path in sorted(EXAMPLES.glob("*.json")):
            body = json.loads(path.read_text())
            if "reference" in body:
                args = ScaleUpRequestSchema().load(body)
                vessels = [args["reference"]] + [t[0] if isinstance(t, tuple) else t for t in args["targets"]
                                                 if not isinstance(t, (int, float))]
                states += [(path.name, v, args["charge"], args["coolant"], args["process_temperature"])
                           for v in vessels if hasattr(v, "shape")]
            elif {"vessel", "charge", "coolant", "process_temperature"} <= set(body):
                body.pop("axes", None)  # an operating window: its check's state
                schema = CoolingCheckRequestSchema() if "heat_release" in body else HeatTransferRequestSchema()
                try:
                    args = schema.load(body)
                except ValidationError:  # another resource's request (e.g. jacket sizing): not a network state
                    continue
                states.append((path.name, args["vessel"], args["charge"], args["coolant"], args["process_temperature"]))
    return states


EXAMPLE_STATES = _example_states()


@pytest.mark.parametrize("name, vessel, charge, coolant, process", EXAMPLE_STATES,
                         ids=[f"{s[0]}-{i}" for i, s in enumerate(EXAMPLE_STATES)])
def test_every_example_and_neighbouring_states_agree_with_the_scalar_path(name, vessel, charge, coolant, process):
    network = assemble(vessel, charge, coolant, process)
    inlet = coolant.inlet_temperature
    inlets = np.array([inlet, inlet - 3.0, inlet + 7.0, inlet, inlet])
    factors = np.array([1.0, 1.0, 1.0, 0.25, 4.0])
    vector = solve_many([network], np.zeros(5, dtype=int), inlets, factors)
    for i in range(5):
        varied = replace(coolant, inlet_temperature=float(inlets[i]))
        if factors[i] != 1.0:
            varied = varied.with_mass_flow(coolant.mass_flow() * factors[i])
        _agree(vector, i, heat_transfer(vessel, charge, varied, process))


def test_examples_together_in_one_pass_agree_one_by_one():
    # N different vessels (and coolants, contents) in one call: the sizing and screening use
    many = heat_transfer_many([s[1:] for s in EXAMPLE_STATES] * 2)
    assert len(many) == 2 * len(EXAMPLE_STATES) and len(many.networks) <= len(EXAMPLE_STATES)  # equal ones once
    for i, (_, vessel, charge, coolant, process) in enumerate(EXAMPLE_STATES * 2):
        _agree(many, i, heat_transfer(vessel, charge, coolant, process))


def _scalar_or_skip(case):
    vessel, charge, coolant, process, _ = case
    try:
        return heat_transfer(vessel, charge, coolant, process)
    except InputError:
        return None


@DRAWS
@given(st.lists(cases(), min_size=1, max_size=3), st.sampled_from(["lehrer_1970", "stein_schmidt_1993"]),
       st.booleans())
def test_drawn_vessels_agree_with_the_scalar_path(drawn, annular, coil):
    # hypothesis draws vessels from 0.1 to 3 m, every head, jacket type and impeller (tests/test_invariants.py),
    # here also Stein & Schmidt's annular correlation and an internal coil, several vessels in one pass
    states = []
    for vessel, charge, coolant, process, release in drawn:
        if vessel.jacket.type == "annular":
            vessel = replace(vessel, jacket=replace(vessel.jacket, correlation=annular))
        if coil and vessel.agitator.impeller != "anchor":
            d = vessel.shape.diameter
            vessel = replace(vessel, coils=(geometry.HelicalCoil(max(0.012, d / 40), 0.002, 0.7 * d, 4, d / 12),))
        if _scalar_or_skip((vessel, charge, coolant, process, release)) is not None:
            states.append((vessel, charge, coolant, process))
    if not states:
        return
    many = heat_transfer_many(states)
    for i, state in enumerate(states):
        _agree(many, i, heat_transfer(*state))


def test_a_vessel_without_cooling_surface_gives_zero_duty():
    _, vessel, charge, coolant, process = EXAMPLE_STATES[0]
    bare = replace(vessel, jacket=None, coils=())
    many = heat_transfer_many([(bare, charge, coolant, process)])
    assert many.duty[0] == 0.0 and np.isnan(many.outlet_temperature[0])
    assert heat_transfer(bare, charge, coolant, process).duty == 0.0


def test_jacket_formula_is_the_scalar_film():
    # the FilmFormula the vector path evaluates is the function service_film_jacket reports (one source)
    from calc.properties import LiquidProperties

    water = LiquidProperties(303.15, 995.7, 4178.1, 798e-6, 0.615)
    jacket = jacket_side.JacketSpec("annular", gap=0.025, inlet_diameter=0.025)
    formula, _ = jacket_side.jacket_film_formula(jacket, 0.6, 0.6)
    # VDI Heat Atlas (2010) worked example for Lehrer (1970): 2922 W/(m2 K); the default adds the laminar annulus
    # by a cube sum (0.06 % here)
    scalar = formula.h(water, 2.5, 355e-6, None)
    assert scalar == pytest.approx(2922, rel=1e-3)
    assert scalar == jacket_side.service_film_jacket(jacket, water, 2.5, 355e-6, 0.6, 0.6).h
    arrays = LiquidProperties(*(np.full(3, v) for v in (303.15, 995.7, 4178.1, 798e-6, 0.615)))
    vector = formula.h(arrays, np.array([2.5, 0.01, 2.5]), np.full(3, 355e-6), None)
    assert vector[0] == vector[2] == pytest.approx(scalar, rel=1e-12)
    assert vector[1] == pytest.approx(formula.h(water, 0.01, 355e-6, None), rel=1e-12)  # the laminar end
