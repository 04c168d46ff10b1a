"""Candidate tables from a scenario: full factorial or space-filling designs for the batch screen.

Orchestration (pandas allowed): it writes the scenario and a design over chosen factors as
rows of the candidate table that `predictor.batch` reads (its module docstring lists the
columns), so every row can go straight into the batch screen. No physics here.

Factors are named like the candidate table's own columns, without the unit, with SI bounds:
``ingredient k loading`` (k = 1 for the first ingredient; a fraction on that ingredient's own
basis), ``ingredient k d50`` [m] (the whole size distribution is scaled so that its D50 is
the value), ``temperature`` [K], ``liquid viscosity`` [Pa*s] (a Newtonian liquid) and
``glycerol`` (mass fraction of a glycerol-water liquid).

The scenario itself is written beside the table (a ``*.loadline.json`` named in the table's
``base scenario`` column; see `predictor.batch`): every row starts from it, so any liquid law,
Arrhenius shift, thickening, intrinsic viscosity or size distribution the scenario holds
reaches the screen, and the table holds only the columns that vary. What the batch cannot
read from a base scenario (calibrated relation parameters, particle interactions) is
refused with the field named, rather than written as a different recipe.
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
#: Default file name of the scenario written beside a candidate table.
BASE_NAME = "candidates_base.loadline.json"
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
    """Refuse what the batch does not read from a base scenario (names the field)."""
    if formulation.model_params or formulation.droplet_model_params:
        names = {**formulation.model_params, **formulation.droplet_model_params}
        raise InputRangeError("model_params", ", ".join(sorted(names)),
                              "none (the batch screen has no calibrated parameters)")
    for k, ing in enumerate(formulation.ingredients):
        for name in ("surface_potential_V", "hamaker_J"):
            if getattr(ing, name) is not None:
                raise InputRangeError(f"ingredients[{k}].{name}", getattr(ing, name),
                                      "none (the batch screen has no particle interactions)")
        if ing.flocculated:
            raise InputRangeError(f"ingredients[{k}].flocculated", True,
                                  "false (the batch screen has no particle interactions)")


def _size_table(dist) -> pd.DataFrame:
    return pd.DataFrame({"size [um]": [f"{1e6 * d:.15g}" for d in dist.diameters_m],
                         "amount [vol%]": [f"{100 * f:.15g}" for f in dist.fractions]})


def candidate_table(formulation: fm.Formulation, factors: dict, design: str = "full-factorial",
                    n: int = 16, levels: int = 3, seed: int = 0, windows=None,
                    base_name: str = BASE_NAME) -> tuple[pd.DataFrame, dict]:
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
    base_name : str
        File name of the scenario written beside the table (``*.loadline.json``).

    Returns
    -------
    table : pandas.DataFrame
        One candidate per row, in the batch screen's column format: ``base scenario`` and
        the varied columns.
    files : dict
        File name -> content to write next to the table (`file_bytes`): the base scenario
        (JSON text) and a size table (``size [um]``, ``amount [vol%]``) per scaled size
        distribution.

    Examples
    --------
    Illustrative call: one powder in water, its loading at three levels.

    >>> from predictor.formulation import Formulation, Ingredient
    >>> form = Formulation(ingredients=(Ingredient("filler", 2700.0, 0.3, diameter_m=5e-6),))
    >>> table, files = candidate_table(form, {"ingredient 1 loading": (0.2, 0.4)})
    >>> table["ingredient 1 loading [wt fraction]"].round(3).tolist(), sorted(files)
    ([0.2, 0.3, 0.4], ['candidates_base.loadline.json'])
    """
    from . import scenario
    from .design import _windows

    if not str(base_name).endswith(".loadline.json") or "/" in str(base_name) \
            or "\\" in str(base_name):
        raise InputRangeError("base_name", base_name, "a file name ending in .loadline.json")
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
    columns: dict[str, object] = {
        "candidate": [f"{formulation.name or 'candidate'} #{i + 1}" for i in range(rows)],
        "base scenario": base_name}
    files: dict[str, object] = {base_name: scenario.dumps(formulation)}
    for (what, k), values in zip(parsed, points.T, strict=True):
        if k is None:
            column = {"temperature": "temperature [K]",
                      "liquid viscosity": "liquid viscosity [Pa*s]",
                      "glycerol": "glycerol [wt fraction]"}[what]
            columns[column] = values
            continue
        ing, head = formulation.ingredients[k], f"ingredient {k + 1}"
        if what == "loading":
            sign = "wt fraction" if ing.basis == "mass" else "vol fraction"
            columns[f"{head} loading [{sign}]"] = values
        elif ing.size is None:
            columns[f"{head} d50 [m]"] = values
        else:
            dist, names = ing.size, []
            for scale in values / dist.d50_m:
                name = f"sizes_{k + 1}_{scale:.12g}.csv".replace("+", "")
                if name not in files:
                    files[name] = _size_table(type(dist)(dist.diameters_m * scale,
                                                         dist.fractions))
                names.append(name)
            columns[f"{head} size table"] = names
    for j, w in enumerate(_windows(windows) if windows is not None else [], start=1):
        columns[f"window {j}"] = w.name
        columns[f"window {j} shear rate [1/s]"] = w.shear_rate_1_per_s
        if w.max_viscosity_Pa_s is not None:
            columns[f"window {j} max viscosity [Pa*s]"] = w.max_viscosity_Pa_s
        if w.min_viscosity_Pa_s is not None:
            columns[f"window {j} min viscosity [Pa*s]"] = w.min_viscosity_Pa_s
    return pd.DataFrame(columns), files      # scalars repeat down the rows


def file_bytes(files: dict) -> dict[str, bytes]:
    """`candidate_table`'s files as bytes to write beside the table (size tables as CSV)."""
    return {name: (content.to_csv(index=False).encode() if isinstance(content, pd.DataFrame)
                   else str(content).encode("utf-8")) for name, content in files.items()}
