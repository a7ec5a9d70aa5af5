"""Quantities at the API boundary: a number in the field's default unit, or a string with a unit.

One pint registry serves the whole process. Each quantity kind names its default API unit (what a
bare number means and what responses use) and the SI unit that ``calc`` works in. Numbers convert
with a precomputed factor and offset; strings go through pint, so "150 rpm", "25 degC", "20 m^3/h"
and "6 ft" all work and a wrong dimension is refused with a message that names both sides.
"""
from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

import pint
from marshmallow import ValidationError, fields

UREG = pint.UnitRegistry()
_NUMBER_THEN_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_MAX_TEXT = 80


@dataclass(frozen=True)
class Kind:
    """A physical quantity kind: its name in messages, default API unit and calc (SI) unit."""

    name: str
    api_unit: str
    si_unit: str
    difference: bool = False  # a temperature difference: degC means delta_degC

    @property
    def dimensionality(self):
        return UREG.Quantity(1, self.si_unit).dimensionality

    def factor_offset(self) -> tuple[float, float]:
        zero = UREG.Quantity(0.0, self.api_unit).to(self.si_unit).magnitude
        one = UREG.Quantity(1.0, self.api_unit).to(self.si_unit).magnitude
        return one - zero, zero


KINDS: dict[str, Kind] = {k.name: k for k in [
    Kind("length", "m", "m"),
    Kind("area", "m^2", "m^2"),
    Kind("volume", "m^3", "m^3"),
    Kind("mass", "kg", "kg"),
    Kind("time", "s", "s"),
    Kind("mass flow", "kg/s", "kg/s"),
    Kind("volume flow", "m^3/s", "m^3/s"),
    Kind("density", "kg/m^3", "kg/m^3"),
    Kind("heat capacity", "J/(kg*K)", "J/(kg*K)"),
    Kind("temperature", "degC", "K"),
    Kind("temperature difference", "K", "K", difference=True),
    Kind("agitator speed", "rpm", "revolution/s"),
    Kind("power", "W", "W"),
    Kind("heat-transfer coefficient", "W/(m^2*K)", "W/(m^2*K)"),
    Kind("thermal conductance", "W/K", "W/K"),
    Kind("fouling resistance", "m^2*K/W", "m^2*K/W"),
    Kind("viscosity", "Pa*s", "Pa*s"),
    Kind("thermal conductivity", "W/(m*K)", "W/(m*K)"),
    Kind("molar enthalpy", "J/mol", "J/mol"),
    Kind("activation energy", "J/mol", "J/mol"),
    Kind("specific energy", "J/kg", "J/kg"),
    Kind("specific power", "W/kg", "W/kg"),
    Kind("power per volume", "W/m^3", "W/m^3"),
    Kind("pressure", "Pa", "Pa"),
    Kind("velocity", "m/s", "m/s"),
    Kind("angle", "degree", "degree"),
    Kind("amount of substance", "mol", "mol"),
    Kind("concentration", "mol/m^3", "mol/m^3"),
    Kind("molar mass", "kg/mol", "kg/mol"),
    Kind("molar flow", "mol/s", "mol/s"),
    Kind("frequency", "1/s", "1/s"),
    Kind("area per volume", "1/m", "1/m"),
    Kind("dimensionless", "", ""),
]}
_FACTORS = {name: kind.factor_offset() for name, kind in KINDS.items()}
_OFFSET_UNITS = {"degree_Celsius": "delta_degree_Celsius", "degree_Fahrenheit": "delta_degree_Fahrenheit"}


def to_si(kind_name: str, value: float) -> float:
    """Convert a number in the kind's default API unit to SI."""
    factor, offset = _FACTORS[kind_name]
    return value * factor + offset


def from_si(kind_name: str, value: float) -> float:
    """Convert an SI number to the kind's default API unit."""
    factor, offset = _FACTORS[kind_name]
    return (value - offset) / factor


