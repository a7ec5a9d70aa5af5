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
# ASCII digits only: Python's \d also matches other scripts' digits, which float() would accept.
NUMBER_TEXT = r"[-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?"
UNIT_CHARACTERS = r"A-Za-z0-9_ */^().%+-"
#: The contract's pattern for quantity text: a number, then an optional unit of the allowed characters.
QUANTITY_PATTERN = rf"^ *{NUMBER_TEXT} *[{UNIT_CHARACTERS}]*$"
_NUMBER_THEN_UNIT = re.compile(rf"^ *({NUMBER_TEXT}) *([{UNIT_CHARACTERS}]*?) *$")
MAX_TEXT = 80
MAX_EXPONENT = 6  # m^3, s^-1, W/(m^2*K): no unit a process engineer writes needs more
MAX_NESTING = 3  # parentheses inside parentheses
MAX_TOKENS = 24
_TOKEN = re.compile(r"\s+|\*\*|[*/^()]|[A-Za-z_%][A-Za-z0-9_]*|[0-9]+(?:\.[0-9]+)?|[-+]")


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


@dataclass(frozen=True)
class Bounds:
    """The physical range of a quantity kind at the API, in its default unit.

    ``largest`` caps the magnitude of any value; ``smallest`` is the lower end for a field that must
    be positive (below it, no plant, laboratory or property table has a meaning, and floating point
    loses its precision). Each comes with the reason a client sees. Orders of magnitude beyond the
    trade's range, so no real input is refused (common practice, no source).
    """

    largest: float
    smallest: float
    reason: str


