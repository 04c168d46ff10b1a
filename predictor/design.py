"""Inverse questions: how much can I load, which loading hits my target, in which window.

Orchestration only (it may use pandas): the physics is in the model modules. Two layers:

- vectorised inversions of one relation, for many candidates at once
  (`loading_for_relative_viscosity`, `max_loading_many`): closed forms where the relation
  inverts analytically, vectorised bisection otherwise;
- questions about a `Formulation` at a shear rate (`max_loading_with_band`,
  `loading_for_target`, `max_loading_windows`, `loading_sweep_with_band`,
  `storage_check`), each answer with its uncertainty band.

How a band is made (documented choices, common practice, no source). The central answer
solves ``formulation.predict`` at the shear rate (so it follows whatever shear behaviour
the flow curve has). The band then samples the relation's parameters (from a calibration,
user-given standard deviations, or the spread of the packing estimators) and, for each
sample, inverts the relation at the relative viscosity the central answer has: the liquid,
the droplets and the shear-rate dependence are treated as a factor common to all samples.
Size uncertainty acts through the adsorbed-layer swelling (a uniform change of all sizes
leaves a geometric packing limit unchanged).
"""

from __future__ import annotations

import dataclasses
import functools
import re
import warnings
from collections.abc import Callable, Iterable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from . import composition, engine, packing, uncertainty
from . import formulation as fm
from ._checks import in_range, positive, scalar_or_array
from .errors import InputRangeError, ValidityWarning
from .registry import ModelSpec, get_model

_TINY = 1e-12


# --- closed-form inversions eta_r -> phi (each checked against its relation in the tests) ---

def _inv_einstein(t, intrinsic_viscosity):
    return (t - 1.0) / intrinsic_viscosity


def _inv_batchelor(t, huggins_coefficient):
    k = huggins_coefficient
    disc = np.maximum(6.25 + 4.0 * k * (t - 1.0), 0.0)
    return np.where(t > 1.0, (np.sqrt(disc) - 2.5) / (2.0 * k), 0.0)


def _inv_krieger_dougherty(t, phi_max, intrinsic_viscosity):
    return phi_max * (1.0 - np.power(t, -1.0 / (intrinsic_viscosity * phi_max)))


def _inv_quemada(t, phi_max):
    return phi_max * (1.0 - 1.0 / np.sqrt(t))


def _inv_eilers(t, phi_max):
    s = np.sqrt(t) - 1.0
    return s / (1.25 + s / phi_max)


def _inv_chong(t, phi_max):
    s = np.sqrt(t) - 1.0
    return phi_max * s / (0.75 + s)


def _inv_mooney(t, crowding_factor, intrinsic_viscosity):
    lt = np.log(t)
    return lt / (intrinsic_viscosity + crowding_factor * lt)


def _inv_frankel_acrivos(t, phi_max):
    return phi_max * (t / (t + 9.0 / 8.0)) ** 3


#: Registry name -> closed-form inverse of eta_r(phi). Relations not listed are inverted by
#: vectorised bisection.
CLOSED_FORM_INVERSES: dict[str, Callable] = {
    "einstein": _inv_einstein,
    "batchelor": _inv_batchelor,
    "krieger-dougherty": _inv_krieger_dougherty,
    "quemada": _inv_quemada,
    "maron-pierce": _inv_quemada,
    "eilers": _inv_eilers,
    "chong": _inv_chong,
    "mooney": _inv_mooney,
    "frankel-acrivos": _inv_frankel_acrivos,
}


def _upper(spec: ModelSpec, params: dict):
    """Divergence point of a relation (phi_max, 1/k for Mooney), else 1."""
    if "phi_max" in params:
        return np.minimum(np.asarray(params["phi_max"], dtype=float), 1.0)
    if "crowding_factor" in params:
        return np.minimum(1.0 / np.asarray(params["crowding_factor"], dtype=float), 1.0)
    return np.asarray(1.0)


def _bisect(spec: ModelSpec, target, params: dict, upper, iterations: int = 46):
    """Smallest phi in [0, upper] with eta_r(phi) >= target, for arrays (broadcast)."""
    shape = np.broadcast_shapes(np.shape(target), np.shape(upper),
                                *(np.shape(v) for v in params.values()))
    target = np.broadcast_to(target, shape)
    lo = np.zeros(shape)
    hi = np.broadcast_to(upper, shape).astype(float)
    with np.errstate(all="ignore"):
        top = np.asarray(spec.func(np.clip(hi * (1 - 1e-12), 0, 1), **params), dtype=float)
        reachable = top >= target
        for _ in range(iterations):
            mid = 0.5 * (lo + hi)
            below = np.asarray(spec.func(mid, **params), dtype=float) < target
            lo = np.where(below, mid, lo)
            hi = np.where(below, hi, mid)
    return np.where(reachable, 0.5 * (lo + hi), np.broadcast_to(upper, shape))


def _invert(spec: ModelSpec, target, params: dict):
    upper = _upper(spec, params)
    inverse = CLOSED_FORM_INVERSES.get(spec.name)
    with np.errstate(all="ignore"):
        if inverse is not None:
            phi = inverse(target, **params)
            phi = np.where(np.isnan(phi), 0.0, phi)
        else:
            phi = _bisect(spec, target, params, upper)
    return np.clip(phi, 0.0, upper)


def loading_for_relative_viscosity(model: str, relative_viscosity, **params):
    r"""Volume fraction at which a relation reaches a relative viscosity (its inverse).

    Closed form for einstein, batchelor, krieger-dougherty, quemada, maron-pierce, eilers,
    chong, mooney and frankel-acrivos; vectorised bisection (46 halvings, below 1e-13 in
    phi) for any other relation of the registry. Vectorised over every argument.

    Parameters
    ----------
    model : str
        Registry name of a suspension or emulsion relation.
    relative_viscosity : float or array_like
        Target relative viscosity (> 0). [-]
    **params
        The relation's parameters (arrays broadcast); missing ones take their defaults.

    Returns
    -------
    phi : float or numpy.ndarray
        Volume fraction in [0, divergence point]; 0 where the target lies below the
        relation's value at phi = 0; the divergence point (phi_max, or 1 for relations
        without one) where the target is not reached below it. [-]

    Notes
    -----
    Krieger-Dougherty, by solving Eq. (1) of `suspension.krieger_dougherty` for phi:

    .. math:: \phi = \phi_m \left(1 - \eta_r^{-1/([\eta]\phi_m)}\right)

    Quemada and Maron-Pierce: :math:`\phi = \phi_m (1 - \eta_r^{-1/2})`; the other closed
    forms are solved the same way (see the source).

    Examples
    --------
    Illustrative call (the inverse of ``krieger_dougherty(0.3) = 2.75120``):

    >>> round(loading_for_relative_viscosity("krieger-dougherty", 2.75120), 5)
    0.3
    """
    spec = get_model(model, kind=("suspension", "emulsion"))
    target = positive(relative_viscosity, "relative_viscosity")
    values = spec.check_params(params)
    values = {k: np.asarray(v, dtype=float) for k, v in values.items()}
    return scalar_or_array(_invert(spec, target, values), relative_viscosity,
                           *values.values())


