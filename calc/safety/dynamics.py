"""Dynamic mole and energy balances of a jacketed stirred tank: batch, semi-batch and continuous.

States: moles n_i of each species, the mass m_b of everything not listed as a species (the solvent
"balance"), the contents temperature T, optionally the jacket temperature T_j and a PI controller's
integral, and six running integrals used only for bookkeeping (feed enthalpy, reaction heat, jacket
heat, shaft work, outflow enthalpy, fed mass).

Sensible enthalpy of the contents, relative to the reference temperature T_h of the reaction
enthalpies: H = C (T - T_h), with C = sum_i n_i M_i c_p,i + m_b c_p,b. Its balance is

    dH/dt = F c_p,F (T_F - T_h) + sum_j (-dH_j) r_j V + Q + W - (F_out/m) H

(feed, reaction heat at T_h, jacket heat into the contents, shaft work, outflow). Expanded with the
mole balances dn_i/dt = F x_i - (F_out/m) n_i + V sum_j nu_ij r_j, it gives the temperature equation
that is integrated,

    C dT/dt = F c_p,F (T_F - T) + sum_j [-dH_j - dcp_j (T - T_h)] r_j V + Q + W,

with dcp_j = sum_i nu_ij M_i c_p,i (Kirchhoff's law). The running integrals integrate the terms of
the enthalpy balance, so comparing H(t_end) - H(0) with their sum checks the derivation and the
integration: the closure error reported in every summary (Himmelblau & Riggs, *Basic Principles
and Calculations in Chemical Engineering*, 8th ed., 2012, ch. 21-23, for the balances; Fogler,
*Elements of Chemical Reaction Engineering*, 5th ed., 2016, ch. 13, for the unsteady energy balance).

Integration: scipy's implicit solvers (BDF by default; Hairer & Wanner, *Solving Ordinary
Differential Equations II*, 1996) stepped one step at a time, so a wall-time budget can stop the run
and keep what was computed, and temperature limits are located inside a step with Brent's method on
the dense output. Every result is a screening estimate: confirm with reaction calorimetry and plant
data, follow local codes and have a licensed engineer review it. The input, the operating modes
and the result are described in :mod:`calc.tank_model`; this module builds the equations from
them, integrates them and searches the worst cooling-failure time.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
from scipy.integrate import OdeSolution
from scipy.optimize import brentq, minimize_scalar

from calc.deadline import NEVER, OutOfTime
from calc.properties import GAS_CONSTANT
from calc.safety.tank_model import (
    METHODS, MODES, Controller, CoolingFailure, FailureTrial, LimitCrossing, Series, SimulationInput, SimulationResult, Summary,
    TemperatureLimit, default_limiting_reagent, validate,
)
from calc.validity import CalcWarning, InputError, Warnings

MESSAGES = {
    0: "The horizon was reached.",
    1: "A terminal temperature limit was reached.",
    2: ("The time budget (the run's wall time or the request's) was used up, or the caller went away; "
        "the result covers the time simulated so far."),
    -1: "The integration failed",
}

N_SUMS = 6  # feed enthalpy, reaction heat, jacket heat, shaft work, outflow enthalpy, fed mass


# ----------------------------------------------------------------------------- the model

@dataclass(frozen=True)
class _Species:
    """The species as arrays in their listed order (mol basis), and the inert balance."""

    names: tuple[str, ...]
    molar_mass: np.ndarray  # M, kg/mol
    molar_heat_capacity: np.ndarray  # M c_p, J/(mol K)
    balance_heat_capacity: float  # c_p of the inert balance, J/(kg K)
    density: float  # kg/m3, of the mixture (constant)


@dataclass(frozen=True)
class _Kinetics:
    """The reactions as arrays (rows: reactions; columns: species)."""

    stoichiometry: np.ndarray  # nu
    orders: np.ndarray
    rate_constant: np.ndarray  # k at the reference temperature, column
    activation_temperature: np.ndarray  # E/R, K, column
    inverse_reference_temperature: np.ndarray  # 1/T_ref, 1/K, column
    enthalpy: np.ndarray  # dH per mol of extent, J/mol
    heat_capacity_change: np.ndarray  # sum over species of nu M c_p, J/(mol K)


@dataclass(frozen=True)
class _FeedTerms:
    """What one kilogram of feed brings (zero without a feed)."""

    moles_per_kg: np.ndarray  # mol/kg of each species
    balance_fraction: float  # kg of inert balance per kg
    temperature: float  # K
    heat_capacity: float  # J/(kg K)


@dataclass(frozen=True)
class _CoolingTerms:
    """The jacket (single pass or holdup) and its controller; no jacket is UA = 0."""

    ua: float  # W/K
    capacity_rate: float  # m_dot c_p of the coolant, W/K (1 without a jacket)
    effectiveness: float  # 1 - exp(-UA / m_dot c_p) of a single pass
    inlet_temperature: float  # K
    holdup: bool  # a well-mixed jacket holdup is a state of its own
    inverse_holdup_capacity: float  # 1 / (m_holdup c_p), 1/(J/K); 0 without a holdup
    controller: Controller | None
    controller_bias: float | None  # K, coolant inlet at zero error


@dataclass(frozen=True)
class _StateLayout:
    """Where each quantity sits in the state vector: moles of each species, the inert balance's mass,
    the temperature, the jacket temperature and controller integral when present, then the running sums
    (feed enthalpy, reaction heat, jacket heat, shaft work, outflow enthalpy, fed mass)."""

    n_species: int
    temperature: int
    jacket_temperature: int | None
    integral: int | None
    sums: int
    size: int


def _species(inp: SimulationInput) -> _Species:
    molar_mass = np.array([s.molar_mass for s in inp.species])
    heat_capacity = np.array([s.heat_capacity for s in inp.species])
    balance = inp.charge.balance_heat_capacity
    if inp.mixture_heat_capacity is not None:
        heat_capacity[:] = inp.mixture_heat_capacity
        balance = inp.mixture_heat_capacity
    return _Species(tuple(s.name for s in inp.species), molar_mass, molar_mass * heat_capacity, balance,
                    inp.charge.density)


def _kinetics(inp: SimulationInput, index: dict[str, int], molar_heat_capacity: np.ndarray) -> _Kinetics:
    shape = (len(inp.reactions), len(inp.species))
    stoichiometry, orders = np.zeros(shape), np.zeros(shape)
    for row, reaction in enumerate(inp.reactions):
        for name, value in reaction.stoichiometry.items():
            stoichiometry[row, index[name]] = value
        for name, value in reaction.orders.items():
            orders[row, index[name]] = value
    def column(values: list[float]) -> np.ndarray:
        return np.array(values)[:, None]
    return _Kinetics(
        stoichiometry, orders, column([r.rate_constant for r in inp.reactions]),
        column([r.activation_energy / GAS_CONSTANT for r in inp.reactions]),
        column([1.0 / r.reference_temperature for r in inp.reactions]),
        np.array([r.enthalpy for r in inp.reactions]), stoichiometry @ molar_heat_capacity)


def _feed_terms(inp: SimulationInput, index: dict[str, int], species: _Species) -> _FeedTerms:
    moles_per_kg = np.zeros(len(species.names))
    temperature = 0.0
    if inp.feed is not None:
        for name, value in inp.feed.composition.items():
            moles_per_kg[index[name]] = value
        temperature = inp.feed.temperature
    balance_fraction = 1.0 - float(species.molar_mass @ moles_per_kg)
    heat_capacity = float(species.molar_heat_capacity @ moles_per_kg) + balance_fraction * species.balance_heat_capacity
    return _FeedTerms(moles_per_kg, balance_fraction, temperature, heat_capacity)


def _cooling_terms(inp: SimulationInput) -> _CoolingTerms:
    jacket, controller = inp.jacket, inp.controller
    if jacket is None:
        return _CoolingTerms(0.0, 1.0, 0.0, 0.0, False, 0.0, controller, None)
    capacity_rate = jacket.coolant_flow * jacket.coolant_heat_capacity
    holdup = jacket.model == "holdup"
    inverse_holdup = 0.0
    if holdup:
        assert jacket.holdup_mass is not None  # validate() requires it for a holdup jacket
        inverse_holdup = 1.0 / (jacket.holdup_mass * jacket.coolant_heat_capacity)
    bias = None
    if controller is not None:
        bias = jacket.inlet_temperature if controller.bias is None else controller.bias
    return _CoolingTerms(jacket.ua, capacity_rate, -math.expm1(-jacket.ua / capacity_rate), jacket.inlet_temperature,
                         holdup, inverse_holdup, controller, bias)


def _layout(n_species: int, cooling: _CoolingTerms) -> _StateLayout:
    k = n_species + 2  # the moles, the balance's mass, the temperature
    jacket_temperature = k if cooling.holdup else None
    k += cooling.holdup
    integral = k if cooling.controller is not None else None
    k += cooling.controller is not None
    return _StateLayout(n_species, n_species + 1, jacket_temperature, integral, k, k + N_SUMS)


class _Model:
    """A validated run as arrays (species, kinetics, feed, cooling, state layout) and its right-hand side."""

    def __init__(self, inp: SimulationInput, warnings: Warnings):
        validate(inp, warnings)
        self.inp = inp
        self.mode = MODES[inp.mode]
        self.species = _species(inp)
        index = {name: i for i, name in enumerate(self.species.names)}
        self.kinetics = _kinetics(inp, index, self.species.molar_heat_capacity)
        self.feed = _feed_terms(inp, index, self.species)
        self.cooling = _cooling_terms(inp)
        self.layout = _layout(len(inp.species), self.cooling)
        self.enthalpy_reference_temperature = inp.enthalpy_reference_temperature
        self.shaft_power = inp.shaft_power
        self.has_outflow = self.mode.has_outflow
        self.evaluations = 0
        self.deadline = NEVER
        self.initial_state = self._initial_state(index)
        self.initial_heat_capacity = self.heat_capacity(self.initial_state)
        self.limiting_reagent = inp.limiting_reagent or default_limiting_reagent(inp, self.species.names)
        self.limiting_index = index[self.limiting_reagent]
        self.limiting_initial_moles = float(self.initial_state[self.limiting_index])
        self.limiting_feed_moles_per_kg = float(self.feed.moles_per_kg[self.limiting_index])
        self.limiting_supply = self.mode.supply(self)
        if not self.limiting_supply > 0:
            raise InputError("limiting_reagent", f"no {self.limiting_reagent} is charged or fed")
        self.atol = self._absolute_tolerances()

    @property
    def names(self) -> tuple[str, ...]:
        return self.species.names

    def _initial_state(self, index: dict[str, int]) -> np.ndarray:
        layout, charge, jacket = self.layout, self.inp.charge, self.inp.jacket
        y0 = np.zeros(layout.size)
        for name, value in charge.composition.items():
            y0[index[name]] = value * charge.mass
        y0[layout.n_species] = charge.mass - self.species.molar_mass @ y0[:layout.n_species]
        y0[layout.temperature] = charge.temperature
        if layout.jacket_temperature is not None and jacket is not None:
            y0[layout.jacket_temperature] = (jacket.inlet_temperature if jacket.initial_temperature is None
                                             else jacket.initial_temperature)
        return y0

    def heat_capacity(self, y: np.ndarray) -> float:
        """Heat capacity of the contents in state ``y``, J/K."""
        n = self.layout.n_species
        return float(self.species.molar_heat_capacity @ y[:n] + y[n] * self.species.balance_heat_capacity)

    def _absolute_tolerances(self) -> np.ndarray:
        """Absolute tolerances per state: moles on the scale of what is charged or fed, the rest by rtol."""
        layout, rtol, mass = self.layout, self.inp.rtol, self.inp.charge.mass
        n_scale = max(float(np.sum(self.initial_state[:layout.n_species])), self.limiting_supply, 1e-9)
        atol = np.full(layout.size, rtol * n_scale * 1e-3)
        atol[layout.n_species] = rtol * mass
        for state in (layout.temperature, layout.jacket_temperature, layout.integral):
            if state is not None:
                atol[state] = rtol
        atol[layout.sums:layout.sums + 5] = rtol * self.initial_heat_capacity
        atol[layout.sums + 5] = rtol * mass
        return atol

    def terms(self, y: np.ndarray, F: float | np.ndarray, cooling: float | np.ndarray, outputs: bool = False
              ) -> tuple[np.ndarray, dict[str, np.ndarray] | None]:
        """Rates of every state (and, if asked, the algebraic outputs) for y of shape (n,) or (n, k);
        F (feed, kg/s) and cooling (1 on, 0 failed) are scalars or arrays of length k."""
        sp, kin, feed, jac, at = self.species, self.kinetics, self.feed, self.cooling, self.layout
        Th = self.enthalpy_reference_temperature
        y = y.reshape(at.size, -1)
        ns = at.n_species
        n, mb, T = y[:ns], y[ns], y[at.temperature]
        mass = sp.molar_mass @ n + mb
        V = mass / sp.density
        logc = np.log(np.maximum(n / V, 1e-300))
        exponent = kin.orders @ logc - kin.activation_temperature * (1.0 / T - kin.inverse_reference_temperature)
        rV = kin.rate_constant * np.exp(np.minimum(exponent, 300.0)) * V  # reaction rates times volume, mol/s
        C = sp.molar_heat_capacity @ n + mb * sp.balance_heat_capacity
        q_ref = -(kin.enthalpy @ rV)
        q_T = q_ref - (T - Th) * (kin.heat_capacity_change @ rV)
        c = jac.controller
        if c is not None:
            error = T - c.setpoint
            raw = jac.controller_bias - c.gain * (error + y[at.integral] / c.integral_time)
            Tin = np.minimum(np.maximum(raw, c.minimum_inlet_temperature), c.maximum_inlet_temperature)
        else:
            Tin = jac.inlet_temperature
        if jac.holdup:
            Tj = y[at.jacket_temperature]
            Q = cooling * jac.ua * (Tj - T)
        else:
            Q = cooling * jac.capacity_rate * jac.effectiveness * (Tin - T)
        dy = np.empty_like(y)
        feed_heat = F * feed.heat_capacity
        if self.has_outflow:
            washout = F / mass
            dy[:ns] = feed.moles_per_kg[:, None] * F + kin.stoichiometry.T @ rV - n * washout
            dy[ns] = F * feed.balance_fraction - mb * washout
            dy[at.sums + 4] = washout * C * (T - Th)
        else:
            dy[:ns] = feed.moles_per_kg[:, None] * F + kin.stoichiometry.T @ rV
            dy[ns] = F * feed.balance_fraction
            dy[at.sums + 4] = 0.0
        dy[at.temperature] = (feed_heat * (feed.temperature - T) + q_T + Q + self.shaft_power) / C
        if jac.holdup:
            dy[at.jacket_temperature] = (cooling * (jac.capacity_rate * (Tin - Tj) + jac.ua * (T - Tj))
                                         * jac.inverse_holdup_capacity)
        if c is not None:
            dy[at.integral] = cooling * (error + (raw - Tin) / c.gain)
        s = at.sums
        dy[s] = feed_heat * (feed.temperature - Th)
        dy[s + 1] = q_ref
        dy[s + 2] = Q
        dy[s + 3] = self.shaft_power
        dy[s + 5] = F
        if not outputs:
            return dy, None
        T_out = Tj if jac.holdup else T - (T - Tin) * (1.0 - jac.effectiveness)
        return dy, dict(mass=mass, V=V, q=q_T, Q=Q, Tin=Tin + 0.0 * T, T_out=T_out, C=C)

    def rhs(self, F: float, cooling: float) -> Callable[[float, np.ndarray], np.ndarray]:
        def fun(t: float, y: np.ndarray) -> np.ndarray:
            self.deadline.check()
            self.evaluations += 1 if y.ndim == 1 else y.shape[1]
            dy = self.terms(y, F, cooling)[0]
            return dy.reshape(y.shape)
        return fun

    def feed_rate(self, t: float) -> float:
        feed = self.inp.feed
        if not self.mode.has_feed or feed is None:
            return 0.0
        rate: float = sum(s.mass_flow for s in feed.steps if s.start <= t < s.end)
        return rate

    def breakpoints(self, t0: float, t1: float) -> list[float]:
        points = {t0, t1}
        if self.mode.has_feed and self.inp.feed is not None:
            for s in self.inp.feed.steps:
                points.update(p for p in (s.start, s.end) if t0 < p < t1)
        return sorted(points)

    def enthalpy(self, y: np.ndarray) -> float:
        """Sensible enthalpy of the contents in state ``y`` above the reference temperature, J."""
        H: float = self.heat_capacity(y) * (y[self.layout.temperature] - self.enthalpy_reference_temperature)
        return H


# ----------------------------------------------------------------------------- integration

@dataclass
class _Track:
    """Accepted steps of one run: times, states, dense outputs and (feed rate, cooling) per interval."""

    ts: list[float]
    ys: list[np.ndarray]
    interps: list[Callable[[float], np.ndarray]] = field(default_factory=list)  # dense outputs
    params: list[tuple[float, float]] = field(default_factory=list)
    crossings: list[LimitCrossing] = field(default_factory=list)
    status: int = 0
    message: str = MESSAGES[0]


def _crossing(lim: TemperatureLimit, iT: int, sol: Callable[[float], np.ndarray], t_old: float, y_old: np.ndarray,
              t_new: float, y_new: np.ndarray) -> float | None:
    g_old, g_new = y_old[iT] - lim.temperature, y_new[iT] - lim.temperature
    up, down = g_old < 0.0 <= g_new, g_old > 0.0 >= g_new
    if not ((lim.direction >= 0 and up) or (lim.direction <= 0 and down)):
        return None
    def g(t: float) -> float:
        return float(sol(t)[iT] - lim.temperature)
    if g_new == 0.0 or g(t_old) * g(t_new) > 0:
        return t_new
    return float(brentq(g, t_old, t_new, xtol=1e-9 * max(1.0, t_new)))


def _run(model: _Model, t0: float, y0: np.ndarray, t1: float, failed: bool, stop_feed: bool,
         limits: tuple[TemperatureLimit, ...]) -> _Track:
    """Integrate from t0 to t1, one solver per interval between feed breakpoints."""
    track = _Track([t0], [y0.copy()])
    with np.errstate(all="ignore"):  # overflow shows up as a failed step, reported in the status
        _integrate(model, track, model.breakpoints(t0, t1), failed, stop_feed, limits)
    return track


def _integrate(model: _Model, track: _Track, points: list[float], failed: bool, stop_feed: bool,
               limits: tuple[TemperatureLimit, ...]) -> None:
    inp = model.inp
    for a, b in zip(points[:-1], points[1:]):
        F = 0.0 if failed and stop_feed else model.feed_rate(0.5 * (a + b))
        cooling = 0.0 if failed else 1.0
        try:
            solver = METHODS[inp.method](model.rhs(F, cooling), a, track.ys[-1], b, rtol=inp.rtol,
                                         atol=model.atol, vectorized=True)
            while solver.status == "running":
                t_old, y_old = solver.t, solver.y.copy()
                message = solver.step()
                if solver.status == "failed":
                    track.status, track.message = -1, f"{MESSAGES[-1]}: {message}"
                    return
                sol = solver.dense_output()
                t_new, y_new = solver.t, solver.y.copy()
                if not np.all(np.isfinite(y_new)):
                    track.status, track.message = -1, f"{MESSAGES[-1]}: the state left the finite numbers"
                    return
                stop = None
                for lim in limits:
                    tc = _crossing(lim, model.layout.temperature, sol, t_old, y_old, t_new, y_new)
                    if tc is not None:
                        track.crossings.append(LimitCrossing(lim.name, tc, lim.temperature))
                        if lim.terminal and (stop is None or tc < stop):
                            stop = tc
                if stop is not None:
                    track.crossings = [c for c in track.crossings if c.time <= stop]
                    t_new, y_new = stop, sol(stop)
                track.ts.append(t_new)
                track.ys.append(y_new)
                track.interps.append(sol)
                track.params.append((F, cooling))
                if stop is not None:
                    track.status, track.message = 1, MESSAGES[1]
                    return
        except OutOfTime:
            track.status, track.message = 2, MESSAGES[2]
            return
        except (ArithmeticError, ValueError, np.linalg.LinAlgError) as exc:
            track.status, track.message = -1, f"{MESSAGES[-1]}: {exc}"
            return


def _truncate(track: _Track, t: float) -> _Track:
    """The part of a run up to time t (interpolated inside the step that contains t)."""
    k = int(np.searchsorted(track.ts, t, side="right"))  # points 0..k-1 are <= t
    out = _Track(track.ts[:k], track.ys[:k], track.interps[:k - 1], track.params[:k - 1],
                 [c for c in track.crossings if c.time <= t])
    if track.ts[k - 1] < t and k - 1 < len(track.interps):
        out.ts.append(t)
        out.ys.append(track.interps[k - 1](t))
        out.interps.append(track.interps[k - 1])
        out.params.append(track.params[k - 1])
    return out


def _concat(first: _Track, second: _Track) -> _Track:
    return _Track(first.ts + second.ts[1:], first.ys + second.ys[1:], first.interps + second.interps,
                  first.params + second.params, first.crossings + second.crossings,
                  second.status, second.message)


def _worst_failure(model: _Model, failure: CoolingFailure, limits: tuple[TemperatureLimit, ...]
                   ) -> tuple[_Track, float | None, tuple[FailureTrial, ...]]:
    """Failure time in the mode's window that gives the highest temperature after failure."""
    nominal = _run(model, 0.0, model.initial_state, model.inp.horizon, False, False, limits)
    if nominal.status == 2 or len(nominal.ts) < 2:
        return nominal, None, ()
    low, high = model.mode.failure_window(model)
    high = min(high, nominal.ts[-1])
    low = min(low, high)
    runs: dict[float, tuple[float, _Track, _Track]] = {}

    def peak(t_fail: float) -> float:
        if t_fail not in runs:
            pre = _truncate(nominal, t_fail)
            post = _run(model, t_fail, pre.ys[-1], model.inp.horizon, True, failure.stop_feed, ())
            if post.status == 2:
                raise OutOfTime
            runs[t_fail] = (max(y[model.layout.temperature] for y in post.ys), pre, post)
        return runs[t_fail][0]

    exhausted = False
    try:
        grid = np.unique(np.linspace(low, high, 13))
        values = [peak(float(t)) for t in grid]
        i = int(np.argmax(values))
        if len(grid) > 2:
            a, b = float(grid[max(i - 1, 0)]), float(grid[min(i + 1, len(grid) - 1)])
            minimize_scalar(lambda t: -peak(float(t)), bounds=(a, b), method="bounded",
                            options={"xatol": 1e-4 * (high - low), "maxiter": 25})
    except OutOfTime:
        exhausted = True
    if not runs:
        nominal.status, nominal.message = 2, MESSAGES[2]
        return nominal, None, ()
    worst = max(runs, key=lambda t: runs[t][0])
    track = _concat(runs[worst][1], runs[worst][2])
    if exhausted:
        track.status, track.message = 2, MESSAGES[2]
    return track, worst, tuple(FailureTrial(t, runs[t][0]) for t in sorted(runs))