# The comparisons in the reasons are orders of magnitude from memory (TEMA's fouling allowances, osmium's
# density, hydrogen's heat capacity); the bounds sit far beyond them on purpose.
BOUNDS: dict[str, Bounds] = {
    "length": Bounds(1e3, 1e-9, "from a nanometre (below any wall, gap or deposit) to a kilometre (beyond any plant "
                                "vessel or pipe)"),
    "area": Bounds(1e6, 1e-12, "up to a square kilometre, beyond any heat-transfer surface"),
    "volume": Bounds(1e6, 1e-12, "from a nanolitre to a million cubic metres, beyond any reactor or tank"),
    "mass": Bounds(1e9, 1e-9, "from a microgram to a million tonnes"),
    "time": Bounds(1e9, 1e-6, "from a microsecond to about 30 years"),
    "mass flow": Bounds(1e5, 1e-12, "up to 100 t/s, beyond any cooling-water main"),
    "volume flow": Bounds(1e2, 1e-15, "up to 100 m^3/s, beyond any cooling-water main"),
    "density": Bounds(3e4, 1e-3, "from a rarefied gas to above the densest metal (osmium, 22,600 kg/m^3)"),
    "heat capacity": Bounds(1e6, 1.0, "from 1 J/(kg K) to 1 MJ/(kg K), beyond hydrogen's 14 kJ/(kg K)"),
    "temperature": Bounds(1e4, 0.0, "above absolute zero and below 10,000 degC, beyond any process"),
    "temperature difference": Bounds(1e4, 1e-9, "up to 10,000 K"),
    "agitator speed": Bounds(1e5, 1e-6, "up to 100,000 rpm, beyond any agitator or pump"),
    "power": Bounds(1e11, 1e-9, "up to 100 GW, beyond any plant"),
    "heat-transfer coefficient": Bounds(1e7, 1e-6, "up to 10 MW/(m^2 K), beyond condensing steam films"),
    "thermal conductance": Bounds(1e10, 1e-9, "up to 10 GW/K"),
    "fouling resistance": Bounds(10.0, 1e-12, "up to 10 m^2 K/W, far above any fouling (TEMA tables stay "
                                              "below 0.002)"),
    "viscosity": Bounds(1e6, 1e-7, "from a rarefied gas (1e-7 Pa s) to 1e6 Pa s, beyond polymer melts"),
    "thermal conductivity": Bounds(1e4, 1e-4, "from 1e-4 W/(m K) to 1e4 W/(m K), beyond diamond"),
    "molar enthalpy": Bounds(1e8, 1e-3, "magnitude up to 100 MJ/mol, beyond any reaction or combustion"),
    "activation energy": Bounds(1e7, 1e-3, "up to 10 MJ/mol, far beyond any chemical reaction"),
    "specific energy": Bounds(1e9, 1e-3, "magnitude up to 1 GJ/kg, beyond any chemical energy"),
    "specific power": Bounds(1e8, 1e-9, "magnitude up to 100 MW/kg"),
    "power per volume": Bounds(1e11, 1e-9, "magnitude up to 100 GW/m^3"),
    "pressure": Bounds(1e9, 1.0, "from 1 Pa to 1 GPa (10,000 bar), beyond any reactor"),
    "velocity": Bounds(1e3, 1e-9, "up to 1 km/s, beyond any liquid flow"),
    "angle": Bounds(360.0, 1e-6, "a full turn at most"),
    "amount of substance": Bounds(1e12, 1e-12, "magnitude up to 1e12 mol"),
    "concentration": Bounds(1e6, 1e-12, "up to 1e6 mol/m^3, beyond any pure liquid (water: 55,000 mol/m^3)"),
    "molar mass": Bounds(1e4, 1e-4, "from 0.1 g/mol to 10,000 kg/mol, hydrogen to the largest polymers"),
    "molar flow": Bounds(1e8, 1e-12, "magnitude up to 1e8 mol/s"),
    "frequency": Bounds(1e15, 1e-15, "magnitude up to 1e15 1/s"),
    "area per volume": Bounds(1e7, 1e-9, "up to 1e7 1/m"),
    "dimensionless": Bounds(1e9, 1e-12, "magnitude up to 1e9"),
}
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
        try:
            value = float(raw)
        except OverflowError:  # a JSON integer with hundreds of digits
            raise ValidationError("must be a finite number (this integer is too large)") from None
        if not math.isfinite(value):
            raise ValidationError("must be a finite number")
        return to_si(kind_name, value)
    if not isinstance(raw, str):
        raise ValidationError(f"expected a {kind.name} (a number or a string such as '{_example(kind)}')")
    if len(raw) > MAX_TEXT:
        raise ValidationError(f"quantity text is longer than {MAX_TEXT} characters")
    if not raw.isascii():
        degrees = "; write degC or degF for degrees" if "\u00b0" in raw else ""
        raise ValidationError("quantity text must be plain ASCII (digits 0-9, unit names such as 'degC', 'm^3/h')"
                              + degrees)
    match = _NUMBER_THEN_UNIT.match(raw)
    if match is None:
        raise ValidationError(decimal_comma_hint(raw) or
                              f"expected a number with an optional unit, e.g. '{_example(kind)}'; got {raw!r}")
    number, unit = float(match.group(1)), match.group(2)
    if not math.isfinite(number):
        raise ValidationError("must be a finite number")
    if unit == "":
        return to_si(kind_name, number)
    try:
        check_unit_text(unit)  # bounded grammar first; its refusals get the same hints
        factor, offset = _conversion(kind_name, unit)
    except ValidationError as error:
        hint = habit_hint(kind, match.group(1), unit)
        if hint is None:
            raise
        raise ValidationError(f"{error.messages[0]}; {hint}") from None
    value = number * factor + offset
    if not math.isfinite(value):
        raise ValidationError("must be a finite number")
    return value


