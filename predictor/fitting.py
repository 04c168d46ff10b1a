"""Calibration of the registry's relations to lab measurements (numpy and scipy only).

`fit` fits the free parameters of any suspension or emulsion relation to measured
viscosity against volume fraction; `fit_flow_curve` fits a liquid law or shear relation to
viscosity against shear rate; `compare_fits` ranks relations by AIC. All fits are weighted
least squares in log viscosity (equal relative errors by default) within the registry's
parameter bounds.

What cannot be fitted is refused with `FitError` and the reason: fewer points than free
parameters plus one, all points at one loading (or shear rate), zero or negative
viscosities, relative viscosities that look like absolute ones (mixed units), points at or
above the fitted packing limit, and data that cannot separate two parameters.
"""

from __future__ import annotations

import inspect
from dataclasses import dataclass, field

import numpy as np

from . import uncertainty
from ._checks import as_array, fraction, in_range
from .errors import FitError, InputRangeError
from .registry import ModelSpec, get_model, models

CONFIDENCE = 0.95
_PENALTY = 1e3        # log-residual given to a prediction that diverges at a data point
_GRID_BUDGET = 2000   # starting-value grid: at most about this many parameter sets


@dataclass(frozen=True, eq=False)
class FitResult:
    """A calibrated relation: parameters with intervals, residuals and fit statistics.

    `params` and `intervals` (at `confidence`, default 95 %) hold the free parameters;
    `fixed` the ones held fixed. `residuals` are ln(measured) - ln(fitted); `r2` and `rmse`
    are in log space; `aic`, `aicc`, `bic` compare relations fitted to the same data.
    `covariance` is the Jacobian estimate in the order of `params`; `bootstrap` holds the
    bootstrap parameter draws (rows) when ``interval="bootstrap"`` was asked.
    """

    model: str
    kind: str
    params: dict
    intervals: dict
    standard_errors: dict
    covariance: np.ndarray
    fixed: dict
    x: np.ndarray
    y: np.ndarray
    fitted: np.ndarray
    residuals: np.ndarray
    weights: np.ndarray
    r2: float
    rmse: float
    aic: float
    aicc: float
    bic: float
    n_points: int
    dof: int
    confidence: float
    interval_method: str
    x_name: str
    y_name: str
    bounds: dict
    at_bounds: tuple = ()
    notes: tuple = ()
    bootstrap: np.ndarray | None = field(default=None, repr=False)

    @property
    def all_params(self) -> dict:
        """Fitted and fixed parameters together, ready for the relation's function."""
        return {**self.fixed, **self.params}

    def predict(self, x):
        """The calibrated relation at `x` (volume fraction or shear rate)."""
        spec = get_model(self.model)
        return spec.func(x, **self.all_params)

    def param_samples(self, n_samples: int = 2000, seed=0) -> dict[str, np.ndarray]:
        """Samples of the free parameters: bootstrap draws if present, else N(params, cov)."""
        if self.bootstrap is not None:
            rng = np.random.default_rng(seed)
            rows = self.bootstrap[rng.integers(0, len(self.bootstrap), int(n_samples))]
            return {k: rows[:, i] for i, k in enumerate(self.params)}
        return uncertainty.sample_normal(self.params, self.covariance, n_samples, seed,
                                         bounds=self.bounds)

    def band(self, x, n_samples: int = 2000, seed=0, level: float | None = None):
        """Monte Carlo band of the calibrated relation at `x` (see `uncertainty.Band`)."""
        spec = get_model(self.model)
        return uncertainty.monte_carlo_band(spec.func, x, self.param_samples(n_samples, seed),
                                            central=self.params, fixed=self.fixed,
                                            level=level or self.confidence)

    def summary(self) -> str:
        """A few plain lines for the CLI and the app."""
        pct = f"{100 * self.confidence:g} %"
        lines = [f"{self.model}: {self.n_points} points, rmse {self.rmse:.3g} in ln(viscosity), "
                 f"R2 {self.r2:.4f}, AIC {self.aic:.2f}"]
        for k, v in self.params.items():
            lo, hi = self.intervals[k]
            lines.append(f"  {k} = {v:.4g} ({lo:.4g} to {hi:.4g}, {pct})")
        lines += [f"  {k} = {v:.4g} (fixed)" for k, v in self.fixed.items()]
        lines += [f"  note: {n}" for n in self.notes]
        return "\n".join(lines)


