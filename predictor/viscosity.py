"""The dispatcher over every relative-viscosity relation in the registry."""

from __future__ import annotations

import warnings

from ._checks import guarded
from .errors import ValidityWarning
from .registry import get_model


@guarded
def relative_viscosity(phi, model: str = "krieger-dougherty", **params):
    """Relative viscosity of a suspension or emulsion from any registered relation.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    model : str
        Registry name of a relation of kind "suspension" or "emulsion"
        (see `predictor.models()`).
    **params
        The relation's parameters; missing ones take their defaults. Values outside the
        registry bounds raise `InputRangeError`.

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the mixture divided by that of the continuous phase. [-]

    Warns
    -----
    ValidityWarning
        When some phi lies outside the range the relation was derived for.

    Examples
    --------
    >>> relative_viscosity(0.3, model="krieger-dougherty", phi_max=0.64)
    2.75120
    """
    spec = get_model(model, kind=("suspension", "emulsion"))
    values = spec.check_params(params)
    result = spec.func(phi, **values)
    message = spec.validity_message(phi, values)
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=3)  # past the guard wrapper
    return result
