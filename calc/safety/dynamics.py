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

import numpy as np
from scipy.integrate import OdeSolution
from scipy.optimize import brentq, minimize_scalar

from calc.deadline import NEVER, OutOfTime
from calc.properties import GAS_CONSTANT
from calc.safety.tank_model import (
    METHODS, MODES, CoolingFailure, LimitCrossing, Series, SimulationInput, SimulationResult, Summary,
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

class _Model:
    """Validated input turned into arrays, and the right-hand side."""

    def __init__(self, inp: SimulationInput, warnings: Warnings):
        validate(inp, warnings)
        self.inp = inp
        self.mode = MODES[inp.mode]
        sp = inp.species
        self.names = tuple(s.name for s in sp)
        index = {name: i for i, name in enumerate(self.names)}
        ns, nr = len(sp), len(inp.reactions)
        self.ns = ns
        self.M = np.array([s.molar_mass for s in sp])
        cp = np.array([s.heat_capacity for s in sp])
        self.cp_b = inp.charge.balance_heat_capacity
        if inp.mixture_heat_capacity is not None:
            cp[:] = inp.mixture_heat_capacity
            self.cp_b = inp.mixture_heat_capacity
        self.Mcp = self.M * cp
        self.nu = np.zeros((nr, ns))
        self.orders = np.zeros((nr, ns))
        for j, r in enumerate(inp.reactions):
            for name, value in r.stoichiometry.items():
                self.nu[j, index[name]] = value
            for name, value in r.orders.items():
                self.orders[j, index[name]] = value
        self.k_ref = np.array([r.rate_constant for r in inp.reactions])[:, None]
        self.E_R = np.array([r.activation_energy / GAS_CONSTANT for r in inp.reactions])[:, None]
        self.inv_Tref = np.array([1.0 / r.reference_temperature for r in inp.reactions])[:, None]
        self.dH = np.array([r.enthalpy for r in inp.reactions])
        self.dcp = self.nu @ self.Mcp
        self.Th = inp.enthalpy_reference_temperature
        self.rho = inp.charge.density
        self.W = inp.shaft_power
        self.has_outflow = self.mode.has_outflow
        # Feed: species mol/kg, balance fraction, heat capacity per kg.
        self.x = np.zeros(ns)
        self.Tf = 0.0
        if inp.feed is not None:
            for name, value in inp.feed.composition.items():
                self.x[index[name]] = value
            self.Tf = inp.feed.temperature
        self.xb = 1.0 - self.M @ self.x
        self.cp_feed = self.Mcp @ self.x + self.xb * self.cp_b
        # Jacket and controller.
        j = inp.jacket
        self.ua = 0.0 if j is None else j.ua
        self.mc = 1.0 if j is None else j.coolant_flow * j.coolant_heat_capacity
        self.ntu_factor = -math.expm1(-self.ua / self.mc)
        self.Tin = 0.0 if j is None else j.inlet_temperature
        self.holdup = j is not None and j.model == "holdup"
        if self.holdup:
            self.inverse_jacket_capacity = 1.0 / (j.holdup_mass * j.coolant_heat_capacity)
        self.c = inp.controller
        self.bias = None
        if self.c is not None:
            self.bias = j.inlet_temperature if self.c.bias is None else self.c.bias
        # State layout.
        self.iT = ns + 1
        k = ns + 2
        self.iTj = k if self.holdup else None
        k += self.holdup
        self.iI = k if self.c is not None else None
        k += self.c is not None
        self.iS = k
        self.n_states = k + N_SUMS
        self.evaluations = 0
        self.deadline = NEVER
        # Initial state.
        y0 = np.zeros(self.n_states)
        ch = inp.charge
        for name, value in ch.composition.items():
            y0[index[name]] = value * ch.mass
        y0[ns] = ch.mass - self.M @ y0[:ns]
        y0[self.iT] = ch.temperature
        if self.holdup:
            y0[self.iTj] = j.inlet_temperature if j.initial_temperature is None else j.initial_temperature
        self.y0 = y0
        self.C0 = self.Mcp @ y0[:ns] + y0[ns] * self.cp_b
        # Limiting reagent.
        name = inp.limiting_reagent or default_limiting_reagent(inp, self.names)
        self.iL = index[name]
        self.limiting = name
        self.nL0 = y0[self.iL]
        self.xL = self.x[self.iL]
        self.supply = self.mode.supply(self)
        if not self.supply > 0:
            raise InputError("limiting_reagent", f"no {name} is charged or fed")
        n_scale = max(float(np.sum(y0[:ns])), self.supply, 1e-9)
        rtol = inp.rtol
        atol = np.full(self.n_states, rtol * n_scale * 1e-3)
        atol[ns] = rtol * ch.mass
        atol[self.iT] = rtol
        if self.holdup:
            atol[self.iTj] = rtol
        if self.c is not None:
            atol[self.iI] = rtol
        atol[self.iS:self.iS + 5] = rtol * self.C0
        atol[self.iS + 5] = rtol * ch.mass
        self.atol = atol

    def terms(self, y, F, cooling, outputs: bool = False):
        """Rates of every state (and, if asked, the algebraic outputs) for y of shape (n,) or (n, k);
        F and cooling are scalars or arrays of length k."""
        y = y.reshape(self.n_states, -1)
        ns = self.ns
        n, mb, T = y[:ns], y[ns], y[self.iT]
        mass = self.M @ n + mb
        V = mass / self.rho
        logc = np.log(np.maximum(n / V, 1e-300))
        rV = self.k_ref * np.exp(np.minimum(self.orders @ logc - self.E_R * (1.0 / T - self.inv_Tref), 300.0)) * V
        C = self.Mcp @ n + mb * self.cp_b
        q_ref = -(self.dH @ rV)
        q_T = q_ref - (T - self.Th) * (self.dcp @ rV)
        c = self.c
        if c is not None:
            error = T - c.setpoint
            raw = self.bias - c.gain * (error + y[self.iI] / c.integral_time)
            Tin = np.minimum(np.maximum(raw, c.minimum_inlet_temperature), c.maximum_inlet_temperature)
        else:
            Tin = self.Tin
        if self.holdup:
            Tj = y[self.iTj]
            Q = cooling * self.ua * (Tj - T)
        else:
            Q = cooling * self.mc * self.ntu_factor * (Tin - T)
        dy = np.empty_like(y)
        feed_heat = F * self.cp_feed
        if self.has_outflow:
            washout = F / mass
            dy[:ns] = self.x[:, None] * F + self.nu.T @ rV - n * washout
            dy[ns] = F * self.xb - mb * washout
            dy[self.iS + 4] = washout * C * (T - self.Th)
        else:
            dy[:ns] = self.x[:, None] * F + self.nu.T @ rV
            dy[ns] = F * self.xb
            dy[self.iS + 4] = 0.0
        dy[self.iT] = (feed_heat * (self.Tf - T) + q_T + Q + self.W) / C
        if self.holdup:
            dy[self.iTj] = cooling * (self.mc * (Tin - Tj) + self.ua * (T - Tj)) * self.inverse_jacket_capacity
        if c is not None:
            dy[self.iI] = cooling * (error + (raw - Tin) / c.gain)
        s = self.iS
        dy[s] = feed_heat * (self.Tf - self.Th)
        dy[s + 1] = q_ref
        dy[s + 2] = Q
        dy[s + 3] = self.W
        dy[s + 5] = F
        if not outputs:
            return dy, None
        T_out = Tj if self.holdup else T - (T - Tin) * (1.0 - self.ntu_factor)
        return dy, dict(mass=mass, V=V, q=q_T, Q=Q, Tin=Tin + 0.0 * T, T_out=T_out, C=C)

    def rhs(self, F: float, cooling: float):
        def fun(t, y):
            self.deadline.check()
            self.evaluations += 1 if y.ndim == 1 else y.shape[1]
            dy = self.terms(y, F, cooling)[0]
            return dy.reshape(y.shape)
        return fun

    def feed_rate(self, t: float) -> float:
        if not self.mode.has_feed:
            return 0.0
        return sum(s.mass_flow for s in self.inp.feed.steps if s.start <= t < s.end)

    def breakpoints(self, t0: float, t1: float) -> list:
        points = {t0, t1}
        if self.mode.has_feed:
            for s in self.inp.feed.steps:
                points.update(p for p in (s.start, s.end) if t0 < p < t1)
        return sorted(points)

    def enthalpy(self, y) -> float:
        return (self.Mcp @ y[:self.ns] + y[self.ns] * self.cp_b) * (y[self.iT] - self.Th)


# ----------------------------------------------------------------------------- integration

@dataclass
class _Track:
    """Accepted steps of one run: times, states, dense outputs and (feed rate, cooling) per interval."""

    ts: list
    ys: list
    interps: list = field(default_factory=list)
    params: list = field(default_factory=list)
    crossings: list = field(default_factory=list)
    status: int = 0
    message: str = MESSAGES[0]


def _crossing(lim: TemperatureLimit, iT: int, sol, t_old, y_old, t_new, y_new):
    g_old, g_new = y_old[iT] - lim.temperature, y_new[iT] - lim.temperature
    up, down = g_old < 0.0 <= g_new, g_old > 0.0 >= g_new
    if not ((lim.direction >= 0 and up) or (lim.direction <= 0 and down)):
        return None
    g = lambda t: sol(t)[iT] - lim.temperature  # noqa: E731
    if g_new == 0.0 or g(t_old) * g(t_new) > 0:
        return t_new
    return brentq(g, t_old, t_new, xtol=1e-9 * max(1.0, t_new))


def _run(model: _Model, t0: float, y0: np.ndarray, t1: float, failed: bool, stop_feed: bool,
         limits: tuple) -> _Track:
    """Integrate from t0 to t1, one solver per interval between feed breakpoints."""
    track = _Track([t0], [y0.copy()])
    with np.errstate(all="ignore"):  # overflow shows up as a failed step, reported in the status
        _integrate(model, track, model.breakpoints(t0, t1), failed, stop_feed, limits)
    return track


def _integrate(model: _Model, track: _Track, points: list, failed: bool, stop_feed: bool, limits: tuple) -> None:
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
                    tc = _crossing(lim, model.iT, sol, t_old, y_old, t_new, y_new)
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


def _worst_failure(model: _Model, failure: CoolingFailure, limits: tuple):
    """Failure time in the mode's window that gives the highest temperature after failure."""
    nominal = _run(model, 0.0, model.y0, model.inp.horizon, False, False, limits)
    if nominal.status == 2 or len(nominal.ts) < 2:
        return nominal, None, ()
    low, high = model.mode.failure_window(model)
    high = min(high, nominal.ts[-1])
    low = min(low, high)
    runs: dict = {}

    def peak(t_fail: float) -> float:
        if t_fail not in runs:
            pre = _truncate(nominal, t_fail)
            post = _run(model, t_fail, pre.ys[-1], model.inp.horizon, True, failure.stop_feed, ())
            if post.status == 2:
                raise OutOfTime
            runs[t_fail] = (max(y[model.iT] for y in post.ys), pre, post)
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
    return track, worst, tuple(sorted((t, runs[t][0]) for t in runs))


# ----------------------------------------------------------------------------- results

def _outputs(model: _Model, Y: np.ndarray, F: np.ndarray, cooling: np.ndarray, fed: np.ndarray) -> dict:
    dy, a = model.terms(Y, F, cooling, outputs=True)
    nL = Y[model.iL]
    a["conversion"] = model.mode.conversion(model, nL, a["mass"], fed)
    a["accumulation"] = model.mode.accumulation(model, nL, a["mass"])
    return a


def _result(model: _Model, track: _Track, t_fail, search, warnings: Warnings) -> SimulationResult:
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
    s = model.iS
    steps = _outputs(model, Y, params[:, 0], params[:, 1], Y[s + 5])
    out = _outputs(model, Y_out, p_out[:, 0], p_out[:, 1], Y_out[s + 5])

    all_t = np.concatenate([ts, t_out])
    all_T = np.concatenate([Y[model.iT], Y_out[model.iT]])
    all_acc = np.concatenate([steps["accumulation"], out["accumulation"]])
    i_T, i_acc = int(np.argmax(all_T)), int(np.argmax(all_acc))

    y0, y1 = Y[:, 0], Y[:, -1]
    dH = model.enthalpy(y1) - model.enthalpy(y0)
    sums = y1[s:s + 5] - y0[s:s + 5]  # feed, reaction, jacket, shaft, outflow
    balance = sums[0] + sums[1] + sums[2] + sums[3] - sums[4]
    scale = max(abs(dH), float(np.max(np.abs(sums))), model.C0 * 1.0)
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
    n_out = Y_out[:model.ns]
    series = Series(
        time=t_out, temperature=Y_out[model.iT], coolant_inlet_temperature=np.broadcast_to(out["Tin"], t_out.shape).copy(),
        coolant_outlet_temperature=np.broadcast_to(out["T_out"], t_out.shape).copy(), moles=n_out,
        concentrations=n_out / out["V"], mass=out["mass"], conversion=out["conversion"],
        accumulation=out["accumulation"], heat_release_rate=out["q"], jacket_duty=-out["Q"],
        feed_rate=p_out[:, 0].copy())
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

    >>> from calc.safety.tank_model import Charge, Reaction, SimulationInput, Species
    >>> sp = (Species("A", 0.1, 2000.0), Species("B", 0.1, 2000.0))
    >>> rx = (Reaction({"A": -1, "B": 1}, {"A": 1}, 1e-3, 350.0, 60e3, 0.0),)
    >>> ch = Charge(1000.0, 350.0, {"A": 1.0}, 900.0, 2000.0)
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
    failure, search, t_fail = inp.failure, (), None
    if failure is None:
        track = _run(model, 0.0, model.y0, inp.horizon, False, False, inp.limits)
    elif failure.time is not None:
        track = _run(model, 0.0, model.y0, failure.time, False, False, inp.limits)
        if track.status == 0:
            t_fail = failure.time
            track = _concat(track, _run(model, failure.time, track.ys[-1], inp.horizon, True,
                                        failure.stop_feed, inp.limits))
    else:
        track, t_fail, search = _worst_failure(model, failure, inp.limits)
    return _result(model, track, t_fail, search, warnings)
