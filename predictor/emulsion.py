"""Emulsions: droplets of one liquid in another, from dilute to jammed.

Four groups of pure numpy functions, all broadcasting over every argument:

- relative viscosity of an emulsion of Newtonian droplets (registered, kind "emulsion"):
  `taylor` (dilute), `phan_thien_pham` and `pal` (concentrated; implicit, solved here by a
  vectorised Halley iteration, see `differential_scheme_solve`);
- deformation and breakup of droplets in simple shear: `capillary_number`,
  `taylor_deformation`, `deformation_onset_shear_rate`, `critical_capillary_de_bruijn`,
  `max_stable_droplet_diameter`;
- shear thinning of a droplet emulsion by droplet deformation (not registered: it depends on
  the capillary number as well as phi): `deformation_thinning`, with Oldroyd's relaxation
  time `relaxation_time_oldroyd`;
- jammed (compressed) emulsions above the droplet packing limit: shear modulus and yield stress
  from Princen & Kiss and from Mason et al., and a Herschel-Bulkley-like flow curve built on them
  (`flow_stress_jammed`).

Conventions for the whole module:

- ``viscosity_ratio`` is droplet viscosity / continuous-phase viscosity, in [0, inf];
  ``inf`` means rigid spheres, 0 means bubbles. Droplets whose interface is immobilised by
  adsorbed surfactant (or proteins, particles) behave close to rigid spheres whatever the
  droplet viscosity (Marangoni stresses stop the interface from moving; common practice, no
  source checked): pass ``viscosity_ratio=np.inf`` for them (through
  `predictor.relative_viscosity`, whose bounds are finite, a large value such as 1e12), which
  is what the ``surfactant_rigid=True`` option of `predictor.phase_ratio` does;
- phi outside [0, 1] or a non-finite input raises `InputRangeError` (``inf`` is allowed only for
  ``viscosity_ratio``); a divergent relation returns ``inf`` at and above its divergence point;
- the registered viscosity relations warn about their validity range through
  `predictor.relative_viscosity`; every other function here warns itself with
  `ValidityWarning` when used outside the range its source fitted.
"""

from __future__ import annotations

import math
import warnings

import numpy as np

from ._checks import as_array, fraction, guarded, in_range, positive, scalar_or_array
from .errors import InputRangeError, LoadlineError, ValidityWarning
from .registry import Param, get_model, model

VISCOSITY_RATIO = Param(
    "viscosity_ratio", "-", (0.0, 1e12),
    "droplet viscosity / continuous-phase viscosity (0 bubbles, large = rigid spheres)",
)
PHI_MAX = Param("phi_max", "-", (0.2, 1.0), "maximum packing fraction of the droplets")
PAL_VARIANT = Param(
    "variant", "-", (1.0, 2.0),
    "right-hand side: 1 exponential (Mooney type), 2 power (Krieger-Dougherty type)",
)

#: Viscosity ratio at and above which simple shear cannot break a droplet: the pole of
#: de Bruijn's fit (Grace 1982 data); checked against a secondary restatement of the fit
#: (citing Fortelny's 2019 review).
NO_BREAKUP_VISCOSITY_RATIO = 4.08

#: Volume fractions used by the Princen & Kiss relations (from memory, not checked against the
#: sources): the zero of the modulus fit, the zero of the viscous term of the flow curve, and
#: the range of the yield-stress and flow fits.
PRINCEN_KISS_MODULUS_ZERO = 0.712
PRINCEN_KISS_FLOW_ZERO = 0.73
PRINCEN_KISS_FITTED = (0.83, 0.98)

#: Random close packing of the droplets, where Mason et al. found the modulus to vanish
#: ("phi_c about 0.635", abstract of Mason, Bibette & Weitz 1995, seen).
MASON_PHI_C = 0.635
#: Upper end of the volume fractions in Mason et al.'s data (from memory, not checked).
MASON_FITTED_UPPER = 0.85


