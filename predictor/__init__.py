"""Loadline's core: viscosity of suspensions and emulsions from what is known before the trial.

Importing the package imports every model module, so every relation is registered.
"""

# Import every model module so that every relation is registered.
from . import emulsion, liquids, packing, shear, sizes, stability, suspension  # noqa: F401
from .errors import (
    FitError,
    InputRangeError,
    LoadlineError,
    ScenarioError,
    UnitError,
    UnknownModelError,
    ValidityWarning,
)
from .registry import ModelSpec, Param, get_model, models
from .viscosity import relative_viscosity

__all__ = [
    "FitError", "InputRangeError", "LoadlineError", "ScenarioError", "UnitError",
    "UnknownModelError", "ValidityWarning", "Param", "ModelSpec", "get_model", "models",
    "relative_viscosity",
]