def max_loading_many(model: str, viscosity_limit_Pa_s, liquid_viscosity_Pa_s, **params):
    """Highest volume fraction under a viscosity limit, for many candidates at once.

    Parameters
    ----------
    model : str
        Registry name of a suspension or emulsion relation.
    viscosity_limit_Pa_s : float or array_like
        Viscosity not to exceed. [Pa*s]
    liquid_viscosity_Pa_s : float or array_like
        Viscosity of the liquid (at the shear rate of interest). [Pa*s]
    **params
        The relation's parameters, e.g. ``phi_max=array, intrinsic_viscosity=array``.

    Returns
    -------
    phi : float or numpy.ndarray
        Broadcast shape of the inputs; 0 where the liquid alone exceeds the limit. [-]

    Raises
    ------
    InputRangeError
        Non-finite or non-positive viscosities, parameters outside the registry bounds
        (the message names the first offending value).

    Examples
    --------
    Illustrative call: three candidate powders in water, limit 100 mPa*s.

    >>> phi = max_loading_many("krieger-dougherty", 0.1, 1e-3,
    ...                        phi_max=np.array([0.58, 0.64, 0.70]), intrinsic_viscosity=2.5)
    >>> np.round(phi, 4)
    array([0.5558, 0.604 , 0.6496])
    """
    limit = positive(viscosity_limit_Pa_s, "viscosity_limit_Pa_s")
    eta_l = positive(liquid_viscosity_Pa_s, "liquid_viscosity_Pa_s")
    return loading_for_relative_viscosity(model, limit / eta_l, **params)


# --- answers about a formulation ----------------------------------------------------------

@dataclass(frozen=True)
class LoadingAnswer:
    """A loading with its band, as volume and mass fraction of the whole formulation.

    `phi*` are volume fractions of the (bare) solids; `phi_effective` includes adsorbed
    layers (what the relation sees). `limited_by` is "viscosity", "liquid" (the liquid
    alone is already above the limit: no loading) or "packing" (the limit is not reached
    below the packing limit).
    """

    phi: float
    phi_low: float
    phi_high: float
    mass_fraction: float
    mass_fraction_low: float
    mass_fraction_high: float
    phi_effective: float
    viscosity_Pa_s: float
    shear_rate_1_per_s: float
    phi_max: float
    limited_by: str
    level: float
    n_samples: int
    sources: tuple

    def text(self, basis: str = "volume") -> str:
        """'47 vol% (45-49)' or '63 wt% (61-65)'."""
        if basis not in ("volume", "mass"):
            raise InputRangeError("basis", basis, "'volume' or 'mass'")
        c, lo, hi = ((self.phi, self.phi_low, self.phi_high) if basis == "volume" else
                     (self.mass_fraction, self.mass_fraction_low, self.mass_fraction_high))
        unit = "vol%" if basis == "volume" else "wt%"
        digits = 0 if (hi - lo) * 100 >= 2 else 1
        if not self.sources:
            return f"{100 * c:.{digits}f} {unit}"
        return f"{100 * c:.{digits}f} {unit} ({100 * lo:.{digits}f}-{100 * hi:.{digits}f})"

    def __str__(self) -> str:
        return f"{self.text('volume')}, {self.text('mass')}"


@dataclass(frozen=True)
class ProcessWindow:
    """A process step: a shear rate with an upper and/or lower viscosity limit."""

    name: str
    shear_rate_1_per_s: float
    max_viscosity_Pa_s: float | None = None
    min_viscosity_Pa_s: float | None = None

    def __post_init__(self):
        if self.max_viscosity_Pa_s is None and self.min_viscosity_Pa_s is None:
            raise InputRangeError(f"window {self.name!r}", None,
                                  "a max_viscosity_Pa_s and/or a min_viscosity_Pa_s")


@dataclass(frozen=True, eq=False)
class WindowsAnswer:
    """The loading range that satisfies every window, and one row per window."""

    table: pd.DataFrame
    phi_low: float
    phi_high: float
    mass_fraction_low: float
    mass_fraction_high: float
    feasible: bool

    def text(self) -> str:
        if not self.feasible:
            return "No loading satisfies every window."
        return (f"{100 * self.phi_low:.1f}-{100 * self.phi_high:.1f} vol% "
                f"({100 * self.mass_fraction_low:.1f}-{100 * self.mass_fraction_high:.1f} wt%)")


def calibrated(formulation: fm.Formulation, fit_result) -> fm.Formulation:
    """A copy of `formulation` using a calibrated relation (`fitting.FitResult`)."""
    if fit_result.kind == "emulsion":
        params = {**formulation.droplet_model_params, **fit_result.all_params}
        return dataclasses.replace(formulation, droplet_model=fit_result.model,
                                   droplet_model_params=params)
    params = {**formulation.model_params, **fit_result.all_params}
    if fit_result.kind != "suspension":
        raise InputRangeError("fit_result.kind", fit_result.kind,
                              "a fit of a suspension or emulsion relation")
    return dataclasses.replace(formulation, model=fit_result.model, model_params=params)