def fit(phi, relative_viscosity=None, model: str = "krieger-dougherty", *,
        viscosity_Pa_s=None, liquid_viscosity_Pa_s=None, fixed: dict | None = None,
        bounds: dict | None = None, weights=None, sigma_log=None, interval: str = "jacobian",
        n_bootstrap: int = 500, seed=0, confidence: float = CONFIDENCE) -> FitResult:
    r"""Fit a suspension or emulsion relation to viscosity measured against loading.

    Weighted least squares in ln(relative viscosity), within the registry's bounds, from a
    grid of starting values; intervals from the Jacobian covariance (Student t) or a
    residual bootstrap.

    Parameters
    ----------
    phi : array_like
        Volume fraction of the dispersed phase at each measurement. [-]
    relative_viscosity : array_like, optional
        Measured viscosity divided by the liquid's. [-]
    model : str, optional
        Registry name of a relation of kind "suspension" or "emulsion".
    viscosity_Pa_s : array_like, optional
        Measured absolute viscosity, instead of `relative_viscosity`; needs
        `liquid_viscosity_Pa_s`. [Pa*s]
    liquid_viscosity_Pa_s : float, optional
        Viscosity of the liquid, to make `viscosity_Pa_s` relative. [Pa*s]
    fixed : dict, optional
        Parameters held at given values (e.g. ``{"intrinsic_viscosity": 2.5}``); the others
        are fitted.
    bounds : dict of str to (float, float), optional
        Narrower bounds than the registry's for some parameters.
    weights : array_like, optional
        Relative weight of each point in the sum of squares (default 1).
    sigma_log : array_like, optional
        Known standard deviation of ln(viscosity) of each point; the covariance is then
        not rescaled by the residual variance (weights are 1/sigma_log**2).
    interval : {"jacobian", "bootstrap"}, optional
        How the confidence intervals are made.
    n_bootstrap : int, optional
        Number of bootstrap refits.
    seed : int, optional
        Seed of the bootstrap.
    confidence : float, optional
        Confidence level of the intervals.

    Returns
    -------
    FitResult

    Raises
    ------
    FitError
        The data cannot be fitted; the message gives the reason (see the module docstring).
    InputRangeError
        Non-finite values, phi outside 0-1, unknown or out-of-range parameters.

    Notes
    -----
    The objective is :math:`\sum_i w_i [\ln y_i - \ln f(\phi_i;\theta)]^2`. With
    :math:`s^2` the weighted residual sum of squares over n - p, the covariance is
    :math:`s^2 (J^\mathsf{T} W J)^{-1}` and the interval :math:`\theta \pm t_{n-p}\,
    \mathrm{se}`, the standard large-sample results of nonlinear regression (Ch. 2 of
    [1]_). The information criteria use the Gaussian likelihood with the variance
    estimated, k = p + 1 (Akaike [2]_, Schwarz [3]_; small-sample AICc of Hurvich & Tsai
    [4]_). The bootstrap resamples the weighted residuals, centred and inflated by
    sqrt(n / (n - p)) (residual resampling, Ch. 9 of [5]_), refits, and takes percentile
    intervals. Intervals are clipped to the parameter bounds.

    phi_max is bounded below by the largest phi measured: a fit that ends on that bound
    means the data reach the packing limit and is refused.

    References
    ----------
    .. [1] D. M. Bates and D. G. Watts, *Nonlinear Regression Analysis and Its
       Applications*. New York: Wiley, 1988, ch. 2.
    .. [2] H. Akaike, "A new look at the statistical model identification," IEEE Trans.
       Autom. Control, vol. 19, no. 6, pp. 716-723, 1974.
    .. [3] G. Schwarz, "Estimating the dimension of a model," Ann. Stat., vol. 6, no. 2,
       pp. 461-464, 1978.
    .. [4] C. M. Hurvich and C.-L. Tsai, "Regression and time series model selection in
       small samples," Biometrika, vol. 76, no. 2, pp. 297-307, 1989.
    .. [5] B. Efron and R. J. Tibshirani, *An Introduction to the Bootstrap*. New York:
       Chapman & Hall, 1993, ch. 9.

    Examples
    --------
    Illustrative call: noise-free Krieger-Dougherty data are recovered exactly.

    >>> import predictor.suspension  # registers the relations
    >>> phi = np.array([0.1, 0.2, 0.3, 0.4, 0.45, 0.5])
    >>> eta = (1 - phi / 0.6) ** (-3.0 * 0.6)
    >>> r = fit(phi, eta, model="krieger-dougherty")
    >>> round(r.params["phi_max"], 4), round(r.params["intrinsic_viscosity"], 4)
    (0.6, 3.0)
    """
    spec = get_model(model, kind=("suspension", "emulsion"))
    x = _series(fraction(phi, "phi"), "phi")
    if (relative_viscosity is None) == (viscosity_Pa_s is None):
        raise FitError("give either relative_viscosity or viscosity_Pa_s (with "
                       "liquid_viscosity_Pa_s), not both and not neither: mixed units")
    if viscosity_Pa_s is not None:
        if liquid_viscosity_Pa_s is None:
            raise FitError("viscosity_Pa_s needs liquid_viscosity_Pa_s to make it relative")
        eta_l = float(in_range(liquid_viscosity_Pa_s, "liquid_viscosity_Pa_s", 0.0, np.inf,
                               low_open=True))
        y = _positive_series(viscosity_Pa_s, "viscosity_Pa_s", x.size) / eta_l
    else:
        y = _positive_series(relative_viscosity, "relative_viscosity", x.size)
        low = y < 0.5
        if np.any(low):
            i = int(np.argmax(low))
            raise FitError(
                f"relative_viscosity = {y[i]:.4g} at point {i} is far below 1 (the liquid "
                "alone); it looks like an absolute viscosity: mixed units. Pass "
                "viscosity_Pa_s= with liquid_viscosity_Pa_s= instead.")
    return _fit(spec, x, y, x_name="phi", y_name="relative_viscosity", fixed=fixed,
                bounds=bounds, weights=weights, sigma_log=sigma_log, interval=interval,
                n_bootstrap=n_bootstrap, seed=seed, confidence=confidence)


