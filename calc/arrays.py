"""Elementary operations that take either a float or a numpy array and answer in kind.

The correlations are written once and serve both the scalar network (one state, readable, with
warnings) and the vectorised network (many states in one pass, ``calc.network.vectorised``). Plain
arithmetic and ``**`` already work on both; the few operations below do not (``max``, ``if``,
``math.exp``), so the correlations call these instead. A float in gives a float out (no numpy scalar
leaks into results or doctests); an array in gives an array out, element by element.
"""
from __future__ import annotations

import math

import numpy as np


def is_array(*values) -> bool:
    """True when any argument is a numpy array (the vectorised path)."""
    return any(isinstance(v, np.ndarray) for v in values)


def where(condition, if_true, if_false):
    """``if_true`` where ``condition`` holds, else ``if_false`` (both are computed for arrays).

    >>> where(1.0 < 2.0, 3.0, 4.0), where(np.array([True, False]), 3.0, 4.0).tolist()
    (3.0, [3.0, 4.0])
    """
    if is_array(condition, if_true, if_false):
        return np.where(condition, if_true, if_false)
    return if_true if condition else if_false


def maximum(a, b):
    """Element-wise larger of ``a`` and ``b``."""
    return np.maximum(a, b) if is_array(a, b) else max(a, b)


def minimum(a, b):
    """Element-wise smaller of ``a`` and ``b``."""
    return np.minimum(a, b) if is_array(a, b) else min(a, b)


def clip(value, low, high):
    """``value`` limited to [low, high] (``min(max(value, low), high)``)."""
    return minimum(maximum(value, low), high)


def exp(x):
    return np.exp(x) if is_array(x) else math.exp(x)


def expm1(x):
    return np.expm1(x) if is_array(x) else math.expm1(x)


def log(x):
    return np.log(x) if is_array(x) else math.log(x)


def log1p(x):
    return np.log1p(x) if is_array(x) else math.log1p(x)


def sqrt(x):
    return np.sqrt(x) if is_array(x) else math.sqrt(x)


def hypot(a, b):
    return np.hypot(a, b) if is_array(a, b) else math.hypot(a, b)
