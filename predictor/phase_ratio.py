"""Phase-ratio explorer: emulsion viscosity and yield stress across the droplet phase fraction.

This orchestration module only sequences calls to `predictor.emulsion` and collects the
results in a pandas DataFrame; the numbers are checked once, at the function layer.

Two liquids are given: the "continuous" liquid and the "droplet" liquid, as the formulator
intends them. `phi` is always the volume fraction of the droplet liquid in the mixture.
Each phi is computed on two branches:

- ``"direct"``: droplet liquid dispersed in the continuous liquid, dispersed fraction phi,
  viscosity ratio droplet / continuous;
- ``"inverted"``: continuous liquid dispersed in the droplet liquid, dispersed fraction
  1 - phi, viscosity ratio swapped.

Comparing the branches shows which continuous phase gives the lower viscosity. Which one
forms in practice depends on the emulsifier (its HLB), on the process and on the order of
addition; it is not predicted here. Rows whose dispersed fraction lies in
`INVERSION_CAUTION_BAND` or above are flagged ``inversion_caution``: phase inversion is
commonly seen there (common practice, no source).

Regimes of the dispersed fraction x (boundaries are ours or common practice, see the
constants): ``"dilute"`` for x < `DILUTE_LIMIT`, ``"concentrated"`` for x < phi_max (a
relative-viscosity relation of the registry at zero capillary number, thinned by droplet
deformation at the chosen shear rate with `predictor.emulsion.deformation_thinning` unless
``deformation_thinning=False``; the capillary number uses the viscosity of that branch's
continuous liquid and half the Sauter diameter), ``"jammed"`` for x >= phi_max (a soft
solid: yield stress and a Herschel-Bulkley-like flow curve from
`predictor.emulsion.flow_stress_jammed`; the viscosity is the apparent viscosity
stress / shear rate at the chosen shear rate).
"""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
from scipy.optimize import brentq

from . import emulsion
from ._checks import as_array, in_range
from .errors import InputRangeError, ValidityWarning
from .registry import get_model

#: Dispersed fraction below which the emulsion is called dilute (Taylor's first-order range;
#: common practice, no source).
DILUTE_LIMIT = 0.03
#: Dispersed fractions where phase inversion is commonly seen (common practice, no source;
#: it depends on the emulsifier and is not predicted). Rows at or above the lower end are
#: flagged.
INVERSION_CAUTION_BAND = (0.6, 0.8)
#: Taylor deformation taken as the onset of shear thinning by droplet deformation (our
#: choice, no source).
DEFORMATION_ONSET = 0.1
#: Default grid of phi: 0 to 0.95 in steps of 0.01.
DEFAULT_PHI = np.round(np.linspace(0.0, 0.95, 96), 10)
BRANCHES = ("direct", "inverted")
COLUMNS = (
    "phi", "branch", "dispersed_fraction", "viscosity_ratio", "regime",
    "relative_viscosity", "viscosity_Pa_s", "yield_stress_Pa", "shear_modulus_Pa",
    "capillary_number", "droplet_deformation", "droplets_deformed", "droplets_break",
    "inversion_caution", "lower_viscosity", "shear_rate_1_per_s", "thinning_factor",
)


def _scalar(value, field, low=0.0, low_open=True):
    arr = in_range(value, field, low, np.inf, low_open=low_open)
    if arr.ndim != 0:
        raise InputRangeError(field, value, "a single number")
    return float(arr)