def fit_flow_curve(shear_rate_1_per_s, viscosity_Pa_s, model: str, *,
                   fixed: dict | None = None, bounds: dict | None = None, weights=None,
                   sigma_log=None, interval: str = "jacobian", n_bootstrap: int = 500,
                   seed=0, confidence: float = CONFIDENCE) -> FitResult:
    """Fit a liquid law or shear relation to viscosity measured against shear rate.

    Same method, checks and options as `fit` (weighted least squares in ln viscosity).

    Parameters
    ----------
    shear_rate_1_per_s : array_like
        Shear rate of each measurement. [1/s]
    viscosity_Pa_s : array_like
        Measured viscosity, in the unit the relation returns (Pa*s for the liquid laws,
        relative viscosity for relative shear relations). [Pa*s]
    model : str
        Registry name of a relation of kind "liquid" or "shear" whose first argument is
        the shear rate.
    fixed, bounds, weights, sigma_log, interval, n_bootstrap, seed, confidence
        As in `fit`.

    Returns
    -------
    FitResult

    Raises
    ------
    FitError
        Too few points, one shear rate only, zero or negative viscosities, or parameters
        the data cannot separate.
    """
    spec = get_model(model, kind=("liquid", "shear"))
    first = next(iter(inspect.signature(spec.func).parameters))
    if "shear_rate" not in first:
        raise FitError(f"{spec.name} is a function of {first}, not of the shear rate; "
                       "it cannot be fitted to a flow curve")
    x = _series(in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf,
                         low_open=True), "shear_rate_1_per_s")
    y = _positive_series(viscosity_Pa_s, "viscosity_Pa_s", x.size)
    return _fit(spec, x, y, x_name="shear_rate_1_per_s", y_name="viscosity_Pa_s", fixed=fixed,
                bounds=bounds, weights=weights, sigma_log=sigma_log, interval=interval,
                n_bootstrap=n_bootstrap, seed=seed, confidence=confidence)