# ----------------------------------------------------------------------------- results

def _outputs(model: _Model, Y: np.ndarray, F: np.ndarray, cooling: np.ndarray, fed: np.ndarray) -> dict[str, np.ndarray]:
    dy, a = model.terms(Y, F, cooling, outputs=True)
    assert a is not None  # asked for
    nL = Y[model.limiting_index]
    a["conversion"] = model.mode.conversion(model, nL, a["mass"], fed)
    a["accumulation"] = model.mode.accumulation(model, nL, a["mass"])
    return a


def _result(model: _Model, track: _Track, t_fail: float | None, search: tuple[FailureTrial, ...],
            warnings: Warnings) -> SimulationResult:
    inp = model.inp
    ts = np.array(track.ts)
    Y = np.array(track.ys).T
    if track.params:
        params = np.array([track.params[0]] + track.params)  # point k ends interval k-1
    else:
        params = np.array([(model.feed_rate(ts[0]), 1.0)])
    if len(ts) > 1:
        t_out = np.linspace(ts[0], ts[-1], inp.budget.output_points)
        Y_out = OdeSolution(ts, track.interps)(t_out)
        Y_out[:, -1] = Y[:, -1]
        idx = np.clip(np.searchsorted(ts, t_out, side="right") - 1, 0, len(track.params) - 1)
        p_out = np.array(track.params)[idx]
        p_out[-1] = params[-1]
    else:
        t_out, Y_out, p_out = ts, Y, params
    s = model.layout.sums
    steps = _outputs(model, Y, params[:, 0], params[:, 1], Y[s + 5])
    out = _outputs(model, Y_out, p_out[:, 0], p_out[:, 1], Y_out[s + 5])

    all_t = np.concatenate([ts, t_out])
    all_T = np.concatenate([Y[model.layout.temperature], Y_out[model.layout.temperature]])
    all_acc = np.concatenate([steps["accumulation"], out["accumulation"]])
    i_T, i_acc = int(np.argmax(all_T)), int(np.argmax(all_acc))

    y0, y1 = Y[:, 0], Y[:, -1]
    dH = model.enthalpy(y1) - model.enthalpy(y0)
    sums = y1[s:s + 5] - y0[s:s + 5]  # feed, reaction, jacket, shaft, outflow
    balance = sums[0] + sums[1] + sums[2] + sums[3] - sums[4]
    scale = max(abs(dH), float(np.max(np.abs(sums))), model.initial_heat_capacity * 1.0)
    closure = abs(dH - balance) / scale
    if closure > 1e-4:
        warnings.add(CalcWarning("energy_balance_not_closed",
                                 f"the energy balance closes only to {closure:.2g} of its largest term; "
                                 "tighten rtol"))
    summary = Summary(
        maximum_temperature=float(all_T[i_T]), time_of_maximum_temperature=float(all_t[i_T]),
        final_conversion=float(steps["conversion"][-1]),
        maximum_accumulation=float(all_acc[i_acc]), time_of_maximum_accumulation=float(all_t[i_acc]),
        peak_heat_release_rate=float(max(steps["q"].max(), out["q"].max())),
        peak_jacket_duty=float(max((-steps["Q"]).max(), (-out["Q"]).max())),
        limits_crossed=tuple(track.crossings), closure_error=float(closure), failure_time=t_fail)
    n_out = Y_out[:model.layout.n_species]
    coolant_in = np.broadcast_to(out["Tin"], t_out.shape).astype(float)
    coolant_out = np.broadcast_to(out["T_out"], t_out.shape).astype(float)
    if t_fail is not None:  # no coolant flows after the failure: its temperatures are undefined
        coolant_in[t_out > t_fail] = np.nan
        coolant_out[t_out > t_fail] = np.nan
    series = Series(
        time=t_out, temperature=Y_out[model.layout.temperature], coolant_inlet_temperature=coolant_in,
        coolant_outlet_temperature=coolant_out, moles=n_out,
        concentrations=n_out / out["V"], mass=out["mass"], conversion=out["conversion"],
        accumulation=out["accumulation"], heat_release_rate=out["q"], jacket_duty=-out["Q"],
        feed_rate=p_out[:, 0].copy(), species=tuple(model.names))
    return SimulationResult(
        success=track.status in (0, 1), status=track.status, message=track.message, species=model.names,
        series=series, summary=summary, failure_search=search, rhs_evaluations=model.evaluations,
        steps=len(ts) - 1, warnings=warnings)