def _inputs(continuous_viscosity_Pa_s, droplet_viscosity_Pa_s, interfacial_tension_N_per_m,
            sauter_diameter_m, shear_rate_1_per_s, model, phi_max, surfactant_rigid,
            jammed_yield, model_params, deformation_thinning):
    eta_c = _scalar(continuous_viscosity_Pa_s, "continuous_viscosity_Pa_s")
    eta_d = _scalar(droplet_viscosity_Pa_s, "droplet_viscosity_Pa_s")
    gamma = _scalar(interfacial_tension_N_per_m, "interfacial_tension_N_per_m")
    d32 = _scalar(sauter_diameter_m, "sauter_diameter_m")
    rate = _scalar(shear_rate_1_per_s, "shear_rate_1_per_s")
    phi_max = float(in_range(phi_max, "phi_max", 0.5, 0.9))
    if jammed_yield not in emulsion.JAMMED_YIELD_RELATIONS:
        raise InputRangeError("jammed_yield", jammed_yield,
                              f"one of {', '.join(emulsion.JAMMED_YIELD_RELATIONS)}")
    spec = get_model(model, kind="emulsion")
    params = dict(model_params or {})
    if "viscosity_ratio" in params:
        raise InputRangeError("model_params", "viscosity_ratio",
                              "no viscosity_ratio: it follows from the two viscosities")
    if "phi_max" in spec.param_names():
        params["phi_max"] = phi_max
    params = spec.check_params(params)
    params.pop("viscosity_ratio", None)
    return dict(eta_c=eta_c, eta_d=eta_d, gamma=gamma, d32=d32, rate=rate, phi_max=phi_max,
                rigid=bool(surfactant_rigid), jammed_yield=jammed_yield, spec=spec,
                params=params, thinning=bool(deformation_thinning))


def _branch(x, eta_cont, eta_drop, c):
    """Properties of one branch at dispersed fractions x (1-D array); c from `_inputs`."""
    lam = np.inf if c["rigid"] else eta_drop / eta_cont
    fluid = x < c["phi_max"]
    regime = np.where(x < DILUTE_LIMIT, "dilute", np.where(fluid, "concentrated", "jammed"))
    x_fluid = np.where(fluid, x, 0.0)
    message = c["spec"].validity_message(x[fluid], {**c["params"], "viscosity_ratio": lam})
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=4)
    eta_r_zero = c["spec"].func(x_fluid, viscosity_ratio=lam, **c["params"])
    ca = emulsion.capillary_number(eta_cont, c["rate"], 0.5 * c["d32"], c["gamma"])
    # `emulsion.deformation_thinning` on the zero-shear values already at hand (its factor
    # does not depend on the relation); breakup is the droplets_break column.
    thinning = (emulsion._thinning_factor(x_fluid, ca, np.asarray(lam, dtype=float))
                if c["thinning"] else np.ones_like(x))
    eta_r_fluid = eta_r_zero * thinning
    jammed = ~fluid
    stress = np.zeros_like(x)
    yield_stress = np.zeros_like(x)
    modulus = np.zeros_like(x)
    if np.any(jammed):
        xj = np.minimum(x[jammed], 0.99)
        stress[jammed] = emulsion.flow_stress_jammed(
            xj, c["rate"], eta_cont, c["gamma"], c["d32"], lam, phi_c=c["phi_max"],
            yield_relation=c["jammed_yield"])
        if c["jammed_yield"] == "mason":
            yield_stress[jammed] = emulsion.yield_stress_mason(xj, c["gamma"], c["d32"],
                                                               c["phi_max"])
            modulus[jammed] = emulsion.shear_modulus_mason(xj, c["gamma"], c["d32"],
                                                           c["phi_max"])
        else:
            xk = np.minimum(xj, np.nextafter(1.0, 0.0))
            yield_stress[jammed] = emulsion.yield_stress_princen_kiss(xk, c["gamma"], c["d32"])
            modulus[jammed] = emulsion.shear_modulus_princen_kiss(xj, c["gamma"], c["d32"])
    viscosity = np.where(fluid, eta_cont * eta_r_fluid, stress / c["rate"])
    # Above 0.99 there is no emulsion left to describe (the other liquid is a trace).
    empty = x > 0.99
    regime = np.where(empty, "none", regime)
    thinning = np.where(fluid, thinning, 1.0)
    viscosity, yield_stress, modulus, thinning = (
        np.where(empty, np.nan, v) for v in (viscosity, yield_stress, modulus, thinning))
    deformation = ca * emulsion._taylor_deformation_factor(np.asarray(lam, dtype=float))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)    # lambda < 1e-4 is only an edge
        ca_crit = emulsion.critical_capillary_de_bruijn(lam)
    return {
        "viscosity_ratio": np.full_like(x, lam),
        "regime": regime,
        "relative_viscosity": viscosity / eta_cont,
        "viscosity_Pa_s": viscosity,
        "yield_stress_Pa": yield_stress,
        "shear_modulus_Pa": modulus,
        "capillary_number": np.full_like(x, ca),
        "droplet_deformation": np.full_like(x, deformation),
        "droplets_deformed": np.full(x.shape, deformation > DEFORMATION_ONSET),
        "droplets_break": np.full(x.shape, ca > ca_crit),
        "inversion_caution": x >= INVERSION_CAUTION_BAND[0],
        "thinning_factor": thinning,
    }


