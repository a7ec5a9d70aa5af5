"""Example requests shared by the benchmark (bench.py), the load generator (load.py) and tests/test_load.py.

One valid request per route, keyed by path. A route counts as available when its path and method are in
openapi.yaml, so the scripts pick up new routes as soon as they are in the contract AND have a body here.
Every body is a valid request: any non-2xx answer to one of them is an error in the load run.

Demo data only (invented): the bodies in examples/ and the semi-batch step below exercise the service; they
are not a reference for anything.
"""
from __future__ import annotations

import functools
import json
from dataclasses import dataclass, field
from pathlib import Path

import yaml

SPEC_PATH = Path(__file__).resolve().parents[2] / "openapi.yaml"


@dataclass(frozen=True)
class Example:
    """One HTTP request: method, path with optional query string, optional JSON body."""

    method: str
    path: str
    body: dict | None = field(default=None, hash=False, compare=False)

    @property
    def route(self) -> str:
        return self.path.split("?", 1)[0]

    def encoded(self) -> bytes | None:
        return None if self.body is None else json.dumps(self.body).encode()

    def __str__(self) -> str:
        return f"{self.method} {self.path}"


EXAMPLES_DIR = SPEC_PATH.parent / "examples"


def _example_file(name: str) -> dict:
    """A request body from examples/ (the same files the README shows), so there is one copy of each."""
    return json.loads((EXAMPLES_DIR / name).read_text())


# Demo semi-batch step (invented): A + B -> C dosed over 30 min into 1.2 t at 60 degC, jacket UA 2.5 kW/K.
SEMI_BATCH = {
    "mode": "semi_batch",
    "species": [{"name": "A", "molar_mass": 0.12, "heat_capacity": 1900},
                {"name": "B", "molar_mass": 0.09, "heat_capacity": 2100},
                {"name": "C", "molar_mass": 0.21, "heat_capacity": 1800}],
    "reactions": [{"stoichiometry": {"A": -1, "B": -1, "C": 1}, "orders": {"A": 1, "B": 1},
                   "rate_constant": 2e-4, "reference_temperature": 60, "activation_energy": 65e3,
                   "enthalpy": -120e3}],
    "charge": {"mass": 1200, "temperature": 60, "composition": {"A": 1.5}, "density": 950,
               "balance_heat_capacity": 1850},
    "feed": {"temperature": 25, "composition": {"B": 5.0}, "mass_flow": "360 kg/h", "start": 0, "end": "30 min"},
    "jacket": {"ua": 2500, "coolant_flow": 3.0, "coolant_heat_capacity": 4180, "inlet_temperature": 40},
    "horizon": "2 h", "output_points": 25,
}

_HEAT = _example_file("heat_transfer_request.json")
EXAMPLES: dict[str, Example | None] = {
    "/health": Example("GET", "/health"),
    "/v1/fluids": Example("GET", "/v1/fluids"),
    "/v1/properties": Example("POST", "/v1/properties",
                              {"fluid": "ethylene_glycol", "temperature": "-5 degC", "mass_fraction": 0.3}),
    "/v1/heat-transfer": Example("POST", "/v1/heat-transfer", _example_file("heat_transfer_request.json")),
    "/v1/cooling-check": Example("POST", "/v1/cooling-check", _example_file("cooling_check_production.json")),
    "/v1/thermal-safety": Example("POST", "/v1/thermal-safety", {
        "process_temperature": 60, "heat_capacity": 1850, "reaction_energy": "150 kJ/kg", "accumulation": 0.25,
        "maximum_technical_temperature": 111,
        "decomposition": {"onset_power": 5, "onset_temperature": 190, "activation_energy": 90e3}}),
    "/v1/simulations": Example("POST", "/v1/simulations", SEMI_BATCH),
    # The reference plus four similar targets: five scales.
    "/v1/scale-up": Example("POST", "/v1/scale-up", _example_file("scale_up_path.json")),
    "/v1/jacket-sizing": Example("POST", "/v1/jacket-sizing", _example_file("jacket_sizing_request.json")),
    # The demo check's dosing time x coolant inlet temperature over a 50 x 50 grid (the target size).
    "/v1/operating-window": Example("POST", "/v1/operating-window", dict(
        _example_file("operating_window_production.json"),
        axes=[{"quantity": "heat_release.dosing_time", "from": "30 min", "to": "4 h", "points": 50},
              {"quantity": "coolant.inlet_temperature", "from": "-10 degC", "to": "25 degC", "points": 50}])),
    "/v1/geometry": Example("POST", "/v1/geometry", {"vessel": _HEAT["vessel"], "fill": {"volume": "4 m^3"}}),
    "/v1/agitation": Example("POST", "/v1/agitation",
                             {k: _HEAT[k] for k in ("vessel", "charge", "process_temperature")}),
    "/v1/coolant-balance": Example("POST", "/v1/coolant-balance",
                                   {"process_temperature": 60, "coolant": _HEAT["coolant"], "ua": "4.4 kW/K"}),
}

# The load mix: routes in proportion to how often users call them (a guess, not a measurement).
LOAD_MIX: dict[str, int] = {
    "/v1/properties": 3,
    "/v1/heat-transfer": 2,
    "/v1/cooling-check": 3,
    "/v1/scale-up": 1,
    "/v1/thermal-safety": 1,
    "/v1/simulations": 1,
}


@functools.cache
def spec_operations() -> frozenset[tuple[str, str]]:
    """(METHOD, path) of every operation in openapi.yaml."""
    spec = yaml.safe_load(SPEC_PATH.read_text())
    return frozenset((method.upper(), path) for path, item in spec["paths"].items() for method in item
                     if method in {"get", "post", "put", "patch", "delete"})


def available(route: str) -> Example | None:
    """The example for ``route`` if the contract has that operation and a body is filled in, else None."""
    example = EXAMPLES.get(route)
    if example is None or (example.method, example.route) not in spec_operations():
        return None
    return example


def load_mix() -> list[Example]:
    """The available load-mix requests, each repeated by its weight (round-robin order for the clients)."""
    mix = []
    for route, weight in LOAD_MIX.items():
        example = available(route)
        if example is not None:
            mix.extend([example] * weight)
    return mix


# A 6 h semi-batch with the cooling failing at 3 h (invented demo numbers): the dynamics benchmark.
SIX_HOUR_FAILURE = dict(
    SEMI_BATCH,
    charge={"mass": 4000, "temperature": 60, "composition": {"B": 1.2}, "density": 950, "balance_heat_capacity": 1900},
    feed={"temperature": 25, "composition": {"A": 2.6}, "mass_flow": "300 kg/h", "start": 0, "end": "6 h"},
    jacket={"ua": 6000, "coolant_flow": 5.0, "coolant_heat_capacity": 4180, "inlet_temperature": 55},
    cooling_failure={"time": "3 h"}, shaft_power=2500, horizon="8 h", output_points=201,
    species=[{"name": "A", "molar_mass": 0.12, "heat_capacity": 1900},
             {"name": "B", "molar_mass": 0.09, "heat_capacity": 2100},
             {"name": "C", "molar_mass": 0.21, "heat_capacity": 1800}],
    reactions=[{"stoichiometry": {"A": -1, "B": -1, "C": 1}, "orders": {"A": 1, "B": 1}, "rate_constant": 3e-4,
                "reference_temperature": 60, "activation_energy": 70e3, "enthalpy": -160e3}],
)
