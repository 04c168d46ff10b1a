r"""Thixotropy: structure that breaks down under shear and builds up again at rest.

One published structure-kinetics model, Moore's [1]_: a structure parameter lambda, 1 for
the fully built structure at rest and 0 for the fully broken one, obeys

.. math:: \frac{d\lambda}{dt} = a\,(1 - \lambda) - b\,\dot\gamma\,\lambda,
          \qquad \eta = \eta_\infty + c\,\lambda

(build-up at rate a, breakdown proportional to the shear rate, viscosity linear in the
structure). The form is checked against a secondary restatement, not against [1]_ itself:
the generalised kinetics a (1 - lambda)^n1 - c lambda gammadot^n2 reviewed by Barnes [2]_,
as restated in the documentation of an open CFD code citing [2]_, which reduces to Moore's
with both exponents 1.

At a constant shear rate the equation is linear, so every history made of constant-rate
steps has an exact solution: `structure` and `viscosity_history` use it, and `stress_history`
chains it step by step for any rate history (step tests, hysteresis loops). `fit_moore`
fits the four constants to step tests and loops together; `recovery_time` answers "how long
after pumping or brushing does the product regain 90 % of its structure". The module is
numpy/scipy only; every constant is SI (a in 1/s, b dimensionless, viscosities in Pa*s).

References
----------
.. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc., vol. 58,
   pp. 470-494, 1959.
.. [2] H. A. Barnes, "Thixotropy - a review," J. Non-Newtonian Fluid Mech., vol. 70, no. 1-2,
   pp. 1-33, 1997.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._checks import as_array, guarded, in_range, positive, scalar_or_array
from .errors import FitError, InputRangeError
from .registry import Param, model

CONFIDENCE = 0.95
PARAMS = ("infinite_shear_viscosity_Pa_s", "structure_viscosity_Pa_s", "build_up_rate_1_per_s",
          "breakdown_coefficient")


@model("thixotropy",
       Param("infinite_shear_viscosity_Pa_s", "Pa*s", (1e-6, 1e6),
             "viscosity of the fully broken structure eta_inf"),
       Param("structure_viscosity_Pa_s", "Pa*s", (0.0, 1e8),
             "viscosity the full structure adds, c (eta_0 = eta_inf + c)"),
       Param("build_up_rate_1_per_s", "1/s", (1e-8, 1e4), "build-up rate at rest a"),
       Param("breakdown_coefficient", "-", (0.0, 1e6), "breakdown per unit strain b"),
       validity="structured liquids with reversible, inelastic thixotropy",
       source="Moore, 1959")
@guarded
def moore(shear_rate_1_per_s, infinite_shear_viscosity_Pa_s=0.1, structure_viscosity_Pa_s=10.0,
          build_up_rate_1_per_s=0.05, breakdown_coefficient=0.05):
    r"""Steady-state (equilibrium) viscosity of Moore's thixotropy model.

    The flow curve measured after the structure has settled at each shear rate, from the
    kinetics of Moore [1]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    infinite_shear_viscosity_Pa_s : float or array_like, optional
        Viscosity of the fully broken structure. [Pa*s]
    structure_viscosity_Pa_s : float or array_like, optional
        Viscosity added by the full structure, c. [Pa*s]
    build_up_rate_1_per_s : float or array_like, optional
        Build-up rate at rest, a. [1/s]
    breakdown_coefficient : float or array_like, optional
        Breakdown per unit strain, b. [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Equilibrium viscosity. [Pa*s]

    Raises
    ------
    InputRangeError
        Negative shear rate or constants, or a non-positive build-up rate.

    Notes
    -----
    Setting d lambda/dt = 0 gives the equilibrium structure and viscosity

    .. math:: \lambda_e = \frac{a}{a + b\dot\gamma},\qquad
              \eta_e = \eta_\infty + \frac{c\,a}{a + b\dot\gamma}

    a Cross-type curve from eta_0 = eta_inf + c at rest to eta_inf at high rates (limits that
    follow from the kinetic equation itself).

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.
    .. [2] H. A. Barnes, "Thixotropy - a review," J. Non-Newtonian Fluid Mech., vol. 70,
       no. 1-2, pp. 1-33, 1997.

    Examples
    --------
    Illustrative call: at a rate a/b the structure is half built.

    >>> moore(1.0, 0.1, 10.0, 0.05, 0.05)
    5.1
    """
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    eta_inf = positive(infinite_shear_viscosity_Pa_s, "infinite_shear_viscosity_Pa_s")
    c = in_range(structure_viscosity_Pa_s, "structure_viscosity_Pa_s", 0.0, np.inf)
    a = positive(build_up_rate_1_per_s, "build_up_rate_1_per_s")
    b = in_range(breakdown_coefficient, "breakdown_coefficient", 0.0, np.inf)
    return scalar_or_array(eta_inf + c * a / (a + b * rate), rate, eta_inf, c, a, b)


@guarded
def equilibrium_structure(shear_rate_1_per_s, build_up_rate_1_per_s, breakdown_coefficient):
    r"""Structure parameter at equilibrium under a constant shear rate (Moore's model).

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    build_up_rate_1_per_s : float or array_like
        Build-up rate at rest, a. [1/s]
    breakdown_coefficient : float or array_like
        Breakdown per unit strain, b. [-]

    Returns
    -------
    structure : float or numpy.ndarray
        a / (a + b gammadot), 1 at rest. [-]

    Raises
    ------
    InputRangeError
        Negative rate or coefficient, or a non-positive build-up rate.

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.

    Examples
    --------
    >>> equilibrium_structure(0.0, 0.05, 0.05)
    1.0
    """
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    a = positive(build_up_rate_1_per_s, "build_up_rate_1_per_s")
    b = in_range(breakdown_coefficient, "breakdown_coefficient", 0.0, np.inf)
    return scalar_or_array(a / (a + b * rate), rate, a, b)


@guarded
def structure(time_s, shear_rate_1_per_s, initial_structure, build_up_rate_1_per_s,
              breakdown_coefficient):
    r"""Structure parameter after a time at a constant shear rate (exact solution).

    Parameters
    ----------
    time_s : float or array_like
        Time since the rate was set, >= 0. [s]
    shear_rate_1_per_s : float or array_like
        The constant shear rate, >= 0 (0: at rest). [1/s]
    initial_structure : float or array_like
        Structure parameter at time 0, in [0, 1]. [-]
    build_up_rate_1_per_s : float or array_like
        Build-up rate at rest, a. [1/s]
    breakdown_coefficient : float or array_like
        Breakdown per unit strain, b. [-]

    Returns
    -------
    structure : float or numpy.ndarray
        lambda(t). [-]

    Raises
    ------
    InputRangeError
        Negative time or rate, structure outside [0, 1], bad constants.

    Notes
    -----
    .. math:: \lambda(t) = \lambda_e + (\lambda_0 - \lambda_e)\,e^{-(a + b\dot\gamma)\,t}

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.

    Examples
    --------
    At rest the structure recovers with the time constant 1/a:

    >>> round(structure(20.0, 0.0, 0.0, 0.05, 0.05), 6)
    0.632121
    """
    t = in_range(time_s, "time_s", 0.0, np.inf)
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    lam0 = in_range(initial_structure, "initial_structure", 0.0, 1.0)
    a = positive(build_up_rate_1_per_s, "build_up_rate_1_per_s")
    b = in_range(breakdown_coefficient, "breakdown_coefficient", 0.0, np.inf)
    k = a + b * rate
    lam_e = a / k
    return scalar_or_array(lam_e + (lam0 - lam_e) * np.exp(-k * t), t, rate, lam0, a, b)


def _scalar(value, field: str, low: float, high: float, **open_ends) -> float:
    if np.ndim(value) != 0:
        raise InputRangeError(field, f"an array of shape {np.shape(value)}", "a single number")
    return float(in_range(value, field, low, high, **open_ends))


def _params(params: dict) -> tuple[float, float, float, float]:
    if not isinstance(params, dict):
        raise InputRangeError("params", type(params).__name__, f"a dict with {', '.join(PARAMS)}")
    missing = [k for k in PARAMS if k not in params]
    if missing:
        raise InputRangeError("params", sorted(params), f"a dict with {', '.join(PARAMS)}")
    eta_inf = float(positive(params[PARAMS[0]], PARAMS[0]))
    c = float(in_range(params[PARAMS[1]], PARAMS[1], 0.0, np.inf))
    a = float(positive(params[PARAMS[2]], PARAMS[2]))
    b = float(in_range(params[PARAMS[3]], PARAMS[3], 0.0, np.inf))
    return eta_inf, c, a, b


@guarded
def viscosity_history(time_s, shear_rate_1_per_s, params: dict, initial_structure=1.0):
    r"""Viscosity against time at one constant shear rate, from a given structure.

    Parameters
    ----------
    time_s : float or array_like
        Time since the rate was set, >= 0. [s]
    shear_rate_1_per_s : float
        The constant shear rate, >= 0. [1/s]
    params : dict
        Moore constants: infinite_shear_viscosity_Pa_s, structure_viscosity_Pa_s,
        build_up_rate_1_per_s, breakdown_coefficient (e.g. `MooreFit.params`).
    initial_structure : float, optional
        Structure at time 0 (1: fully rested; `equilibrium_structure` after a process
        step). [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        eta_inf + c lambda(t). [Pa*s]

    Raises
    ------
    InputRangeError
        Bad times, rate, structure or constants.

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.

    Examples
    --------
    Illustrative call: a rested sample sheared at 10 1/s thins towards its equilibrium.

    >>> p = {"infinite_shear_viscosity_Pa_s": 0.1, "structure_viscosity_Pa_s": 10.0,
    ...      "build_up_rate_1_per_s": 0.05, "breakdown_coefficient": 0.05}
    >>> [round(float(v), 4) for v in viscosity_history([0.0, 1e4], 10.0, p)]
    [10.1, 1.0091]
    """
    eta_inf, c, a, b = _params(params)
    lam = structure(time_s, shear_rate_1_per_s, initial_structure, a, b)
    return eta_inf + c * lam


@guarded
def stress_history(time_s, shear_rate_1_per_s, params: dict, initial_structure=None):
    r"""Shear stress along any shear-rate history (step tests, hysteresis loops).

    The rate is held at each sample's value until the next sample (piecewise constant), and
    the exact constant-rate solution is chained from sample to sample.

    Parameters
    ----------
    time_s : array_like
        Increasing sample times. [s]
    shear_rate_1_per_s : array_like
        Shear rate at each sample, >= 0. [1/s]
    params : dict
        Moore constants (see `viscosity_history`).
    initial_structure : float, optional
        Structure at the first sample; default the equilibrium at the first rate (a
        pre-sheared sample). [-]

    Returns
    -------
    shear_stress_Pa : numpy.ndarray
        (eta_inf + c lambda) gammadot at each sample. [Pa]

    Raises
    ------
    InputRangeError
        Times not increasing, arrays of different lengths, bad rates or constants.

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.

    Examples
    --------
    Illustrative call: a loop up and down at 1 1/s per second from a rested sample; the
    way down carries less stress (thixotropic hysteresis).

    >>> p = {"infinite_shear_viscosity_Pa_s": 0.1, "structure_viscosity_Pa_s": 10.0,
    ...      "build_up_rate_1_per_s": 0.05, "breakdown_coefficient": 0.05}
    >>> s = stress_history([0, 5, 10, 15, 20], [0, 5, 10, 5, 0], p, initial_structure=1.0)
    >>> bool(s[3] < s[1])
    True
    """
    eta_inf, c, a, b = _params(params)
    t = np.atleast_1d(as_array(time_s, "time_s")).astype(float)
    rate = np.atleast_1d(in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf))
    if t.ndim != 1 or rate.shape != t.shape:
        raise InputRangeError("shear_rate_1_per_s", rate.size, f"one rate per time ({t.size})")
    if np.any(np.diff(t) < 0):
        raise InputRangeError("time_s", "decreasing", "increasing sample times")
    lam = np.empty_like(t)
    lam[0] = a / (a + b * rate[0]) if initial_structure is None else _scalar(
        initial_structure, "initial_structure", 0.0, 1.0)
    k = a + b * rate[:-1]
    decay = np.exp(-k * np.diff(t))
    lam_e = a / k
    # A linear recurrence with varying coefficients: a short Python loop over samples.
    for i in range(t.size - 1):
        lam[i + 1] = lam_e[i] + (lam[i] - lam_e[i]) * decay[i]
    return (eta_inf + c * lam) * rate


@guarded
def recovery_time(fraction, params: dict, process_shear_rate_1_per_s, process_time_s=None):
    r"""Time at rest after a process step until the structure regains a fraction of its full value.

    The process step (pumping, brushing, mixing) shears the product at a rate for a time
    from rest; afterwards the product rests and rebuilds at rate a.

    Parameters
    ----------
    fraction : float or array_like
        Structure to regain, as a fraction of the full rested structure, in (0, 1). [-]
    params : dict
        Moore constants (see `viscosity_history`).
    process_shear_rate_1_per_s : float or array_like
        Shear rate of the process step, >= 0. [1/s]
    process_time_s : float or array_like, optional
        Duration of the process step, from a rested sample (default None: long enough to
        reach the equilibrium at the process rate). [s]

    Returns
    -------
    time_s : float or numpy.ndarray
        0 where the structure never fell below `fraction`. [s]

    Raises
    ------
    InputRangeError
        Fraction outside (0, 1), bad rates, times or constants.

    Notes
    -----
    After the step the structure is lambda_p = `structure`(t_p, gammadot_p, 1, a, b); at
    rest lambda(t) = 1 - (1 - lambda_p) exp(-a t), so

    .. math:: t_f = \frac{1}{a}\,\ln\frac{1 - \lambda_p}{1 - f}\quad(\lambda_p < f)

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.

    Examples
    --------
    Illustrative call: after long pumping at 100 1/s, 90 % recovery takes about ln(10)/a.

    >>> p = {"infinite_shear_viscosity_Pa_s": 0.1, "structure_viscosity_Pa_s": 10.0,
    ...      "build_up_rate_1_per_s": 0.05, "breakdown_coefficient": 0.05}
    >>> round(recovery_time(0.9, p, 100.0), 3)
    45.853
    """
    f = in_range(fraction, "fraction", 0.0, 1.0, low_open=True, high_open=True)
    _, _, a, b = _params(params)
    rate = in_range(process_shear_rate_1_per_s, "process_shear_rate_1_per_s", 0.0, np.inf)
    k = a + b * rate
    lam_e = a / k
    if process_time_s is None:
        lam_p, tp = lam_e, 0.0
    else:
        tp = in_range(process_time_s, "process_time_s", 0.0, np.inf)
        lam_p = lam_e + (1.0 - lam_e) * np.exp(-k * tp)
    with np.errstate(divide="ignore"):      # lam_p = 1 (never broken): no recovery needed
        t = np.where(lam_p < f, np.log((1.0 - lam_p) / (1.0 - f)) / a, 0.0)
    return scalar_or_array(t, f, rate, tp)


@dataclass(frozen=True, eq=False)
class MooreFit:
    """Moore constants fitted to thixotropy tests, with intervals at `confidence`."""

    params: dict
    intervals: dict
    standard_errors: dict
    covariance: np.ndarray
    n_points: int
    rmse: float
    confidence: float
    residuals: np.ndarray

    def summary(self) -> str:
        pct = f"{100 * self.confidence:g} %"
        lines = [f"moore: {self.n_points} points, rmse {self.rmse:.3g} in ln(stress)"]
        lines += [f"  {k} = {v:.4g} ({self.intervals[k][0]:.4g} to {self.intervals[k][1]:.4g}, "
                  f"{pct})" for k, v in self.params.items()]
        return "\n".join(lines)


def _tests(tests, field):
    out = []
    for i, test in enumerate(tests):
        try:
            t, rate, stress, lam0 = (list(test) + [None])[:4]
        except (TypeError, ValueError):
            raise InputRangeError(f"{field}[{i}]", test, "(time_s, shear_rate_1_per_s, "
                                  "shear_stress_Pa[, initial_structure])") from None
        t = np.atleast_1d(as_array(t, f"{field}[{i}] time_s")).astype(float)
        rate = np.broadcast_to(in_range(rate, f"{field}[{i}] shear_rate_1_per_s", 0.0, np.inf),
                               t.shape).astype(float)
        stress = np.atleast_1d(positive(stress, f"{field}[{i}] shear_stress_Pa")).astype(float)
        if stress.shape != t.shape or t.ndim != 1 or t.size < 2:
            raise InputRangeError(f"{field}[{i}]", t.size, "at least two samples, one stress "
                                  "per time")
        out.append((t, rate, stress, lam0))
    return out


@guarded
def fit_moore(step_tests=(), loops=(), confidence: float = CONFIDENCE,
              start: dict | None = None) -> MooreFit:
    r"""Fit Moore's constants to step-shear tests and hysteresis loops together.

    Parameters
    ----------
    step_tests : sequence of (time_s, shear_rate_1_per_s, shear_stress_Pa, rate_before)
        Each a step from a pre-shear at `rate_before` [1/s] (structure at its equilibrium
        there) to the rate(s) given at the samples; times from the step. Stress at each
        sample. [s, 1/s, Pa, 1/s]
    loops : sequence of (time_s, shear_rate_1_per_s, shear_stress_Pa[, initial_structure])
        Rate histories such as up-and-down ramps; `initial_structure` defaults to 1 (a
        rested sample). [s, 1/s, Pa, -]
    confidence : float, optional
        Level of the intervals.
    start : dict, optional
        Starting values of the constants.

    Returns
    -------
    MooreFit

    Raises
    ------
    FitError
        Fewer points than constants plus one, or data that cannot separate the constants
        (one step test alone fixes only three combinations: use two or more final rates).
    InputRangeError
        Bad arrays.

    Notes
    -----
    Least squares in ln(stress) over the four constants in log space, with the covariance
    s^2 (J^T J)^-1 and Student-t intervals (the method of `predictor.fitting.fit`).

    References
    ----------
    .. [1] F. Moore, "The rheology of ceramic slips and bodies," Trans. Br. Ceram. Soc.,
       vol. 58, pp. 470-494, 1959.
    .. [2] D. M. Bates and D. G. Watts, *Nonlinear Regression Analysis and Its
       Applications*. New York: Wiley, 1988, ch. 2.

    Examples
    --------
    Illustrative call: noise-free step tests to 1 and 10 1/s give back the constants.

    >>> p = {"infinite_shear_viscosity_Pa_s": 0.1, "structure_viscosity_Pa_s": 10.0,
    ...      "build_up_rate_1_per_s": 0.05, "breakdown_coefficient": 0.05}
    >>> t = np.linspace(0.0, 120.0, 25)
    >>> steps = [(t, r, stress_history(np.r_[-1e9, t], np.r_[500.0, np.full(25, r)], p)[1:],
    ...           500.0) for r in (1.0, 10.0)]
    >>> f = fit_moore(steps)
    >>> round(f.params["build_up_rate_1_per_s"], 4)
    0.05
    """
    from scipy import optimize, stats

    confidence = _scalar(confidence, "confidence", 0.0, 1.0, low_open=True, high_open=True)
    steps = _tests(step_tests, "step_tests")
    runs = []
    for t, rate, stress, before in steps:
        if before is None:
            raise InputRangeError("step_tests", "no rate_before", "the pre-shear rate of each "
                                  "step test")
        before = _scalar(before, "rate_before", 0.0, np.inf)
        runs.append((np.r_[t[0] - 1e12, t], np.r_[before, rate], stress, None))
    for t, rate, stress, lam0 in _tests(loops, "loops"):
        runs.append((t, rate, stress, 1.0 if lam0 is None else lam0))
    if not runs:
        raise FitError("no step test or loop to fit")
    y = np.log(np.concatenate([r[2] for r in runs]))
    n, p = y.size, len(PARAMS)
    if n < p + 1:
        raise FitError(f"{n} points cannot fit the {p} Moore constants; need at least {p + 1}")

    def model_log(u):
        params = dict(zip(PARAMS, np.exp(u), strict=True))
        parts = []
        for t, rate, _, lam0 in runs:
            try:
                s = stress_history(t, rate, params, initial_structure=lam0)
            except InputRangeError:          # constants under- or overflowed: no fit there
                s = np.full(t.size, np.nan)
            parts.append(s[1:] if lam0 is None else s)
        with np.errstate(divide="ignore"):
            return np.log(np.concatenate(parts))

    def residuals(u):
        r = y - model_log(u)
        return np.where(np.isfinite(r), r, 1e3)

    eta = np.concatenate([r[2][r[1][-r[2].size:] > 0] / r[1][-r[2].size:][r[1][-r[2].size:] > 0]
                          for r in runs])
    lo_eta = float(np.min(eta)) if eta.size else 0.1
    hi_eta = float(np.max(eta)) if eta.size else 10.0
    guesses = []
    for a0 in (1e-3, 1e-2, 1e-1, 1.0):
        for b0 in (1e-3, 1e-2, 1e-1, 1.0):
            guesses.append(np.log([0.5 * lo_eta, max(hi_eta - 0.5 * lo_eta, 1e-6), a0, b0]))
    if start:
        guesses.insert(0, np.log([float(start[k]) for k in PARAMS]))
    costs = [np.sum(residuals(g) ** 2) for g in guesses]
    best = None
    for k in np.argsort(costs)[:3]:
        res = optimize.least_squares(residuals, guesses[k], method="lm", xtol=1e-12,
                                     ftol=1e-12, max_nfev=4000)
        if best is None or res.cost < best.cost:
            best = res
    u = best.x
    r = residuals(u)
    dof = n - p
    s2 = float(np.sum(r**2)) / dof
    jac = -best.jac
    jtj = jac.T @ jac
    scale = np.sqrt(np.diag(jtj))
    if np.any(scale == 0) or np.linalg.cond(jtj / np.outer(scale, scale)) > 1e12:
        raise FitError("the tests do not separate the four Moore constants; measure step tests "
                       "to two or more final shear rates, or add a hysteresis loop")
    cov_u = s2 * np.linalg.inv(jtj)
    se_u = np.sqrt(np.clip(np.diag(cov_u), 0.0, None))
    tq = float(stats.t.ppf(0.5 * (1 + confidence), dof))
    theta = np.exp(u)
    cov = cov_u * np.outer(theta, theta)
    params = dict(zip(PARAMS, (float(v) for v in theta), strict=True))
    # Intervals symmetric in ln(theta) (the constants were fitted in logs): never negative.
    intervals = {k: (float(np.exp(u[i] - tq * se_u[i])), float(np.exp(u[i] + tq * se_u[i])))
                 for i, k in enumerate(PARAMS)}
    se = dict(zip(PARAMS, (float(v) for v in theta * se_u), strict=True))
    return MooreFit(params, intervals, se, cov, n, float(np.sqrt(np.mean(r**2))), confidence, r)