@dataclass(frozen=True, eq=False)
class ModelComparison:
    """Relations fitted to the same data, best (lowest AIC) first.

    `failed` maps the relations that could not be fitted to the reason.
    """

    fits: tuple
    failed: dict

    @property
    def best(self) -> FitResult:
        if not self.fits:
            raise FitError("no relation could be fitted: " + "; ".join(
                f"{k}: {v}" for k, v in self.failed.items()))
        return self.fits[0]

    def rows(self) -> list[dict]:
        """One dict per fitted relation: AIC, delta AIC, Akaike weight, AICc, BIC, rmse."""
        if not self.fits:
            return []
        aic = np.array([f.aic for f in self.fits])
        delta = aic - aic.min()
        w = np.exp(-0.5 * delta)
        w = w / w.sum()
        return [{"model": f.model, "n_params": len(f.params), "aic": f.aic,
                 "delta_aic": float(d), "akaike_weight": float(wi), "aicc": f.aicc,
                 "bic": f.bic, "rmse_log": f.rmse, "r2_log": f.r2,
                 "params": ", ".join(f"{k}={v:.4g}" for k, v in f.params.items()),
                 "notes": " ".join(f.notes)}
                for f, d, wi in zip(self.fits, delta, w, strict=True)]


def compare_fits(phi, relative_viscosity=None, models_to_try=None, *,
                 kind: str = "suspension", **options) -> ModelComparison:
    """Fit several relations to the same data and rank them by AIC.

    Parameters
    ----------
    phi : array_like
        Volume fraction at each measurement. [-]
    relative_viscosity : array_like, optional
        Measured relative viscosity. [-]
    models_to_try : sequence of str, optional
        Registry names; default every relation of `kind`.
    kind : {"suspension", "emulsion"}, optional
        Used when `models_to_try` is not given.
    **options
        Passed to `fit` (e.g. ``viscosity_Pa_s``, ``liquid_viscosity_Pa_s``,
        ``weights``). ``fixed`` entries are applied to the relations that have them.

    Returns
    -------
    ModelComparison
        Relations that cannot be fitted are listed in `failed` with the reason.

    Notes
    -----
    An AIC difference below about 2 means the data support both relations about equally;
    above about 10, essentially none for the worse one (the rule of thumb of Burnham &
    Anderson, *Model Selection and Multimodel Inference*, 2nd ed., Springer, 2002,
    Sec. 2.6; from memory, not checked against the source).
    """
    names = list(models_to_try) if models_to_try is not None else [
        s.name for s in models(kind)]
    fixed_all = dict(options.pop("fixed", None) or {})
    fits, failed = [], {}
    for name in names:
        spec = get_model(name, kind=("suspension", "emulsion"))
        fixed = {k: v for k, v in fixed_all.items() if k in spec.param_names()}
        try:
            fits.append(fit(phi, relative_viscosity, spec.name, fixed=fixed, **options))
        except FitError as err:
            failed[spec.name] = str(err)
    fits.sort(key=lambda f: f.aic)
    return ModelComparison(tuple(fits), failed)


