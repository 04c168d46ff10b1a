"""Input checks shared by the model modules (numpy only).

Each helper converts to a float array, checks it and raises `InputRangeError` naming the
field, the value and the allowed range.
"""

from __future__ import annotations

import numpy as np

from .errors import InputRangeError


def as_array(value, field: str) -> np.ndarray:
    """Float array of `value`; finite, or `InputRangeError`."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputRangeError(field, value, "a number or an array of numbers") from None
    if not np.all(np.isfinite(arr)):
        bad = arr[~np.isfinite(arr)].flat[0]
        raise InputRangeError(field, bad, "a finite number")
    return arr


def in_range(value, field: str, low: float, high: float, *, low_open=False, high_open=False):
    """Float array of `value` within [low, high] (ends open where asked)."""
    arr = as_array(value, field)
    too_low = arr <= low if low_open else arr < low
    too_high = arr >= high if high_open else arr > high
    bad = too_low | too_high
    if np.any(bad):
        lo = "(" if low_open else "["
        hi = ")" if high_open else "]"
        raise InputRangeError(field, arr[bad].flat[0], f"a value in {lo}{low:g}, {high:g}{hi}")
    return arr


def positive(value, field: str) -> np.ndarray:
    """Float array of `value`, every element > 0 and finite."""
    return in_range(value, field, 0.0, np.inf, low_open=True)


def fraction(value, field: str = "phi") -> np.ndarray:
    """Volume or mass fraction in [0, 1]."""
    return in_range(value, field, 0.0, 1.0)


def scalar_or_array(result, *inputs):
    """Return a Python float when every input was a scalar, else the array."""
    result = np.asarray(result, dtype=float)
    if result.ndim == 0 and all(np.ndim(x) == 0 for x in inputs):
        return float(result)
    return result
