"""Candidate tables from a scenario: full factorial or space-filling designs for the batch screen.

Orchestration (pandas allowed): it writes the scenario and a design over chosen factors as
rows of the candidate table that `predictor.batch` reads (its module docstring lists the
columns), so every row can go straight into the batch screen. No physics here.

Factors are named like the candidate table's own columns, without the unit, with SI bounds:
``ingredient k loading`` (k = 1 for the first ingredient; a fraction on that ingredient's own
basis), ``ingredient k d50`` [m] (the whole size distribution is scaled so that its D50 is
the value), ``temperature`` [K], ``liquid viscosity`` [Pa*s] (a Newtonian liquid) and
``glycerol`` (mass fraction of a glycerol-water liquid).

The batch screen reads Newtonian liquids (water, glycerol-water, a given viscosity) without
frictional thickening, calibrated parameters or a given intrinsic viscosity; a scenario
using any of these is refused with the field named, rather than written as a different
recipe.
"""

from __future__ import annotations

import itertools
import re

import numpy as np
import pandas as pd

from . import formulation as fm
from .errors import InputRangeError

DESIGNS = ("full-factorial", "latin-hypercube", "sobol", "halton")
MAX_ROWS = 100_000
_FACTOR = re.compile(r"^\s*(?:ingredient\s+(?P<k>\d+)\s+(?P<what>loading|d50)|"
                     r"(?P<liquid>temperature|liquid viscosity|glycerol))\s*$", re.IGNORECASE)
# SI ranges a factor may take (the screening limits of formulation.py; common practice).
_BOUNDS = {"loading": (0.0, 1.0), "d50": (1e-9, 1e-2), "temperature": (150.0, 700.0),
           "liquid viscosity": (1e-7, 1e7), "glycerol": (0.0, 1.0)}


def design_points(bounds, design: str = "full-factorial", n: int = 16, levels: int = 3,
                  seed: int = 0) -> np.ndarray:
    """Points of a design over a box: (rows, factors), each column within its bounds.

    Parameters
    ----------
    bounds : array_like, shape (k, 2)
        (low, high) of each factor.
    design : {"full-factorial", "latin-hypercube", "sobol", "halton"}
        Full factorial on `levels` evenly spaced levels per factor (levels ** k rows), or a
        space-filling design of `n` rows from `scipy.stats.qmc` (scrambled Sobol' needs n a
        power of 2).
    n : int
        Rows of a space-filling design.
    levels : int
        Levels per factor of the full factorial (2 or more).
    seed : int
        Seed of the space-filling designs (the same seed gives the same table).

    Examples
    --------
    >>> design_points([[0.1, 0.3], [20.0, 40.0]], levels=2).tolist()
    [[0.1, 20.0], [0.1, 40.0], [0.3, 20.0], [0.3, 40.0]]
    """
    box = np.asarray(bounds, dtype=float)
    if box.ndim != 2 or box.shape[1] != 2 or box.shape[0] == 0:
        raise InputRangeError("bounds", np.shape(box), "one (low, high) pair per factor")
    if not np.all(np.isfinite(box)) or np.any(box[:, 0] > box[:, 1]):
        raise InputRangeError("bounds", box.tolist(), "finite pairs with low <= high")
    k = box.shape[0]
    if design == "full-factorial":
        if isinstance(levels, bool) or not isinstance(levels, int) or levels < 2:
            raise InputRangeError("levels", levels, "an integer of 2 or more")
        if levels ** k > MAX_ROWS:
            raise InputRangeError("levels", levels, f"levels ** factors up to {MAX_ROWS} rows")
        axes = [np.linspace(lo, hi, levels) for lo, hi in box]
        return np.array(list(itertools.product(*axes)), dtype=float)
    if design not in DESIGNS:
        raise InputRangeError("design", design, ", ".join(DESIGNS))
    if isinstance(n, bool) or not isinstance(n, int) or not 1 <= n <= MAX_ROWS:
        raise InputRangeError("n", n, f"an integer from 1 to {MAX_ROWS}")
    from scipy.stats import qmc

    if design == "sobol":
        if n & (n - 1):
            raise InputRangeError("n", n, "a power of 2 for a Sobol' design (8, 16, 32, ...)")
        unit = qmc.Sobol(d=k, scramble=True, seed=seed).random(n)
    elif design == "halton":
        unit = qmc.Halton(d=k, scramble=True, seed=seed).random(n)
    else:
        unit = qmc.LatinHypercube(d=k, seed=seed).random(n)
    return qmc.scale(unit, box[:, 0], box[:, 1]) if np.all(box[:, 0] < box[:, 1]) else (
        box[:, 0] + unit * (box[:, 1] - box[:, 0]))


