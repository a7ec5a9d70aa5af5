"""Warnings, validity ranges and input errors shared by every calculation module.

A correlation used outside the range its authors tested is still evaluated (engineers need a number),
but the result carries a warning naming the correlation, the quantity, its value and the published
range. Physically impossible input raises :class:`InputError`, naming the request field at fault.
"""
from __future__ import annotations

import math
import numbers
from dataclasses import dataclass
from types import TracebackType
from typing import Any, Callable, Iterable, Literal, TypeVar

T = TypeVar("T")
R = TypeVar("R")


@dataclass(frozen=True)
class CalcWarning:
    """A note that travels with a result and never fails the request."""

    code: str
    message: str


class InputError(ValueError):
    """Input that no calculation can honour (negative size, level above the brim, frozen coolant).

    ``field`` is the dotted path of the request field at fault, as the API names it
    (``"vessel.jacket.top"``); the API turns this into a 422 problem.
    """

    def __init__(self, field: str, message: str):
        super().__init__(f"{field}: {message}")
        self.field = field
        self.message = message


class TooLarge(InputError):
    """More items than the configured limit allows (targets of a scale-up, ...); the API answers 413."""


class CalculationError(RuntimeError):
    """A numerical method failed for input that was itself valid (no root, no convergence)."""


def _format(value: float) -> str:
    return f"{value:.4g}"


def range_warning(correlation: str, quantity: str, value: float,
                  low: float | None = None, high: float | None = None) -> CalcWarning | None:
    """Return a warning when ``value`` lies outside [low, high] (either bound may be open), else None.

    >>> range_warning("Lehrer (1970)", "Re", 50.0, 1e3, 1e5).code
    'outside_validity_range'
    >>> range_warning("Lehrer (1970)", "Re", 5e3, 1e3, 1e5) is None
    True
    >>> range_warning("Schmidt (1967)", "Re", 3.731e5, None, 1.5e5).message
    'Schmidt (1967): Re = 3.731e+05 is above the published upper limit 1.5e+05; the result is an extrapolation'
    """
    if not math.isfinite(value):
        return CalcWarning("non_finite_value", f"{correlation}: {quantity} is not a finite number")
    below = low is not None and value < low
    above = high is not None and value > high
    if not (below or above):
        return None
    if low is not None and high is not None:
        published = f"outside the published range [{_format(low)}, {_format(high)}]"
    elif high is not None:  # open below: only above can be out
        published = f"above the published upper limit {_format(high)}"
    else:
        assert low is not None  # open above: only below can be out
        published = f"below the published lower limit {_format(low)}"
    return CalcWarning(
        "outside_validity_range",
        f"{correlation}: {quantity} = {_format(value)} is {published}; the result is an extrapolation",
    )


class Warnings(list[CalcWarning]):
    """A list of :class:`CalcWarning` that drops duplicates and knows how to check a range."""

    def add(self, warning: CalcWarning | None) -> None:
        if warning is not None and warning not in self:
            self.append(warning)

    def check(self, correlation: str, quantity: str, value: float,
              low: float | None = None, high: float | None = None) -> None:
        self.add(range_warning(correlation, quantity, value, low, high))

    def extend_unique(self, warnings: Iterable[CalcWarning]) -> None:
        for w in warnings:
            self.add(w)


# ---------------------------------------------------------------- input guards
# The one set of guards every calc module uses on the numbers it is given; each names the API field.

def require_finite(field: str, value: float | None) -> float:
    """Raise :class:`InputError` unless ``value`` is a finite real number (a bool or None is not one).

    >>> require_finite("ua", 3)
    3.0
    """
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value):
        raise InputError(field, f"must be a finite number, got {value!r}")
    return float(value)


def require_positive(field: str, value: float | None) -> float:
    """Raise :class:`InputError` unless ``value`` is a finite number > 0."""
    checked = require_finite(field, value)
    if not checked > 0:
        raise InputError(field, f"must be a positive number, got {value!r}")
    return checked


def require_non_negative(field: str, value: float | None) -> float:
    """Raise :class:`InputError` unless ``value`` is a finite number >= 0."""
    checked = require_finite(field, value)
    if not checked >= 0:
        raise InputError(field, f"must not be negative, got {value!r}")
    return checked


def require_temperature(field: str, value: float | None) -> float:
    """Raise :class:`InputError` unless ``value`` is an absolute temperature above 0 K."""
    checked = require_finite(field, value)
    if not checked > 0:
        raise InputError(field, f"must be an absolute temperature above 0 K, got {value!r}")
    return checked


@dataclass(frozen=True)
class Correlation:
    """A registry entry: the function, its published source and its validity range per quantity.

    ``validity`` maps the name of an argument (as the function spells it, e.g. ``"Re"``) to
    ``(low, high)``; either bound may be None.
    """

    name: str  # the authors and year, as cited: "Lehrer (1970)"
    function: Callable[..., Any]
    source: str
    validity: dict[str, tuple[float | None, float | None]] = None  # type: ignore[assignment]

    def check(self, warnings: Warnings, **values: float) -> None:
        """Add a warning to ``warnings`` for every given quantity outside this correlation's range."""
        for quantity, value in values.items():
            low, high = (self.validity or {}).get(quantity, (None, None))
            warnings.check(self.name, quantity, value, low, high)


