"""Elementary operations that take either a float or a numpy array and answer in kind.

The correlations are written once and serve both the scalar network (one state, readable, with
warnings) and the vectorised network (many states in one pass, ``calc.network.vectorised``). Plain
arithmetic and ``**`` already work on both; the few operations below do not (``max``, ``if``,
``math.exp``), so the correlations call these instead. A float in gives a float out (no numpy scalar
leaks into results or doctests); an array in gives an array out, element by element.

They are annotated for one state (``float``), as the correlations are; ``calc.network.vectorised``
passes arrays through the same code.
"""
from __future__ import annotations

import math
from typing import cast

import numpy as np


def is_array(*values: object) -> bool:
    """True when any argument is a numpy array (the vectorised path)."""
    return any(isinstance(v, np.ndarray) for v in values)


def where(condition: bool, if_true: float, if_false: float) -> float:
    """``if_true`` where ``condition`` holds, else ``if_false`` (both are computed for arrays).

    >>> where(1.0 < 2.0, 3.0, 4.0), where(np.array([True, False]), 3.0, 4.0).tolist()
    (3.0, [3.0, 4.0])
    """
    if is_array(condition, if_true, if_false):
        return cast(float, np.where(condition, if_true, if_false))  # an array on the vectorised path
    return if_true if condition else if_false


def maximum(a: float, b: float) -> float:
    """Element-wise larger of ``a`` and ``b``."""
    return np.maximum(a, b) if is_array(a, b) else max(a, b)


def minimum(a: float, b: float) -> float:
    """Element-wise smaller of ``a`` and ``b``."""
    return np.minimum(a, b) if is_array(a, b) else min(a, b)


def clip(value: float, low: float, high: float) -> float:
    """``value`` limited to [low, high] (``min(max(value, low), high)``)."""
    return minimum(maximum(value, low), high)


def exp(x: float) -> float:
    return np.exp(x) if is_array(x) else math.exp(x)


def expm1(x: float) -> float:
    return np.expm1(x) if is_array(x) else math.expm1(x)


def log(x: float) -> float:
    return np.log(x) if is_array(x) else math.log(x)


def log1p(x: float) -> float:
    return np.log1p(x) if is_array(x) else math.log1p(x)


def sqrt(x: float) -> float:
    return np.sqrt(x) if is_array(x) else math.sqrt(x)


def hypot(a: float, b: float) -> float:
    return np.hypot(a, b) if is_array(a, b) else math.hypot(a, b)