def _factor(name: str, formulation: fm.Formulation) -> tuple[str, int | None]:
    match = _FACTOR.match(str(name))
    if not match:
        raise InputRangeError("factor", name, "'ingredient k loading', 'ingredient k d50', "
                              "'temperature', 'liquid viscosity' or 'glycerol'")
    if match["liquid"]:
        what = match["liquid"].lower()
        liquid = formulation.liquid
        if what == "liquid viscosity" and liquid.preset:
            raise InputRangeError("factor", name, "a Newtonian liquid given by its viscosity "
                                  f"(this scenario's liquid is the {liquid.preset!r} preset)")
        if what == "glycerol" and liquid.preset != "glycerol-water":
            raise InputRangeError("factor", name, "a glycerol-water liquid")
        return what, None
    k = int(match["k"])
    if not 1 <= k <= len(formulation.ingredients):
        raise InputRangeError("factor", name,
                              f"an ingredient number from 1 to {len(formulation.ingredients)}")
    return match["what"].lower(), k - 1


def _check_batch_can_read(formulation: fm.Formulation) -> None:
    liquid = formulation.liquid
    if not liquid.preset and liquid.law != "newtonian":
        raise InputRangeError("liquid law", liquid.law, "water, glycerol-water or a Newtonian "
                              "liquid (the batch screen reads Newtonian liquids)")
    if liquid.activation_temperature_K is not None and not liquid.preset:
        raise InputRangeError("liquid activation temperature", liquid.activation_temperature_K,
                              "none (the candidate table has no Arrhenius column)")
    if formulation.thickening_onset_stress_Pa is not None:
        raise InputRangeError("thickening_onset_stress_Pa",
                              formulation.thickening_onset_stress_Pa,
                              "none (the batch screen has no frictional thickening)")
    if formulation.model_params:
        raise InputRangeError("model_params", ", ".join(formulation.model_params),
                              "none (the candidate table has no calibrated parameters)")
    for k, ing in enumerate(formulation.ingredients):
        if ing.intrinsic_viscosity is not None:
            raise InputRangeError(f"ingredients[{k}].intrinsic_viscosity",
                                  ing.intrinsic_viscosity,
                                  "none (the candidate table estimates it from the shape)")


def _size_table(dist) -> pd.DataFrame:
    return pd.DataFrame({"size [um]": [f"{1e6 * d:.15g}" for d in dist.diameters_m],
                         "amount [vol%]": [f"{100 * f:.15g}" for f in dist.fractions]})