def phase_ratio_sweep(continuous_viscosity_Pa_s, droplet_viscosity_Pa_s,
                      interfacial_tension_N_per_m, sauter_diameter_m, shear_rate_1_per_s,
                      model="pal", phi_max=0.64, surfactant_rigid=False, phi=None,
                      jammed_yield="mason", model_params=None, deformation_thinning=True):
    """Viscosity and yield stress of an emulsion against the droplet-liquid fraction.

    Parameters
    ----------
    continuous_viscosity_Pa_s : float
        Viscosity of the liquid meant to be continuous (e.g. the water phase). [Pa*s]
    droplet_viscosity_Pa_s : float
        Viscosity of the liquid meant to form droplets (e.g. the oil). [Pa*s]
    interfacial_tension_N_per_m : float
        Interfacial tension between the two liquids (with the emulsifier). [N/m]
    sauter_diameter_m : float
        Sauter mean diameter of the droplets, taken the same on both branches. [m]
    shear_rate_1_per_s : float
        Shear rate at which the viscosity is reported, > 0. [1/s]
    model : str, optional
        Registry name of the relation used below phi_max: "taylor", "pal" or
        "phan-thien-pham".
    phi_max : float, optional
        Droplet packing fraction where the emulsion jams, in [0.5, 0.9]; also Pal's packing
        limit and the onset of Mason's yield stress. 0.64 is random close packing of equal
        spheres; polydisperse droplets pack higher. [-]
    surfactant_rigid : bool, optional
        Treat the droplets as rigid spheres (viscosity ratio inf) on both branches, as
        droplets with an interface immobilised by surfactant behave (common practice, no
        source).
    phi : array_like, optional
        Fractions of the droplet liquid, each in [0, 0.99]; default 0 to 0.95 by 0.01. [-]
    jammed_yield : {"mason", "princen-kiss"}, optional
        Yield-stress relation of the jammed regime (see `emulsion.flow_stress_jammed`).
    model_params : dict, optional
        Further parameters of the relation, e.g. ``{"variant": 1}`` for Pal.
    deformation_thinning : bool, optional
        Below phi_max, lower the relation's zero-shear value for droplet deformation at the
        shear rate (`predictor.emulsion.deformation_thinning`; rigid droplets do not thin).
        False gives the Newtonian (zero capillary number) value.

    Returns
    -------
    pandas.DataFrame
        One row per phi and branch, columns `COLUMNS`: ``phi``, ``branch`` ("direct" /
        "inverted"), ``dispersed_fraction``, ``viscosity_ratio``, ``regime`` ("dilute" /
        "concentrated" / "jammed"), ``relative_viscosity``, ``viscosity_Pa_s``,
        ``yield_stress_Pa``, ``shear_modulus_Pa``, ``capillary_number``,
        ``droplet_deformation`` (Taylor), ``droplets_deformed`` (deformation above
        `DEFORMATION_ONSET`), ``droplets_break`` (capillary number above the critical one:
        the droplet size would change, so the values are indicative),
        ``inversion_caution``, ``lower_viscosity`` (the branch with the lower viscosity at
        this phi), ``shear_rate_1_per_s`` and ``thinning_factor`` (viscosity with
        deformation thinning over the zero-shear value; 1 where not applied: jammed rows,
        whose flow curve carries its own rate dependence, or ``deformation_thinning=False``;
        NaN where there is no emulsion).

    Raises
    ------
    InputRangeError
        If an input is not a positive number, phi lies outside [0, 0.99], or a name is
        unknown.

    Warns
    -----
    ValidityWarning
        Where the chosen relation or a jammed-regime fit is used outside its range.

    Examples
    --------
    Invented scenario: a light cream, oil of 50 mPa*s in a water phase of 2 mPa*s, 5 mN/m,
    d32 = 5 um, viewed at 10 1/s.

    >>> table = phase_ratio_sweep(2e-3, 50e-3, 5e-3, 5e-6, 10.0, phi=[0.3])
    >>> print(table[["branch", "regime", "viscosity_Pa_s"]].round(5).to_string(index=False))
      branch       regime  viscosity_Pa_s
      direct concentrated         0.00529
    inverted       jammed         0.54069
    """
    c = _inputs(continuous_viscosity_Pa_s, droplet_viscosity_Pa_s, interfacial_tension_N_per_m,
                sauter_diameter_m, shear_rate_1_per_s, model, phi_max, surfactant_rigid,
                jammed_yield, model_params, deformation_thinning)
    phi = DEFAULT_PHI if phi is None else np.atleast_1d(as_array(phi, "phi")).ravel()
    phi = in_range(phi, "phi", 0.0, 0.99)
    frames = []
    for branch in BRANCHES:
        if branch == "direct":
            x, eta_cont, eta_drop = phi, c["eta_c"], c["eta_d"]
        else:
            x, eta_cont, eta_drop = 1.0 - phi, c["eta_d"], c["eta_c"]
        columns = _branch(np.asarray(x, dtype=float), eta_cont, eta_drop, c)
        frames.append(pd.DataFrame({"phi": phi, "branch": branch, "dispersed_fraction": x,
                                    **columns}))
    table = pd.concat(frames, ignore_index=True)
    table["shear_rate_1_per_s"] = c["rate"]
    lowest = table.groupby("phi")["viscosity_Pa_s"].transform("min")
    table["lower_viscosity"] = table["viscosity_Pa_s"] <= lowest
    return table[list(COLUMNS)]