# --- the shared machinery -------------------------------------------------------------


def _series(x: np.ndarray, field: str) -> np.ndarray:
    x = np.atleast_1d(x).astype(float)
    if x.ndim != 1:
        raise InputRangeError(field, x.size, "a one-dimensional series of measurements")
    return x


def _positive_series(values, field: str, n: int) -> np.ndarray:
    y = np.atleast_1d(as_array(values, field)).astype(float)
    if y.shape != (n,):
        raise InputRangeError(field, y.size, f"one value per measurement ({n})")
    bad = y <= 0
    if np.any(bad):
        i = int(np.argmax(bad))
        raise FitError(f"{field} = {y[i]:.4g} at point {i}: viscosities must be positive "
                       "(ln of zero or a negative value has no meaning)")
    return y


class _Problem:
    """Free parameters in the optimiser's space: ln(theta) where the bounds span decades."""

    def __init__(self, spec: ModelSpec, free: list[str], bounds: dict):
        self.spec, self.free = spec, free
        self.low = np.array([bounds[k][0] for k in free], dtype=float)
        self.high = np.array([bounds[k][1] for k in free], dtype=float)
        self.log = (self.low > 0) & np.isfinite(self.high) & (self.high / np.where(
            self.low > 0, self.low, 1.0) > 100.0)

    def to_u(self, theta):
        return np.where(self.log, np.log(np.where(self.log, theta, 1.0)), theta)

    def to_theta(self, u):
        return np.where(self.log, np.exp(np.where(self.log, u, 0.0)), u)

    def u_bounds(self):
        return self.to_u(self.low), self.to_u(self.high)


def _grid(problem: _Problem, default: np.ndarray) -> np.ndarray:
    """Starting values: a grid inside the bounds (log-spaced where fitted in logs)."""
    p = len(problem.free)
    m = int(max(2, min(7, np.floor(_GRID_BUDGET ** (1.0 / p)))))
    axes = []
    ulo, uhi = problem.u_bounds()
    for i in range(p):
        if np.isfinite(ulo[i]) and np.isfinite(uhi[i]):
            inner = np.linspace(ulo[i], uhi[i], m + 2)[1:-1]
            axes.append(np.append(inner, problem.to_u(default)[i]))
        else:
            d = default[i]
            axes.append(np.array([d - 1, d, d + 1]) if d == 0 else d * np.array([0.3, 1, 3]))
    mesh = np.meshgrid(*axes, indexing="ij")
    return np.stack([g.reshape(-1) for g in mesh], axis=-1)


