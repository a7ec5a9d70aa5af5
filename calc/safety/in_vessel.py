"""A dynamic run in a described vessel: UA, coolant flow and c_p, and shaft power from the network.

The dynamic balances hold UA constant over a run; here it is the vessel's UA from
``calc.network.heat_transfer`` at the charge's starting temperature (see ``calc.network.heat_transfer.lumped_exchange``).
"""
from __future__ import annotations

from dataclasses import dataclass, replace

from calc.network.heat_transfer import calibrated, lumped_exchange
from calc.properties import Liquid
from calc.safety.dynamics import simulate
from calc.safety.tank_model import Jacket, SimulationInput, SimulationResult
from calc.validity import Warnings, fields_renamed
from calc.vessel.model import Charge, Coolant, Vessel


@dataclass(frozen=True)
class RunVessel:
    """The vessel a run happens in, its contents' properties and its coolant.

    ``agitator_power``: the run's shaft power is the vessel agitator's at the starting state
    (instead of the run's own ``shaft_power``).
    """

    vessel: Vessel
    contents: Liquid
    coolant: Coolant
    agitator_power: bool = True


def simulate_in_vessel(inp: SimulationInput, given: RunVessel | None) -> SimulationResult:
    """Simulate ``inp``; with ``given``, its jacket (and shaft power) come from the vessel's network.

    The network's warnings lead the run's own.
    """
    if given is None:
        return simulate(inp)
    contents = Charge(given.contents, mass=inp.charge.mass)
    # the request's own paths: the vessel and its coolant sit under "vessel", the start state under "charge"
    with fields_renamed({"vessel": "vessel.vessel", "coolant": "vessel.coolant", "calibration": "vessel.calibration",
                         "process_temperature": "charge.temperature"}):
        # a measured UA is backed out first, on the caller's clock
        vessel = calibrated(given.vessel, inp.budget.deadline.within(inp.budget.wall_time))
        exchange = lumped_exchange(vessel, contents, given.coolant, inp.charge.temperature)
    jacket = Jacket(exchange.ua, exchange.coolant_flow, exchange.coolant_heat_capacity, exchange.inlet_temperature)
    shaft_power = exchange.shaft_power if given.agitator_power else inp.shaft_power
    result = simulate(replace(inp, jacket=jacket, shaft_power=shaft_power))
    return replace(result, warnings=Warnings([*exchange.warnings, *result.warnings]))