class _Context:
    """What the answers share: the mixture, the relation, the shares of the solids."""

    def __init__(self, formulation: fm.Formulation):
        self.mix = mix = fm.mixture(formulation)
        if not mix.is_solid.any() or mix.phi_solids <= 0:
            raise InputRangeError("solid loading", mix.phi_solids,
                                  "a formulation with some solid to scale (for droplets "
                                  "use phase_ratio_for_target)")
        self.spec = get_model(formulation.model, kind="suspension")
        if "intrinsic_viscosity" in self.spec.param_names() and \
                "intrinsic_viscosity" not in formulation.model_params:
            # Scaling the solids along their shares keeps their share-weighted [eta]; pin it
            # so that rounding of that weighted mean (2.4999999999999996 for 2.5 and 2.5)
            # cannot fall outside the registry bounds at a trial loading.
            low, high = next(p.bounds for p in self.spec.params
                             if p.name == "intrinsic_viscosity")
            formulation = dataclasses.replace(formulation, model_params={
                **formulation.model_params,
                "intrinsic_viscosity": float(np.clip(mix.intrinsic_viscosity, low, high))})
        self.formulation = formulation
        self.params = self.spec.check_params(
            fm._relation_params(self.spec, mix, formulation.model_params))
        solid_phi = np.where(mix.is_solid, mix.phi, 0.0)
        self.shares = solid_phi / solid_phi.sum()            # real volume shares
        self.upper = float(_upper(self.spec, self.params))
        self.rho = np.array([i.density_kg_per_m3 for i in formulation.ingredients], float)

    @functools.cached_property
    def spread(self) -> dict:
        """`packing_estimator_spread` of the formulation (asked for once per answer)."""
        return packing_estimator_spread(self.formulation)

    def swelling_per_real(self, size_factor=None):
        """Effective over real solid volume, optionally for sampled size factors."""
        sw = self.mix.swelling
        if size_factor is None:
            return float(self.shares @ sw)
        layer = np.cbrt(sw) - 1.0                               # delta / a per ingredient
        scaled = (1.0 + layer[None, :] / np.asarray(size_factor)[:, None]) ** 3
        return scaled @ self.shares

    def mass_fraction(self, phi_real):
        """Mass fraction of all solids for real solid volume fractions (vectorised)."""
        phi_real = np.atleast_1d(np.asarray(phi_real, dtype=float))
        drops = np.where(self.mix.is_solid, 0.0, self.mix.phi)
        room = np.clip(1.0 - drops.sum(), 0.0, 1.0)
        phi_all = np.minimum(phi_real, room)[:, None] * self.shares + drops
        w = composition.mass_fractions(phi_all, self.rho,
                                       self.formulation.liquid.density_kg_per_m3)
        return w[:, self.mix.is_solid].sum(axis=1)

    def viscosity(self, phi_eff: float, rate: float, quiet: bool = True) -> float:
        """Viscosity of the formulation at an effective solid fraction and a shear rate.

        Validity warnings of the trial loadings are silenced (`quiet`); the solvers call
        it once more at the answer with them on.
        """
        if phi_eff >= self.upper:
            return np.inf
        # The mixture scaled in place, as `fm.max_loading` does: the same flow curve as
        # `fm.predict(fm.with_solids_scaled(...))` without resolving the mixture again.
        scaled = fm._at_loading(self.mix, max(phi_eff, 0.0))
        with warnings.catch_warnings():
            if quiet:
                warnings.simplefilter("ignore", ValidityWarning)
            curve = fm.flow_curve_of(self.formulation, np.array([float(rate)]), scaled)
        return float(curve.viscosity_Pa_s[0])


def _solve_loading(ctx: _Context, limit: float, rate: float) -> tuple[float, str]:
    """Effective solid fraction where the viscosity at `rate` reaches `limit`.

    The one solver of `engine.max_loading` on this formulation's row, searched up to the
    relation's own upper limit.
    """
    fs = engine.from_rows([engine.row_inputs(ctx.formulation, ctx.mix)])
    phi, reason = engine.max_loading(fs, limit, rate, tolerance=1e-10,
                                     upper=ctx.upper * (1.0 - 1e-9))
    if reason[0] == "viscosity":
        ctx.viscosity(float(phi[0]), rate, quiet=False)   # the answer's own warnings
    return float(phi[0]), str(reason[0])


def _param_samples(ctx: _Context, n, seed, fit, phi_max_sd, param_sd, packing_spread):
    """Samples of the relation's parameters from every source asked for."""
    n = int(n)
    samples = {k: np.full(n, float(np.asarray(v))) for k, v in ctx.params.items()}
    sources = []
    rng = np.random.default_rng(seed)
    if fit is not None:
        for k, v in fit.param_samples(n, seed).items():
            if k in samples:
                samples[k] = np.asarray(v, dtype=float)
        sources.append(f"calibration ({fit.model}, {fit.interval_method})")
    sds = dict(param_sd or {})
    if phi_max_sd is not None:
        sds["phi_max"] = phi_max_sd
    if packing_spread:
        sd = ctx.spread["relative_sd"] * ctx.params.get("phi_max", np.nan)
        if "phi_max" in samples and np.isfinite(sd):
            sds["phi_max"] = float(np.hypot(sds.get("phi_max", 0.0), sd))
            sources.append("spread of packing estimators")
    for k, sd in sds.items():
        if k not in samples:
            raise InputRangeError("param_sd", k, f"a parameter of {ctx.spec.name}: "
                                  f"{', '.join(samples) or 'none'}")
        sd = float(in_range(sd, f"standard deviation of {k}", 0.0, np.inf))
        if sd > 0:
            samples[k] = samples[k] + sd * rng.standard_normal(n)
            sources.append(f"{k} +- {sd:.3g}")
    bounds = {p.name: p.bounds for p in ctx.spec.params}
    samples = {k: np.clip(v, *bounds[k]) if k in bounds else v for k, v in samples.items()}
    return samples, sources, rng


def _check_band_options(level, n_samples, size_rel_sd):
    level = float(in_range(level, "level", 0.0, 1.0, low_open=True, high_open=True))
    if isinstance(n_samples, bool) or not isinstance(n_samples, int | np.integer) \
            or not 10 <= n_samples <= 10**6:
        raise InputRangeError("n_samples", n_samples, "an integer from 10 to 1e6")
    size_sd = 0.0 if size_rel_sd is None else float(in_range(size_rel_sd, "size_rel_sd",
                                                             0.0, 1.0))
    return level, int(n_samples), size_sd