def candidate_table(formulation: fm.Formulation, factors: dict, design: str = "full-factorial",
                    n: int = 16, levels: int = 3, seed: int = 0,
                    windows=None) -> tuple[pd.DataFrame, dict[str, pd.DataFrame]]:
    """Rows of a candidate table varying chosen factors of a scenario, for the batch screen.

    Parameters
    ----------
    formulation : Formulation
        The scenario every row starts from.
    factors : dict
        Factor name (see the module docstring) -> (low, high) in SI units.
    design, n, levels, seed
        As in `design_points`.
    windows : iterable, optional
        Process windows (as in `design.loading_map`) written as the table's window columns.

    Returns
    -------
    table : pandas.DataFrame
        One candidate per row, in the batch screen's column format.
    size_tables : dict
        File name -> size table (``size [um]``, ``amount [vol%]``) for the ingredients with a
        size distribution; write them next to the table (the table names them).

    Examples
    --------
    Illustrative call: one powder in water, its loading at three levels.

    >>> from predictor.formulation import Formulation, Ingredient
    >>> form = Formulation(ingredients=(Ingredient("filler", 2700.0, 0.3, diameter_m=5e-6),))
    >>> table, files = candidate_table(form, {"ingredient 1 loading": (0.2, 0.4)})
    >>> table["ingredient 1 loading [wt fraction]"].round(3).tolist()
    [0.2, 0.3, 0.4]
    """
    from .design import _windows

    _check_batch_can_read(formulation)
    if not isinstance(factors, dict) or not factors:
        raise InputRangeError("factors", factors, "a dict of factor name -> (low, high)")
    parsed = [_factor(name, formulation) for name in factors]
    if len(set(parsed)) != len(parsed):
        raise InputRangeError("factors", ", ".join(factors), "each factor once")
    bounds = []
    for name, (what, _k) in zip(factors, parsed, strict=True):
        try:
            low, high = (float(v) for v in factors[name])
        except (TypeError, ValueError):
            raise InputRangeError(name, factors[name], "a pair (low, high)") from None
        lo, hi = _BOUNDS[what]
        if not (np.isfinite(low) and np.isfinite(high) and lo <= low <= high <= hi):
            raise InputRangeError(name, (low, high), f"low <= high within {lo:g} to {hi:g}")
        bounds.append((low, high))
    points = design_points(bounds, design, n, levels, seed)
    rows = len(points)
    liquid = formulation.liquid
    columns: dict[str, object] = {
        "candidate": [f"{formulation.name or 'candidate'} #{i + 1}" for i in range(rows)],
        "liquid": liquid.preset or "newtonian",
        "temperature [K]": liquid.temperature_K,
        "liquid density [kg/m3]": liquid.density_kg_per_m3,
        "relation": formulation.model, "droplet relation": formulation.droplet_model}
    if not liquid.preset:
        columns["liquid viscosity [Pa*s]"] = float(liquid.params.get("viscosity_Pa_s", 1e-3))
    if liquid.preset == "glycerol-water":
        columns["glycerol [wt fraction]"] = liquid.glycerol_mass_fraction
    values = {parsed[j]: points[:, j] for j in range(len(parsed))}
    for what, column in (("temperature", "temperature [K]"),
                         ("liquid viscosity", "liquid viscosity [Pa*s]"),
                         ("glycerol", "glycerol [wt fraction]")):
        if (what, None) in values:
            columns[column] = values[(what, None)]
    files: dict[str, pd.DataFrame] = {}
    for k, ing in enumerate(formulation.ingredients):
        head = f"ingredient {k + 1}"
        sign = "wt fraction" if ing.basis == "mass" else "vol fraction"
        columns[head] = ing.name
        columns[f"{head} kind"] = ing.kind
        columns[f"{head} loading [{sign}]"] = values.get(("loading", k), ing.loading)
        columns[f"{head} density [kg/m3]"] = ing.density_kg_per_m3
        dist = ing.distribution()
        d50 = values.get(("d50", k))
        if ing.size is None:
            columns[f"{head} d50 [m]"] = ing.diameter_m if d50 is None else d50
        else:
            names = []
            scales = np.ones(rows) if d50 is None else d50 / dist.d50_m
            for scale in scales:
                name = f"sizes_{k + 1}_{scale:.12g}.csv".replace("+", "")
                if name not in files:
                    files[name] = _size_table(type(dist)(dist.diameters_m * scale,
                                                         dist.fractions))
                names.append(name)
            columns[f"{head} size table"] = names
        columns[f"{head} aspect ratio [-]"] = ing.aspect_ratio
        columns[f"{head} layer [m]"] = ing.layer_thickness_m
        if ing.phi_max is not None:
            columns[f"{head} phi_max [-]"] = ing.phi_max
        if ing.kind == fm.DROPLET and ing.droplet_viscosity_Pa_s is not None:
            columns[f"{head} droplet viscosity [Pa*s]"] = ing.droplet_viscosity_Pa_s
    for j, w in enumerate(_windows(windows) if windows is not None else [], start=1):
        columns[f"window {j}"] = w.name
        columns[f"window {j} shear rate [1/s]"] = w.shear_rate_1_per_s
        if w.max_viscosity_Pa_s is not None:
            columns[f"window {j} max viscosity [Pa*s]"] = w.max_viscosity_Pa_s
        if w.min_viscosity_Pa_s is not None:
            columns[f"window {j} min viscosity [Pa*s]"] = w.min_viscosity_Pa_s
    return pd.DataFrame(columns), files      # scalars repeat down the rows
