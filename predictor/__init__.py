"""Loadline's core: viscosity of suspensions and emulsions from what is known before the trial.

The names below are the stable public API; everything else is reached through
its module (``predictor.shear``, ``predictor.design``, ...). Both are loaded on first use
(module `__getattr__`, PEP 562), so ``import predictor`` costs almost nothing and a command
pays only for what it uses. The registry loads every model module the first time it is
read (`predictor.registry.models`), so every relation is registered before it is listed.
"""

from .errors import (
    FitError,
    InputRangeError,
    LoadlineError,
    ScenarioError,
    UnitError,
    UnknownModelError,
    ValidityWarning,
)

__version__ = "0.1.0"

#: Public name -> the module that defines it (imported when the name is first used).
_HOME = {
    "Param": "registry", "ModelSpec": "registry", "get_model": "registry", "models": "registry",
    "relative_viscosity": "viscosity",
    "max_packing": "packing", "packing_estimates": "packing",
    "SizeDistribution": "sizes",
    "water_viscosity": "liquids", "glycerol_water_viscosity": "liquids",
    "volume_fractions": "composition", "mass_fractions": "composition",
    "Formulation": "formulation", "Ingredient": "formulation", "Liquid": "formulation",
    "mixture": "formulation", "predict": "formulation", "flow_curve_summary": "formulation",
    "process_viscosities": "formulation", "loading_sweep": "formulation",
    "max_loading": "formulation",
    "fit": "fitting", "fit_flow_curve": "fitting", "compare_fits": "fitting",
    "FitResult": "fitting",
    "read_scenario": "scenario", "write_scenario": "scenario",
}

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


def __getattr__(name: str):
    import importlib

    if name in _HOME:
        value = getattr(importlib.import_module(f"{__name__}.{_HOME[name]}"), name)
    elif not name.startswith("__"):
        try:   # a submodule: predictor.shear, predictor.design, ...
            value = importlib.import_module(f"{__name__}.{name}")
        except ModuleNotFoundError as err:
            if err.name != f"{__name__}.{name}":
                raise
            raise AttributeError(f"module {__name__!r} has no attribute {name!r}") from None
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(__all__))