def max_loading_with_band(formulation: fm.Formulation, viscosity_limit_Pa_s: float,
                          shear_rate_1_per_s: float = 1.0, *, fit=None, phi_max_sd=None,
                          param_sd: dict | None = None, packing_spread: bool = False,
                          size_rel_sd: float | None = None, level: float = 0.95,
                          n_samples: int = 2000, seed: int = 0) -> LoadingAnswer:
    """Highest solid loading whose viscosity at a shear rate stays under a limit, with band.

    Parameters
    ----------
    formulation : Formulation
        The solids are scaled along their current shares; droplets keep their loading.
    viscosity_limit_Pa_s : float
        Viscosity not to exceed at the shear rate. [Pa*s]
    shear_rate_1_per_s : float, optional
        Shear rate of the process step. [1/s]
    fit : fitting.FitResult, optional
        A calibration: its relation and parameters replace the formulation's, and its
        covariance (or bootstrap draws) feeds the band.
    phi_max_sd : float, optional
        Standard deviation of phi_max (user-given). [-]
    param_sd : dict, optional
        Standard deviations of other parameters of the relation.
    packing_spread : bool, optional
        Add the spread of the packing estimators (`packing_estimator_spread`) to phi_max.
    size_rel_sd : float, optional
        Relative standard deviation of the particle sizes (acts through adsorbed layers).
    level : float, optional
        Confidence level of the band.
    n_samples : int, optional
        Monte Carlo samples.
    seed : int, optional
        Seed; the same seed gives the same band.

    Returns
    -------
    LoadingAnswer
        Without any uncertainty source, low = central = high and `sources` is empty.

    Raises
    ------
    InputRangeError
        Non-positive limit or shear rate, a formulation without solids, bad options.
    """
    if fit is not None:
        formulation = calibrated(formulation, fit)
    limit = float(positive(viscosity_limit_Pa_s, "viscosity_limit_Pa_s"))
    rate = float(positive(shear_rate_1_per_s, "shear_rate_1_per_s"))
    level, n, size_sd = _check_band_options(level, n_samples, size_rel_sd)
    ctx = _Context(formulation)
    phi_eff, limited_by = _solve_loading(ctx, limit, rate)
    return _answer(ctx, phi_eff, limited_by, limit, rate, level, n, seed, fit, phi_max_sd,
                   param_sd, packing_spread, size_sd)


def _answer(ctx, phi_eff, limited_by, viscosity, rate, level, n, seed, fit, phi_max_sd,
            param_sd, packing_spread, size_sd) -> LoadingAnswer:
    phi_real = phi_eff / ctx.swelling_per_real()
    samples, sources, rng = _param_samples(ctx, n, seed, fit, phi_max_sd, param_sd,
                                           packing_spread)
    if size_sd > 0:
        sources.append(f"size +- {100 * size_sd:.3g} %")
    if not sources:
        w = float(ctx.mass_fraction(phi_real)[0])
        return LoadingAnswer(phi_real, phi_real, phi_real, w, w, w, phi_eff, viscosity, rate,
                             ctx.upper, limited_by, level, 0, ())
    if limited_by == "liquid":
        eff = np.zeros(n)
    else:
        with np.errstate(all="ignore"):
            target = float(ctx.spec.func(phi_eff, **ctx.params))
        eff = _invert(ctx.spec, target, samples)
    factor = np.exp(size_sd * rng.standard_normal(n)) if size_sd > 0 else None
    real = eff / (ctx.swelling_per_real(factor) if factor is not None else
                  ctx.swelling_per_real())
    low, high = uncertainty.quantile_band(real, level)
    low, high = min(float(low), phi_real), max(float(high), phi_real)
    w = ctx.mass_fraction([phi_real, low, high])
    return LoadingAnswer(phi_real, low, high, float(w[0]), float(w[1]), float(w[2]), phi_eff,
                         viscosity, rate, ctx.upper, limited_by, level, n, tuple(sources))


def loading_for_target(formulation: fm.Formulation, target_viscosity_Pa_s: float,
                       shear_rate_1_per_s: float = 1.0, **band_options) -> LoadingAnswer:
    """Solid loading at which the viscosity at a shear rate equals a target, with band.

    Same options as `max_loading_with_band`.

    Raises
    ------
    InputRangeError
        When the target lies below the viscosity without solids, or is not reached below
        the packing limit; the message gives the reachable range.
    """
    fit = band_options.pop("fit", None)
    if fit is not None:
        formulation = calibrated(formulation, fit)
    target = float(positive(target_viscosity_Pa_s, "target_viscosity_Pa_s"))
    rate = float(positive(shear_rate_1_per_s, "shear_rate_1_per_s"))
    level, n, size_sd = _check_band_options(band_options.pop("level", 0.95),
                                            band_options.pop("n_samples", 2000),
                                            band_options.pop("size_rel_sd", None))
    ctx = _Context(formulation)
    phi_eff, limited_by = _solve_loading(ctx, target, rate)
    if limited_by != "viscosity":
        eta0 = ctx.viscosity(0.0, rate)
        raise InputRangeError(
            "target_viscosity_Pa_s", target,
            f"a viscosity between {eta0:.4g} Pa*s (no solids) and the divergence at "
            f"phi_max = {ctx.upper:.4g}, at {rate:g} 1/s")
    unknown = set(band_options) - {"phi_max_sd", "param_sd", "packing_spread", "seed"}
    if unknown:
        raise InputRangeError("option", sorted(unknown)[0],
                              "fit, phi_max_sd, param_sd, packing_spread, size_rel_sd, "
                              "level, n_samples, seed")
    return _answer(ctx, phi_eff, limited_by, target, rate, level, n,
                   band_options.get("seed", 0), fit, band_options.get("phi_max_sd"),
                   band_options.get("param_sd"), band_options.get("packing_spread", False),
                   size_sd)


def _windows(windows) -> list[ProcessWindow]:
    out = []
    for i, w in enumerate(windows):
        if isinstance(w, ProcessWindow):
            out.append(w)
        elif isinstance(w, dict):
            out.append(ProcessWindow(**w))
        elif isinstance(w, tuple | list) and len(w) in (3, 4):
            out.append(ProcessWindow(*w))
        else:
            raise InputRangeError(f"windows[{i}]", str(w),
                                  "a ProcessWindow, a dict, or (name, shear rate, max "
                                  "viscosity[, min viscosity])")
    if not out:
        raise InputRangeError("windows", 0, "at least one process window")
    return out