def parse_quantity(kind_name: str, raw) -> float:
    """Parse a number (default unit) or "number unit" text and return the SI value.

    Raises marshmallow.ValidationError with a message a caller can act on.

    >>> parse_quantity("agitator speed", "150 rpm")
    2.5
    >>> parse_quantity("temperature", 25)
    298.15
    """
    kind = KINDS[kind_name]
    if isinstance(raw, bool):
        raise ValidationError(f"expected a {kind.name} (a number or a string such as '{_example(kind)}')")
    if isinstance(raw, (int, float)):
        value = float(raw)
        if not math.isfinite(value):
            raise ValidationError("must be a finite number")
        return to_si(kind_name, value)
    if not isinstance(raw, str):
        raise ValidationError(f"expected a {kind.name} (a number or a string such as '{_example(kind)}')")
    if len(raw) > _MAX_TEXT:
        raise ValidationError(f"quantity text is longer than {_MAX_TEXT} characters")
    match = _NUMBER_THEN_UNIT.match(raw)
    if match is None:
        raise ValidationError(f"expected a number with an optional unit, e.g. '{_example(kind)}'; got {raw!r}")
    number, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise ValidationError("must be a finite number")
    if unit == "":
        return to_si(kind_name, number)
    try:
        factor, offset = _conversion(kind_name, unit)
    except ValidationError as error:
        hint = habit_hint(kind, match.group(1), unit)
        if hint is None:
            raise
        # A decimal comma leaves the parser a nonsense unit (',8 m'): the hint alone says what happened.
        raise ValidationError(hint if unit.startswith(",") else f"{error.messages[0]}; {hint}") from None
    value = number * factor + offset
    if not math.isfinite(value):
        raise ValidationError("must be a finite number")
    return value


@lru_cache(maxsize=1024)
def _conversion(kind_name: str, unit: str) -> tuple[float, float]:
    """(factor, offset) taking a number in ``unit`` to the kind's SI unit; pint decides, once per unit.

    Every unit pint knows is affine (scale and offset), so two conversions fix it. Raises
    ValidationError for an unknown unit or a wrong dimension (errors are not cached).
    """
    kind = KINDS[kind_name]
    try:
        units = UREG.parse_units(unit)
    except Exception:  # pint's parser raises assorted errors (even AssertionError) on garbage text
        raise ValidationError(f"unknown unit {unit!r}") from None
    if kind.difference and str(units) in _OFFSET_UNITS:
        units = UREG.parse_units(_OFFSET_UNITS[str(units)])
    one, zero = UREG.Quantity(1.0, units), UREG.Quantity(0.0, units)
    if kind_name == "agitator speed" and one.dimensionality == UREG.Quantity(1, "1/s").dimensionality:
        base = one.to_base_units()
        factor = base.magnitude / (2 * math.pi) if "radian" in str(base.units) else base.magnitude
        return float(factor), 0.0
    if one.dimensionality != kind.dimensionality:
        raise ValidationError(f"expected a {kind.name}, got {unit!r}")
    try:
        at_zero = float(zero.to(kind.si_unit).magnitude)
        return float(one.to(kind.si_unit).magnitude) - at_zero, at_zero
    except Exception as exc:  # pint refuses some conversions (e.g. offset units in compound units)
        raise ValidationError(f"cannot convert {unit!r} to {kind.api_unit}: {exc}") from None


_GAUGE = re.compile(r"^(bar|psi|kPa|MPa|Pa)\s*(?:g|\(g\)|gauge|\(gauge\))$", re.IGNORECASE)
_ABSOLUTE = re.compile(r"^(bar|psi|kPa|MPa|Pa)\s*(?:a|\(a\)|abs|\(abs\))$", re.IGNORECASE)
# The standard atmosphere, 101 325 Pa by definition, in each unit a gauge reading is written in.
_ATMOSPHERE = {"bar": 1.01325, "psi": 14.696, "kpa": 101.325, "mpa": 0.101325, "pa": 101325.0}
_BARE_DEGREES = {"c": "degC", "f": "degF", "deg c": "degC", "deg f": "degF", "celsius": "degC",
                 "fahrenheit": "degF", "k": "K", "r": "degR"}