def _viscosity_ratio(value, field: str = "viscosity_ratio") -> np.ndarray:
    """Float array in [0, inf]; +inf (rigid spheres) is allowed, NaN and negatives are not."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise InputRangeError(field, value, "a number or an array of numbers") from None
    bad = np.isnan(arr) | (arr < 0.0)
    if np.any(bad):
        raise InputRangeError(field, arr[bad].flat[0],
                              "a value in [0, inf] (inf means rigid spheres)")
    return arr


def _warn(message: str) -> None:
    warnings.warn(message, ValidityWarning, stacklevel=3)


# --------------------------------------------------------------------------------------------
# Relative viscosity
# --------------------------------------------------------------------------------------------


@model("emulsion", VISCOSITY_RATIO,
       validity="dilute emulsions of spherical Newtonian droplets, phi below about 0.03",
       source="Taylor, Proc. R. Soc. A 1932", phi_range=(0.0, 0.03))
@guarded
def taylor(phi, viscosity_ratio=1.0):
    r"""Relative viscosity of a dilute emulsion of Newtonian droplets.

    Taylor's first-order result [1]_ for force-free spherical droplets that stay spherical
    (interfacial tension large against the viscous stress), with the droplet's internal
    circulation set by the viscosity ratio.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    viscosity_ratio : float or array_like, optional
        Droplet viscosity divided by continuous-phase viscosity; ``inf`` for rigid spheres,
        0 for bubbles. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the emulsion divided by that of the continuous phase. [-]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1], viscosity_ratio is negative or NaN, or an input is not a
        number.

    See Also
    --------
    phan_thien_pham, pal : concentrated emulsions; both reduce to this at small phi.

    Notes
    -----
    .. math:: \eta_r = 1 + \phi\,\frac{2.5\,\lambda + 1}{\lambda + 1}

    The limits: lambda -> inf gives Einstein's rigid spheres, 1 + 2.5 phi; lambda = 0 gives
    bubbles, 1 + phi. First order in phi: valid for phi below a few percent (0.03 is used
    as the range here, as for Einstein's relation; common practice, no source). Equation as
    in [1]_, checked against secondary restatements (several notes citing [1]_ write
    1 + 2.5 phi (lambda + 0.4)/(lambda + 1), the same expression); it is the one consistent
    with the limits of [2]_ and [3]_.

    References
    ----------
    .. [1] G. I. Taylor, "The viscosity of a fluid containing small drops of another fluid,"
       Proc. R. Soc. Lond. A, vol. 138, no. 834, pp. 41-48, 1932, doi:10.1098/rspa.1932.0169.
    .. [2] N. Phan-Thien and D. C. Pham, "Differential multiphase models for polydispersed
       suspensions and particulate solids," J. Non-Newtonian Fluid Mech., vol. 72, no. 2-3,
       pp. 305-318, 1997.
    .. [3] R. Pal, "Novel viscosity equations for emulsions of two immiscible liquids,"
       J. Rheol., vol. 45, no. 2, pp. 509-520, 2001.

    Examples
    --------
    Illustrative calls: equal viscosities, rigid spheres, bubbles.

    >>> taylor(0.02, viscosity_ratio=1.0)
    1.035
    >>> taylor(0.02, viscosity_ratio=np.inf)
    1.05
    >>> taylor(0.02, viscosity_ratio=0.0)
    1.02
    """
    phi = fraction(phi, "phi")
    lam = _viscosity_ratio(viscosity_ratio)
    with np.errstate(divide="ignore", invalid="ignore"):
        inverse = np.where(lam >= 1.0, 1.0 / np.where(lam >= 1.0, lam, 1.0), 0.0)
        coefficient = np.where(lam >= 1.0, (2.5 + inverse) / (1.0 + inverse),
                               (2.5 * lam + 1.0) / (lam + 1.0))
    return scalar_or_array(1.0 + phi * coefficient, phi, lam)


#: A Halley step this small (relative to 1 + ln eta_r) ends the iteration: the error left is
#: of the order of its cube.
CUBIC_STOP = 1e-6


def _halley_kernel(c, q, out, tol, max_iter):
    """Per-element safeguarded Halley iteration (compiled with numba for large inputs).

    Returns the number of elements that did not converge; `out` receives ln(eta_r).
    """
    failures = 0
    for i in range(c.shape[0]):
        ci = c[i]
        qi = q[i]
        if not math.isfinite(ci):
            out[i] = math.inf
            continue
        if qi == 0.0:                      # rigid spheres: eta_r = R
            out[i] = ci
            continue
        log_q = math.log(qi)
        ratio = (1.0 - qi) / qi
        y = min(ci, ci / (1.0 + 1.5 * qi), (ci - 1.5 * log_q) / 2.5)
        lowest = ci / 2.5                  # the bubble root bounds every root from below
        converged = False
        for _ in range(max_iter):
            if y > 300.0:                  # e^y would overflow: expand around q e^y
                t = ratio * math.exp(-y)
                log_s = log_q + y + math.log1p(t)
                share = 1.0 / (1.0 + t)
            else:
                e = math.exp(y)
                den = 1.0 - qi + qi * e
                log_s = math.log(den)
                share = qi * e / den
            g = y + 1.5 * log_s - ci
            g1 = 1.0 + 1.5 * share
            g2 = 1.5 * share * (1.0 - share)
            den2 = 2.0 * g1 * g1 - g * g2
            halley = den2 > g1 * g1
            step = 2.0 * g * g1 / den2 if halley else g / g1
            y_new = max(y - step, lowest)
            step = abs(y - y_new)
            y = y_new
            # Halley's error is cubic in the step: a step of 1e-6 leaves about 1e-18.
            if step <= tol * (1.0 + y) or (halley and step <= CUBIC_STOP * (1.0 + y)):
                converged = True
                break
        out[i] = y
        if not converged:
            failures += 1
    return failures


def _halley_numpy(c, q, tol, max_iter):
    """The same iteration as `_halley_kernel`, vectorised with numpy (small inputs)."""
    finite = np.isfinite(c)
    cc = np.where(finite, c, 0.0)
    with np.errstate(divide="ignore"):
        log_q = np.log(q)
        log_1mq = np.log1p(-q)
        asymptote = np.where(q > 0.0, (cc - 1.5 * log_q) / 2.5, np.inf)
    y = np.minimum(np.minimum(cc, cc / (1.0 + 1.5 * q)), asymptote)
    lowest = cc / 2.5
    rigid = q == 0.0
    for _ in range(max_iter):
        log_s = np.logaddexp(log_1mq, log_q + y)
        share = np.exp(log_q + y - log_s)
        g = y + 1.5 * log_s - cc
        g1 = 1.0 + 1.5 * share
        g2 = 1.5 * share * (1.0 - share)
        den2 = 2.0 * g1 * g1 - g * g2
        halley = den2 > g1 * g1
        step = np.where(halley, 2.0 * g * g1 / np.where(halley, den2, 1.0), g / g1)
        y_new = np.where(rigid, cc, np.maximum(y - step, lowest))
        step = np.abs(y - y_new)
        y = y_new
        done = (step <= tol * (1.0 + y)) | (halley & (step <= CUBIC_STOP * (1.0 + y)))
        if np.all(done):
            return np.where(finite, y, np.inf), 0
    return np.where(finite, y, np.inf), int(np.sum(~done))


#: Inputs at least this large go to the numba-compiled kernel; smaller ones to numpy
#: (no compilation on first use).
NUMBA_MIN_SIZE = 20_000
_COMPILED: dict = {}


def _compiled_kernel():
    if "kernel" not in _COMPILED:
        from ._jit import compile_kernel

        # Serial on purpose: numba's parallel layers refuse concurrent calls from several
        # threads (one per app session), and two cores gained under 10 % here.
        _COMPILED["kernel"] = compile_kernel(_halley_kernel)
    return _COMPILED["kernel"]



@guarded
def differential_scheme_solve(log_right_side, viscosity_ratio, *, tol=1e-13, max_iter=50):
    r"""Solve the differential-scheme equation of emulsions for the relative viscosity.

    Solves, element by element and without a Python loop over the elements,

    .. math:: \eta_r \left(\frac{2\eta_r + 5\lambda}{2 + 5\lambda}\right)^{3/2} = R

    given ln R >= 0: the common form of Phan-Thien & Pham's relation (R = (1 - phi)^-5/2) and
    of Pal's (R with a packing limit).

    Parameters
    ----------
    log_right_side : float or array_like
        ln R, >= 0; ``inf`` gives ``inf``. [-]
    viscosity_ratio : float or array_like
        Droplet / continuous-phase viscosity, in [0, inf]. [-]
    tol : float, optional
        Convergence tolerance on the step of ln(eta_r), relative to 1 + ln(eta_r). [-]
    max_iter : int, optional
        Iteration cap; reaching it raises `LoadlineError` (never seen in the tests).

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        The root eta_r >= 1. [-]

    Raises
    ------
    InputRangeError
        If ln R is negative or NaN, or the viscosity ratio is negative or NaN.
    LoadlineError
        If some element has not converged after `max_iter` steps.

    Notes
    -----
    With y = ln(eta_r) and q = 2/(2 + 5 lambda) the equation reads
    G(y) = y + 1.5 ln(1 - q + q e^y) - ln R = 0. G is increasing (1 <= G' <= 2.5) and convex,
    and its root lies between the bubble root ln R / 2.5 and the smallest of three upper
    bounds: ln R (rigid spheres), the tangent at 0 and the large-y asymptote. A Halley step
    (Newton's where Halley's denominator is small) from that upper bound, kept above the
    lower bound, converges in 1 to 3 steps over the whole domain (checked by the property
    tests for lambda from 0 to 1e12 and phi up to 1 - 1e-15; it stops once a Halley step
    is below `CUBIC_STOP`, whose cube is far below double precision). Arrays of `NUMBA_MIN_SIZE`
    elements or more use a numba-compiled loop with the same arithmetic.
    q = 0 (lambda = inf) gives eta_r = R; q = 1 (lambda = 0) gives eta_r = R^(2/5).

    Examples
    --------
    Illustrative call: ln R = 2.5 ln 2 (Phan-Thien & Pham at phi = 0.5) for bubbles gives 2.

    >>> differential_scheme_solve(2.5 * np.log(2.0), 0.0)
    2.0
    """
    if isinstance(max_iter, bool) or not isinstance(max_iter, int | np.integer) or max_iter < 1:
        raise InputRangeError("max_iter", max_iter, "a whole number of iterations >= 1")
    tol = float(in_range(tol, "tol", 0.0, 0.1, low_open=True))
    c = np.asarray(log_right_side, dtype=float)
    if np.any(np.isnan(c)) or np.any(c < 0.0):
        bad = c[np.isnan(c) | (c < 0.0)].flat[0]
        raise InputRangeError("log_right_side", bad, "a value in [0, inf]")
    lam = _viscosity_ratio(viscosity_ratio)
    c, lam = np.broadcast_arrays(c, lam)
    shape = c.shape
    c = np.ascontiguousarray(c, dtype=float).ravel()
    with np.errstate(divide="ignore"):
        q = np.ascontiguousarray(2.0 / (2.0 + 5.0 * lam), dtype=float).ravel()
    if c.size >= NUMBA_MIN_SIZE:
        y = np.empty_like(c)
        failures = _compiled_kernel()(c, q, y, tol, max_iter)
    else:
        y, failures = _halley_numpy(c, q, tol, max_iter)
    if failures:
        raise LoadlineError(
            f"differential_scheme_solve did not converge in {max_iter} iterations for "
            f"{failures} of {c.size} values; please report the inputs."
        )
    with np.errstate(over="ignore"):          # ln(eta_r) above 709: eta_r is inf
        eta = np.exp(y).reshape(shape)
    return scalar_or_array(eta, log_right_side, viscosity_ratio)


@model("emulsion", VISCOSITY_RATIO,
       validity="concentrated emulsions of Newtonian droplets; no packing limit in the "
                "relation, so unrealistic above droplet packing, about 0.64",
       source="Phan-Thien & Pham, J. Non-Newton. Fluid Mech. 1997", phi_range=(0.0, 0.64))
@guarded
def phan_thien_pham(phi, viscosity_ratio=1.0):
    r"""Relative viscosity of a concentrated emulsion from a differential scheme (implicit).

    Phan-Thien & Pham's differential-scheme relation [1]_: Taylor's dilute result applied
    step by step as droplets are added to an emulsion that already behaves as a liquid.
    The equation is implicit in eta_r and is solved with `differential_scheme_solve`.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    viscosity_ratio : float or array_like, optional
        Droplet viscosity divided by continuous-phase viscosity; ``inf`` for rigid spheres,
        0 for bubbles. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the emulsion divided by that of the continuous phase; ``inf`` at
        phi = 1. [-]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1] or viscosity_ratio is negative or NaN.

    See Also
    --------
    taylor : the dilute limit.
    pal : the same left-hand side with a packing limit.

    Notes
    -----
    .. math:: \eta_r^{2/5}\left(\frac{2\eta_r + 5\lambda}{2 + 5\lambda}\right)^{3/5}
              = \frac{1}{1 - \phi}

    Limits: lambda -> inf gives (1 - phi)^-2.5 (Brinkman/Roscoe for rigid spheres);
    lambda = 0 gives 1/(1 - phi) for bubbles; phi -> 0 gives Taylor's 1 + phi (2.5 lambda + 1)
    / (lambda + 1). The relation has no packing limit: it stays finite up to phi = 1, so it
    underestimates emulsions approaching droplet packing (about 0.64), which is the range
    registered here. Equation as in [1]_ from memory, not checked against the paper; the
    three limits above are checked in the tests.

    References
    ----------
    .. [1] N. Phan-Thien and D. C. Pham, "Differential multiphase models for polydispersed
       suspensions and particulate solids," J. Non-Newtonian Fluid Mech., vol. 72, no. 2-3,
       pp. 305-318, 1997, doi:10.1016/S0377-0257(97)00037-1.

    Examples
    --------
    Illustrative calls: bubbles and rigid spheres at phi = 0.3, then equal viscosities.

    >>> phan_thien_pham(0.3, viscosity_ratio=0.0)
    1.428571
    >>> phan_thien_pham(0.3, viscosity_ratio=np.inf)
    2.439242
    >>> phan_thien_pham(0.3, viscosity_ratio=1.0)
    1.794613
    """
    phi = fraction(phi, "phi")
    lam = _viscosity_ratio(viscosity_ratio)
    with np.errstate(divide="ignore"):
        log_right = -2.5 * np.log1p(-phi)
    return scalar_or_array(differential_scheme_solve(log_right, lam), phi, lam)


@model("emulsion", VISCOSITY_RATIO, PHI_MAX, PAL_VARIANT,
       validity="0 <= phi < phi_max; concentrated emulsions of Newtonian droplets",
       source="Pal, J. Rheol. 2001", phi_range=(0.0, 1.0), phi_range_relative=True)
@guarded
def pal(phi, viscosity_ratio=1.0, phi_max=0.64, variant=2):
    r"""Relative viscosity of a concentrated emulsion with a droplet packing limit (implicit).

    Pal's differential-scheme relations [1]_: the left-hand side of Phan-Thien & Pham's
    relation, with a right-hand side that diverges at the packing limit phi_max. Two forms
    of the right-hand side are offered (`variant`); both are solved with
    `differential_scheme_solve`.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    viscosity_ratio : float or array_like, optional
        Droplet viscosity divided by continuous-phase viscosity; ``inf`` for rigid spheres,
        0 for bubbles. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction of the droplets, where the viscosity diverges. [-]
    variant : {1, 2}, optional
        Right-hand side: 1 exponential (Mooney type), 2 power (Krieger-Dougherty type).
        Our labels, not the paper's model numbers. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the emulsion divided by that of the continuous phase; ``inf`` where
        phi >= phi_max. [-]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1], phi_max outside (0, 1], viscosity_ratio is negative or
        NaN, or variant is not 1 or 2.

    See Also
    --------
    phan_thien_pham : the same left-hand side without a packing limit.
    predictor.suspension.krieger_dougherty, predictor.suspension.mooney : the rigid limits.

    Notes
    -----
    .. math:: \eta_r\left(\frac{2\eta_r + 5\lambda}{2 + 5\lambda}\right)^{3/2} =
              \exp\left(\frac{2.5\,\phi}{1 - \phi/\phi_m}\right) \;\text{(variant 1)},\qquad
              \left(1 - \frac{\phi}{\phi_m}\right)^{-2.5\,\phi_m} \;\text{(variant 2)}

    Limits: lambda -> inf gives Mooney's relation with crowding factor 1/phi_m (variant 1)
    and Krieger-Dougherty's with [eta] = 2.5 (variant 2); phi -> 0 gives Taylor's relation.
    Pal fitted phi_m to measured emulsions; values above random close packing (0.64) are
    common for polydisperse droplets (from memory, not checked against the source). The
    equations are as in [1]_ from memory, not checked against the paper (the published set
    has more than these two forms); their limits are checked in the tests.

    References
    ----------
    .. [1] R. Pal, "Novel viscosity equations for emulsions of two immiscible liquids,"
       J. Rheol., vol. 45, no. 2, pp. 509-520, 2001, doi:10.1122/1.1349122.

    Examples
    --------
    Illustrative calls: rigid droplets give Krieger-Dougherty's value; equal viscosities.

    >>> pal(0.3, viscosity_ratio=np.inf, phi_max=0.64)
    2.751197
    >>> pal(0.3, viscosity_ratio=1.0, phi_max=0.64)
    1.931239
    """
    phi = fraction(phi, "phi")
    lam = _viscosity_ratio(viscosity_ratio)
    phi_max = in_range(phi_max, "phi_max", 0.0, 1.0, low_open=True)
    form = as_array(variant, "variant")
    if np.any((form != 1.0) & (form != 2.0)):
        bad = form[(form != 1.0) & (form != 2.0)].flat[0]
        raise InputRangeError("variant", bad, "1 (exponential) or 2 (power)")
    x = phi / phi_max
    below = x < 1.0
    safe = np.where(below, 1.0 - x, 1.0)
    log_right = np.where(form == 1.0, 2.5 * phi / safe, -2.5 * phi_max * np.log(safe))
    log_right = np.where(below, log_right, np.inf)
    return scalar_or_array(differential_scheme_solve(log_right, lam), phi, lam, phi_max, form)


# --------------------------------------------------------------------------------------------
# Deformation and breakup in simple shear
# --------------------------------------------------------------------------------------------


@guarded
def capillary_number(continuous_viscosity_Pa_s, shear_rate_1_per_s, droplet_radius_m,
                     interfacial_tension_N_per_m):
    r"""Capillary number of a droplet in simple shear: viscous over interfacial stress.

    The definition used by Taylor [1]_ and by the breakup data of Grace [2]_: the droplet
    radius, not its diameter, is the length.

    Parameters
    ----------
    continuous_viscosity_Pa_s : float or array_like
        Viscosity of the continuous phase. [Pa*s]
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    droplet_radius_m : float or array_like
        Droplet radius (for a size distribution, half the Sauter diameter). [m]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension between the two liquids. [N/m]

    Returns
    -------
    capillary_number : float or numpy.ndarray
        Ca = eta_c * shear_rate * R / Gamma. [-]

    Raises
    ------
    InputRangeError
        If a viscosity, radius or tension is not positive, or the shear rate is negative.

    Notes
    -----
    .. math:: \mathrm{Ca} = \frac{\eta_c\,\dot\gamma\,R}{\Gamma}

    References
    ----------
    .. [1] G. I. Taylor, "The formation of emulsions in definable fields of flow," Proc. R.
       Soc. Lond. A, vol. 146, no. 858, pp. 501-523, 1934, doi:10.1098/rspa.1934.0169.
    .. [2] H. P. Grace, "Dispersion phenomena in high viscosity immiscible fluid systems and
       application of static mixers as dispersion devices in such systems," Chem. Eng.
       Commun., vol. 14, no. 3-6, pp. 225-277, 1982.

    Examples
    --------
    Illustrative call: 1 mPa*s water, 1000 1/s, 5 um radius, 5 mN/m.

    >>> capillary_number(1e-3, 1e3, 5e-6, 5e-3)
    0.001
    """
    eta = positive(continuous_viscosity_Pa_s, "continuous_viscosity_Pa_s")
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    radius = positive(droplet_radius_m, "droplet_radius_m")
    gamma = positive(interfacial_tension_N_per_m, "interfacial_tension_N_per_m")
    return scalar_or_array(eta * rate * radius / gamma, eta, rate, radius, gamma)


#: Taylor deformation above which the small-deformation theory is no longer trusted here
#: (common practice, no source).
TAYLOR_DEFORMATION_LIMIT = 0.3


def _taylor_deformation_factor(lam):
    """(19 lambda + 16)/(16 lambda + 16), written so that lambda = inf gives 19/16."""
    with np.errstate(invalid="ignore", divide="ignore"):
        inverse = np.where(lam >= 1.0, 1.0 / np.where(lam >= 1.0, lam, 1.0), 0.0)
        return np.where(lam >= 1.0, (19.0 + 16.0 * inverse) / (16.0 + 16.0 * inverse),
                        (19.0 * lam + 16.0) / (16.0 * lam + 16.0))


@guarded
def taylor_deformation(capillary_number, viscosity_ratio=1.0):
    r"""Steady deformation of a droplet in simple shear at small capillary number.

    Taylor's small-deformation result [1]_: the droplet becomes an ellipsoid whose
    deformation D = (L - B)/(L + B) (L, B the longest and shortest axes) grows linearly with
    the capillary number.

    Parameters
    ----------
    capillary_number : float or array_like
        Ca from `capillary_number`, >= 0. [-]
    viscosity_ratio : float or array_like, optional
        Droplet / continuous-phase viscosity, in [0, inf]. [-]

    Returns
    -------
    deformation : float or numpy.ndarray
        D = (L - B)/(L + B). [-]

    Raises
    ------
    InputRangeError
        If Ca is negative or non-finite, or the viscosity ratio is negative or NaN.

    Warns
    -----
    ValidityWarning
        Where D exceeds `TAYLOR_DEFORMATION_LIMIT` (0.3), beyond small deformation.

    Notes
    -----
    .. math:: D = \mathrm{Ca}\,\frac{19\lambda + 16}{16\lambda + 16}

    First order in Ca; it is the "onset" indicator used by `predictor.phase_ratio`: when D
    is no longer small, droplets elongate and the emulsion shear-thins (see
    `deformation_thinning`; the registered relations of this module are the zero-Ca,
    Newtonian values). Equation as in [1]_ from memory, not checked against the paper.

    References
    ----------
    .. [1] G. I. Taylor, "The formation of emulsions in definable fields of flow," Proc. R.
       Soc. Lond. A, vol. 146, no. 858, pp. 501-523, 1934, doi:10.1098/rspa.1934.0169.

    Examples
    --------
    Illustrative call: equal viscosities at Ca = 0.1.

    >>> taylor_deformation(0.1, viscosity_ratio=1.0)
    0.109375
    """
    ca = in_range(capillary_number, "capillary_number", 0.0, np.inf, high_open=True)
    lam = _viscosity_ratio(viscosity_ratio)
    deformation = ca * _taylor_deformation_factor(lam)
    if np.any(deformation > TAYLOR_DEFORMATION_LIMIT):
        _warn(f"taylor_deformation gives D = {float(np.max(deformation)):.3g}, beyond small "
              f"deformation (D <= {TAYLOR_DEFORMATION_LIMIT:g}); the droplet shape is only "
              "indicative there.")
    return scalar_or_array(deformation, ca, lam)


@guarded
def deformation_onset_shear_rate(continuous_viscosity_Pa_s, droplet_radius_m,
                                 interfacial_tension_N_per_m, viscosity_ratio=1.0,
                                 deformation=0.1):
    r"""Shear rate at which droplets reach a given small deformation (onset of thinning).

    Inverts `taylor_deformation` [1]_ for the shear rate. Above this shear rate droplets are
    visibly elongated and the emulsion starts to shear-thin by droplet deformation.

    Parameters
    ----------
    continuous_viscosity_Pa_s : float or array_like
        Viscosity of the continuous phase. [Pa*s]
    droplet_radius_m : float or array_like
        Droplet radius (half the Sauter diameter for a distribution). [m]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    viscosity_ratio : float or array_like, optional
        Droplet / continuous-phase viscosity, in [0, inf]. [-]
    deformation : float or array_like, optional
        Deformation D taken as the onset, in (0, 0.3]; 0.1 is our choice (common practice,
        no source). [-]

    Returns
    -------
    shear_rate_1_per_s : float or numpy.ndarray
        Shear rate at which D is reached. [1/s]

    Raises
    ------
    InputRangeError
        If an input is not positive, or `deformation` lies outside (0, 0.3].

    See Also
    --------
    deformation_thinning : the viscosity as the droplets deform.

    Notes
    -----
    .. math:: \dot\gamma_{onset} = \frac{D\,\Gamma}{\eta_c R}\,\frac{16\lambda + 16}
              {19\lambda + 16}

    This is an onset marker of visible deformation. The viscosity itself as a function of
    the capillary number is `deformation_thinning`; its thinning is half done at
    Ca = 1 / `relaxation_time_oldroyd`, which lies above this onset for viscosity ratios
    below about 11 and below it for more viscous droplets (see the Notes there).

    References
    ----------
    .. [1] G. I. Taylor, "The formation of emulsions in definable fields of flow," Proc. R.
       Soc. Lond. A, vol. 146, no. 858, pp. 501-523, 1934, doi:10.1098/rspa.1934.0169.

    Examples
    --------
    Illustrative call (invented case): 1 mPa*s water, 1 um droplets (radius 0.5 um),
    5 mN/m, equal viscosities.

    >>> deformation_onset_shear_rate(1e-3, 0.5e-6, 5e-3, viscosity_ratio=1.0)
    914285.7
    """
    eta = positive(continuous_viscosity_Pa_s, "continuous_viscosity_Pa_s")
    radius = positive(droplet_radius_m, "droplet_radius_m")
    gamma = positive(interfacial_tension_N_per_m, "interfacial_tension_N_per_m")
    lam = _viscosity_ratio(viscosity_ratio)
    d = in_range(deformation, "deformation", 0.0, TAYLOR_DEFORMATION_LIMIT, low_open=True)
    rate = d * gamma / (eta * radius * _taylor_deformation_factor(lam))
    return scalar_or_array(rate, eta, radius, gamma, lam, d)


#: Lower end of the viscosity ratios behind de Bruijn's fit (from memory, not checked).
DE_BRUIJN_LOWEST_RATIO = 1e-4


@guarded
def critical_capillary_de_bruijn(viscosity_ratio):
    r"""Critical capillary number for droplet breakup in simple shear (fit of Grace's curve).

    De Bruijn's fit [1]_ of the classic breakup curve measured by Grace [2]_: above this
    capillary number a droplet in steady simple shear breaks. It has a minimum near
    viscosity ratio 0.5-1 and rises without bound towards lambda = 4.08, above which
    simple shear cannot break droplets at all.

    Parameters
    ----------
    viscosity_ratio : float or array_like
        Droplet / continuous-phase viscosity, in [0, inf]. [-]

    Returns
    -------
    critical_capillary_number : float or numpy.ndarray
        Ca_crit, with Ca = eta_c * shear_rate * R / Gamma; ``inf`` for lambda >= 4.08. [-]

    Raises
    ------
    InputRangeError
        If the viscosity ratio is negative or NaN.

    Warns
    -----
    ValidityWarning
        Where lambda < 1e-4, below the range of the data fitted (from memory).

    Notes
    -----
    .. math:: \log_{10}\mathrm{Ca}_{crit} = -0.506 - 0.0995\,\log_{10}\lambda
              + 0.124\,(\log_{10}\lambda)^2 - \frac{0.115}{\log_{10}\lambda - \log_{10}4.08}

    Coefficients checked against a secondary restatement of the fit (one that cites
    Fortelny's 2019 review). It prints 0.0995 for the coefficient of log(lambda), where we
    had recalled 0.0994; we use 0.0995 because it is the written source (the two differ by
    under 0.1 % in Ca_crit between lambda = 1e-2 and 4). The restatement does not name the
    log base; base 10 is kept because it gives Ca_crit = 0.481 at lambda = 1, the commonly
    quoted minimum of about 0.5, where natural logs would not. The shape (minimum about
    0.4-0.5 near lambda = 1, no breakup above lambda of about 4) agrees with the breakup
    curve as described in the abstract of [3]_ (seen). Steady simple shear only: elongational flow
    breaks droplets at any lambda and at lower Ca, and real mixers combine both.

    References
    ----------
    .. [1] R. A. de Bruijn, "Deformation and breakup of drops in simple shear flows," Ph.D.
       thesis, Eindhoven University of Technology, 1989.
    .. [2] H. P. Grace, "Dispersion phenomena in high viscosity immiscible fluid systems and
       application of static mixers as dispersion devices in such systems," Chem. Eng.
       Commun., vol. 14, no. 3-6, pp. 225-277, 1982.
    .. [3] J. M. H. Janssen and H. E. H. Meijer, "Droplet breakup mechanisms: Stepwise
       equilibrium versus transient dispersion," J. Rheol., vol. 37, no. 4, pp. 597-608, 1993.

    Examples
    --------
    Illustrative calls: equal viscosities; a droplet ten times as viscous cannot be broken.

    >>> critical_capillary_de_bruijn(1.0)
    0.481195
    >>> critical_capillary_de_bruijn(10.0)
    inf
    """
    lam = _viscosity_ratio(viscosity_ratio)
    if np.any(lam < DE_BRUIJN_LOWEST_RATIO):
        _warn(f"critical_capillary_de_bruijn is used at viscosity_ratio = "
              f"{float(np.min(lam)):.3g}, below the range of the fitted data "
              f"({DE_BRUIJN_LOWEST_RATIO:g} to {NO_BREAKUP_VISCOSITY_RATIO:g}).")
    breaks = (lam > 0.0) & (lam < NO_BREAKUP_VISCOSITY_RATIO)
    x = np.log10(np.where(breaks, lam, 1.0))
    log_ca = (-0.506 - 0.0995 * x + 0.124 * x**2
              - 0.115 / (x - np.log10(NO_BREAKUP_VISCOSITY_RATIO)))
    # lambda = 0 (bubbles): the fit grows without bound as lambda -> 0; below about 1e-40
    # it passes the float range, which is the same answer (no breakup), so overflow is inf.
    with np.errstate(over="ignore"):
        ca = np.where(breaks, 10.0**log_ca, np.inf)
    return scalar_or_array(ca, lam)


@guarded
def max_stable_droplet_diameter(continuous_viscosity_Pa_s, shear_rate_1_per_s,
                                interfacial_tension_N_per_m, viscosity_ratio=1.0):
    r"""Largest droplet diameter that survives steady simple shear at a process shear rate.

    Droplets larger than this break (critical capillary number from
    `critical_capillary_de_bruijn` [1]_ [2]_), so it estimates what a mixer or mill that
    shears at this rate can make.

    Parameters
    ----------
    continuous_viscosity_Pa_s : float or array_like
        Viscosity of the continuous phase (of the emulsion being sheared, for concentrated
        emulsions; common practice, no source). [Pa*s]
    shear_rate_1_per_s : float or array_like
        Process shear rate, > 0. [1/s]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    viscosity_ratio : float or array_like, optional
        Droplet / continuous-phase viscosity, in [0, inf]. [-]

    Returns
    -------
    diameter_m : float or numpy.ndarray
        2 Ca_crit Gamma / (eta_c shear_rate); ``inf`` where lambda >= 4.08 (no breakup in
        simple shear). [m]

    Raises
    ------
    InputRangeError
        If an input is not positive or the viscosity ratio is negative or NaN.

    Warns
    -----
    ValidityWarning
        Where lambda >= 4.08: simple shear cannot break these droplets; elongational flow
        is needed.

    Notes
    -----
    .. math:: d_{max} = \frac{2\,\mathrm{Ca}_{crit}(\lambda)\,\Gamma}{\eta_c\,\dot\gamma}

    Laminar, steady simple shear and a single droplet. Turbulent high-pressure homogenisers
    follow other laws and are not covered.

    References
    ----------
    .. [1] R. A. de Bruijn, "Deformation and breakup of drops in simple shear flows," Ph.D.
       thesis, Eindhoven University of Technology, 1989.
    .. [2] H. P. Grace, "Dispersion phenomena in high viscosity immiscible fluid systems and
       application of static mixers as dispersion devices in such systems," Chem. Eng.
       Commun., vol. 14, no. 3-6, pp. 225-277, 1982.

    Examples
    --------
    Illustrative call (invented case): a colloid mill at 1e4 1/s in a 0.1 Pa*s thickened
    water phase, 5 mN/m, oil as viscous as the water phase.

    >>> max_stable_droplet_diameter(0.1, 1e4, 5e-3, viscosity_ratio=1.0)
    4.81195e-06
    """
    eta = positive(continuous_viscosity_Pa_s, "continuous_viscosity_Pa_s")
    rate = positive(shear_rate_1_per_s, "shear_rate_1_per_s")
    gamma = positive(interfacial_tension_N_per_m, "interfacial_tension_N_per_m")
    lam = _viscosity_ratio(viscosity_ratio)
    ca_crit = critical_capillary_de_bruijn(lam)
    if np.any(np.isinf(ca_crit)):
        _warn("max_stable_droplet_diameter: simple shear cannot break droplets with "
              f"viscosity_ratio >= {NO_BREAKUP_VISCOSITY_RATIO:g} (or 0); the diameter is "
              "inf there. Elongational flow is needed.")
    return scalar_or_array(2.0 * ca_crit * gamma / (eta * rate), eta, rate, gamma, lam)


# --------------------------------------------------------------------------------------------
# Shear thinning by droplet deformation
# --------------------------------------------------------------------------------------------


def _relaxation_factor(lam):
    """(19 lambda + 16)(2 lambda + 3)/(40 (lambda + 1)), written so that lambda = inf gives inf."""
    big = lam >= 1.0
    safe = np.where(big, lam, 1.0)
    inverse = 1.0 / safe
    small = np.where(big, 0.0, lam)
    return np.where(big, safe * ((19.0 + 16.0 * inverse) * (2.0 + 3.0 * inverse)
                                 / (40.0 * (1.0 + inverse))),
                    (19.0 * small + 16.0) * (2.0 * small + 3.0) / (40.0 * (small + 1.0)))


def _thinning_exponent(lam):
    """(19 lambda + 16)/(2 (lambda + 1)(2 lambda + 3)): Taylor's intrinsic viscosity minus
    Oldroyd's high-Ca one; written so that lambda = inf gives 0."""
    big = lam >= 1.0
    inverse = 1.0 / np.where(big, lam, 1.0)
    small = np.where(big, 0.0, lam)
    return np.where(big, inverse * (19.0 + 16.0 * inverse)
                    / (2.0 * (1.0 + inverse) * (2.0 + 3.0 * inverse)),
                    (19.0 * small + 16.0) / (2.0 * (small + 1.0) * (2.0 * small + 3.0)))


@guarded
def relaxation_time_oldroyd(viscosity_ratio):
    r"""Dimensionless shape-relaxation time of a droplet in a dilute emulsion.

    The relaxation time of Oldroyd's dilute-emulsion theory [1]_, in units of the capillary
    time eta_c R / Gamma: how long a deformed droplet takes to relax back to a sphere. Its
    inverse is the capillary number at which `deformation_thinning` is half done.

    Parameters
    ----------
    viscosity_ratio : float or array_like
        Droplet / continuous-phase viscosity, in [0, inf]. [-]

    Returns
    -------
    relaxation_time : float or numpy.ndarray
        lambda_hat; the time itself is lambda_hat * eta_c * R / Gamma. ``inf`` for rigid
        spheres (they never deform). [-]

    Raises
    ------
    InputRangeError
        If the viscosity ratio is negative or NaN.

    See Also
    --------
    deformation_thinning : uses this time.

    Notes
    -----
    .. math:: \hat\lambda = \frac{(19\lambda + 16)(2\lambda + 3)}{40(\lambda + 1)}

    The dilute (first order in phi) limit of Oldroyd's relaxation time [1]_, checked
    against a secondary restatement (a thesis code citing [1]_). At lambda = 0 it is 6/5,
    the constant K = 6/5 that Llewellin, Mader & Wilson [2]_ use for bubbles (seen restated
    in two independent codes). It grows like 19 lambda / 20 for
    viscous droplets.

    References
    ----------
    .. [1] J. G. Oldroyd, "The elastic and viscous properties of emulsions and suspensions,"
       Proc. R. Soc. Lond. A, vol. 218, no. 1132, pp. 122-132, 1953.
    .. [2] E. W. Llewellin, H. M. Mader and S. D. R. Wilson, "The constitutive equation and
       flow dynamics of bubbly magmas," Geophys. Res. Lett., vol. 29, no. 24, p. 2170, 2002,
       doi:10.1029/2002GL015697 (DOI from memory).

    Examples
    --------
    Illustrative calls: bubbles, equal viscosities, rigid spheres.

    >>> relaxation_time_oldroyd(0.0)
    1.2
    >>> relaxation_time_oldroyd(1.0)
    2.1875
    >>> relaxation_time_oldroyd(np.inf)
    inf
    """
    lam = _viscosity_ratio(viscosity_ratio)
    return scalar_or_array(_relaxation_factor(lam), lam)


@guarded
def deformation_thinning(phi, capillary_number, viscosity_ratio=1.0, model="phan-thien-pham",
                         model_params=None):
    r"""Relative viscosity of an emulsion whose droplets deform in steady shear.

    For bubbles (viscosity ratio 0) this is the steady-flow relation of Llewellin, Mader &
    Wilson [1]_ as recommended by Mader, Llewellin & Mueller [2]_: the viscosity falls from
    its zero-shear value (1 - phi)^-1 to (1 - phi)^(5/3) as the capillary number grows. For
    other viscosity ratios it is a generalisation of our own, not a published relation:
    the same form, with the relaxation time and the high-shear intrinsic viscosity of
    Oldroyd's dilute-emulsion theory [3]_ and the zero-shear value of a registered emulsion
    relation (Phan-Thien & Pham [4]_ by default).

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase, in [0, 1) (and below phi_max for a relation
        with a packing limit). [-]
    capillary_number : float or array_like
        Ca = eta_c * shear_rate * R / Gamma from `capillary_number` (R the droplet radius,
        half the Sauter diameter for a distribution), >= 0. [-]
    viscosity_ratio : float or array_like, optional
        Droplet / continuous-phase viscosity, in [0, inf]; ``inf`` (rigid spheres, or
        droplets with an immobilised interface) gives no thinning. [-]
    model : str, optional
        Registered emulsion relation for the zero-shear value: "phan-thien-pham" (default),
        "pal" or "taylor".
    model_params : dict, optional
        Further parameters of that relation, e.g. ``{"phi_max": 0.7}`` for Pal; not the
        viscosity ratio, which is its own argument.

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the emulsion divided by that of the continuous phase, at this capillary
        number. Below 1 is possible for viscosity ratios below 1 at high Ca (deformed
        bubbles lubricate the flow). [-]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1) or at or above the relation's phi_max, the capillary
        number is negative or not finite, the viscosity ratio is negative or NaN, or
        `model_params` holds an unknown name, a value out of bounds or the viscosity ratio.
    UnknownModelError
        If `model` is not a registered emulsion relation.

    Warns
    -----
    ValidityWarning
        Where the capillary number exceeds the critical one for breakup in simple shear
        (`critical_capillary_de_bruijn`): droplets would break and the size that sets Ca
        would change; and where phi lies outside the relation's validity range.

    See Also
    --------
    capillary_number, relaxation_time_oldroyd
    deformation_onset_shear_rate : the shear rate of visible deformation.
    phan_thien_pham, pal, taylor : the zero-shear values.

    Notes
    -----
    .. math:: \eta_r = \eta_\infty + \frac{\eta_0 - \eta_\infty}
              {1 + (\hat\lambda\,\mathrm{Ca})^2},\qquad
              \eta_\infty = \eta_0\,(1 - \phi)^{[\eta]_0 - [\eta]_\infty},\qquad
              [\eta]_0 - [\eta]_\infty = \frac{19\lambda + 16}{2(\lambda + 1)(2\lambda + 3)}

    with hat-lambda from `relaxation_time_oldroyd` and eta_0 the chosen relation at the
    viscosity ratio lambda.

    *Bubbles (lambda = 0)*: hat-lambda = 6/5, eta_0 = 1/(1 - phi) (the bubble limit of
    Phan-Thien & Pham) and the exponent 8/3, so eta_inf = (1 - phi)^(5/3): the relation of
    [1]_ in the form recommended in [2]_, with K = 6/5 and m = 2: checked against secondary
    restatements, the same form being in two independent public codes (a MATLAB function
    citing [1]_ as extended by Eqs. 2-3 of [2]_, and pyflowgo's bubble relative-viscosity
    model).

    *Any lambda (our construction)*: hat-lambda is Oldroyd's dilute relaxation time [3]_;
    [eta]_0 = (5 lambda + 2)/(2 lambda + 2) is Taylor's intrinsic viscosity and
    [eta]_inf = 5 (lambda - 1)/(2 lambda + 3) the one of Oldroyd's dilute theory at high Ca
    [3]_ (it follows from the restated relaxation time; -5/3 at lambda = 0, 5/2 for rigid
    spheres). Their difference, the
    dilute loss of intrinsic viscosity on deformation, is carried to concentrations by the
    differential scheme as a factor on eta_0, as [1]_ and [2]_ do for bubbles. It is
    positive for every lambda, so the relation never thickens; it vanishes like
    19/(4 lambda) for viscous droplets, so the thinning fades continuously into the rigid
    limit, and eta_inf keeps the packing limit of the chosen relation (Pal's divergence at
    phi_max is kept at every Ca).

    Limits and cautions:

    - Oldroyd's theory is for small deformation of dilute droplets; the concentrated form
      is an extrapolation, like the bubble form it generalises, and the steady-shear
      Cross-like form is the analogy used in [1]_, not a consequence of the dilute theory.
    - Rigid spheres (lambda = inf) are returned unchanged (eta_0). For viscous droplets,
      hat-lambda grows like 19 lambda / 20, so the thinning starts at Ca about 1/lambda and
      its amplitude falls like 1/lambda: treat it above lambda of about 4 as a screening
      estimate.
    - Above the critical capillary number droplets break (a warning is given); the relation
      then describes the old size only.
    - No yield stress: above droplet packing use `flow_stress_jammed`.

    References
    ----------
    .. [1] E. W. Llewellin, H. M. Mader and S. D. R. Wilson, "The constitutive equation and
       flow dynamics of bubbly magmas," Geophys. Res. Lett., vol. 29, no. 24, p. 2170, 2002,
       doi:10.1029/2002GL015697 (DOI from memory).
    .. [2] H. M. Mader, E. W. Llewellin and S. P. Mueller, "The rheology of two-phase magmas:
       A review and analysis," J. Volcanol. Geotherm. Res., vol. 257, pp. 135-158, 2013,
       doi:10.1016/j.jvolgeores.2013.02.014 (DOI from memory).
    .. [3] J. G. Oldroyd, "The elastic and viscous properties of emulsions and suspensions,"
       Proc. R. Soc. Lond. A, vol. 218, no. 1132, pp. 122-132, 1953.
    .. [4] N. Phan-Thien and D. C. Pham, "Differential multiphase models for polydispersed
       suspensions and particulate solids," J. Non-Newtonian Fluid Mech., vol. 72, no. 2-3,
       pp. 305-318, 1997, doi:10.1016/S0377-0257(97)00037-1.

    Examples
    --------
    Illustrative calls: bubbles at phi = 0.3, at rest and at Ca = 1 (the relation of [1]_),
    then oil droplets as viscous as the water phase at Ca = 0.3.

    >>> deformation_thinning(0.3, 0.0, viscosity_ratio=0.0)
    1.428571
    >>> deformation_thinning(0.3, 1.0, viscosity_ratio=0.0)
    0.911169
    >>> deformation_thinning(0.3, 0.3, viscosity_ratio=1.0)
    1.543788
    """
    phi = in_range(phi, "phi", 0.0, 1.0, high_open=True)
    ca = in_range(capillary_number, "capillary_number", 0.0, np.inf)
    lam = _viscosity_ratio(viscosity_ratio)
    spec = get_model(model, kind="emulsion")
    params = dict(model_params or {})
    if "viscosity_ratio" in params:
        raise InputRangeError("model_params", "viscosity_ratio",
                              "no viscosity_ratio: pass it as the viscosity_ratio argument")
    params = spec.check_params(params)
    params.pop("viscosity_ratio", None)
    if "phi_max" in params:
        phi_b, phi_max = np.broadcast_arrays(phi, np.asarray(params["phi_max"], dtype=float))
        jammed = phi_b >= phi_max
        if np.any(jammed):
            raise InputRangeError(
                "phi", phi_b[jammed].flat[0],
                f"a value in [0, phi_max) = [0, {phi_max[jammed].flat[0]:g}) for "
                f"{spec.name}; above it the droplets are jammed (see flow_stress_jammed)")
    message = spec.validity_message(phi, {**params, "viscosity_ratio": lam})
    if message:
        _warn(message)
    eta_0 = np.asarray(spec.func(phi, viscosity_ratio=lam, **params), dtype=float)
    eta = eta_0 * _thinning_factor(phi, ca, lam)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)    # lambda < 1e-4 is only an edge
        ca_crit = critical_capillary_de_bruijn(lam)
    ca_b, crit_b, lam_b = np.broadcast_arrays(ca, ca_crit, lam)
    breaks = ca_b > crit_b
    if np.any(breaks):
        _warn(f"deformation_thinning is used at capillary_number = {ca_b[breaks].flat[0]:.3g}, "
              f"above the critical capillary number for breakup in simple shear "
              f"({crit_b[breaks].flat[0]:.3g} at viscosity_ratio = {lam_b[breaks].flat[0]:.3g}):"
              " the droplets would break and their size change; the thinning is only "
              "indicative there.")
    return scalar_or_array(eta, phi, ca, lam)


def _thinning_factor(phi, ca, lam):
    """eta_r(Ca) / eta_r(0) of `deformation_thinning`: the same for any zero-shear relation,
    1 exactly at Ca = 0 and for rigid spheres."""
    rigid = np.isinf(lam)
    floor = np.exp(_thinning_exponent(lam) * np.log1p(-phi))       # eta_inf / eta_0
    with np.errstate(over="ignore", invalid="ignore"):
        # Overflow of (hat-lambda Ca)^2 means weight 0, the high-Ca limit; 0 * inf (a huge
        # lambda at Ca = 0) is replaced by 0 just below.
        x = _relaxation_factor(np.where(rigid, 0.0, lam)) * ca
        weight = 1.0 / (1.0 + np.where(ca > 0.0, x, 0.0) ** 2)
        blend = floor + (1.0 - floor) * weight
    weight = np.where(rigid, 1.0, weight)
    return np.where(weight >= 1.0, 1.0, np.where(weight <= 0.0, floor, blend))


# --------------------------------------------------------------------------------------------
# Jammed (compressed) emulsions
# --------------------------------------------------------------------------------------------


def _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m):
    gamma = positive(interfacial_tension_N_per_m, "interfacial_tension_N_per_m")
    d32 = positive(sauter_diameter_m, "sauter_diameter_m")
    return gamma, d32, gamma / (0.5 * d32)