def max_loading_windows(formulation: fm.Formulation, windows: Iterable,
                        **band_options) -> WindowsAnswer:
    """The loading range that keeps every process window, e.g. pumpable and sag-resistant.

    Parameters
    ----------
    formulation : Formulation
    windows : iterable
        `ProcessWindow` objects, dicts with its fields, or tuples (name, shear rate,
        max viscosity[, min viscosity]). A maximum viscosity caps the loading from above
        (pumping at 100 1/s); a minimum viscosity sets a lowest loading (sag resistance
        at 0.1 1/s).
    **band_options
        As in `max_loading_with_band`; each window's bound gets its own band.

    Returns
    -------
    WindowsAnswer
        `table` has one row per window bound: window, shear_rate_1_per_s, bound ("max" or
        "min"), viscosity_Pa_s, phi, phi_low, phi_high, mass_fraction, mass_fraction_low,
        mass_fraction_high, limited_by.
    """
    rows = []
    for w in _windows(windows):
        for bound, value in (("max", w.max_viscosity_Pa_s), ("min", w.min_viscosity_Pa_s)):
            if value is None:
                continue
            ans = max_loading_with_band(formulation, value, w.shear_rate_1_per_s,
                                        **band_options)
            rows.append({"window": w.name, "shear_rate_1_per_s": w.shear_rate_1_per_s,
                         "bound": bound, "viscosity_Pa_s": value, "phi": ans.phi,
                         "phi_low": ans.phi_low, "phi_high": ans.phi_high,
                         "mass_fraction": ans.mass_fraction,
                         "mass_fraction_low": ans.mass_fraction_low,
                         "mass_fraction_high": ans.mass_fraction_high,
                         "limited_by": ans.limited_by})
    table = pd.DataFrame(rows)
    caps = table[table["bound"] == "max"]
    floors = table[table["bound"] == "min"]
    hi = float(caps["phi"].min()) if len(caps) else float(table["phi"].max())
    hi_w = float(caps["mass_fraction"].min()) if len(caps) else float(
        table["mass_fraction"].max())
    lo = float(floors["phi"].max()) if len(floors) else 0.0
    lo_w = float(floors["mass_fraction"].max()) if len(floors) else 0.0
    unreachable = len(floors) and (floors["limited_by"] == "packing").any()
    feasible = bool(lo <= hi and not unreachable)
    return WindowsAnswer(table, lo, hi, lo_w, hi_w, feasible)


def loading_sweep_with_band(formulation: fm.Formulation, phi=None, n: int = 200, *,
                            fit=None, phi_max_sd=None, param_sd: dict | None = None,
                            packing_spread: bool = False, loading_rel_sd: float | None = None,
                            size_rel_sd: float | None = None, level: float = 0.95,
                            n_samples: int = 2000, seed: int = 0) -> pd.DataFrame:
    """`formulation.loading_sweep` with a Monte Carlo band on the viscosity.

    Parameters
    ----------
    formulation : Formulation
    phi : array_like, optional
        Effective solid volume fractions; default as `formulation.loading_sweep`.
    n : int, optional
        Points of the default grid.
    fit, phi_max_sd, param_sd, packing_spread, size_rel_sd, level, n_samples, seed
        As in `max_loading_with_band`.
    loading_rel_sd : float, optional
        Relative standard deviation of the loading itself (weighing, dosing). [-]

    Returns
    -------
    pandas.DataFrame
        The columns of `loading_sweep` plus viscosity_low_Pa_s, viscosity_high_Pa_s and
        divergent_fraction (share of samples that jammed at that loading). `attrs`: level,
        n_samples, sources, and with `packing_spread` the estimators' phi_max values
        (packing_estimates, as `packing_estimator_spread` gives them).
    """
    if fit is not None:
        formulation = calibrated(formulation, fit)
    level, n_s, size_sd = _check_band_options(level, n_samples, size_rel_sd)
    frame = fm.loading_sweep(formulation, phi=phi, n=n)
    ctx = _Context(formulation)
    samples, sources, rng = _param_samples(ctx, n_s, seed, fit, phi_max_sd, param_sd,
                                           packing_spread)
    grid = frame["phi"].to_numpy(dtype=float)
    scale = np.ones(n_s)
    if loading_rel_sd:
        sd = float(in_range(loading_rel_sd, "loading_rel_sd", 0.0, 1.0))
        scale = scale * np.clip(1.0 + sd * rng.standard_normal(n_s), 0.0, None)
        sources.append(f"loading +- {100 * sd:.3g} %")
    if size_sd > 0:
        factor = np.exp(size_sd * rng.standard_normal(n_s))
        scale = scale * ctx.swelling_per_real(factor) / ctx.swelling_per_real()
        sources.append(f"size +- {100 * size_sd:.3g} %")
    common = fm.droplet_factor(formulation, ctx.mix)    # as in relative_viscosity_at
    with np.errstate(all="ignore"):
        values = np.asarray(ctx.spec.func(np.clip(grid[None, :] * scale[:, None], 0.0, 1.0),
                                          **{k: v[:, None] for k, v in samples.items()}),
                            dtype=float)
    values = np.where(np.isnan(values), np.inf, values)
    low, high = uncertainty.quantile_band(values, level)
    eta_l = ctx.mix.liquid_viscosity_Pa_s
    eta = frame["viscosity_Pa_s"].to_numpy(dtype=float)
    frame["viscosity_low_Pa_s"] = np.minimum(low * common * eta_l, eta)
    frame["viscosity_high_Pa_s"] = np.maximum(high * common * eta_l, eta)
    frame["divergent_fraction"] = np.mean(np.isinf(values), axis=0)
    frame.attrs.update(level=level, n_samples=n_s, sources=tuple(sources))
    if packing_spread:
        frame.attrs["packing_estimates"] = dict(ctx.spread["estimates"])
    return frame


def packing_estimator_spread(formulation: fm.Formulation,
                             methods: Iterable[str] | None = None) -> dict:
    """phi_max of the solids by each fast packing estimator, and their relative spread.

    The estimators describe spheres; each is scaled by the same factor that takes the
    default sphere estimate to the formulation's own phi_max (its shape factor, or the
    phi_max the user gave), so the range sits around the value in use.

    Parameters
    ----------
    formulation : Formulation
    methods : iterable of str, optional
        Registry names of packing methods; default every one except "simulation" (slow).

    Returns
    -------
    dict
        ``{"estimates": {method: phi_max}, "relative_sd": std / mean, "left_out":
        {method: reason}}``: the sample standard deviation (ddof=1; NaN with fewer than two
        estimates) over the methods that gave a value inside (0, 1) without a validity
        warning; methods used outside their validity range are left out, with the reason.
    """
    from . import sizes

    mix = fm.mixture(formulation)
    solid = [k for k, i in enumerate(formulation.ingredients) if mix.is_solid[k]]
    if not solid:
        raise InputRangeError("solid loading", 0.0, "a formulation with solids")
    dists = [formulation.ingredients[k].distribution() for k in solid]
    weights = (mix.phi * mix.swelling)[solid]
    weights = weights / weights.sum()
    combined = dists[0] if len(dists) == 1 else sizes.SizeDistribution.blend(
        dists, weights, basis="volume")
    # packing_estimates knows which methods apply to this distribution (and why not).
    summary = packing.packing_estimates(combined.diameters_m, combined.fractions)
    names = set(methods) if methods is not None else set(summary.estimates) | set(
        k for k in summary.skipped if k != "simulation")
    # The estimators describe spheres; scale them by the ratio the formulation applies to
    # its own default (shape factor, or a phi_max the user gave), so the range sits around
    # the phi_max actually used.
    scale = mix.phi_max / summary.default if summary.default > 0 else 1.0
    estimates = {k: v * scale for k, v in summary.estimates.items()
                 if k in names and 0.0 < v * scale < 1.0}
    left_out = {k: r for k, r in summary.skipped.items() if k in names}
    left_out.update({k: f"phi_max = {v * scale:.4g} outside (0, 1)"
                     for k, v in summary.estimates.items() if k in names and k not in estimates})
    values = np.array(list(estimates.values()))
    rel = float(np.std(values, ddof=1) / np.mean(values)) if values.size > 1 else np.nan
    return {"estimates": estimates, "relative_sd": rel, "left_out": left_out}


