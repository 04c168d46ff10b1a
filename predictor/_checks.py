"""Input checks shared by the model modules (numpy only).

Each helper converts to a float array, checks it and raises `InputRangeError` naming the
field, the value and the allowed range.
"""

from __future__ import annotations

import math

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
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        arr = None
    if arr is not None and arr.size:
        # Fast path (the solvers check their inputs thousands of times per answer): the
        # extremes inside the range and finite means every element is; NaN fails both.
        lo, hi = (float(arr), float(arr)) if arr.ndim == 0 else (float(arr.min()),
                                                                 float(arr.max()))
        if (math.isfinite(lo) and math.isfinite(hi)
                and (lo > low if low_open else lo >= low)
                and (hi < high if high_open else hi <= high)):
            return arr
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


def guarded(func):
    """Turn numpy floating-point faults and shape mismatches into `InputRangeError`.

    Applied to every public function of the model modules (a meta-test checks it), so that
    absurd magnitudes (overflow), invalid operations (NaN) and arrays that do not broadcast
    give one clear message naming the inputs, never a bare numpy warning or a silent NaN.
    A relation that divides by zero on purpose (a documented divergence) wraps that step in
    its own ``np.errstate``, which takes precedence.
    """
    import functools
    import inspect

    signature = inspect.signature(func)

    def describe(args, kwargs) -> str:
        try:
            bound = signature.bind(*args, **kwargs)
        except TypeError:
            return "the inputs"
        parts = []
        for name, value in bound.arguments.items():
            arr = np.asarray(value) if not isinstance(value, str | dict) else None
            if arr is not None and arr.dtype.kind in "fiu":
                text = f"{float(arr):.3g}" if arr.ndim == 0 else f"array{arr.shape}"
                parts.append(f"{name}={text}")
        return ", ".join(parts) or "the inputs"

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        try:
            with np.errstate(over="raise", invalid="raise", divide="raise"):
                return func(*args, **kwargs)
        except FloatingPointError as err:
            raise InputRangeError(
                describe(args, kwargs), "(this combination)",
                f"inputs of realistic magnitude; {func.__name__} hits a floating-point "
                f"{str(err).replace('encountered in ', 'in ')}") from None
        except (ValueError, IndexError) as err:
            if isinstance(err, InputRangeError) or not _is_shape_error(err):
                raise
            raise InputRangeError(describe(args, kwargs), "(these shapes)",
                                  f"array arguments whose shapes broadcast together "
                                  f"in {func.__name__}") from None

    wrapper.__loadline_guarded__ = True
    return wrapper


def _is_shape_error(err: Exception) -> bool:
    from .errors import LoadlineError

    text = str(err)
    return not isinstance(err, LoadlineError) and any(
        key in text for key in ("broadcast", "shape", "dimension", "axis", "size 0",
                                "zero-size", "out of bounds"))
