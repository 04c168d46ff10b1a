"""Uncertainty bands on predictions: seeded Monte Carlo and a documented linearisation.

Pure numpy. A band is built from samples of a relation's parameters (from a calibration's
covariance or bootstrap, from the spread of packing estimators, or from a user-given
standard deviation) and the relation evaluated on all samples at once (one broadcast call,
samples along the first axis).

Conventions for the whole module:

- a sample that diverges (``inf``) is kept, never dropped: where more than the tail share
  of samples diverge, the upper end of the band is ``inf``, so a band never hides a
  divergence near phi_max;
- the band always contains the central prediction (the relation at the central
  parameters): where sampling puts the central value outside the sample quantiles, which
  happens only for strongly non-linear relations, the band is widened to include it;
- the quantiles are the order statistics just outside the nominal tail probabilities
  (conservative, never interpolated, so ``inf`` samples cannot produce NaN).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from statistics import NormalDist

import numpy as np

from ._checks import as_array, in_range
from .errors import InputRangeError


@dataclass(frozen=True, eq=False)
class Band:
    """A central prediction with a lower and upper bound at a confidence `level`.

    `divergent_fraction` is the share of samples that diverged (``inf``) at each point;
    `method` says how the band was made ("monte-carlo" or "linearised").
    """

    x: np.ndarray
    central: np.ndarray
    low: np.ndarray
    high: np.ndarray
    level: float
    method: str
    n_samples: int
    divergent_fraction: np.ndarray

    def contains(self, values) -> np.ndarray:
        """True where `values` lie within [low, high]."""
        values = np.asarray(values, dtype=float)
        return (values >= self.low) & (values <= self.high)

    @property
    def relative_width(self) -> np.ndarray:
        """(high - low) / central; ``inf`` where the band diverges. [-]"""
        with np.errstate(divide="ignore", invalid="ignore"):
            return (self.high - self.low) / self.central


def _level(level) -> float:
    return float(in_range(level, "level", 0.0, 1.0, low_open=True, high_open=True))


def _rng(seed) -> np.random.Generator:
    if isinstance(seed, np.random.Generator):
        return seed
    if seed is None or isinstance(seed, bool) or not isinstance(seed, int | np.integer):
        raise InputRangeError("seed", seed, "an integer (results must be reproducible)")
    return np.random.default_rng(int(seed))


def _n_samples(n) -> int:
    if isinstance(n, bool) or not isinstance(n, int | np.integer) or not 2 <= n <= 10**7:
        raise InputRangeError("n_samples", n, "an integer from 2 to 1e7")
    return int(n)


def _clip(values: dict, bounds: dict | None) -> dict:
    if not bounds:
        return values
    return {k: np.clip(v, *bounds[k]) if k in bounds else v for k, v in values.items()}


def sample_normal(mean: dict, covariance, n_samples: int = 2000, seed=0,
                  bounds: dict | None = None) -> dict[str, np.ndarray]:
    r"""Correlated normal samples of named parameters.

    Draws from the multivariate normal N(mean, covariance), the large-sample distribution of
    least-squares estimates, and clips each parameter to its `bounds` (the registry's
    physical limits, e.g. phi_max <= 1).

    Parameters
    ----------
    mean : dict of str to float
        Central value of each parameter, in the order of `covariance`'s rows.
    covariance : array_like, shape (p, p)
        Covariance matrix of the parameters.
    n_samples : int, optional
        Number of samples.
    seed : int or numpy.random.Generator, optional
        Seed of the random generator; the same seed gives the same samples.
    bounds : dict of str to (float, float), optional
        Limits each sample is clipped to.

    Returns
    -------
    samples : dict of str to numpy.ndarray
        One array of shape (n_samples,) per parameter.

    Raises
    ------
    InputRangeError
        A covariance of the wrong shape, not symmetric, or with a negative variance.

    Examples
    --------
    Illustrative call:

    >>> s = sample_normal({"phi_max": 0.6}, [[1e-4]], n_samples=5000, seed=1)
    >>> round(float(s["phi_max"].std()), 3)
    0.01
    """
    names = list(mean)
    mu = as_array([mean[k] for k in names], "mean")
    cov = as_array(covariance, "covariance").reshape(len(names), len(names)) \
        if np.size(covariance) == len(names) ** 2 else None
    if cov is None:
        raise InputRangeError("covariance", np.size(covariance),
                              f"a {len(names)} x {len(names)} matrix for {', '.join(names)}")
    if not np.allclose(cov, cov.T, rtol=1e-8, atol=1e-300) or np.any(np.diag(cov) < 0):
        raise InputRangeError("covariance", float(np.min(np.diag(cov))),
                              "a symmetric matrix with non-negative variances")
    n = _n_samples(n_samples)
    rng = _rng(seed)
    # Eigen-decomposition tolerates a singular (e.g. zero) covariance, unlike Cholesky.
    vals, vecs = np.linalg.eigh(cov)
    root = vecs * np.sqrt(np.clip(vals, 0.0, None))
    draws = mu + rng.standard_normal((n, len(names))) @ root.T
    return _clip({k: draws[:, i] for i, k in enumerate(names)}, bounds)


def sample_independent(central: dict, standard_deviation: dict, n_samples: int = 2000,
                       seed=0, bounds: dict | None = None) -> dict[str, np.ndarray]:
    """Independent normal samples around central values (user-given uncertainties).

    Parameters
    ----------
    central : dict of str to float
        Central value of each quantity.
    standard_deviation : dict of str to float
        Standard deviation of some of the quantities (>= 0); the others stay fixed.
    n_samples : int, optional
        Number of samples.
    seed : int or numpy.random.Generator, optional
        Seed of the random generator.
    bounds : dict of str to (float, float), optional
        Limits each sample is clipped to.

    Returns
    -------
    samples : dict of str to numpy.ndarray
        Arrays of shape (n_samples,) for every key of `central`.

    Examples
    --------
    Illustrative call:

    >>> s = sample_independent({"phi_max": 0.6, "intrinsic_viscosity": 2.5},
    ...                        {"phi_max": 0.02}, n_samples=4, seed=0)
    >>> s["intrinsic_viscosity"].tolist()
    [2.5, 2.5, 2.5, 2.5]
    """
    n = _n_samples(n_samples)
    rng = _rng(seed)
    out = {}
    for key in central:
        mu = float(as_array(central[key], key))
        sd = standard_deviation.get(key, 0.0)
        sd = float(in_range(sd, f"standard deviation of {key}", 0.0, np.inf))
        out[key] = mu + sd * rng.standard_normal(n) if sd > 0 else np.full(n, mu)
    unknown = set(standard_deviation) - set(central)
    if unknown:
        name = sorted(unknown)[0]
        raise InputRangeError("standard deviation", name,
                              f"one of the quantities {', '.join(central)}")
    return _clip(out, bounds)


def quantile_band(values, level: float = 0.95):
    """Lower and upper order statistics of samples along axis 0 (``inf`` kept).

    Parameters
    ----------
    values : array_like, shape (n_samples, ...)
        Sampled predictions; ``inf`` marks a diverged sample.
    level : float, optional
        Central probability between the two bounds.

    Returns
    -------
    low, high : numpy.ndarray
        The order statistics of rank floor(alpha/2 (S - 1)) and ceil((1 - alpha/2)(S - 1)),
        alpha = 1 - level, S the number of samples.

    Examples
    --------
    >>> low, high = quantile_band(np.arange(101.0)[:, None], level=0.9)
    >>> float(low[0]), float(high[0])
    (5.0, 95.0)
    """
    level = _level(level)
    v = np.sort(np.asarray(values, dtype=float), axis=0)
    s = v.shape[0]
    alpha = 1.0 - level
    k_low = int(np.floor(0.5 * alpha * (s - 1) + 1e-9))
    k_high = int(np.ceil((1.0 - 0.5 * alpha) * (s - 1) - 1e-9))
    return v[k_low], v[k_high]


def monte_carlo_band(func: Callable, x, samples: dict, *, central: dict | None = None,
                     fixed: dict | None = None, level: float = 0.95) -> Band:
    r"""Band of a vectorised relation over parameter samples, in one broadcast call.

    Evaluates ``func(x[None, :], **{name: samples[name][:, None]}, **fixed)`` (shape
    (S, n)) and takes the order statistics of every column.

    Parameters
    ----------
    func : callable
        A vectorised relation, e.g. `suspension.krieger_dougherty`.
    x : array_like, shape (n,)
        Points where the band is wanted (e.g. volume fractions). [-]
    samples : dict of str to array_like, shape (S,)
        Samples of the uncertain parameters.
    central : dict of str to float, optional
        Central parameters; default the median of each sample.
    fixed : dict, optional
        Parameters held fixed.
    level : float, optional
        Confidence level of the band.

    Returns
    -------
    Band

    Notes
    -----
    Propagation of distributions by Monte Carlo follows Supplement 1 of the GUM [1]_
    (coverage interval from the sorted model values); our choice of conservative order
    statistics is explained in the module docstring.

    References
    ----------
    .. [1] JCGM 101:2008, "Evaluation of measurement data - Supplement 1 to the Guide to the
       expression of uncertainty in measurement - Propagation of distributions using a
       Monte Carlo method," BIPM, 2008, Sec. 7.7.

    Examples
    --------
    Illustrative call: phi_max known to +-0.02 (one standard deviation).

    >>> from predictor.suspension import krieger_dougherty
    >>> s = sample_independent({"phi_max": 0.60}, {"phi_max": 0.02}, 2000, seed=0)
    >>> b = monte_carlo_band(krieger_dougherty, [0.3, 0.55, 0.59], s,
    ...                      fixed={"intrinsic_viscosity": 2.5})
    >>> bool(np.all(b.low <= b.central)) and bool(np.all(b.central <= b.high))
    True
    >>> bool(np.isinf(b.high[-1]))
    True
    """
    level = _level(level)
    xs = np.atleast_1d(as_array(x, "x"))
    if not samples:
        raise InputRangeError("samples", 0, "at least one uncertain parameter")
    arrays = {k: np.asarray(v, dtype=float).reshape(-1) for k, v in samples.items()}
    sizes = {v.size for v in arrays.values()}
    if len(sizes) != 1:
        raise InputRangeError("samples", min(sizes), "the same number of samples for each")
    fixed = dict(fixed or {})
    centre = central or {k: float(np.median(v)) for k, v in arrays.items()}
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        values = np.asarray(func(xs[None, :], **{k: v[:, None] for k, v in arrays.items()},
                                 **fixed), dtype=float)
        mid = np.asarray(func(xs, **centre, **fixed), dtype=float)
    values = np.where(np.isnan(values), np.inf, values)
    low, high = quantile_band(values, level)
    return Band(xs, mid, np.minimum(low, mid), np.maximum(high, mid), level, "monte-carlo",
                values.shape[0], np.mean(np.isinf(values), axis=0))


def linearised_band(func: Callable, x, params: dict, covariance, *, fixed: dict | None = None,
                    level: float = 0.95, relative_step: float = 1e-6) -> Band:
    r"""Band of a relation from a first-order (delta-method) propagation in log space.

    Parameters
    ----------
    func : callable
        A vectorised relation returning positive values.
    x : array_like, shape (n,)
        Points where the band is wanted. [-]
    params : dict of str to float
        Central values of the uncertain parameters, in the order of `covariance`.
    covariance : array_like, shape (p, p)
        Their covariance.
    fixed : dict, optional
        Parameters held fixed.
    level : float, optional
        Confidence level (normal quantile).
    relative_step : float, optional
        Relative step of the central finite differences.

    Returns
    -------
    Band
        ``inf`` bounds where the central value or a finite-difference neighbour diverges.

    Notes
    -----
    With g the gradient of ln f with respect to the parameters and C their covariance,

    .. math:: \ln f \pm z_{(1+\mathrm{level})/2} \sqrt{g^\mathsf{T} C g}

    (the law of propagation of uncertainty, Eq. (13) of [1]_, applied to ln f). Near a
    divergence the linearisation underestimates the upper side; prefer
    `monte_carlo_band` there.

    References
    ----------
    .. [1] JCGM 100:2008, "Evaluation of measurement data - Guide to the expression of
       uncertainty in measurement," BIPM, 2008, Sec. 5.1.2.

    Examples
    --------
    Illustrative call:

    >>> from predictor.suspension import krieger_dougherty
    >>> b = linearised_band(krieger_dougherty, [0.3], {"phi_max": 0.6}, [[1e-4]],
    ...                     fixed={"intrinsic_viscosity": 2.5})
    >>> bool(b.low[0] < b.central[0] < b.high[0])
    True
    """
    level = _level(level)
    xs = np.atleast_1d(as_array(x, "x"))
    names = list(params)
    theta = as_array([params[k] for k in names], "params")
    cov = as_array(covariance, "covariance").reshape(len(names), len(names))
    fixed = dict(fixed or {})
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        mid = np.asarray(func(xs, **dict(zip(names, theta, strict=True)), **fixed), float)
        grads = []
        for i in range(len(names)):
            h = relative_step * max(abs(theta[i]), 1e-12)
            up, down = theta.copy(), theta.copy()
            up[i] += h
            down[i] -= h
            f_up = np.log(np.asarray(func(xs, **dict(zip(names, up, strict=True)), **fixed)))
            f_dn = np.log(np.asarray(func(xs, **dict(zip(names, down, strict=True)), **fixed)))
            grads.append((f_up - f_dn) / (2 * h))
        g = np.stack(grads, axis=-1)
        sd = np.sqrt(np.einsum("ni,ij,nj->n", g, cov, g))
        z = NormalDist().inv_cdf(0.5 * (1 + level))
        log_mid = np.log(mid)
        low = np.where(np.isfinite(sd), np.exp(log_mid - z * sd), 0.0)
        high = np.where(np.isfinite(sd), np.exp(log_mid + z * sd), np.inf)
    diverged = ~np.isfinite(mid)
    low = np.where(diverged, np.inf, low)
    high = np.where(diverged, np.inf, high)
    return Band(xs, mid, low, high, level, "linearised", 0, diverged.astype(float))