def phase_ratio_for_target(continuous_viscosity_Pa_s, droplet_viscosity_Pa_s,
                           interfacial_tension_N_per_m, sauter_diameter_m, shear_rate_1_per_s,
                           *, target_viscosity_Pa_s=None, target_yield_stress_Pa=None,
                           branch="direct", model="pal", phi_max=0.64, surfactant_rigid=False,
                           jammed_yield="mason", regime=None, phi_upper=0.95,
                           model_params=None, deformation_thinning=True):
    """The droplet-liquid fraction phi that reaches a target viscosity or yield stress.

    Searches the dispersed fraction from 0 to `phi_upper` on one branch for the lowest
    fraction whose viscosity (at the shear rate) or yield stress reaches the target, with
    the same relations as `phase_ratio_sweep`.

    Parameters
    ----------
    continuous_viscosity_Pa_s, droplet_viscosity_Pa_s, interfacial_tension_N_per_m, \
sauter_diameter_m, shear_rate_1_per_s, model, phi_max, surfactant_rigid, jammed_yield, \
model_params, deformation_thinning
        As in `phase_ratio_sweep`.
    target_viscosity_Pa_s : float, optional
        Target viscosity at the shear rate. [Pa*s]
    target_yield_stress_Pa : float, optional
        Target yield stress (jammed regime only). Give exactly one of the two targets. [Pa]
    branch : {"direct", "inverted"}, optional
        Which liquid is continuous (see the module notes).
    regime : {None, "fluid", "jammed"}, optional
        Restrict the search to below phi_max ("fluid") or above it ("jammed"); None searches
        both and returns the lowest fraction. Useful because the apparent viscosity drops
        where a divergent relation hands over to the jammed flow curve.
    phi_upper : float, optional
        Highest dispersed fraction searched, in (0, 0.99]. [-]

    Returns
    -------
    phi : float
        Volume fraction of the droplet liquid (for the inverted branch, 1 minus the
        dispersed fraction found). [-]

    Raises
    ------
    InputRangeError
        If the target is not reachable in the searched range (the message gives the range
        that is), if both or neither target is given, or on bad inputs.

    Warns
    -----
    ValidityWarning
        Where the relation is used outside its range at the answer.

    Examples
    --------
    Invented scenario: the light cream of `phase_ratio_sweep`; how much oil for 10 mPa*s?

    >>> round(phase_ratio_for_target(2e-3, 50e-3, 5e-3, 5e-6, 10.0,
    ...                              target_viscosity_Pa_s=10e-3), 4)
    0.419
    """
    c = _inputs(continuous_viscosity_Pa_s, droplet_viscosity_Pa_s, interfacial_tension_N_per_m,
                sauter_diameter_m, shear_rate_1_per_s, model, phi_max, surfactant_rigid,
                jammed_yield, model_params, deformation_thinning)
    if (target_viscosity_Pa_s is None) == (target_yield_stress_Pa is None):
        raise InputRangeError("target", None,
                              "exactly one of target_viscosity_Pa_s, target_yield_stress_Pa")
    if target_viscosity_Pa_s is not None:
        field, key = "target_viscosity_Pa_s", "viscosity_Pa_s"
        target = _scalar(target_viscosity_Pa_s, field)
    else:
        field, key = "target_yield_stress_Pa", "yield_stress_Pa"
        target = _scalar(target_yield_stress_Pa, field)
    if branch not in BRANCHES:
        raise InputRangeError("branch", branch, f"one of {', '.join(BRANCHES)}")
    if regime not in (None, "fluid", "jammed"):
        raise InputRangeError("regime", regime, "None, 'fluid' or 'jammed'")
    upper = float(in_range(phi_upper, "phi_upper", 0.0, 0.99, low_open=True))
    if branch == "direct":
        eta_cont, eta_drop = c["eta_c"], c["eta_d"]
    else:
        eta_cont, eta_drop = c["eta_d"], c["eta_c"]

    def values(x):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityWarning)
            return _branch(np.atleast_1d(np.asarray(x, dtype=float)), eta_cont, eta_drop, c)

    low = c["phi_max"] if regime == "jammed" else 0.0
    high = min(upper, np.nextafter(c["phi_max"], 0.0)) if regime == "fluid" else upper
    if high <= low:
        raise InputRangeError("phi_upper", upper, f"above {low:g} for regime {regime!r}")
    grid = np.linspace(low, high, 2001)
    found = values(grid)[key]
    hits = np.flatnonzero(found >= target)
    if hits.size == 0 or (hits[0] == 0 and found[0] > target):
        reachable = f"{found.min():.4g} to {found.max():.4g}"
        raise InputRangeError(field, target, f"a value from {reachable} on the {branch} "
                              f"branch for dispersed fractions {low:g} to {high:g}")
    k = hits[0]
    if k == 0:
        x = grid[0]
    elif (grid[k - 1] < c["phi_max"]) != (grid[k] < c["phi_max"]):
        x = c["phi_max"]        # the target falls in the jump at the jamming boundary
    else:
        x = brentq(lambda s: values(s)[key][0] - target, grid[k - 1], grid[k],
                   xtol=1e-12, rtol=1e-12)
    _branch(np.atleast_1d(float(x)), eta_cont, eta_drop, c)   # warnings at the answer
    return float(x) if branch == "direct" else float(1.0 - x)