def _fit(spec: ModelSpec, x, y, *, x_name, y_name, fixed, bounds, weights, sigma_log,
         interval, n_bootstrap, seed, confidence) -> FitResult:
    from scipy import optimize  # imported on first use: `import predictor` stays quick

    confidence = float(in_range(confidence, "confidence", 0.0, 1.0, low_open=True,
                                high_open=True))
    if interval not in ("jacobian", "bootstrap"):
        raise InputRangeError("interval", interval, "'jacobian' or 'bootstrap'")
    fixed = dict(fixed or {})
    spec.check_params(fixed)  # unknown names or values out of bounds raise
    free = [k for k in spec.param_names() if k not in fixed]
    n, p = x.size, len(free)
    what = "loading" if x_name == "phi" else "shear rate"
    if n < p + 1:
        raise FitError(f"{n} points cannot fit {p} free parameters of {spec.name} "
                       f"({', '.join(free)}); need at least {p + 1} points, or fix some "
                       "parameters (fixed={...})")
    distinct = np.unique(x).size
    if distinct < 2 or distinct < p:
        raise FitError(f"all points are at {distinct} {what}(s) ({np.unique(x)[0]:.4g}"
                       f"{'' if distinct == 1 else ', ...'}); {p} free parameters need at "
                       f"least {max(2, p)} different {what}s")

    w = _weights(weights, sigma_log, n)
    absolute = sigma_log is not None
    lims = _bounds(spec, free, fixed, bounds, x, x_name)
    problem = _Problem(spec, free, lims)
    ly = np.log(y)
    sw = np.sqrt(w)

    def log_model(theta_rows):
        """ln f for parameter rows (k, p) -> (k, n); inf/NaN where it diverges or fails."""
        kw = {k: theta_rows[:, i][:, None] for i, k in enumerate(free)}
        with np.errstate(all="ignore"):
            try:
                return np.log(np.asarray(spec.func(x[None, :], **kw, **fixed), dtype=float))
            except (ValueError, ArithmeticError):
                out = np.full((len(theta_rows), n), np.inf)
                for j, row in enumerate(theta_rows):
                    try:
                        out[j] = np.log(np.asarray(spec.func(
                            x, **dict(zip(free, row, strict=True)), **fixed), dtype=float))
                    except (ValueError, ArithmeticError):
                        pass
                return out

    def residuals(u):
        lf = log_model(problem.to_theta(u)[None, :])[0]
        r = sw * (ly - lf)
        return np.where(np.isfinite(r), r, _PENALTY)

    ulo, uhi = problem.u_bounds()
    if p:
        default = np.clip(np.array([spec.defaults().get(k, 1.0) for k in free], float),
                          problem.low, problem.high)
        starts = _grid(problem, default)
        lf = log_model(problem.to_theta(starts))
        cost = np.sum(np.where(np.isfinite(lf), w * (ly - lf) ** 2, _PENALTY**2), axis=1)
        order = np.argsort(cost)
        candidates = [starts[order[0]], problem.to_u(default)]
        best = None
        for u0 in candidates:
            u0 = np.clip(u0, ulo + 1e-12 * np.abs(ulo), uhi - 1e-12 * np.abs(uhi))
            res = optimize.least_squares(residuals, u0, bounds=(ulo, uhi), jac="3-point",
                                         x_scale="jac", xtol=1e-12, ftol=1e-12, gtol=1e-12,
                                         max_nfev=2000)
            if best is None or res.cost < best.cost:
                best = res
        u_hat = best.x
        theta = problem.to_theta(u_hat)
    else:
        u_hat = theta = np.zeros(0)

    params = dict(zip(free, (float(t) for t in theta), strict=True))
    lf = log_model(theta[None, :])[0] if p else np.log(
        np.asarray(spec.func(x, **fixed), dtype=float))
    if not np.all(np.isfinite(lf)):
        i = int(np.argmax(~np.isfinite(lf)))
        raise FitError(f"{spec.name} diverges at phi = {x[i]:.4g} for every parameter set "
                       "allowed: points at or above the packing limit cannot be fitted")
    notes = []
    if "phi_max" in params and params["phi_max"] <= np.max(x) * (1 + 1e-4):
        raise FitError(
            f"phi_max fitted at {params['phi_max']:.4g}, at the highest loading measured "
            f"(phi = {np.max(x):.4g}): points at or above the fitted packing limit cannot be "
            "fitted; drop the highest loadings or fix phi_max")

    raw = ly - lf
    rss = max(float(np.sum(w * raw**2)), 1e-300)   # exact data: keep logs finite
    dof = n - p
    s2 = 1.0 if absolute else rss / dof
    cov = np.zeros((p, p))
    if p:
        jac_u = -sw[:, None] * _jacobian_u(log_model, problem, u_hat)
        dtheta = np.where(problem.log, theta, 1.0)       # d theta / d u
        jac = jac_u / dtheta
        jtj = jac.T @ jac
        scale = np.sqrt(np.diag(jtj))
        if np.any(scale == 0) or np.linalg.cond(jtj / np.outer(scale, scale)) > 1e12:
            raise FitError(f"the data do not separate the parameters {', '.join(free)} of "
                           f"{spec.name}; fix one of them (fixed={{...}}) or measure over a "
                           "wider range")
        cov = s2 * np.linalg.inv(jtj)
        cov = 0.5 * (cov + cov.T)
    se = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    from scipy import stats  # on first use: about 0.2 s to import

    tq = float(stats.t.ppf(0.5 * (1 + confidence), dof)) if not absolute else float(
        stats.norm.ppf(0.5 * (1 + confidence)))
    loose = [k for i, k in enumerate(free)
             if theta[i] - tq * se[i] <= lims[k][0] and theta[i] + tq * se[i] >= lims[k][1]]
    if loose:
        k = loose[0]
        raise FitError(f"the data do not determine {k} of {spec.name}: its "
                       f"{100 * confidence:g} % interval spans the whole allowed range "
                       f"{lims[k][0]:.4g} to {lims[k][1]:.4g}; fix it (fixed={{...}}) or "
                       "measure over a wider range")
    intervals = {k: (float(max(theta[i] - tq * se[i], lims[k][0])),
                     float(min(theta[i] + tq * se[i], lims[k][1])))
                 for i, k in enumerate(free)}
    at_bounds = tuple(k for i, k in enumerate(free)
                      if np.isclose(theta[i], lims[k][0], rtol=1e-6, atol=0)
                      or np.isclose(theta[i], lims[k][1], rtol=1e-6, atol=0))
    if at_bounds:
        notes.append(f"{', '.join(at_bounds)} ended on a bound; its interval is not reliable")

    boot = None
    method = "jacobian"
    if interval == "bootstrap" and p:
        boot = _bootstrap(residuals, ly, lf, w, sw, problem, u_hat, dof, n_bootstrap, seed)
        if len(boot) < 0.9 * n_bootstrap:
            notes.append(f"{n_bootstrap - len(boot)} of {n_bootstrap} bootstrap refits failed")
        alpha = 1 - confidence
        q = np.quantile(boot, [alpha / 2, 1 - alpha / 2], axis=0)
        intervals = {k: (float(q[0, i]), float(q[1, i])) for i, k in enumerate(free)}
        method = "bootstrap"

    message = spec.validity_message(x, {**fixed, **params}) if x_name == "phi" else None
    if message:
        notes.append(message)
    k_ic = p + (0 if absolute else 1)
    log_l = -0.5 * (n * np.log(2 * np.pi * rss / n) + n) + 0.5 * np.sum(np.log(w)) \
        if not absolute else -0.5 * (rss + np.sum(np.log(2 * np.pi / w)))
    aic = float(-2 * log_l + 2 * k_ic)
    aicc = float(aic + 2 * k_ic * (k_ic + 1) / (n - k_ic - 1)) if n - k_ic - 1 > 0 else np.inf
    bic = float(-2 * log_l + k_ic * np.log(n))
    mean = np.sum(w * ly) / np.sum(w)
    ss_tot = float(np.sum(w * (ly - mean) ** 2))
    r2 = 1.0 - rss / ss_tot if ss_tot > 0 else float("nan")
    return FitResult(
        model=spec.name, kind=spec.kind, params=params, intervals=intervals,
        standard_errors=dict(zip(free, (float(s) for s in se), strict=True)), covariance=cov,
        fixed={k: float(v) for k, v in fixed.items()}, x=x, y=y, fitted=np.exp(lf),
        residuals=raw, weights=w, r2=float(r2), rmse=float(np.sqrt(np.mean(raw**2))),
        aic=aic, aicc=aicc, bic=bic, n_points=n, dof=dof, confidence=confidence,
        interval_method=method, x_name=x_name, y_name=y_name,
        bounds={k: lims[k] for k in free}, at_bounds=at_bounds, notes=tuple(notes),
        bootstrap=boot)


