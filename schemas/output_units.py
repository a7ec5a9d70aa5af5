"""Units a response is written in: the default API units, a preset, and per-field overrides.

Responses name the unit of every numeric field in ``units``. A request may ask for another set:
``output_units=si`` (the default API units: SI with degC and rpm), ``metric`` (metric engineering:
kW, degC, m^3/h, bar, min, ...) or ``us`` (US customary: BTU/h, degF, gal/min, psi, ft, ...), and
override single fields with ``unit.<field>=<unit>`` (``unit.cooling_capacity=MW``). Every unit
label written is one the request parser reads back, so an answer can be sent again as input.

pint does every conversion (once per unit, cached); numbers are affine in every unit pint knows,
so a factor and an offset carry each conversion.
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Any

from marshmallow import ValidationError

from .units import KINDS, UREG

# Unit of each quantity kind per preset; a kind not named keeps its default API unit.
PRESETS: dict[str, dict[str, str]] = {
    "si": {},
    "metric": {
        "power": "kW", "thermal conductance": "kW/K", "power per volume": "kW/m^3",
        "volume flow": "m^3/h", "mass flow": "kg/h", "molar flow": "mol/h",
        "pressure": "bar", "time": "min",
        "heat capacity": "kJ/(kg*K)", "specific energy": "kJ/kg",
        "molar enthalpy": "kJ/mol", "activation energy": "kJ/mol",
        "viscosity": "mPa*s",
    },
    "us": {
        "power": "BTU/h", "thermal conductance": "BTU/(h*delta_degF)", "power per volume": "BTU/(h*ft^3)",
        "specific power": "BTU/(h*lb)",
        "temperature": "degF", "temperature difference": "delta_degF",
        "length": "ft", "area": "ft^2", "volume": "gal", "area per volume": "1/ft", "velocity": "ft/s",
        "mass": "lb", "mass flow": "lb/h", "volume flow": "gal/min", "density": "lb/ft^3",
        "pressure": "psi", "time": "min",
        "heat capacity": "BTU/(lb*delta_degF)", "specific energy": "BTU/lb",
        "heat-transfer coefficient": "BTU/(h*ft^2*delta_degF)", "fouling resistance": "h*ft^2*delta_degF/BTU",
        "thermal conductivity": "BTU/(h*ft*delta_degF)", "viscosity": "cP",
    },
}
OVERRIDE_PREFIX = "unit."


@dataclass(frozen=True)
class Conversion:
    """value_out = factor * value_in + offset, from a kind's default API unit to ``unit``."""

    unit: str
    factor: float
    offset: float

    def __call__(self, value: float) -> float:
        return self.factor * value + self.offset


@lru_cache(maxsize=512)
def conversion(kind_name: str, unit: str) -> Conversion:
    """The conversion of a kind's default API unit to ``unit``; ValidationError for a wrong unit."""
    kind = KINDS[kind_name]
    try:
        target = UREG.parse_units(unit)
    except Exception:  # pint's parser raises assorted errors on garbage text
        raise ValidationError(f"unknown unit {unit!r}") from None
    source = UREG.parse_units(kind.api_unit) if kind.api_unit else UREG.dimensionless
    if kind.difference and str(target) in ("degree_Celsius", "degree_Fahrenheit"):
        target = UREG.parse_units("delta_" + str(target))  # a difference of 1 degC is 1 K
    one, zero = UREG.Quantity(1.0, source), UREG.Quantity(0.0, source)
    if one.dimensionality != UREG.Quantity(1.0, target).dimensionality:
        raise ValidationError(f"{unit!r} is not a unit of {kind.name} (the field's unit is {kind.api_unit!r})")
    try:
        at_zero = float(zero.to(target).magnitude)
        return Conversion(unit, float(one.to(target).magnitude) - at_zero, at_zero)
    except Exception as exc:  # an offset unit inside a compound unit, e.g. 'W/degC'
        raise ValidationError(f"cannot write {kind.name} in {unit!r}: {exc}") from None


def plan(kinds: dict[str, str], preset: str | None, overrides: dict[str, str]) -> dict[str, Conversion]:
    """The conversion of each field (dotted path -> kind) that leaves its default unit.

    Raises ValidationError keyed by the query parameter at fault (``output_units`` or ``unit.<field>``).
    """
    chosen = PRESETS["si"]
    if preset is not None:
        if preset not in PRESETS:
            raise ValidationError({"output_units": [f"must be one of {', '.join(PRESETS)}"]})
        chosen = PRESETS[preset]
    conversions: dict[str, Conversion] = {}
    for path, kind in kinds.items():
        unit = chosen.get(kind)
        if unit is not None and unit != KINDS[kind].api_unit:
            conversions[path] = conversion(kind, unit)
    errors: dict[str, list[str]] = {}
    for field, unit in overrides.items():
        key = field if field in kinds else f"{field}.*" if f"{field}.*" in kinds else None
        if key is None:
            errors[OVERRIDE_PREFIX + field] = ["this response has no quantity of that name"]
            continue
        try:
            conversions[key] = conversion(kinds[key], unit)
        except ValidationError as error:
            errors[OVERRIDE_PREFIX + field] = error.messages if isinstance(error.messages, list) else [str(error)]
    if errors:
        raise ValidationError(errors)
    return conversions


def apply(payload: Any, conversions: dict[str, Conversion], path: str = "") -> Any:
    """A copy of ``payload`` with the numbers at each converted path (list items included) converted."""
    if not conversions:
        return payload
    if isinstance(payload, dict):
        out = {}
        for key, value in payload.items():
            child = f"{path}.{key}" if path else key
            if child not in conversions and f"{path}.*" in conversions:
                child = f"{path}.*"
            out[key] = apply(value, conversions, child) if child in conversions or _below(child, conversions) \
                else value
        return out
    if isinstance(payload, list):
        return [apply(item, conversions, path) for item in payload]
    if isinstance(payload, (int, float)) and not isinstance(payload, bool) and path in conversions:
        return conversions[path](float(payload))
    return payload


def _below(path: str, conversions: dict[str, Conversion]) -> bool:
    prefix = path + "."
    return any(key.startswith(prefix) for key in conversions)


def units_after(units: dict[str, str], conversions: dict[str, Conversion]) -> dict[str, str]:
    """The ``units`` map of a converted response."""
    return {path: conversions[path].unit if path in conversions else unit for path, unit in units.items()}
