"""The one formulation engine: N formulations x M shear rates in one vectorised solve.

Every question asked of many formulations (a batch screen, a loading sweep, the highest
loading under a limit, a design map, uncertainty bands, blends) and of one (`predict`)
runs through this module: a `FormulationSet` holds the resolved inputs of N formulations
as arrays (struct of arrays, one element per row), and `evaluate` solves the flow curve of
every row at M shear rates at once with `shear.flow_curves`, the same model and solve as
`shear.flow_curve`. `predict` is N = 1.

How formulations become rows is `formulation.mixtures` (volume fractions, packing limit,
intrinsic viscosity, vectorised over rows) and `formulation.set_columns` (the choices
documented in `formulation.predict`); `formulation.mixture` and `row_inputs` are their
one-row case, so nothing is computed twice in two ways.

>>> from predictor import engine
>>> from predictor.formulation import Formulation, Ingredient
>>> f = Formulation(ingredients=(Ingredient("silica", 2200.0, 0.3, diameter_m=5e-6),))
>>> fs = engine.vary(f, loadings={0: [0.2, 0.4]}, basis="mass")
>>> res = engine.evaluate(fs, shear_rate_1_per_s=[100.0, 1000.0])
>>> res.viscosity_Pa_s.shape, res.regime.shape, res.phi.shape
((2, 2), (2, 2), (2,))
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

import numpy as np

from . import formulation as fm
from .errors import InputRangeError
from .flowset import (  # noqa: F401  (the engine's public names, one place to import them)
    LOADING_TOLERANCE,
    FormulationSet,
    Result,
    evaluate,
    from_rows,
    max_loading,
    medium_factor,
    row_notes,
)

#: How one formulation becomes a row of a `FormulationSet` (see `formulation.predict`).
row_inputs = fm.row_inputs


def stack(formulations: Iterable[fm.Formulation]) -> FormulationSet:
    """A `FormulationSet` of the given formulations, one row each, in order.

    Raises
    ------
    InputRangeError
        An empty list, or a formulation whose inputs are out of range (names the field).
    """
    rows = [fm.row_inputs(f) for f in formulations]
    if not rows:
        raise InputRangeError("formulations", "an empty list", "at least one formulation")
    return from_rows(rows)


def vary(formulation: fm.Formulation, loadings: Mapping[int, object],
         basis: str = "mass") -> FormulationSet:
    """N variants of one formulation: ingredient k's loading set per row, the rest held.

    Parameters
    ----------
    formulation : Formulation
        The scenario; every field not varied is taken from it.
    loadings : dict of int to array_like
        Ingredient index (0-based) -> loadings (N,) as fractions (0-1) on `basis`. All
        arrays broadcast to one length N.
    basis : {"mass", "volume"}
        Basis of the given loadings.

    Returns
    -------
    FormulationSet
        N rows; packing limits, volume fractions and radii resolved per row.

    Raises
    ------
    InputRangeError
        An unknown ingredient index, a bad basis, or loadings outside 0-1 (names the row).
    """
    if basis not in ("mass", "volume"):
        raise InputRangeError("basis", basis, "'mass' or 'volume'")
    ings = formulation.ingredients
    arrays = {}
    for k, values in loadings.items():
        if isinstance(k, bool) or not isinstance(k, int | np.integer) or not 0 <= k < len(ings):
            raise InputRangeError("loadings", k, f"an ingredient index from 0 to {len(ings) - 1}")
        arrays[int(k)] = np.atleast_1d(np.asarray(values, dtype=float))
    if not arrays:
        return stack([formulation])
    try:
        columns = np.broadcast_arrays(*arrays.values())
    except ValueError:
        raise InputRangeError("loadings", {k: v.shape for k, v in arrays.items()},
                              "arrays of one length") from None
    n = columns[0].size
    table = np.tile(np.array([i.loading for i in ings], dtype=float), (n, 1))
    is_mass = np.array([i.basis == "mass" for i in ings])
    for k, col in zip(arrays, columns, strict=True):
        bad = ~(np.isfinite(col) & (col >= 0.0) & (col <= 1.0))
        if bad.any():
            i = int(np.flatnonzero(bad)[0])
            raise InputRangeError(f"row {i}: ingredients[{k}].loading", float(col[i]),
                                  "a number from 0 to 1")
        table[:, k] = col
        is_mass[k] = basis == "mass"
    try:
        mix = fm.mixtures(formulation, table, is_mass)
    except InputRangeError:
        for i in range(n):          # name the first row that fails
            try:
                fm.mixtures(formulation, table[i:i + 1], is_mass)
            except InputRangeError as err:
                raise InputRangeError(f"row {i}: {err.field}", err.value, err.allowed) from None
        raise
    return FormulationSet(**fm.set_columns(formulation, mix))