def _check_fitted(name, phi, low, high):
    outside = (phi < low) | (phi > high)
    if np.any(outside):
        worst = phi[outside].flat[0]
        _warn(f"{name} is used at phi = {float(worst):.3g}, outside the range its source "
              f"fitted ({low:g} to {high:g}).")


@guarded
def shear_modulus_princen_kiss(phi, interfacial_tension_N_per_m, sauter_diameter_m):
    r"""Static shear modulus of a highly concentrated (jammed) emulsion.

    Princen & Kiss's empirical fit [1]_ for polydisperse emulsions, scaled by the Laplace
    pressure of the Sauter radius.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    sauter_diameter_m : float or array_like
        Sauter mean diameter d32 of the droplets. [m]

    Returns
    -------
    shear_modulus_Pa : float or numpy.ndarray
        Zero below phi = 0.712. [Pa]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1] or the tension or diameter is not positive.

    Warns
    -----
    ValidityWarning
        Outside 0.712 <= phi <= 0.98.

    Notes
    -----
    .. math:: G = 1.769\,\frac{\Gamma}{R_{32}}\,\phi^{1/3}\,(\phi - 0.712)

    Equation from memory, not checked against [1]_; fitted range taken as 0.712 to 0.98
    (from memory).

    References
    ----------
    .. [1] H. M. Princen and A. D. Kiss, "Rheology of foams and highly concentrated
       emulsions. III. Static shear modulus," J. Colloid Interface Sci., vol. 112, no. 2,
       pp. 427-437, 1986.

    Examples
    --------
    Illustrative call (invented case): phi 0.9, 10 mN/m, d32 = 10 um.

    >>> shear_modulus_princen_kiss(0.9, 10e-3, 10e-6)
    642.1895
    """
    phi = fraction(phi, "phi")
    gamma, d32, scale = _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m)
    _check_fitted("shear_modulus_princen_kiss", phi, PRINCEN_KISS_MODULUS_ZERO,
                  PRINCEN_KISS_FITTED[1])
    g = 1.769 * scale * np.cbrt(phi) * np.clip(phi - PRINCEN_KISS_MODULUS_ZERO, 0.0, None)
    return scalar_or_array(g, phi, gamma, d32)