def _weights(weights, sigma_log, n: int) -> np.ndarray:
    if weights is not None and sigma_log is not None:
        raise InputRangeError("weights", "both", "either weights or sigma_log, not both")
    if sigma_log is not None:
        s = np.broadcast_to(in_range(sigma_log, "sigma_log", 0.0, np.inf, low_open=True),
                            (n,))
        return 1.0 / s**2
    if weights is None:
        return np.ones(n)
    w = np.broadcast_to(in_range(weights, "weights", 0.0, np.inf, low_open=True), (n,))
    return np.array(w, dtype=float)


def _bounds(spec, free, fixed, user, x, x_name) -> dict:
    """Registry bounds, narrowed by the user's; phi_max kept above every phi measured."""
    lims = {p.name: tuple(map(float, p.bounds)) for p in spec.params if p.name in free}
    for k, (lo, hi) in (user or {}).items():
        if k not in lims:
            raise InputRangeError("bounds", k, f"one of the free parameters: {', '.join(free)}")
        reg_lo, reg_hi = lims[k]
        lo, hi = max(float(lo), reg_lo), min(float(hi), reg_hi)
        if not lo < hi:
            raise InputRangeError(f"bounds[{k}]", (lo, hi),
                                  f"a range inside {reg_lo:g} to {reg_hi:g}")
        lims[k] = (lo, hi)
    x_max = float(np.max(x))
    if x_name == "phi" and "phi_max" in fixed and x_max >= float(fixed["phi_max"]):
        raise FitError(f"phi = {x_max:.4g} is at or above the fixed phi_max = "
                       f"{float(fixed['phi_max']):.4g}: points at or above the packing limit "
                       "cannot be fitted")
    if x_name == "phi" and "phi_max" in lims:
        lo, hi = lims["phi_max"]
        if x_max >= hi:
            raise FitError(f"phi = {x_max:.4g} is at or above the largest phi_max allowed "
                           f"({hi:g}): points at or above the packing limit cannot be fitted")
        lims["phi_max"] = (max(lo, x_max * (1 + 1e-6)), hi)
    return lims