def habit_hint(kind: Kind, number: str, unit: str) -> str | None:
    """A suggestion for a unit written as people often write it by hand, or None.

    >>> habit_hint(KINDS["volume flow"], "20", "m3/h")
    "write powers with ^: '20 m^3/h'"
    """
    bare = unit.strip().lower()
    if kind.name.startswith("temperature") and bare in _BARE_DEGREES:
        meaning = {"c": " ('C' is the coulomb)", "f": " ('F' is the farad)"}.get(bare, "")
        return f"did you mean '{number} {_BARE_DEGREES[bare]}'{meaning}?"
    if re.match(r"^,\d", unit):
        return (f"'{number}{unit}' has a decimal comma: write '{number}.{unit[1:]}' (a comma is read neither "
                "as a decimal mark nor as a thousands separator)")
    gauge = _GAUGE.match(unit.strip())
    if gauge:
        base = gauge.group(1)
        absolute = float(number) + _ATMOSPHERE[base.lower()]
        return (f"pressures here are absolute: add the atmospheric pressure to a gauge reading, e.g. "
                f"'{absolute:.6g} {base}' for {number} {unit.strip()} at sea level")
    absolute = _ABSOLUTE.match(unit.strip())
    if absolute:
        return f"pressures here are absolute already: write '{number} {absolute.group(1)}'"
    if re.search(r"[A-Za-z]\d", unit):
        powered = re.sub(r"([A-Za-z])(\d)", r"\1^\2", unit)
        return f"write powers with ^: '{number} {powered}'"
    if unit != unit.lower():
        try:
            UREG.parse_units(unit.lower())
        except Exception:  # pint's parser raises assorted errors on garbage text
            return None
        return f"units are case-sensitive: did you mean '{number} {unit.lower()}'?"
    return None


def hint_for(kind_name: str, raw) -> str | None:
    """The habit hint for quantity text ``raw`` read as ``kind_name``, or None."""
    match = _NUMBER_THEN_UNIT.match(raw) if isinstance(raw, str) and len(raw) <= _MAX_TEXT else None
    return habit_hint(KINDS[kind_name], match.group(1), match.group(2)) if match and match.group(2) else None


def _example(kind: Kind) -> str:
    return f"1 {kind.api_unit}" if kind.api_unit else "0.5"


class Quantity(fields.Field):
    """A marshmallow field for a physical quantity: API units outside, SI inside.

    ``minimum``/``maximum`` are in the API unit; ``exclusive_minimum`` makes the lower bound strict.
    """

    def __init__(self, kind: str, *, minimum: float | None = None, maximum: float | None = None,
                 exclusive_minimum: bool = False, description: str = "", **kwargs):
        if kind not in KINDS:
            raise KeyError(kind)
        self.kind = kind
        self.minimum, self.maximum, self.exclusive_minimum = minimum, maximum, exclusive_minimum
        metadata = dict(kwargs.pop("metadata", {}))
        metadata.update(unit=KINDS[kind].api_unit, kind=kind, description=description)
        super().__init__(metadata=metadata, **kwargs)

    def _deserialize(self, value, attr, data, **kwargs) -> float:
        si = parse_quantity(self.kind, value)
        api = from_si(self.kind, si)
        unit = KINDS[self.kind].api_unit
        if self.minimum is not None:
            too_low = api <= self.minimum if self.exclusive_minimum else api < self.minimum
            if too_low:
                relation = "greater than" if self.exclusive_minimum else "at least"
                raise ValidationError(f"must be {relation} {self.minimum:g} {unit}".rstrip())
        if self.maximum is not None and api > self.maximum:
            raise ValidationError(f"must be at most {self.maximum:g} {unit}".rstrip())
        return si

    def _serialize(self, value, attr, obj, **kwargs):
        if value is None:
            return None
        result = from_si(self.kind, float(value))
        return result if math.isfinite(result) else None