@guarded
def yield_stress_princen_kiss(phi, interfacial_tension_N_per_m, sauter_diameter_m):
    r"""Yield stress of a highly concentrated (jammed) emulsion.

    Princen & Kiss's empirical fit [1]_ for polydisperse emulsions.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    sauter_diameter_m : float or array_like
        Sauter mean diameter d32 of the droplets. [m]

    Returns
    -------
    yield_stress_Pa : float or numpy.ndarray
        Zero where the fit is negative (phi below about 0.80). [Pa]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1) or the tension or diameter is not positive.

    Warns
    -----
    ValidityWarning
        Outside the fitted range 0.83 <= phi <= 0.98.

    Notes
    -----
    .. math:: \tau_y = \frac{\Gamma}{R_{32}}\,\phi^{1/3}\,Y(\phi),\qquad
              Y(\phi) = -0.080 - 0.114\,\log_{10}(1 - \phi)

    Y(phi) checked against a secondary restatement, which does not state the log base;
    base 10 is kept, as recalled: it puts the zero of Y at phi = 0.80, near where the
    droplets unjam (about 0.71), whereas natural logs would put it at phi = 0.50, far below
    droplet packing. The fitted
    range (0.83 to 0.98) is from memory, not checked against [1]_.

    References
    ----------
    .. [1] H. M. Princen and A. D. Kiss, "Rheology of foams and highly concentrated
       emulsions. IV. An experimental study of the shear viscosity and yield stress of
       concentrated emulsions," J. Colloid Interface Sci., vol. 128, no. 1, pp. 176-187, 1989.

    Examples
    --------
    Illustrative call (invented case): phi 0.9, 10 mN/m, d32 = 10 um.

    >>> yield_stress_princen_kiss(0.9, 10e-3, 10e-6)
    65.65328
    """
    phi = in_range(phi, "phi", 0.0, 1.0, high_open=True)
    gamma, d32, scale = _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m)
    _check_fitted("yield_stress_princen_kiss", phi, *PRINCEN_KISS_FITTED)
    y = -0.080 - 0.114 * np.log10(1.0 - phi)
    return scalar_or_array(scale * np.cbrt(phi) * np.clip(y, 0.0, None), phi, gamma, d32)


