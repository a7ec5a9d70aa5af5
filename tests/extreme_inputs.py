"""Extreme-value requests built from the contract's examples: every numeric leaf set to each hostile value.

Shared by ``tests/test_extreme_inputs.py`` (a seeded, bounded sample inside ``make test``) and
``tests/benchmarks/fuzz_extremes.py`` (every case, with statuses and latencies by class).
The values: IEEE 754 binary64 edge cases (0, -0.0, the smallest subnormal 5e-324, 1e308 near the
largest finite double), a negative, a 400-digit integer, and unit text that is hostile (chained
exponents, non-ASCII digits, overflow, unbalanced parentheses, wrong dimension).
"""
from __future__ import annotations

import copy
import json
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

#: label -> value put at a numeric leaf
EXTREMES: dict[str, object] = {
    "zero": 0, "negative_zero": -0.0, "subnormal": 5e-324, "huge": 1e308, "negative": -1.0,
    "negative_huge": -1e308, "400_digit_integer": 10 ** 400, "fraction": 0.5,
    "chained_exponent": "1 K**9**9**9", "arabic_digits": "\u0661\u0662 m", "text_overflow": "1e999",
    "unbalanced_unit": "1 m^(2", "wrong_dimension": "3 kg*A", "long_text": "1" + " " * 70 + "m",
}


def examples() -> list[tuple[str, dict]]:
    """(path, body) of every calculation example in the contract's registry."""
    from schemas import registry

    return [(calc.path, json.loads((ROOT / "examples" / calc.example).read_text()))
            for calc in registry.CALCULATIONS if calc.example]


def numeric_leaves(node, path=()) -> list[tuple]:
    """Paths (tuples of keys and indices) of every number, or text that starts like a number."""
    out = []
    if isinstance(node, dict):
        for key, value in node.items():
            out.extend(numeric_leaves(value, path + (key,)))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            out.extend(numeric_leaves(value, path + (i,)))
    elif isinstance(node, (int, float)) and not isinstance(node, bool):
        out.append(path)
    elif isinstance(node, str) and node[:1] in "0123456789-+.":
        out.append(path)
    return out


def with_value(body: dict, path: tuple, value) -> dict:
    changed = copy.deepcopy(body)
    node = changed
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    return changed


def cases():
    """Every (route, dotted leaf, value label, body) for every example, leaf and extreme value."""
    for route, body in examples():
        for path in numeric_leaves(body):
            dotted = ".".join(str(p) for p in path)
            for label, value in EXTREMES.items():
                yield route, dotted, label, with_value(body, path, value)


def encode(body: dict) -> bytes:
    """JSON with a 400-digit integer kept as digits (json.dumps writes Python ints exactly)."""
    return json.dumps(body).encode()