def storage_check(formulation: fm.Formulation, *, storage_time_s: float = 180 * 86400.0,
                  clear_layer_m: float = 1e-3, container_height_m: float = 0.1,
                  settling_shear_rate_1_per_s: float = 1e-4) -> pd.DataFrame:
    """Settling or creaming verdict for each dispersed ingredient of a formulation.

    Each ingredient's D90 (its coarse end settles first) moves through the liquid at its
    low-shear viscosity (the liquid law at `settling_shear_rate_1_per_s`; sedimentation
    shear rates are about 1e-6 to 1e-3 1/s, common practice, no source), hindered by all
    the dispersed phases together (Richardson-Zaki), and is held by the liquid's yield
    stress if it has one (Beris' criterion). See `stability.storage_verdict`.

    Returns
    -------
    pandas.DataFrame
        One row per ingredient: ingredient, diameter_m, stable, reason, message,
        velocity_m_per_s, clear_layer_time_s, gravitational_peclet, yield_parameter.
    """
    from . import stability

    mix = fm.mixture(formulation)
    liq = formulation.liquid
    rate = float(positive(settling_shear_rate_1_per_s, "settling_shear_rate_1_per_s"))
    eta = float(np.asarray(fm.predict(dataclasses.replace(formulation, ingredients=()),
                                      rate)["viscosity_Pa_s"], dtype=float)[0])
    tau_y = float(liq.params.get("yield_stress_Pa", 0.0)) if not liq.preset else 0.0
    phi_all = float(mix.phi.sum())
    rows = []
    for ing in formulation.ingredients:
        d = float(ing.distribution().d90_m)
        v = stability.storage_verdict(
            d, ing.density_kg_per_m3, liq.density_kg_per_m3, eta, phi=min(phi_all, 0.99),
            yield_stress_Pa=tau_y, clear_layer_m=clear_layer_m, storage_time_s=storage_time_s,
            container_height_m=container_height_m, temperature_K=liq.temperature_K)
        rows.append({"ingredient": ing.name, "diameter_m": d, "stable": v.stable,
                     "reason": v.reason, "message": v.message,
                     "velocity_m_per_s": v.hindered_velocity_m_per_s,
                     "clear_layer_time_s": v.clear_layer_time_s,
                     "gravitational_peclet": v.gravitational_peclet,
                     "yield_parameter": v.yield_parameter})
    # The columns are named even with no ingredient (an empty table, not a column-less one).
    return pd.DataFrame(rows, columns=["ingredient", "diameter_m", "stable", "reason",
                                       "message", "velocity_m_per_s", "clear_layer_time_s",
                                       "gravitational_peclet", "yield_parameter"])


def phase_ratio_for_target(*args, **kwargs):
    """Droplet fraction for a target viscosity (delegates to `phase_ratio`)."""
    from . import phase_ratio

    return phase_ratio.phase_ratio_for_target(*args, **kwargs)


def best_blend(*args, **kwargs):
    """Best blend of two or three powders (delegates to `blend.optimise_blend`)."""
    from . import blend

    return blend.optimise_blend(*args, **kwargs)


__all__ = [
    "CLOSED_FORM_INVERSES", "LoadingAnswer", "ProcessWindow", "WindowsAnswer",
    "best_blend", "calibrated", "loading_for_relative_viscosity", "loading_for_target",
    "loading_sweep_with_band", "max_loading_many", "max_loading_with_band",
    "max_loading_windows", "packing_estimator_spread", "phase_ratio_for_target",
    "storage_check",
]


# --- design-space maps: where in the recipe the product stays workable ---------------------

#: Regime of a map cell whose loadings leave no room for the liquid (nothing is predicted).
NO_LIQUID = "no liquid"
LIQUID = "liquid"
MAX_GRID = 401


def _ingredient_index(formulation: fm.Formulation, ingredient, field: str) -> int:
    """0-based index of an ingredient given by index or by name."""
    names = [i.name for i in formulation.ingredients]
    allowed = (f"an ingredient index from 0 to {len(names) - 1} or one of the names "
               + ", ".join(repr(n) for n in names)) if names else "a formulation with ingredients"
    if isinstance(ingredient, int | np.integer) and not isinstance(ingredient, bool):
        if 0 <= int(ingredient) < len(names):
            return int(ingredient)
    elif isinstance(ingredient, str) and ingredient in names:
        return names.index(ingredient)
    raise InputRangeError(field, ingredient, allowed)


def _evaluate_cells(formulation: fm.Formulation, loadings: dict, basis: str, rates):
    """Viscosity (N, M), regime (N, M) and phi/phi_max (N,) of N recipes at M shear rates.

    Recipe r is `formulation` with ingredient k's loading set to ``loadings[k][r]`` on
    `basis`; every other ingredient keeps its scenario loading. This is the one place the
    maps evaluate formulations: ``engine.evaluate(engine.vary(formulation,
    loadings=loadings, basis=basis), rates)``, every cell in one vectorised solve.
    Validity warnings of the cells are collected and returned once each (4th item).
    """
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ValidityWarning)
        res = engine.evaluate(engine.vary(formulation, loadings=loadings, basis=basis), rates)
    messages = tuple(dict.fromkeys(str(w.message) for w in caught
                                   if issubclass(w.category, ValidityWarning)))
    return res.viscosity_Pa_s, res.regime, res.headroom, messages


