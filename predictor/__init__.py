"""Loadline's core: viscosity of suspensions and emulsions from what is known before the trial.

Importing the package imports every model module, so every relation is registered.
The names below are the stable public API (design.md); everything else is reached through
its module (``predictor.shear``, ``predictor.design``, ...).
"""

# Import every model module so that every relation is registered.
from . import (  # noqa: F401
    emulsion,
    interactions,
    liquids,
    packing,
    shear,
    sizes,
    stability,
    suspension,
)
from .composition import mass_fractions, volume_fractions
from .errors import (
    FitError,
    InputRangeError,
    LoadlineError,
    ScenarioError,
    UnitError,
    UnknownModelError,
    ValidityWarning,
)
from .fitting import FitResult, compare_fits, fit, fit_flow_curve
from .formulation import (
    Formulation,
    Ingredient,
    Liquid,
    flow_curve_summary,
    loading_sweep,
    max_loading,
    mixture,
    predict,
    process_viscosities,
)
from .liquids import glycerol_water_viscosity, water_viscosity
from .packing import max_packing, packing_estimates
from .registry import ModelSpec, Param, get_model, models
from .scenario import read_scenario, write_scenario
from .sizes import SizeDistribution
from .viscosity import relative_viscosity

__version__ = "0.1.0"

__all__ = [
    "FitError", "InputRangeError", "LoadlineError", "ScenarioError", "UnitError",
    "UnknownModelError", "ValidityWarning",
    "Param", "ModelSpec", "get_model", "models",
    "relative_viscosity", "max_packing", "packing_estimates", "SizeDistribution",
    "water_viscosity", "glycerol_water_viscosity", "volume_fractions", "mass_fractions",
    "Formulation", "Ingredient", "Liquid", "mixture", "predict", "flow_curve_summary",
    "process_viscosities", "loading_sweep", "max_loading",
    "fit", "fit_flow_curve", "compare_fits", "FitResult",
    "read_scenario", "write_scenario",
]