@guarded
def shear_modulus_mason(phi, interfacial_tension_N_per_m, sauter_diameter_m, phi_c=MASON_PHI_C):
    r"""Plateau shear modulus of a compressed emulsion just above droplet packing.

    Mason, Bibette & Weitz [1]_ found the modulus of monodisperse emulsions, scaled by the
    Laplace pressure Gamma/R, to grow as phi (phi - phi_c) with phi_c about 0.635; the
    prefactor 1.7 is from the later study [2]_.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase (Mason et al. use an effective fraction that
        includes the thin films; for droplets above about 1 um the two agree). [-]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    sauter_diameter_m : float or array_like
        Sauter mean diameter of the droplets (the diameter for monodisperse droplets). [m]
    phi_c : float or array_like, optional
        Volume fraction where the modulus vanishes, in [0.5, 0.9]. [-]

    Returns
    -------
    shear_modulus_Pa : float or numpy.ndarray
        Zero below phi_c. [Pa]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1], phi_c outside [0.5, 0.9], or the tension or diameter is
        not positive.

    Warns
    -----
    ValidityWarning
        Above phi = 0.85, the upper end of the data (from memory).

    Notes
    -----
    .. math:: G' = 1.7\,\frac{\Gamma}{R}\,\phi\,(\phi - \phi_c)

    The form phi (phi - phi_c) and phi_c = 0.635 are from the abstract of [1]_ (seen); the
    prefactor 1.7 and the upper end 0.85 are from memory, not checked against [2]_.

    References
    ----------
    .. [1] T. G. Mason, J. Bibette and D. A. Weitz, "Elasticity of compressed emulsions,"
       Phys. Rev. Lett., vol. 75, no. 10, pp. 2051-2054, 1995.
    .. [2] T. G. Mason, M.-D. Lacasse, G. S. Grest, D. Levine, J. Bibette and D. A. Weitz,
       "Osmotic pressure and viscoelastic shear moduli of concentrated emulsions," Phys. Rev.
       E, vol. 56, no. 3, pp. 3150-3166, 1997.

    Examples
    --------
    Illustrative call (invented case): phi 0.75, 10 mN/m, 10 um droplets.

    >>> shear_modulus_mason(0.75, 10e-3, 10e-6)
    293.25
    """
    phi = fraction(phi, "phi")
    gamma, d32, scale = _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m)
    phi_c = in_range(phi_c, "phi_c", 0.5, 0.9)
    _check_fitted("shear_modulus_mason", phi, 0.0, MASON_FITTED_UPPER)
    g = 1.7 * scale * phi * np.clip(phi - phi_c, 0.0, None)
    return scalar_or_array(g, phi, gamma, d32, phi_c)