def _has_liquid(formulation: fm.Formulation, loadings: dict, basis: str) -> np.ndarray:
    """True for each recipe whose loadings leave a share of the formulation to the liquid."""
    ings = formulation.ingredients
    n = len(next(iter(loadings.values())))
    table = np.tile([i.loading for i in ings], (n, 1)).astype(float)
    is_mass = np.array([i.basis == "mass" for i in ings])
    for k, values in loadings.items():
        table[:, k] = values
        is_mass[k] = basis == "mass"
    ok = ((np.where(is_mass, table, 0.0).sum(axis=1) < 1.0)
          & (np.where(is_mass, 0.0, table).sum(axis=1) < 1.0))
    if ok.any():
        rho = np.array([i.density_kg_per_m3 for i in ings], dtype=float)
        phi = composition.volume_fractions(table[ok], is_mass, rho,
                                           formulation.liquid.density_kg_per_m3)
        ok[ok] = phi.sum(axis=1) < 1.0
    return ok


def _window_slug(name: str) -> str:
    slug = re.sub(r"[^0-9a-z]+", "_", str(name).lower()).strip("_")
    return slug or "window"


def _map_columns(formulation: fm.Formulation, loadings: dict, basis: str,
                 shear_rate_1_per_s, windows) -> tuple[dict, dict]:
    """The evaluated columns of a map (viscosity, headroom, regime, windows) and its attrs."""
    if basis not in ("mass", "volume"):
        raise InputRangeError("basis", basis, "'mass' or 'volume'")
    rate = np.atleast_1d(np.asarray(positive(shear_rate_1_per_s, "shear_rate_1_per_s"),
                                    dtype=float))
    if rate.size != 1:
        raise InputRangeError("shear_rate_1_per_s", f"{rate.size} values", "one shear rate")
    items = list(windows) if windows is not None else []
    checked = _windows(items) if items else []          # no windows: no pass columns
    for w in checked:
        positive(w.shear_rate_1_per_s, f"window {w.name!r} shear rate")
        for value in (w.max_viscosity_Pa_s, w.min_viscosity_Pa_s):
            if value is not None:
                positive(value, f"window {w.name!r} viscosity limit")
    slugs = [_window_slug(w.name) for w in checked]
    if len(set(slugs)) != len(slugs):
        raise InputRangeError("windows", ", ".join(w.name for w in checked),
                              "windows with distinct names")
    rates = np.concatenate([rate, [w.shear_rate_1_per_s for w in checked]])
    n = len(next(iter(loadings.values())))
    eta = np.full((n, rates.size), np.nan)
    regime = np.full((n, rates.size), NO_LIQUID, dtype=object)
    headroom = np.full(n, np.nan)
    ok = _has_liquid(formulation, loadings, basis)
    messages: tuple = ()
    if ok.any():
        eta[ok], regime[ok], headroom[ok], messages = _evaluate_cells(
            formulation, {k: np.asarray(v)[ok] for k, v in loadings.items()}, basis, rates)
    columns = {"viscosity_Pa_s": eta[:, 0], "phi_over_phi_max": headroom,
               "regime": regime[:, 0].astype(str)}
    passes = []
    for j, (w, slug) in enumerate(zip(checked, slugs, strict=True), start=1):
        v = eta[:, j]
        ok_w = np.isfinite(v)        # no flow (jammed) or no liquid fails every window
        if w.max_viscosity_Pa_s is not None:
            ok_w &= v <= w.max_viscosity_Pa_s
        if w.min_viscosity_Pa_s is not None:
            ok_w &= v >= w.min_viscosity_Pa_s
        columns[f"{slug}_viscosity_Pa_s"] = v
        columns[f"{slug}_pass"] = ok_w
        passes.append(ok_w)
    if passes:
        columns["feasible"] = np.logical_and.reduce(passes)
    attrs = {"basis": basis, "shear_rate_1_per_s": float(rate[0]),
             "windows": [dataclasses.asdict(w) | {"column": slug}
                         for w, slug in zip(checked, slugs, strict=True)],
             "warnings": messages}
    return columns, attrs


def _axis(bounds, n: int, field: str) -> np.ndarray:
    try:
        low, high = (float(v) for v in bounds)
    except (TypeError, ValueError):
        raise InputRangeError(field, bounds, "a pair (low, high) of fractions") from None
    if not (np.isfinite(low) and np.isfinite(high) and 0.0 <= low < high <= 1.0):
        raise InputRangeError(field, (low, high), "fractions with 0 <= low < high <= 1")
    return np.linspace(low, high, n)


def _grid_size(n) -> int:
    if isinstance(n, bool) or not isinstance(n, int | np.integer) or not 2 <= n <= MAX_GRID:
        raise InputRangeError("n", n, f"an integer from 2 to {MAX_GRID}")
    return int(n)


def _fractions_on(formulation: fm.Formulation, basis: str) -> np.ndarray:
    """Each ingredient's current fraction of the formulation on `basis`."""
    mix = fm.mixture(formulation)
    return np.asarray(mix.mass_fraction if basis == "mass" else mix.phi, dtype=float)