#: How the sign convention is explained wherever a reaction enthalpy is read.
SIGN_CONVENTION = ("coolmargin's convention is the thermodynamic one: a reaction enthalpy is negative when the "
                   "reaction releases heat (exothermic) and the heat released is -dH")


def require_sign(field: str, enthalpy: float, endothermic: bool, flag_field: str) -> float:
    """Check a reaction enthalpy [J/mol] against what the request says the step does.

    Engineers quote heats of reaction with either sign, and a positive enthalpy read as "absorbs heat"
    turns a runaway-prone step into one that needs no cooling. So a positive enthalpy is refused unless
    the request says explicitly that the step absorbs heat (``flag_field`` true), and an explicit
    endothermic step must then have a positive enthalpy. Raises :class:`InputError` naming ``field``.

    >>> require_sign("heat_release.reaction_enthalpy", -120e3, False, "heat_release.endothermic")
    -120000.0
    >>> require_sign("heat_release.reaction_enthalpy", 120e3, False, "heat_release.endothermic")
    Traceback (most recent call last):
    ...
    calc.validity.InputError: heat_release.reaction_enthalpy: is positive (120000 J/mol), ...
    """
    if isinstance(enthalpy, bool) or not isinstance(enthalpy, (int, float)) or not math.isfinite(enthalpy):
        raise InputError(field, f"must be a finite number in J/mol, got {enthalpy!r}")
    if enthalpy > 0.0 and not endothermic:
        raise InputError(field, f"is positive ({enthalpy:.6g} J/mol), which would mean the step absorbs heat; "
                                f"{SIGN_CONVENTION}. Give an exothermic enthalpy as a negative number, or set "
                                f"{flag_field} to true if this step really absorbs heat")
    if endothermic and enthalpy <= 0.0:
        raise InputError(flag_field, f"is true, but {field} is {enthalpy:.6g} J/mol (not positive): "
                                     f"{SIGN_CONVENTION}")
    return float(enthalpy)


def _extreme_input(inputs: dict[str, float]) -> tuple[str, float] | None:
    """The input farthest from 1 in orders of magnitude: the likeliest cause of an overflow."""
    scored = [(abs(math.log10(abs(v))), name, v) for name, v in inputs.items()
              if isinstance(v, float) and math.isfinite(v) and v != 0.0]
    if not scored:
        return None
    _, name, value = max(scored)
    return name, value


def finite_or_input_error(compute: Callable[[T], R], argument: T, inputs: dict[str, float]) -> R:
    """Run ``compute(argument)``; a numerical breakdown becomes an :class:`InputError` naming an input.

    Every field is bounded at the API, yet products of bounded inputs (an exponential of an activation
    energy over a low temperature, a huge flow through a tiny gap) can still overflow, divide by zero
    or reach a library that refuses non-finite numbers. Those are faults of the input's combination,
    not of the service: the error names the input farthest from ordinary magnitudes (``inputs`` maps
    request field paths to their numbers) and says what broke. InputError and CalculationError pass
    through unchanged.
    """
    try:
        return compute(argument)
    except (InputError, CalculationError):
        raise
    except (ArithmeticError, ValueError) as exc:  # overflow, 0/0, math domain, "array must not contain infs"
        culprit = _extreme_input(inputs)
        field, shown = ("(body)", "") if culprit is None else (culprit[0], f" (the most extreme input is "
                                                                           f"{culprit[0]} = {culprit[1]:.4g})")
        raise InputError(field, f"the calculation broke down numerically with these inputs{shown}: "
                                f"{type(exc).__name__}: {exc}; check the values and units") from exc


class fields_renamed:
    """Context manager: an :class:`InputError` raised inside names the request's own path.

    The same calculation serves requests of different shapes (a vessel is ``vessel`` in a cooling check,
    ``reference`` or ``targets[2].vessel`` in a scale-up, ``vessel.vessel`` in a simulation), so a caller
    that knows the shape renames the leading part of the field: ``{"vessel": "reference"}`` turns
    ``vessel.jacket.gap`` into ``reference.jacket.gap``. The longest matching prefix wins.

    >>> try:
    ...     with fields_renamed({"vessel": "targets[1].vessel"}):
    ...         raise InputError("vessel.jacket.gap", "must be positive")
    ... except InputError as error:
    ...     print(error.field)
    targets[1].vessel.jacket.gap
    """

    def __init__(self, mapping: dict[str, str]):
        self.mapping = sorted(mapping.items(), key=lambda item: -len(item[0]))

    def __enter__(self) -> fields_renamed:
        return self

    def __exit__(self, kind: type[BaseException] | None, error: BaseException | None,
                 traceback: TracebackType | None) -> Literal[False]:
        if not isinstance(error, InputError):
            return False
        for old, new in self.mapping:
            if error.field == old or error.field.startswith((old + ".", old + "[")):
                raise InputError(new + error.field[len(old):], error.message) from None
        return False