def check_unit_text(unit: str) -> None:
    """Refuse unit text outside a small grammar before pint parses it, so parsing stays bounded.

    pint evaluates exponents as Python numbers, so ``K**9**9**9`` would take minutes and all memory.
    Allowed: unit names, ``*``, ``/``, spaces, one exponent per factor (``^`` or ``**``, a number of at
    most two digits and magnitude at most MAX_EXPONENT, optionally signed or in parentheses),
    parentheses nested at most MAX_NESTING deep, and a bare ``1`` as in ``1/s``.

    >>> check_unit_text("W/(m^2*K)")
    >>> check_unit_text("K**2**3")
    Traceback (most recent call last):
    ...
    marshmallow.exceptions.ValidationError: unit text may not chain exponents (K**2**3)
    """
    tokens = _TOKEN.findall(unit)
    if "".join(tokens) != unit:
        raise ValidationError(f"unit text {unit!r} has characters outside unit names, digits, * / ^ ( ) and spaces")
    if re.search(r"[0-9][A-Za-z_]", unit):
        raise ValidationError(f"a number in unit text {unit!r} must stand apart from unit names")
    tokens = [t for t in tokens if not t.isspace()]
    if len(tokens) > MAX_TOKENS:
        raise ValidationError(f"unit text has more than {MAX_TOKENS} parts")
    depth, i, previous_was_exponent = 0, 0, False
    while i < len(tokens):
        token = tokens[i]
        if token in ("^", "**"):
            if previous_was_exponent:
                raise ValidationError(f"unit text may not chain exponents ({unit})")
            j = i + 1
            opened = j < len(tokens) and tokens[j] == "("
            j += opened
            if j < len(tokens) and tokens[j] in "+-":
                j += 1
            if j >= len(tokens) or not tokens[j][0].isdigit():
                raise ValidationError(f"an exponent in {unit!r} must be a number")
            number = tokens[j]
            if len(number.split(".")[0]) > 2 or float(number) > MAX_EXPONENT:
                raise ValidationError(f"exponents in unit text are limited to {MAX_EXPONENT} ({unit})")
            if opened:
                if j + 1 >= len(tokens) or tokens[j + 1] != ")":
                    raise ValidationError(f"an exponent in parentheses in {unit!r} must be closed")
                j += 1
            i, previous_was_exponent = j + 1, True
            continue
        previous_was_exponent = False
        if token == "(":
            depth += 1
            if depth > MAX_NESTING:
                raise ValidationError(f"unit text is nested deeper than {MAX_NESTING} parentheses")
        elif token == ")":
            depth -= 1
            if depth < 0:
                raise ValidationError(f"unbalanced parentheses in unit text {unit!r}")
        elif token[0].isdigit() and token != "1":
            raise ValidationError(f"a number inside unit text {unit!r} may only be the 1 of '1/s'")
        elif token in "+-":
            raise ValidationError(f"a sign inside unit text {unit!r} belongs to an exponent only")
        i += 1
    if depth != 0:
        raise ValidationError(f"unbalanced parentheses in unit text {unit!r}")


#: Entries pint may keep in each of its registry caches before they are reset to the start-up state;
#: without a bound, every distinct unit text a client sends would stay in memory for the process's life.
PINT_CACHE_LIMIT = 4096
_PINT_BASELINE = {name: dict(value) for name, value in vars(UREG._cache).items() if isinstance(value, dict)}


def _bound_pint_caches() -> None:
    cache = UREG._cache
    for name, baseline in _PINT_BASELINE.items():
        if len(getattr(cache, name)) > PINT_CACHE_LIMIT:
            setattr(cache, name, dict(baseline))


#: Refusals of :func:`_conversion` by (kind, unit) -> message, so a unit tried as another kind first (a volume
#: flow where a flow may be a mass or a volume flow) costs pint once; cleared when it reaches the limit.
_REFUSED: dict[tuple[str, str], str] = {}
REFUSED_LIMIT = 1024


@lru_cache(maxsize=1024)
def _conversion(kind_name: str, unit: str) -> tuple[float, float]:
    """(factor, offset) taking a number in ``unit`` to the kind's SI unit; pint decides, once per unit.

    Every unit pint knows is affine (scale and offset), so two conversions fix it. Raises
    ValidationError for an unknown unit or a wrong dimension (the refusal is remembered too).
    """
    refused = _REFUSED.get((kind_name, unit))
    if refused is not None:
        raise ValidationError(refused)
    try:
        return _convert(kind_name, unit)
    except ValidationError as error:
        if len(_REFUSED) >= REFUSED_LIMIT:
            _REFUSED.clear()
        _REFUSED[(kind_name, unit)] = error.messages[0]
        raise


