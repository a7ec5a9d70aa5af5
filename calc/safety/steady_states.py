"""Steady states of a jacketed continuous stirred tank and their stability.

A CSTR with one power-law reaction A -> products, r = k(T) c^n, constant density and heat capacity.
At steady state the mole balance fixes the outlet concentration at each temperature,
c_A0 - c = tau k(T) c^n, and the energy balance says heat generation equals heat removal:

    Q_g(T) = (-dH) F (c_A0 - c(T))                             (F volumetric flow)
    Q_r(T) = rho F c_p (T - T_0) + UA (T - T_c) - W            (W shaft work)

Every intersection is a steady state (Van Heerden 1953). All lie between T_lo, where Q_r = 0, and
T_hi = T_lo + dT_ad (full conversion) for an exothermic reaction, so a fine grid over that range
catches every sign change of Q_g - Q_r, and Brent's method pins each one. A state needs
dQ_r/dT > dQ_g/dT to be statically stable (Van Heerden 1953), and both eigenvalues of the Jacobian of
the mole and energy balances in the left half-plane to be stable at all: the slope condition is
the determinant condition, and a positive trace can still make a state oscillate (Aris & Amundson
1958). Screening estimate: confirm with reaction calorimetry and plant data, follow local codes and
have a licensed engineer review the result.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import brentq

from calc.cautions import DYNAMICS
from calc.properties import GAS_CONSTANT
from calc.validity import (CalcWarning, Correlation, InputError, Warnings, require_finite, require_non_negative,
                           require_positive, require_sign, require_temperature)



@dataclass(frozen=True)
class CSTRInput:
    volume: float  # m3
    flow: float  # m3/s, feed = outflow
    feed_concentration: float  # mol/m3 of A
    feed_temperature: float  # K
    density: float  # kg/m3
    heat_capacity: float  # J/(kg K)
    rate_constant: float  # at reference_temperature, (mol/m3)^(1-n)/s
    reference_temperature: float  # K
    activation_energy: float  # J/mol
    reaction_enthalpy: float  # J/mol, negative = exothermic
    ua: float  # W/K
    coolant_temperature: float  # K
    order: float = 1.0
    shaft_power: float = 0.0  # W
    temperature_range: tuple[float, float] | None = None  # (low, high) K; default: every possible steady state
    grid_points: int = 4001
    endothermic: bool = False  # the request declares a heat-absorbing reaction (reaction_enthalpy > 0 allowed)


@dataclass(frozen=True)
class SteadyState:
    temperature: float  # K
    concentration: float  # mol/m3
    conversion: float  # -
    heat_generation: float  # W
    generation_slope: float  # W/K, dQ_g/dT
    removal_slope: float  # W/K, dQ_r/dT
    slope_stable: bool  # Van Heerden: dQ_r/dT > dQ_g/dT
    eigenvalues: tuple[complex, ...]  # of the Jacobian of (c, T), 1/s
    stable: bool  # every eigenvalue has a negative real part
    classification: str

    @property
    def eigenvalue_pairs(self) -> tuple[tuple[float, float], ...]:
        """The eigenvalues as (real, imaginary) pairs, 1/s."""
        return tuple((float(complex(e).real), float(complex(e).imag)) for e in self.eigenvalues)


#: Points of the returned curves; the states are found on the full scan grid.
CURVE_POINTS = 401


def thinned(values: np.ndarray, points: int = CURVE_POINTS) -> np.ndarray:
    """At most ``points`` evenly spaced samples of a scan, first and last kept.

    >>> thinned(np.arange(10.0), 4).tolist()
    [0.0, 3.0, 6.0, 9.0]
    """
    values = np.asarray(values, dtype=float)
    if values.size <= points:
        return values
    picked: np.ndarray = values[np.linspace(0, values.size - 1, points).round().astype(int)]
    return picked


@dataclass(frozen=True)
class HeatCurves:
    """Heat generation and removal against temperature (K, W), thinned for returning."""

    temperature: np.ndarray
    heat_generation: np.ndarray
    heat_removal: np.ndarray


@dataclass(frozen=True)
class SteadyStatesResult:
    states: tuple[SteadyState, ...]  # by increasing temperature
    temperature: np.ndarray  # K, the scanned grid
    heat_generation: np.ndarray  # W
    heat_removal: np.ndarray  # W
    warnings: Warnings = field(default_factory=Warnings)
    cautions: tuple[str, ...] = (DYNAMICS,)

    @property
    def curves(self) -> HeatCurves:
        return HeatCurves(thinned(self.temperature), thinned(self.heat_generation), thinned(self.heat_removal))


def outlet_concentration(feed_concentration: float, tau_k: np.ndarray, order: float) -> np.ndarray:
    r"""Outlet concentration of a CSTR with power-law kinetics, from the steady mole balance.

    .. math:: c_{A0} - c = \tau k c^n

    Parameters
    ----------
    feed_concentration : float
        Feed concentration, [mol/m^3]
    tau_k : float or ndarray
        Residence time times rate constant, [(mol/m^3)^(1-n)]
    order : float
        Reaction order n >= 0, [-]

    Returns
    -------
    c : float or ndarray
        Outlet concentration, [mol/m^3]

    Notes
    -----
    n = 1: c = c_A0/(1 + tau k); n = 0: c = max(c_A0 - tau k, 0); otherwise the unique root in
    [0, c_A0] by Brent's method.

    Examples
    --------
    >>> float(outlet_concentration(1000.0, 3.0, 1.0))
    250.0
    >>> round(float(outlet_concentration(1000.0, 0.003, 2.0)), 6)  # (-1 + sqrt(1 + 12)) / 0.006
    434.258546
    >>> float(outlet_concentration(1000.0, 1500.0, 0.0))  # zero order: complete conversion
    0.0

    References
    ----------
    Fogler, H. S. *Elements of Chemical Reaction Engineering*, 5th ed., Prentice Hall, 2016, ch. 5.
    """
    tau_k = np.asarray(tau_k, dtype=float)
    if order == 1.0:
        return feed_concentration / (1.0 + tau_k)
    if order == 0.0:  # zero order runs to completion once tau k reaches the feed concentration
        return np.maximum(feed_concentration - tau_k, 0.0)[()]
    c0 = feed_concentration
    flat = [brentq(lambda c, a=a: c0 - c - a * c ** order, 0.0, c0, xtol=1e-12 * c0, rtol=1e-14)
            if a > 0 else c0 for a in tau_k.ravel()]
    return np.array(flat).reshape(tau_k.shape)[()]


def _stability_Van_Heerden_1953(generation_slope: float, removal_slope: float) -> bool:
    """Static (slope) condition of Van Heerden, Ind. Eng. Chem. 45, 1242 (1953): dQ_r/dT > dQ_g/dT."""
    return removal_slope > generation_slope


def _stability_Aris_Amundson_1958(jacobian: np.ndarray) -> tuple[tuple[complex, ...], bool]:
    """Linear stability, Aris & Amundson, Chem. Eng. Sci. 7, 121 (1958): eigenvalues of the Jacobian."""
    eig = np.linalg.eigvals(jacobian)
    return tuple(complex(e) for e in eig), bool(np.all(eig.real < 0))


REGISTRY: dict[str, Correlation] = {c.name: c for c in [
    Correlation("Van Heerden (1953)", _stability_Van_Heerden_1953,
                "Van Heerden, C. Ind. Eng. Chem. 45, 1242-1247, 1953", {}),
    Correlation("Aris & Amundson (1958)", _stability_Aris_Amundson_1958,
                "Aris, R.; Amundson, N. R. Chem. Eng. Sci. 7, 121-131, 1958", {}),
]}


def _validate(inp: CSTRInput) -> None:
    for name in ("volume", "flow", "feed_temperature", "density", "heat_capacity", "reference_temperature"):
        require_positive(name, getattr(inp, name))
    for name in ("feed_concentration", "rate_constant", "activation_energy", "ua", "order"):
        require_non_negative(name, getattr(inp, name))
    require_sign("reaction_enthalpy", inp.reaction_enthalpy, inp.endothermic, "endothermic")
    require_finite("shaft_power", inp.shaft_power)
    require_temperature("coolant_temperature", inp.coolant_temperature)
    if not (isinstance(inp.grid_points, int) and 11 <= inp.grid_points <= 200001):
        raise InputError("grid_points", "must be an integer from 11 to 200001")
    if inp.temperature_range is not None:
        low, high = inp.temperature_range
        if not (math.isfinite(low) and math.isfinite(high) and 0 < low < high):
            raise InputError("maximum_temperature", "must be above minimum_temperature (both absolute, in K)")


class _CSTR:
    def __init__(self, inp: CSTRInput):
        self.inp = inp
        self.tau = inp.volume / inp.flow
        self.mcp = inp.density * inp.flow * inp.heat_capacity  # W/K
        self.E_R = inp.activation_energy / GAS_CONSTANT

    def k(self, T: float | np.ndarray) -> np.ndarray:
        exponent = np.minimum(-self.E_R * (1.0 / np.asarray(T, float) - 1.0 / self.inp.reference_temperature), 600.0)
        return self.inp.rate_constant * np.exp(exponent)

    def concentration(self, T: float | np.ndarray) -> np.ndarray:
        return outlet_concentration(self.inp.feed_concentration, self.tau * self.k(T), self.inp.order)

    def generation(self, T: float | np.ndarray) -> np.ndarray:
        q_g: np.ndarray = -self.inp.reaction_enthalpy * self.inp.flow * (self.inp.feed_concentration - self.concentration(T))
        return q_g

    def removal(self, T: float | np.ndarray) -> float | np.ndarray:
        i = self.inp
        q_r = self.mcp * (T - i.feed_temperature) + i.ua * (T - i.coolant_temperature) - i.shaft_power
        return q_r

    def state(self, T: float) -> SteadyState:
        i, n = self.inp, self.inp.order
        c = float(self.concentration(T))
        k = float(self.k(T))
        dk = k * self.E_R / T ** 2
        kn = n * k * c ** (n - 1.0) if c > 0 else (k if n == 1.0 else 0.0)
        dc_dT = -self.tau * dk * c ** n / (1.0 + self.tau * kn)
        g_slope = i.reaction_enthalpy * i.flow * dc_dT
        r_slope = self.mcp + i.ua
        rho_cp = i.density * i.heat_capacity
        jac = np.array([
            [-1.0 / self.tau - kn, -dk * c ** n],
            [-i.reaction_enthalpy * kn / rho_cp,
             -1.0 / self.tau - i.ua / (rho_cp * i.volume) - i.reaction_enthalpy * dk * c ** n / rho_cp],
        ])
        slope_ok = REGISTRY["Van Heerden (1953)"].function(g_slope, r_slope)
        eig, stable = REGISTRY["Aris & Amundson (1958)"].function(jac)
        if not slope_ok:
            kind = "unstable saddle: fails the slope condition"
        elif stable:
            kind = "stable focus" if any(abs(e.imag) > 0 for e in eig) else "stable node"
        else:
            kind = "unstable: meets the slope condition but the trace is positive; sustained oscillation possible"
        conversion = 1.0 - c / i.feed_concentration if i.feed_concentration > 0 else 0.0
        return SteadyState(T, c, conversion, float(self.generation(T)), float(g_slope), r_slope,
                           slope_ok, eig, stable, kind)


def cstr_steady_states(inp: CSTRInput) -> SteadyStatesResult:
    """Every steady state of a jacketed CSTR with its stability, and the Q_g and Q_r curves.

    Examples
    --------
    A cooled first-order CSTR with three steady states (invented example; see the tests for the
    independent check):

    >>> r = cstr_steady_states(CSTRInput(volume=1.0, flow=1e-3, feed_concentration=2000.0,
    ...     feed_temperature=300.0, density=1000.0, heat_capacity=4000.0, rate_constant=1e-3,
    ...     reference_temperature=350.0, activation_energy=100e3, reaction_enthalpy=-200e3,
    ...     ua=500.0, coolant_temperature=300.0))
    >>> [(round(s.temperature, 2), s.stable) for s in r.states]
    [(300.3, True), (355.01, False), (385.2, True)]
    """
    _validate(inp)
    model = _CSTR(inp)
    warnings = Warnings()
    if inp.temperature_range is not None:
        low, high = inp.temperature_range
    else:
        base = (model.mcp * inp.feed_temperature + inp.ua * inp.coolant_temperature + inp.shaft_power) / (
            model.mcp + inp.ua)
        full = -inp.reaction_enthalpy * inp.flow * inp.feed_concentration / (model.mcp + inp.ua)
        low, high = min(base, base + full) - 1.0, max(base, base + full) + 1.0
        if low <= 0:
            raise InputError("shaft_power", "no steady state at a positive absolute temperature")
    T = np.linspace(low, high, inp.grid_points)
    q_g, q_r = model.generation(T), np.asarray(model.removal(T))  # arrays over the grid
    f = q_g - q_r
    roots = [float(t) for t, v in zip(T, f) if v == 0.0]
    for i in np.nonzero(f[:-1] * f[1:] < 0)[0]:
        roots.append(brentq(lambda t: float(model.generation(t) - model.removal(t)), T[i], T[i + 1],
                            xtol=1e-10, rtol=1e-14))
    scale = max(float(np.max(np.abs(q_r))), 1.0)
    near = np.nonzero((np.abs(f[1:-1]) < np.abs(f[:-2])) & (np.abs(f[1:-1]) < np.abs(f[2:]))
                      & (np.abs(f[1:-1]) < 1e-3 * scale) & (f[:-2] * f[2:] > 0))[0]
    if near.size:
        warnings.add(CalcWarning("near_tangent_steady_state",
                                 f"heat generation and removal nearly touch near {T[near[0] + 1] - 273.15:.1f} degC: "
                                 "the system is close to ignition or extinction, a small change may add or remove "
                                 "steady states"))
    states = tuple(model.state(t) for t in sorted(set(roots)))
    if not states:
        warnings.add(CalcWarning("no_steady_state_in_range", "no steady state lies in the temperature range given"))
    return SteadyStatesResult(states, T, q_g, q_r, warnings)
