"""Thermal safety and dynamics: ``/v1/thermal-safety``, ``/v1/simulations``, ``/v1/cstr-steady-states``."""
from __future__ import annotations

from flask import Blueprint, current_app

from calc.safety import criticality
from calc.safety import steady_states
from calc.safety import tank_model
from calc.safety.in_vessel import simulate_in_vessel
from schemas.safety import (CSTRRequestSchema, CSTRResultSchema, SimulationRequestSchema, SimulationResultSchema,
                            ThermalSafetyRequestSchema, ThermalSafetyResultSchema, series_rows, simulation_input)

from .errors import ProblemError
from .charts import figure as _figure, footnote as _footnote, readable, render as _render
from .http import calculate
from .runtime import deadline

bp = Blueprint("safety", __name__, url_prefix="/v1")
_safety_request, _safety_result = ThermalSafetyRequestSchema(), ThermalSafetyResultSchema()
_simulation_request, _simulation_result = SimulationRequestSchema(), SimulationResultSchema()
_cstr_request, _cstr_result = CSTRRequestSchema(), CSTRResultSchema()

# ---------------------------------------------------------------- thermal safety

@bp.route("/thermal-safety", methods=["GET", "POST"])
def thermal_safety():
    return calculate(_safety_request, criticality.assess_thermal_safety, _safety_result)


# ---------------------------------------------------------------- simulations

def _simulation_chart(payload: dict, fmt: str, units: dict) -> bytes:
    s = payload["series"]
    times, time_unit = readable(s["time"], units["series.time"])
    temperature_unit = units["series.temperature"]
    fig, (ax_t, ax_q, ax_x) = _figure(3)
    ax_t.plot(times, s["temperature"], label="contents")
    ax_t.plot(times, s["coolant_inlet_temperature"], label="coolant in", linewidth=0.9)
    ax_t.plot(times, s["coolant_outlet_temperature"], label="coolant out", linewidth=0.9, linestyle="--")
    failure = payload["summary"].get("failure_time")
    for ax in (ax_t, ax_q, ax_x):
        if failure is not None:
            ax.axvline(readable([failure], units["summary.failure_time"])[0][0], color="#999999", linewidth=0.8,
                       linestyle=":")
    ax_t.set_ylabel(f"temperature, {temperature_unit}")
    ax_t.legend(frameon=False, fontsize=8)
    release, power_unit = readable(s["heat_release_rate"], units["series.heat_release_rate"])
    ax_q.plot(times, release, label="reaction heat release")
    ax_q.plot(times, readable(s["jacket_duty"], units["series.jacket_duty"])[0], label="jacket duty")
    ax_q.set_ylabel(f"heat flow, {power_unit}")
    ax_q.legend(frameon=False, fontsize=8)
    ax_x.plot(times, s["accumulation"], label="accumulation")
    ax_x.plot(times, s["conversion"], label="conversion", linewidth=0.9)
    ax_x.set_ylabel("fraction")
    ax_x.set_xlabel(f"time, {time_unit}")
    ax_x.legend(frameon=False, fontsize=8)
    _footnote(fig)
    return _render(fig, fmt)


def _limited(field: str, value: float, limit: float, unit: str) -> None:
    if value > limit:
        raise ProblemError(422, f"{field}: must not exceed {limit:g} {unit} on this server",
                           [{"field": field, "message": f"must not exceed {limit:g} {unit} on this server"}])


def _simulate(args: dict) -> tank_model.SimulationResult:
    config = current_app.config
    _limited("horizon", args["horizon"], float(config["MAX_SIMULATION_HORIZON"]), "s")
    _limited("output_points", args["output_points"], int(config["MAX_SERIES_POINTS"]), "points")
    budget = tank_model.Budget(horizon_limit=float(config["MAX_SIMULATION_HORIZON"]),
                               output_points=args["output_points"],
                               maximum_output_points=int(config["MAX_SERIES_POINTS"]),
                               wall_time=float(config["SIMULATION_WALL_TIME"]), deadline=deadline())
    return simulate_in_vessel(simulation_input(args, budget), args["vessel"])


@bp.route("/simulations", methods=["GET", "POST"])
def simulations():
    return calculate(_simulation_request, _simulate, _simulation_result, table=series_rows, chart=_simulation_chart)


# ---------------------------------------------------------------- CSTR steady states

def _cstr_chart(payload: dict, fmt: str, units: dict) -> bytes:
    curves = payload["curves"]
    fig, (ax,) = _figure(1)
    fig.set_size_inches(7.5, 4.2)
    generation, power_unit = readable(curves["heat_generation"], units["curves.heat_generation"])
    ax.plot(curves["temperature"], generation, label="heat generation")
    ax.plot(curves["temperature"], readable(curves["heat_removal"], units["curves.heat_removal"])[0],
            label="heat removal")
    for state in payload["states"]:
        filled = state["stable"]
        at = readable([state["heat_generation"]], units["states.heat_generation"])[0][0]
        ax.plot([state["temperature"]], [at], "o", markersize=7,
                color="#222222", markerfacecolor="#222222" if filled else "white",
                label=None)
        ax.annotate(state["classification"], (state["temperature"], at),
                    textcoords="offset points", xytext=(6, -12), fontsize=7)
    ax.set_xlabel(f"reactor temperature, {units['curves.temperature']}")
    ax.set_ylabel(f"heat flow, {power_unit}")
    ax.legend(frameon=False, fontsize=8, title="filled: stable, open: unstable", title_fontsize=7)
    _footnote(fig)
    return _render(fig, fmt)


@bp.route("/cstr-steady-states", methods=["GET", "POST"])
def cstr_steady_states():
    return calculate(_cstr_request, steady_states.cstr_steady_states, _cstr_result, rows="states",
                     chart=_cstr_chart)