@guarded
def yield_stress_mason(phi, interfacial_tension_N_per_m, sauter_diameter_m, phi_c=MASON_PHI_C):
    r"""Yield stress of a compressed emulsion just above droplet packing.

    Mason, Bibette & Weitz's scaling [1]_ for monodisperse emulsions: the yield stress,
    scaled by the Laplace pressure Gamma/R, grows as (phi - phi_c)^2.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    sauter_diameter_m : float or array_like
        Sauter mean diameter of the droplets (the diameter for monodisperse droplets). [m]
    phi_c : float or array_like, optional
        Volume fraction where the yield stress vanishes, in [0.5, 0.9]. [-]

    Returns
    -------
    yield_stress_Pa : float or numpy.ndarray
        Zero below phi_c. [Pa]

    Raises
    ------
    InputRangeError
        If phi lies outside [0, 1], phi_c outside [0.5, 0.9], or the tension or diameter is
        not positive.

    Warns
    -----
    ValidityWarning
        Above phi = 0.85, the upper end of the data (from memory).

    Notes
    -----
    .. math:: \tau_y = 0.51\,\frac{\Gamma}{R}\,(\phi - \phi_c)^2

    Prefactor, exponent and range from memory, not checked against [1]_.

    References
    ----------
    .. [1] T. G. Mason, J. Bibette and D. A. Weitz, "Yielding and flow of monodisperse
       emulsions," J. Colloid Interface Sci., vol. 179, no. 2, pp. 439-448, 1996.

    Examples
    --------
    Illustrative call (invented case): phi 0.75, 10 mN/m, 10 um droplets.

    >>> yield_stress_mason(0.75, 10e-3, 10e-6)
    13.4895
    """
    phi = fraction(phi, "phi")
    gamma, d32, scale = _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m)
    phi_c = in_range(phi_c, "phi_c", 0.5, 0.9)
    _check_fitted("yield_stress_mason", phi, 0.0, MASON_FITTED_UPPER)
    tau = 0.51 * scale * np.clip(phi - phi_c, 0.0, None) ** 2
    return scalar_or_array(tau, phi, gamma, d32, phi_c)