def loading_map(formulation: fm.Formulation, x_ingredient, y_ingredient, x_range, y_range,
                shear_rate_1_per_s, n: int = 41, basis: str = "mass",
                windows: Iterable | None = None) -> pd.DataFrame:
    """Viscosity over a plane of two ingredients' loadings, with process windows.

    Every cell of an ``n x n`` grid is the scenario with the two ingredients set to the
    cell's loadings (fractions of the whole formulation on `basis`) and every other
    ingredient held at its scenario loading; its viscosity at the shear rate is the one
    `formulation.predict` gives for that recipe (full flow curve: thinning, thickening, a
    non-Newtonian liquid).

    Parameters
    ----------
    formulation : Formulation
    x_ingredient, y_ingredient : int or str
        The two ingredients, by 0-based index or by name.
    x_range, y_range : tuple of float
        (low, high) loadings of each axis, fractions on `basis` (0 <= low < high <= 1).
    shear_rate_1_per_s : float
        Shear rate of the map's viscosity. [1/s]
    n : int, optional
        Grid points per axis (2 to 401; default 41).
    basis : {"mass", "volume"}, optional
        Basis of the loadings on both axes.
    windows : iterable, optional
        Process windows (`ProcessWindow`, dicts or tuples as in `max_loading_windows`); each
        is checked at its own shear rate.

    Returns
    -------
    pandas.DataFrame
        One row per cell (x varies fastest): x_loading, y_loading, viscosity_Pa_s (inf at
        and beyond the packing limit, NaN where the loadings leave no liquid),
        phi_over_phi_max, regime ("jammed" at the packing limit, "no liquid" where nothing is
        left for the liquid); per window ``<name>_viscosity_Pa_s`` and ``<name>_pass`` (the
        name in lower case, other characters as ``_``), and ``feasible`` (every window
        passes) when windows are given. A jammed or liquid-free cell fails every window.
        `attrs`: x_ingredient, y_ingredient (names), basis, shear_rate_1_per_s, windows,
        current (the scenario's own x and y loadings), warnings (validity notes, each once).

    Raises
    ------
    InputRangeError
        Unknown or identical ingredients, ranges outside 0-1, a bad grid size, basis, shear
        rate or window.

    Examples
    --------
    Illustrative call: two powders in water, a 3 x 3 map at 100 1/s.

    >>> from predictor.formulation import Formulation, Ingredient
    >>> form = Formulation(ingredients=(Ingredient("coarse", 2700.0, 0.3, diameter_m=20e-6),
    ...                                 Ingredient("fine", 2700.0, 0.1, diameter_m=2e-6)))
    >>> grid = loading_map(form, 0, "fine", (0.1, 0.3), (0.0, 0.2), 100.0, n=3)
    >>> grid[["x_loading", "y_loading"]].iloc[4].tolist()
    [0.2, 0.1]
    """
    n = _grid_size(n)
    kx = _ingredient_index(formulation, x_ingredient, "x_ingredient")
    ky = _ingredient_index(formulation, y_ingredient, "y_ingredient")
    if kx == ky:
        raise InputRangeError("y_ingredient", y_ingredient, "an ingredient other than the x one")
    xs, ys = np.meshgrid(_axis(x_range, n, "x_range"), _axis(y_range, n, "y_range"))
    x, y = xs.ravel(), ys.ravel()
    columns, attrs = _map_columns(formulation, {kx: x, ky: y}, basis, shear_rate_1_per_s,
                                  windows)
    frame = pd.DataFrame({"x_loading": x, "y_loading": y, **columns})
    now = _fractions_on(formulation, basis)
    frame.attrs.update(attrs, x_ingredient=formulation.ingredients[kx].name,
                       y_ingredient=formulation.ingredients[ky].name,
                       current={"x_loading": float(now[kx]), "y_loading": float(now[ky])})
    return frame


def loading_ternary(formulation: fm.Formulation, ingredients, shear_rate_1_per_s,
                    total: float | None = None, n: int = 21, basis: str = "mass",
                    windows: Iterable | None = None) -> pd.DataFrame:
    """Viscosity over a triangle of three ingredients (or two and the liquid).

    The three parts share a total: each point of the triangle gives their shares, and the
    loadings are share times total (fractions of the formulation on `basis`). With three
    ingredients the total is fixed (default: their present sum), so the solids are traded
    against each other; with ``"liquid"`` as one of the three the two ingredients' total is
    free and the liquid takes the rest of the triangle's total (default: the two
    ingredients plus the liquid at present). Every other ingredient keeps its scenario
    loading. Cells are evaluated as in `loading_map`.

    Parameters
    ----------
    formulation : Formulation
    ingredients : sequence of three int or str
        Ingredients by 0-based index or name; at most one may be ``"liquid"``.
    shear_rate_1_per_s : float
        Shear rate of the viscosity. [1/s]
    total : float, optional
        Sum of the three parts' fractions on `basis` (0 < total <= 1).
    n : int, optional
        Points per edge of the triangle (2 to 401; default 21): n (n + 1) / 2 cells.
    basis : {"mass", "volume"}, optional
    windows : iterable, optional
        As in `loading_map`.

    Returns
    -------
    pandas.DataFrame
        One row per point: share_1, share_2, share_3 (shares of the total, summing to 1),
        loading_1, loading_2, loading_3 (fractions on `basis`; for the liquid its share
        of the triangle's total), then the columns of `loading_map` after y_loading.
        `attrs` as in `loading_map` with `parts` (the three names), total and current
        (the scenario's shares).

    Examples
    --------
    Illustrative call: two powders and the liquid, 3 points per edge.

    >>> from predictor.formulation import Formulation, Ingredient
    >>> form = Formulation(ingredients=(Ingredient("coarse", 2700.0, 0.3, diameter_m=20e-6),
    ...                                 Ingredient("fine", 2700.0, 0.1, diameter_m=2e-6)))
    >>> tri = loading_ternary(form, (0, 1, "liquid"), 100.0, n=3)
    >>> len(tri), round(tri.attrs["total"], 6)
    (6, 1.0)
    """
    n = _grid_size(n)
    parts = list(ingredients) if isinstance(ingredients, list | tuple) else [ingredients]
    if len(parts) != 3:
        raise InputRangeError("ingredients", len(parts), "three ingredients (one may be "
                              "'liquid')")
    index = [None if p == LIQUID else _ingredient_index(formulation, p, f"ingredients[{j}]")
             for j, p in enumerate(parts)]
    solid = [k for k in index if k is not None]
    if len(set(solid)) != len(solid) or len(solid) < 2:
        raise InputRangeError("ingredients", ", ".join(map(str, parts)),
                              "three different parts, at most one of them 'liquid'")
    now = _fractions_on(formulation, basis)
    parts_now = np.array([1.0 - now.sum() if k is None else now[k] for k in index])
    if total is None:
        total = float(parts_now.sum())
    total = float(in_range(total, "total", 0.0, 1.0, low_open=True))
    i, j = np.meshgrid(np.arange(n), np.arange(n), indexing="ij")
    keep = i + j <= n - 1
    shares = np.stack([i[keep], j[keep], (n - 1) - i[keep] - j[keep]], axis=1) / (n - 1)
    loadings = {k: shares[:, m] * total for m, k in enumerate(index) if k is not None}
    columns, attrs = _map_columns(formulation, loadings, basis, shear_rate_1_per_s, windows)
    frame = pd.DataFrame({**{f"share_{m + 1}": shares[:, m] for m in range(3)},
                          **{f"loading_{m + 1}": shares[:, m] * total for m in range(3)},
                          **columns})
    names = [LIQUID if k is None else formulation.ingredients[k].name for k in index]
    frame.attrs.update(attrs, parts=names, total=total,
                       current={f"share_{m + 1}": float(parts_now[m] / parts_now.sum())
                                if parts_now.sum() > 0 else float("nan") for m in range(3)})
    return frame


__all__ += ["NO_LIQUID", "loading_map", "loading_ternary"]
