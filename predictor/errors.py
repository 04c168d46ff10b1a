"""Errors and warnings raised by Loadline.

Every message names the field, the value received and the allowed range, so the app and
the CLI can show it as it is.
"""

from __future__ import annotations


class LoadlineError(Exception):
    """Base class of every error Loadline raises on purpose."""


class InputRangeError(LoadlineError, ValueError):
    """An input lies outside the range a relation or a file format allows."""

    def __init__(self, field: str, value, allowed: str, hint: str = ""):
        self.field, self.value, self.allowed = field, value, allowed
        message = f"{field} = {_show(value)} is not allowed; expected {allowed}."
        super().__init__(f"{message} {hint}".strip())


class UnknownModelError(LoadlineError, ValueError):
    """A model or method name is not in the registry."""

    def __init__(self, field: str, value, valid: list[str]):
        self.field, self.value, self.valid = field, value, valid
        super().__init__(f"{field} = {value!r} is not known; choose one of: {', '.join(valid)}.")


class UnitError(LoadlineError, ValueError):
    """A quantity could not be read, or has the wrong dimension."""


class FitError(LoadlineError):
    """A calibration cannot be done with the data given; the message says why."""


class ScenarioError(LoadlineError):
    """A scenario or data file is malformed, unreadable or from a newer version."""


class ValidityWarning(UserWarning):
    """A relation is used outside the range it was derived or fitted for."""


def _show(value) -> str:
    try:
        import numpy as np

        arr = np.asarray(value, dtype=float)
        if arr.ndim == 0:
            return f"{float(arr):.6g}"
        bad = arr[~np.isfinite(arr)] if not np.all(np.isfinite(arr)) else arr
        return f"{float(bad.flat[0]):.6g} (one of {arr.size} values)"
    except (TypeError, ValueError):
        return repr(value)