def _jacobian_u(log_model, problem, u):
    """d ln f / d u by central differences, all perturbed rows in one call."""
    p = u.size
    h = 1e-6 * np.maximum(np.abs(u), 1e-3)
    ulo, uhi = problem.u_bounds()
    up = np.minimum(u + h, uhi)
    dn = np.maximum(u - h, ulo)
    rows = np.repeat(u[None, :], 2 * p, axis=0)
    rows[np.arange(p), np.arange(p)] = up
    rows[p + np.arange(p), np.arange(p)] = dn
    lf = log_model(problem.to_theta(rows))
    return ((lf[:p] - lf[p:]) / (up - dn)[:, None]).T


def _bootstrap(residuals, ly, lf, w, sw, problem, u_hat, dof, n_boot, seed):
    if isinstance(n_boot, bool) or not isinstance(n_boot, int | np.integer) or n_boot < 20:
        raise InputRangeError("n_bootstrap", n_boot, "an integer of at least 20")
    from scipy import optimize

    rng = np.random.default_rng(seed)
    n = ly.size
    std = sw * (ly - lf) * np.sqrt(n / dof)
    std = std - std.mean()
    ulo, uhi = problem.u_bounds()
    draws = []
    for _ in range(int(n_boot)):
        ly_star = lf + rng.choice(std, n, replace=True) / sw

        def res_star(u, ly_star=ly_star):
            return residuals(u) + sw * (ly_star - ly)

        try:
            r = optimize.least_squares(res_star, u_hat, bounds=(ulo, uhi), jac="2-point",
                                       x_scale="jac", max_nfev=500)
        except (ValueError, np.linalg.LinAlgError):
            continue
        if r.success:
            draws.append(problem.to_theta(r.x))
    return np.array(draws).reshape(-1, u_hat.size)