JAMMED_YIELD_RELATIONS = ("mason", "princen-kiss")


@guarded
def flow_stress_jammed(phi, shear_rate_1_per_s, continuous_viscosity_Pa_s,
                       interfacial_tension_N_per_m, sauter_diameter_m, viscosity_ratio=1.0,
                       phi_c=MASON_PHI_C, yield_relation="mason"):
    r"""Shear stress of a jammed emulsion in steady flow: a Herschel-Bulkley-like curve.

    The yield stress from Mason et al. [1]_ or Princen & Kiss [2]_, plus a viscous stress:
    Princen & Kiss's term [2]_, which grows as the square root of the capillary number, or,
    where larger, the stress of the droplets flowing as a liquid (Phan-Thien & Pham [3]_).

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    continuous_viscosity_Pa_s : float or array_like
        Viscosity of the continuous phase. [Pa*s]
    interfacial_tension_N_per_m : float or array_like
        Interfacial tension. [N/m]
    sauter_diameter_m : float or array_like
        Sauter mean diameter d32 of the droplets. [m]
    viscosity_ratio : float or array_like, optional
        Droplet / continuous-phase viscosity, in [0, inf], for the liquid-like floor. [-]
    phi_c : float or array_like, optional
        Onset of the yield stress for ``yield_relation="mason"``, in [0.5, 0.9]. [-]
    yield_relation : {"mason", "princen-kiss"}, optional
        Which yield-stress relation to use.

    Returns
    -------
    shear_stress_Pa : float or numpy.ndarray
        Steady shear stress. [Pa]

    Raises
    ------
    InputRangeError
        On bad inputs, or an unknown `yield_relation`.

    Warns
    -----
    ValidityWarning
        From the yield relation used, outside its fitted range.

    Notes
    -----
    .. math:: \sigma = \tau_y(\phi) + \max\left(32\,(\phi - 0.73)\,\frac{\Gamma}{R_{32}}\,
              \mathrm{Ca}^{1/2},\; \eta_c\,\dot\gamma\,\eta_{r,PTP}(\phi, \lambda)\right),
              \qquad \mathrm{Ca} = \frac{\eta_c\,R_{32}\,\dot\gamma}{\Gamma}

    The first viscous term is Princen & Kiss's fit for 0.83 <= phi <= 0.98 (equation from
    memory, not checked against [2]_), taken as zero below phi = 0.73. The second, the
    relative viscosity of `phan_thien_pham` times the continuous phase's stress, is a floor
    of our own construction, not a published relation: it keeps the apparent viscosity at
    high shear rates, and just above phi_c where the yield stress vanishes, from falling
    below that of the same droplets flowing as a liquid. Between phi_c and 0.83 the whole
    curve is a screening estimate.

    References
    ----------
    .. [1] T. G. Mason, J. Bibette and D. A. Weitz, "Yielding and flow of monodisperse
       emulsions," J. Colloid Interface Sci., vol. 179, no. 2, pp. 439-448, 1996.
    .. [2] H. M. Princen and A. D. Kiss, "Rheology of foams and highly concentrated
       emulsions. IV. An experimental study of the shear viscosity and yield stress of
       concentrated emulsions," J. Colloid Interface Sci., vol. 128, no. 1, pp. 176-187, 1989.
    .. [3] N. Phan-Thien and D. C. Pham, "Differential multiphase models for polydispersed
       suspensions and particulate solids," J. Non-Newtonian Fluid Mech., vol. 72, no. 2-3,
       pp. 305-318, 1997.

    Examples
    --------
    Illustrative call (invented case): a thick cream, phi 0.85, 10 1/s, water phase
    1 mPa*s, 5 mN/m, d32 = 5 um, Princen & Kiss yield stress.

    >>> flow_stress_jammed(0.85, 10.0, 1e-3, 5e-3, 5e-6, yield_relation="princen-kiss")
    43.55555
    """
    phi = fraction(phi, "phi")
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    eta = positive(continuous_viscosity_Pa_s, "continuous_viscosity_Pa_s")
    gamma, d32, scale = _laplace_scale(interfacial_tension_N_per_m, sauter_diameter_m)
    lam = _viscosity_ratio(viscosity_ratio)
    if yield_relation == "mason":
        tau_y = yield_stress_mason(phi, gamma, d32, phi_c)
    elif yield_relation == "princen-kiss":
        tau_y = yield_stress_princen_kiss(np.minimum(phi, np.nextafter(1.0, 0.0)), gamma, d32)
    else:
        raise InputRangeError("yield_relation", yield_relation,
                              f"one of {', '.join(JAMMED_YIELD_RELATIONS)}")
    ca = eta * 0.5 * d32 * rate / gamma
    princen_kiss = 32.0 * np.clip(phi - PRINCEN_KISS_FLOW_ZERO, 0.0, None) * scale * np.sqrt(ca)
    liquid = eta * rate * phan_thien_pham(phi, lam)
    stress = tau_y + np.maximum(princen_kiss, liquid)
    return scalar_or_array(stress, phi, rate, eta, gamma, d32, lam)