def _convert(kind_name: str, unit: str) -> tuple[float, float]:
    kind = KINDS[kind_name]
    _bound_pint_caches()
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
            check_unit_text(unit.lower())  # the bounded grammar first: pint may spin on text outside it
            UREG.parse_units(unit.lower())
        except Exception:  # pint's parser raises assorted errors on garbage text
            return None
        return f"units are case-sensitive: did you mean '{number} {unit.lower()}'?"
    return None


_DECIMAL_COMMA = re.compile(r"^ *[-+]?[0-9]+,[0-9]")


def decimal_comma_hint(raw: str) -> str | None:
    """A message for a number written with a decimal comma ("1,8 m"), or None.

    >>> decimal_comma_hint("1,8 m")
    "'1,8 m' has a decimal comma: write '1.8 m' (a comma is read neither as a decimal mark nor as a thousands separator)"
    """
    if not _DECIMAL_COMMA.match(raw):
        return None
    return (f"{raw.strip()!r} has a decimal comma: write {raw.strip().replace(',', '.', 1)!r} (a comma is read neither "
            "as a decimal mark nor as a thousands separator)")


def hint_for(kind_name: str, raw) -> str | None:
    """The habit hint for quantity text ``raw`` read as ``kind_name``, or None."""
    if isinstance(raw, str) and decimal_comma_hint(raw):
        return decimal_comma_hint(raw)
    match = _NUMBER_THEN_UNIT.match(raw) if isinstance(raw, str) and len(raw) <= MAX_TEXT else None
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
        bounds = BOUNDS[kind]
        if minimum is not None and minimum == 0 and exclusive_minimum and bounds.smallest > 0:
            minimum, exclusive_minimum = bounds.smallest, False  # positive: from the kind's smallest value
        elif minimum is None and kind == "temperature":
            minimum, exclusive_minimum = -273.15, True  # absolute zero
        elif minimum is None:
            minimum = -bounds.largest
        maximum = bounds.largest if maximum is None else min(maximum, bounds.largest)
        self.minimum, self.maximum, self.exclusive_minimum = minimum, maximum, exclusive_minimum
        metadata = dict(kwargs.pop("metadata", {}))
        # a description given either way (the keyword, or marshmallow's metadata) is kept
        metadata.update(unit=KINDS[kind].api_unit, kind=kind, description=description or metadata.get("description", ""),
                        bounds_reason=bounds.reason)
        super().__init__(metadata=metadata, **kwargs)

    def _deserialize(self, value, attr, data, **kwargs) -> float:
        si = parse_quantity(self.kind, value)
        api = from_si(self.kind, si)
        unit = KINDS[self.kind].api_unit
        reason = BOUNDS[self.kind].reason
        too_low = api <= self.minimum if self.exclusive_minimum else api < self.minimum
        if too_low:
            relation = "greater than" if self.exclusive_minimum else "at least"
            raise ValidationError(f"must be {relation} {self.minimum:g} {unit}".rstrip() + f" ({reason})")
        if api > self.maximum:
            raise ValidationError(f"must be at most {self.maximum:g} {unit}".rstrip() + f" ({reason})")
        return si

    def _serialize(self, value, attr, obj, **kwargs):
        if value is None:
            return None
        result = from_si(self.kind, float(value))
        return result if math.isfinite(result) else None


#: 0 K in the API's temperature unit (degC): the floor of every temperature field.
ABSOLUTE_ZERO_C = from_si("temperature", 0.0)


def absolute_temperature(**kwargs) -> Quantity:
    """A temperature field that refuses anything at or below absolute zero."""
    return Quantity("temperature", minimum=ABSOLUTE_ZERO_C, exclusive_minimum=True, **kwargs)


def positive(kind: str, **kwargs) -> Quantity:
    """A quantity field that must be > 0."""
    return Quantity(kind, minimum=0, exclusive_minimum=True, **kwargs)


def non_negative(kind: str, **kwargs) -> Quantity:
    """A quantity field that must be >= 0."""
    return Quantity(kind, minimum=0, **kwargs)