def simulate(inp: SimulationInput) -> SimulationResult:
    """Integrate the mole and energy balances of one stirred-tank run, with an optional cooling failure.

    Parameters
    ----------
    inp : SimulationInput
        Mode, species, reactions, charge, feed, jacket, controller, failure, limits, solver and budget
        (described and validated in :mod:`calc.tank_model`); all quantities SI (K, kg, mol, m3, s, W,
        J/mol).

    Returns
    -------
    result : SimulationResult
        Time series downsampled to ``budget.output_points``, summary, failure search, solver cost.

    Notes
    -----
    Cooling failure sets the jacket duty to zero (a holdup jacket keeps its temperature) and, with
    ``stop_feed``, the feed; shaft work continues. The worst failure time is searched on a 13-point
    grid over the window, then refined with a bounded scalar minimiser around the best grid point
    (Brent 1973); its criterion is the highest temperature reached after failure (the simulated MTSR).
    Never raises for numerical trouble: a failed integration or an exhausted wall-time budget comes
    back as ``success=False`` with ``status`` and ``message`` and the part computed so far. Invalid
    input raises :class:`~calc.validity.InputError` naming the field.

    Examples
    --------
    First-order A -> B in a batch without heat of reaction: conversion 1 - exp(-k t).

    >>> from calc.safety.tank_model import InitialCharge, Reaction, SimulationInput, Species
    >>> sp = (Species("A", 0.1, 2000.0), Species("B", 0.1, 2000.0))
    >>> rx = (Reaction({"A": -1, "B": 1}, {"A": 1}, 1e-3, 350.0, 60e3, 0.0),)
    >>> ch = InitialCharge(1000.0, 350.0, {"A": 1.0}, 900.0, 2000.0)
    >>> r = simulate(SimulationInput("batch", sp, rx, ch, horizon=1000.0))
    >>> r.status, round(r.summary.final_conversion, 6), round(1 - math.exp(-1.0), 6)
    (0, 0.632121, 0.632121)

    References
    ----------
    Fogler, H. S. *Elements of Chemical Reaction Engineering*, 5th ed., Prentice Hall, 2016, ch. 13;
    Stoessel, F. *Thermal Safety of Chemical Processes*, Wiley-VCH, 2008, ch. 7;
    Brent, R. P. *Algorithms for Minimization without Derivatives*, Prentice-Hall, 1973.
    """
    warnings = Warnings()
    model = _Model(inp, warnings)
    model.deadline = inp.budget.deadline.within(inp.budget.wall_time)
    failure, t_fail = inp.failure, None
    search: tuple[FailureTrial, ...] = ()
    if failure is None:
        track = _run(model, 0.0, model.initial_state, inp.horizon, False, False, inp.limits)
    elif failure.time is not None:
        track = _run(model, 0.0, model.initial_state, failure.time, False, False, inp.limits)
        if track.status == 0:
            t_fail = failure.time
            track = _concat(track, _run(model, failure.time, track.ys[-1], inp.horizon, True,
                                        failure.stop_feed, inp.limits))
    else:
        track, t_fail, search = _worst_failure(model, failure, inp.limits)
    return _result(model, track, t_fail, search, warnings)
