r"""Shear-rate physics of suspensions: Peclet number, Brownian thinning, shear thickening.

Pure numpy, SI units. The relations:

- `peclet_number` and `reduced_stress`, the dimensionless rate and stress of Brownian
  particles;
- `krieger_shear_thinning`: the stress-based interpolation of Krieger between the zero-shear
  and high-shear plateaus of Brownian suspensions;
- `wyart_cates`: the frictional shear thickening of dense non-Brownian suspensions;
- `flow_curve`: one suspension (or filled non-Newtonian liquid) over a range of shear rates,
  solved self-consistently for the stress at each rate, in stress space, so that an
  S-shaped curve (discontinuous thickening) and shear jamming are found and reported;
- `newtonian_flow_viscosity` and `newtonian_flow_regime`: the same flow curve in closed form
  for a Newtonian liquid without thickening, vectorised over many suspensions at once;
- `PROCESS_SHEAR_RATES`: typical shear rates of processes (common practice, no source).

How the pieces are combined in `flow_curve` (our own combination of published relations,
documented in its Notes) is a modelling choice; each piece is checked on its own in the tests.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from ._checks import as_array, guarded, in_range, positive, scalar_or_array
from .errors import InputRangeError, ValidityWarning
from .liquids import liquid_law
from .registry import get_model

#: Boltzmann constant, exact since the 2019 SI redefinition. [J/K]
BOLTZMANN_J_PER_K = 1.380649e-23

#: Reduced stress sigma a**3/(k_B T) at which Krieger's interpolation is midway between the
#: plateaus (b = 1/0.1 in Krieger's notation). From memory, not checked against the source.
CRITICAL_REDUCED_STRESS = 0.1

#: Typical shear rates of processes, (name, low, high) in 1/s. Common practice, no source;
#: edit freely. Order: slowest first.
PROCESS_SHEAR_RATES: tuple[tuple[str, float, float], ...] = (
    ("settling", 1e-6, 1e-3),
    ("levelling", 1e-2, 1e-1),
    ("sagging", 1e-1, 1e1),
    ("pouring, dip coating", 1e1, 1e2),
    ("mixing, stirring, pumping", 1e0, 1e3),
    ("brushing, spraying", 1e3, 1e4),
    ("rubbing creams", 1e4, 1e5),
    ("high-speed blade or roll coating", 1e4, 1e6),
)

#: Regime labels of `flow_curve`, one per point.
REGIMES = ("plateau", "thinning", "thickening", "yield", "discontinuous-thickening", "jammed")
#: |d ln eta / d ln gammadot| below this counts as a plateau (our own threshold).
PLATEAU_SLOPE = 0.05
#: Relative change of the particle contribution marking the onset of thinning or thickening.
ONSET_CHANGE = 0.10
#: Radius above which Brownian motion is irrelevant to the flow curve (common practice, no
#: source: about a micrometre for particles in water-like liquids).
BROWNIAN_RADIUS_LIMIT_m = 3e-6


@guarded
def peclet_number(shear_rate_1_per_s, radius_m, viscosity_Pa_s, temperature_K):
    r"""Peclet number of Brownian spheres in shear: shear rate over diffusion rate.

    Convention: Pe = a**2 gammadot / D_0 with the Stokes-Einstein diffusivity
    D_0 = k_B T / (6 pi eta_s a), as in Bergenholtz, Brady & Vicic [1]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    radius_m : float or array_like
        Particle radius a. [m]
    viscosity_Pa_s : float or array_like
        Viscosity eta_s of the suspending liquid. [Pa*s]
    temperature_K : float or array_like
        Temperature. [K]

    Returns
    -------
    peclet : float or numpy.ndarray
        Pe. [-]

    Notes
    -----
    .. math:: \mathrm{Pe} = \frac{6\pi\eta_s a^3\dot\gamma}{k_B T}

    Other papers use a**3 eta gammadot/(k_B T) or the diameter; they differ by constant
    factors. Dilute Brownian spheres thin as Pe**2 at small Pe [1]_.

    References
    ----------
    .. [1] J. Bergenholtz, J. F. Brady and M. Vicic, "The non-Newtonian rheology of dilute
       colloidal suspensions," J. Fluid Mech., vol. 456, pp. 239-275, 2002.

    Examples
    --------
    Illustrative call: 100 nm radius in water at 1 1/s.

    >>> peclet_number(1.0, 100e-9, 0.89e-3, 298.15)
    0.00407543
    """
    rate = in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)
    a = positive(radius_m, "radius_m")
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    t = positive(temperature_K, "temperature_K")
    pe = 6.0 * np.pi * eta * a**3 * rate / (BOLTZMANN_J_PER_K * t)
    return scalar_or_array(pe, rate, a, eta, t)


@guarded
def reduced_stress(shear_stress_Pa, radius_m, temperature_K):
    r"""Shear stress in units of the Brownian stress scale k_B T / a**3.

    The reduced stress of Krieger [1]_.

    Parameters
    ----------
    shear_stress_Pa : float or array_like
        Shear stress, >= 0. [Pa]
    radius_m : float or array_like
        Particle radius a. [m]
    temperature_K : float or array_like
        Temperature. [K]

    Returns
    -------
    reduced_stress : float or numpy.ndarray
        sigma a**3 / (k_B T). [-]

    Notes
    -----
    .. math:: \sigma_r = \frac{\sigma a^3}{k_B T}

    References
    ----------
    .. [1] I. M. Krieger, "Rheology of monodisperse latices," Adv. Colloid Interface Sci.,
       vol. 3, no. 2, pp. 111-136, 1972.

    Examples
    --------
    Illustrative call: 1 Pa on 100 nm particles at 298.15 K.

    >>> reduced_stress(1.0, 100e-9, 298.15)
    0.242931
    """
    sigma = in_range(shear_stress_Pa, "shear_stress_Pa", 0.0, np.inf)
    a = positive(radius_m, "radius_m")
    t = positive(temperature_K, "temperature_K")
    return scalar_or_array(sigma * a**3 / (BOLTZMANN_J_PER_K * t), sigma, a, t)


@guarded
def krieger_shear_thinning(reduced_stress, zero_shear_relative_viscosity,
                           high_shear_relative_viscosity,
                           critical_reduced_stress=CRITICAL_REDUCED_STRESS):
    r"""Relative viscosity of a Brownian suspension between its two plateaus, from the stress.

    Krieger's stress-based interpolation [1]_, from the work of Woods & Krieger [2]_.

    Parameters
    ----------
    reduced_stress : float or array_like
        sigma a**3/(k_B T), >= 0 (see `reduced_stress`). [-]
    zero_shear_relative_viscosity : float or array_like
        Low-shear plateau eta_r,0 (may be ``inf``). [-]
    high_shear_relative_viscosity : float or array_like
        High-shear plateau eta_r,inf. [-]
    critical_reduced_stress : float or array_like, optional
        Reduced stress at which the viscosity is midway, 1/b in Krieger's notation;
        default 0.1 (from memory, not checked against the source). [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        eta_r at that stress. [-]

    Notes
    -----
    .. math::
        \eta_r = \eta_{r,\infty} + \frac{\eta_{r,0} - \eta_{r,\infty}}{1 + \sigma_r/\sigma_{r,c}}

    Cross-type in stress, not in shear rate: at a given rate the stress depends on the
    viscosity, so a flow curve needs the self-consistent solve of `flow_curve`. Form from
    memory (not checked against [1]_); the plateau values for hard spheres are those of
    Krieger-Dougherty with a low- and a high-shear maximum packing.

    References
    ----------
    .. [1] I. M. Krieger, "Rheology of monodisperse latices," Adv. Colloid Interface Sci.,
       vol. 3, no. 2, pp. 111-136, 1972.
    .. [2] M. E. Woods and I. M. Krieger, "Rheological studies on dispersions of uniform
       colloidal spheres I. Aqueous dispersions in steady shear flow," J. Colloid Interface
       Sci., vol. 34, no. 1, pp. 91-99, 1970.

    Examples
    --------
    At the critical reduced stress the viscosity is midway between 20 and 4:

    >>> krieger_shear_thinning(0.1, 20.0, 4.0, 0.1)
    12.0
    """
    s = in_range(reduced_stress, "reduced_stress", 0.0, np.inf)
    eta0 = np.asarray(zero_shear_relative_viscosity, dtype=float)
    if np.any(np.isnan(eta0) | (eta0 < 0)):
        raise InputRangeError("zero_shear_relative_viscosity", eta0[np.isnan(eta0) | (eta0 < 0)]
                              .flat[0], "a value >= 0 (inf allowed)")
    eta_inf = as_array(high_shear_relative_viscosity, "high_shear_relative_viscosity")
    sc = positive(critical_reduced_stress, "critical_reduced_stress")
    with np.errstate(invalid="ignore"):
        eta = eta_inf + (eta0 - eta_inf) / (1.0 + s / sc)
    return scalar_or_array(eta, s, eta0, eta_inf, sc)


@guarded
def thinning_onset_reduced_stress(zero_shear_relative_viscosity, high_shear_relative_viscosity,
                                  critical_reduced_stress=CRITICAL_REDUCED_STRESS,
                                  drop=ONSET_CHANGE):
    r"""Reduced stress at which Krieger's interpolation has fallen `drop` below eta_r,0.

    Parameters
    ----------
    zero_shear_relative_viscosity, high_shear_relative_viscosity : float or array_like
        The two plateaus of `krieger_shear_thinning`. [-]
    critical_reduced_stress : float or array_like, optional
        As in `krieger_shear_thinning`. [-]
    drop : float, optional
        Fractional drop defining the onset (0.1: 10 % below the zero-shear plateau). [-]

    Returns
    -------
    reduced_stress : float or numpy.ndarray
        sigma_r at the onset; ``inf`` (never reached) where the plateaus differ by less than
        `drop`. [-]

    Notes
    -----
    Solving eta_r = (1 - drop) eta_r,0 in `krieger_shear_thinning`:

    .. math::
        \sigma_r = \sigma_{r,c}\left[\frac{\eta_{r,0} - \eta_{r,\infty}}
        {(1-\delta)\eta_{r,0} - \eta_{r,\infty}} - 1\right]

    For a Newtonian liquid the onset shear rate is sigma / (eta_s (1 - drop) eta_r,0) with
    sigma = sigma_r k_B T/a**3: it scales as 1/a**3.

    Examples
    --------
    Illustrative call:

    >>> thinning_onset_reduced_stress(20.0, 4.0, 0.1, 0.1)
    0.0142857
    """
    eta0 = in_range(zero_shear_relative_viscosity, "zero_shear_relative_viscosity", 1.0, np.inf)
    eta_inf = in_range(high_shear_relative_viscosity, "high_shear_relative_viscosity", 1.0,
                       np.inf)
    sc = positive(critical_reduced_stress, "critical_reduced_stress")
    d = in_range(drop, "drop", 0.0, 1.0, low_open=True, high_open=True)
    target = (1.0 - d) * eta0
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.where(target > eta_inf, sc * ((eta0 - eta_inf) / (target - eta_inf) - 1.0),
                     np.inf)
    return scalar_or_array(s, eta0, eta_inf, sc, d)


@guarded
def wyart_cates_jamming_fraction(shear_stress_Pa, onset_stress_Pa, phi_frictionless=0.64,
                                 phi_frictional=0.58):
    r"""Stress-dependent jamming volume fraction of Wyart & Cates.

    Parameters
    ----------
    shear_stress_Pa : float or array_like
        Shear stress, >= 0. [Pa]
    onset_stress_Pa : float or array_like
        Onset stress sigma* at which frictional contacts form (set by the repulsion between
        particles). [Pa]
    phi_frictionless : float or array_like, optional
        Jamming point phi_0 without friction (low stress); about 0.64 for spheres. [-]
    phi_frictional : float or array_like, optional
        Jamming point phi_mu with friction (high stress), below phi_0; about 0.58 for
        spheres with friction coefficient near 1 (from memory). [-]

    Returns
    -------
    phi_jamming : float or numpy.ndarray
        phi_J(sigma). [-]

    Notes
    -----
    .. math::
        \phi_J = f\,\phi_\mu + (1-f)\,\phi_0, \qquad f = 1 - e^{-\sigma/\sigma^*}

    The form of phi_J is from Wyart & Cates [1]_ (from memory; the two jamming points are
    described in the abstract of [2]_). The fraction of frictional contacts f is our
    choice: public research codes write either f = 1 - exp(-sigma/sigma*) or
    f = exp(-sigma*/sigma), and which one [1]_ and [2]_ use was not checked. We use the
    first because it rises linearly from zero (f ~ sigma/sigma*), so the thickening sets in
    gradually from the onset stress, and f(sigma*) = 1 - 1/e; the second stays
    exponentially small up to about sigma*/3 and gives f(sigma*) = 1/e. The shear jamming
    fraction at stresses far above sigma* is the same either way.

    References
    ----------
    .. [1] M. Wyart and M. E. Cates, "Discontinuous shear thickening without inertia in dense
       non-Brownian suspensions," Phys. Rev. Lett., vol. 112, no. 9, 098302, 2014.
    .. [2] A. Singh, R. Mari, M. M. Denn and J. F. Morris, "A constitutive model for simple
       shear of dense frictional suspensions," J. Rheol., vol. 62, no. 2, pp. 457-468, 2018.

    Examples
    --------
    At sigma = sigma* ln 2, half the contacts are frictional:

    >>> wyart_cates_jamming_fraction(np.log(2.0), 1.0, 0.64, 0.58)
    0.61
    """
    sigma = in_range(shear_stress_Pa, "shear_stress_Pa", 0.0, np.inf)
    star = positive(onset_stress_Pa, "onset_stress_Pa")
    p0 = in_range(phi_frictionless, "phi_frictionless", 0.0, 1.0, low_open=True)
    pm = in_range(phi_frictional, "phi_frictional", 0.0, 1.0, low_open=True)
    if np.any(pm > p0):
        raise InputRangeError("phi_frictional", np.max(pm), "a value <= phi_frictionless")
    f = -np.expm1(-sigma / star)
    return scalar_or_array(f * pm + (1.0 - f) * p0, sigma, star, p0, pm)


@guarded
def wyart_cates(phi, shear_stress_Pa, onset_stress_Pa, phi_frictionless=0.64,
                phi_frictional=0.58):
    r"""Relative viscosity of a dense non-Brownian suspension with frictional thickening.

    The model of Wyart & Cates [1]_: the viscosity diverges at a jamming point that falls
    from phi_0 to phi_mu as the stress turns lubricated contacts into frictional ones.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the particles. [-]
    shear_stress_Pa : float or array_like
        Shear stress, >= 0. [Pa]
    onset_stress_Pa : float or array_like
        Onset stress sigma*. [Pa]
    phi_frictionless : float or array_like, optional
        Jamming point at low stress phi_0. [-]
    phi_frictional : float or array_like, optional
        Jamming point at high stress phi_mu (<= phi_0). [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        eta_r(phi, sigma); ``inf`` where phi >= phi_J(sigma) (shear jammed). [-]

    Notes
    -----
    .. math:: \eta_r = \left(1 - \frac{\phi}{\phi_J(\sigma)}\right)^{-2}

    with phi_J from `wyart_cates_jamming_fraction`. Between the volume fraction where the
    flow curve first turns back (an S-shaped stress-rate curve) and phi_mu the suspension
    thickens discontinuously; above phi_mu it jams under shear. Formula from memory (not
    checked against [1]_); the behaviour it describes is in the abstract of [2]_.

    References
    ----------
    .. [1] M. Wyart and M. E. Cates, Phys. Rev. Lett., vol. 112, no. 9, 098302, 2014.
    .. [2] A. Singh, R. Mari, M. M. Denn and J. F. Morris, J. Rheol., vol. 62, no. 2,
       pp. 457-468, 2018.

    Examples
    --------
    At low stress the frictionless law (1 - 0.5/0.64)**-2:

    >>> wyart_cates(0.5, 0.0, 1.0, 0.64, 0.58)
    20.8980
    """
    phi = in_range(phi, "phi", 0.0, 1.0)
    phi_j = wyart_cates_jamming_fraction(shear_stress_Pa, onset_stress_Pa, phi_frictionless,
                                         phi_frictional)
    x = phi / np.asarray(phi_j)
    with np.errstate(divide="ignore"):
        eta = np.where(x < 1.0, 1.0 / np.clip(1.0 - x, 0.0, None) ** 2, np.inf)
    return scalar_or_array(eta, phi, phi_j)


# --- The flow curve ------------------------------------------------------------------------


@dataclass(frozen=True)
class FlowCurve:
    """A flow curve: arrays over the shear rates, markers and messages.

    `regime` holds one label of `REGIMES` per point. `markers` holds plain floats (``nan``
    where a marker does not apply): see `flow_curve`. `warnings` are the user-facing
    messages; those about validity were also raised as `ValidityWarning`.
    """

    shear_rate_1_per_s: np.ndarray
    shear_stress_Pa: np.ndarray
    viscosity_Pa_s: np.ndarray
    relative_viscosity: np.ndarray
    liquid_viscosity_Pa_s: np.ndarray
    regime: np.ndarray
    markers: dict = field(default_factory=dict)
    warnings: tuple[str, ...] = ()


class _Model:
    """The stress-dependent relative viscosity g(sigma) and the liquid, for one suspension."""

    def __init__(self, phi, law, medium_factor, relation, relation_params, phi_max_zero_shear,
                 phi_max_high_shear, phi_max_frictional, onset_stress_Pa, radius_m,
                 temperature_K, critical_reduced_stress):
        self.phi, self.law, self.medium = phi, law, medium_factor
        self.spec = get_model(relation, kind="suspension")
        self.has_phi_max = "phi_max" in self.spec.param_names()
        params = {k: v for k, v in (relation_params or {}).items() if k != "phi_max"}
        if self.has_phi_max:
            params["phi_max"] = phi_max_high_shear
        self.params = self.spec.check_params(params)
        self.params.pop("phi_max", None)
        self.phi_hs = phi_max_high_shear
        self.thickening = onset_stress_Pa is not None and self.has_phi_max
        self.phi_mu = phi_max_frictional if self.thickening else phi_max_high_shear
        self.star = onset_stress_Pa
        self.brownian = (radius_m is not None and phi_max_zero_shear is not None
                         and self.has_phi_max)
        self.stress_scale = (critical_reduced_stress * BOLTZMANN_J_PER_K * temperature_K
                             / radius_m**3) if radius_m is not None else np.nan
        self.g_hs = self.relation(phi_max_high_shear)
        self.g0 = self.relation(phi_max_zero_shear) if self.brownian else np.nan
        self.g_mu = self.relation(self.phi_mu)

    def relation(self, phi_max):
        """Relative viscosity of the particles at one packing limit (array or float)."""
        if not self.has_phi_max:
            return np.asarray(self.spec.func(self.phi, **self.params), dtype=float)
        return np.asarray(self.spec.func(self.phi, phi_max=phi_max, **self.params), dtype=float)

    def g(self, sigma):
        """Particle relative viscosity at stress sigma (our combination, see flow_curve)."""
        sigma = np.asarray(sigma, dtype=float)
        if self.thickening:
            f = -np.expm1(-sigma / self.star)
            g = self.relation(f * self.phi_mu + (1.0 - f) * self.phi_hs)
        else:
            g = np.broadcast_to(self.g_hs, sigma.shape)
        if self.brownian:
            w = 1.0 / (1.0 + sigma / self.stress_scale)
            with np.errstate(invalid="ignore"):
                g = np.where(w > 0, g + (self.g0 - g) * w, g)
        return g

    def stress(self, rate, g):
        """Macroscopic stress at a rate for particle relative viscosity g (Chateau et al.)."""
        one = 1.0 - self.phi
        with np.errstate(invalid="ignore", over="ignore"):
            s = np.sqrt(one * g) * self.medium * self.law.stress(rate * np.sqrt(g / one))
        return np.where(np.isfinite(g), s, np.inf)

    def rate(self, sigma, g):
        """Macroscopic rate carrying stress sigma for particle relative viscosity g."""
        one = 1.0 - self.phi
        finite = np.isfinite(g)
        gg = np.where(finite, g, 1.0)
        local = self.law.shear_rate(sigma / (self.medium * np.sqrt(one * gg)))
        return np.where(finite, local * np.sqrt(one / gg), 0.0)

    def jamming_stress(self):
        """Stress above which phi_J(sigma) <= phi (inf if never)."""
        if not self.thickening or self.phi < self.phi_mu:
            return np.inf
        if self.phi >= self.phi_hs:
            return 0.0
        f = (self.phi_hs - self.phi) / (self.phi_hs - self.phi_mu)
        if f >= 1.0:        # phi == phi_mu: jams only as sigma -> inf; e**-60 is as good
            return 60.0 * self.star
        return float(-self.star * np.log1p(-f))


def _first_crossing(model, sig_grid, values, target, rising):
    """Stress of the first crossing of g through target on a grid, refined on a subgrid."""
    hit = values >= target if rising else values <= target
    idx = np.flatnonzero(hit)
    if idx.size == 0 or idx[0] == 0:
        return np.nan
    sub = np.geomspace(sig_grid[idx[0] - 1], sig_grid[idx[0]], 256)
    g_sub = model.g(sub)
    j = int(np.argmax(g_sub >= target if rising else g_sub <= target))
    if j == 0:
        return float(sub[0])
    x0, x1, y0, y1 = np.log(sub[j - 1]), np.log(sub[j]), g_sub[j - 1], g_sub[j]
    t = (target - y0) / (y1 - y0) if np.isfinite(y1) and y1 != y0 else 1.0
    return float(np.exp(x0 + t * (x1 - x0)))


def _refine(model, rates, lo, hi):
    """Stress solving sigma = S(rate, g(sigma)) in each bracket [e**lo, e**hi] (Illinois).

    Works on x = ln(sigma) with f(x) = x - ln S(rate, g(e**x)), negative at lo and
    non-negative at hi; vectorised regula falsi with the Illinois modification, then a
    last bisection step where the residual cannot be evaluated (jammed branches).
    """
    def f(x):
        with np.errstate(divide="ignore"):
            return x - np.log(model.stress(rates, model.g(np.exp(x))))

    f_lo, f_hi = f(lo), f(hi)
    side = np.zeros(lo.shape, int)
    for _ in range(40):
        ok = np.isfinite(f_lo) & np.isfinite(f_hi) & (f_hi != f_lo)
        x = np.where(ok, (lo * f_hi - hi * f_lo) / np.where(ok, f_hi - f_lo, 1.0),
                     0.5 * (lo + hi))
        x = np.clip(x, np.minimum(lo, hi), np.maximum(lo, hi))
        fx = f(x)
        neg = fx < 0
        # Illinois: halve the stale end's residual when the same end is kept twice.
        f_hi = np.where(neg & (side == -1), 0.5 * f_hi, f_hi)
        f_lo = np.where(~neg & (side == 1), 0.5 * f_lo, f_lo)
        lo, f_lo = np.where(neg, x, lo), np.where(neg, fx, f_lo)
        hi, f_hi = np.where(neg, hi, x), np.where(neg, f_hi, fx)
        side = np.where(neg, -1, 1)
        if np.all(hi - lo < 1e-13) or np.all(np.abs(fx[np.isfinite(fx)]) < 1e-14):
            break
    return np.where(np.abs(f_lo) < np.abs(f_hi), lo, hi)


@guarded
def flow_curve(shear_rate_1_per_s, phi, *, liquid_law_name="newtonian", liquid_params=None,
               medium_factor=1.0, relation="krieger-dougherty", relation_params=None,
               phi_max_zero_shear=None, phi_max_high_shear=0.64, phi_max_frictional=None,
               onset_stress_Pa=None, radius_m=None, temperature_K=298.15,
               critical_reduced_stress=CRITICAL_REDUCED_STRESS, points_per_decade=60):
    r"""Flow curve of one suspension: viscosity, stress and regime at each shear rate.

    Solves, at every shear rate, for the stress sigma that the suspension carries, when its
    particle relative viscosity g depends on the stress (Brownian thinning, frictional
    thickening) and the liquid may itself be non-Newtonian. The solve is done in stress
    space on a dense grid (vectorised), then refined point by point by a vectorised
    bisection; no per-point root finder.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rates, > 0. [1/s]
    phi : float
        Effective volume fraction of the particles. [-]
    liquid_law_name : str, optional
        Registry name of the liquid law (kind "liquid").
    liquid_params : dict, optional
        The liquid law's parameters (SI).
    medium_factor : float, optional
        Constant relative viscosity of the medium over the bare liquid (e.g. droplets
        already mixed into the liquid); multiplies the liquid's stress. [-]
    relation : str, optional
        Registry name of the suspension relation g(phi; phi_max, ...). A relation without
        a phi_max parameter gives a stress-independent g (no thinning or thickening).
    relation_params : dict, optional
        The relation's other parameters (e.g. intrinsic_viscosity).
    phi_max_zero_shear : float, optional
        Packing limit of the zero-shear (Brownian) plateau; None: no Brownian thinning. [-]
    phi_max_high_shear : float, optional
        Packing limit of the high-shear plateau, the frictionless jamming point phi_0. [-]
    phi_max_frictional : float, optional
        Frictional jamming point phi_mu (< phi_max_high_shear); needed with
        `onset_stress_Pa`. [-]
    onset_stress_Pa : float, optional
        Onset stress sigma* of frictional thickening; None: no thickening. [Pa]
    radius_m : float, optional
        Particle radius for the Brownian stress scale; None: no Brownian thinning. Above
        `BROWNIAN_RADIUS_LIMIT_m` (3 um) the Brownian term is left out, with a note. [m]
    temperature_K : float, optional
        Temperature. [K]
    critical_reduced_stress : float, optional
        Midpoint of Krieger's interpolation, in units of k_B T/a**3. [-]
    points_per_decade : int, optional
        Density of the stress grid (accuracy is set by the refinement, not by this).

    Returns
    -------
    FlowCurve
        Arrays over the rates; `markers` with keys ``zero_shear_relative_viscosity``,
        ``high_shear_relative_viscosity``, ``zero_shear_viscosity_Pa_s``,
        ``high_shear_viscosity_Pa_s``, ``thinning_onset_1_per_s``,
        ``thickening_onset_1_per_s``, ``dst_low_1_per_s``, ``dst_high_1_per_s``,
        ``shear_jamming_1_per_s``, ``apparent_yield_stress_Pa``,
        ``brownian_stress_Pa`` (floats, ``nan`` where not applicable).

    Raises
    ------
    InputRangeError
        Non-positive or non-finite rates, phi outside [0, 1), inconsistent packing limits.

    Warns
    -----
    ValidityWarning
        The relation used outside its validity range, or the Brownian interpolation used
        above its zero-shear packing limit (then dropped).

    Notes
    -----
    The particle relative viscosity at stress sigma combines three published relations
    (the combination is ours):

    .. math::
        g(\sigma) = g_\infty(\sigma) + \frac{g_0 - g_\infty(\sigma)}{1 + \sigma_r/\sigma_{r,c}},
        \quad g_\infty(\sigma) = G(\phi; \phi_J(\sigma)), \quad g_0 = G(\phi; \phi_{m,0})

    with G the chosen relation (Krieger-Dougherty by default) taken at a packing limit,
    Krieger's interpolation (`krieger_shear_thinning`) and Wyart & Cates' phi_J(sigma)
    (`wyart_cates_jamming_fraction`; with ``relation="quemada"`` the high-stress branch is
    exactly `wyart_cates`). The liquid enters by the estimate of Chateau, Ovarlez & Trung
    (`predictor.liquids.suspension_in_liquid_stress`):
    sigma = sqrt((1 - phi) g) m tau_l(gammadot sqrt(g/(1 - phi))), m = `medium_factor`.

    For each sigma on a grid the rate is explicit; where the rate falls as sigma rises
    the curve is S-shaped (discontinuous thickening): under a rising shear rate the
    suspension follows the lower branch up to the turning point and then jumps to the
    upper branch; the points in the multi-valued range are labelled
    "discontinuous-thickening" and carry the lower-branch value. Above phi_mu the curve
    turns back to zero rate at the jamming stress: rates above its maximum are labelled
    "jammed", with ``inf`` viscosity and stress. Regime labels: "yield" where the yield
    stress carries more than half the stress; else by the local slope
    d ln eta/d ln gammadot: below -0.05 "thinning", above 0.05 "thickening", else
    "plateau". Onsets: thinning where g has fallen 10 % below g_0, thickening where g has
    risen 10 % above its minimum (both in terms of the particle contribution g).

    Examples
    --------
    A Newtonian liquid and hard spheres with no Brownian or frictional physics give the
    Krieger-Dougherty value at every rate:

    >>> fc = flow_curve([1.0, 10.0], 0.3, liquid_params={"viscosity_Pa_s": 0.01})
    >>> [round(float(x), 4) for x in fc.viscosity_Pa_s]
    [0.0275, 0.0275]
    """
    rates = np.atleast_1d(as_array(shear_rate_1_per_s, "shear_rate_1_per_s")).astype(float)
    if np.any(rates <= 0):
        raise InputRangeError("shear_rate_1_per_s", rates[rates <= 0][0], "a rate > 0")
    scalars = {"phi": phi, "medium_factor": medium_factor,
               "phi_max_zero_shear": phi_max_zero_shear, "phi_max_high_shear": phi_max_high_shear,
               "phi_max_frictional": phi_max_frictional, "onset_stress_Pa": onset_stress_Pa,
               "radius_m": radius_m, "temperature_K": temperature_K,
               "critical_reduced_stress": critical_reduced_stress,
               "points_per_decade": points_per_decade}
    for name, value in scalars.items():
        if value is not None and np.ndim(value) != 0:
            raise InputRangeError(name, f"an array of shape {np.shape(value)}", "a single number")
    phi = float(in_range(phi, "phi", 0.0, 1.0, high_open=True))
    critical_reduced_stress = float(positive(critical_reduced_stress, "critical_reduced_stress"))
    points_per_decade = float(in_range(points_per_decade, "points_per_decade", 5.0, 1000.0))
    phi_hs = float(in_range(phi_max_high_shear, "phi_max_high_shear", 0.0, 1.0, low_open=True))
    if phi_max_zero_shear is not None:
        phi_max_zero_shear = float(in_range(phi_max_zero_shear, "phi_max_zero_shear", 0.0,
                                            phi_hs, low_open=True))
    if onset_stress_Pa is not None:
        onset_stress_Pa = float(positive(onset_stress_Pa, "onset_stress_Pa"))
        if phi_max_frictional is None:
            raise InputRangeError("phi_max_frictional", float("nan"),
                                  f"a packing limit below phi_max_high_shear = {phi_hs:g} "
                                  "when an onset stress is given")
        phi_max_frictional = float(in_range(phi_max_frictional, "phi_max_frictional", 0.0,
                                            phi_hs, low_open=True))
    if radius_m is not None:
        radius_m = float(positive(radius_m, "radius_m"))
    temperature_K = float(positive(temperature_K, "temperature_K"))
    medium_factor = float(positive(medium_factor, "medium_factor"))
    law = liquid_law(liquid_law_name, **(liquid_params or {}))
    messages: list[str] = []

    def warn(text):
        messages.append(text)
        warnings.warn(text, ValidityWarning, stacklevel=3)

    model = _Model(phi, law, medium_factor, relation, relation_params, phi_max_zero_shear,
                   phi_hs, phi_max_frictional, onset_stress_Pa, radius_m, temperature_K,
                   critical_reduced_stress)
    check = dict(model.params, **({"phi_max": phi_hs} if model.has_phi_max else {}))
    text = model.spec.validity_message(phi, check)
    if text:
        warn(text)
    if model.brownian and radius_m > BROWNIAN_RADIUS_LIMIT_m:
        messages.append(f"Brownian shear thinning is negligible for particles of radius "
                        f"{radius_m * 1e6:.3g} um (stress scale k_B T/a^3 = "
                        f"{model.stress_scale / critical_reduced_stress:.2g} Pa) and is left "
                        "out.")
        model.brownian = False
    if model.brownian and not np.isfinite(model.g0):
        warn(f"phi = {phi:.3g} is at or above the zero-shear packing limit "
             f"{phi_max_zero_shear:.3g}: Krieger's interpolation has no zero-shear plateau "
             "there (a Brownian glass with a yield stress of order k_B T/a^3 = "
             f"{model.stress_scale / critical_reduced_stress:.3g} Pa); the Brownian term is "
             "left out.")
        model.brownian = False

    eta_l = np.asarray(law.viscosity(rates), dtype=float) * np.ones_like(rates)
    markers = _plateau_markers(model, law, critical_reduced_stress)
    sig_jam = model.jamming_stress()
    if not np.isfinite(model.g_hs) and not model.thickening or sig_jam == 0.0:
        warn(f"phi = {phi:.3g} is at or above the packing limit {phi_hs:.3g}: no flow "
             "is predicted at any shear rate.")
        inf = np.full_like(rates, np.inf)
        markers["shear_jamming_1_per_s"] = 0.0
        return FlowCurve(rates, inf, inf, inf, eta_l, np.full(rates.shape, "jammed"),
                         markers, tuple(messages))

    # Stress grid wide enough to hold every requested rate (g is bounded by its plateaus).
    g_vals = [float(model.g_hs)] + ([float(model.g0)] if model.brownian else []) + \
        ([float(model.g_mu)] if model.thickening else [])
    g_lo, g_hi = min(g_vals), max(g_vals)
    sig_lo = float(model.stress(rates.min(), g_lo)) / 4.0
    sig_hi = float(model.stress(rates.max(), g_hi)) * 4.0 if np.isfinite(g_hi) else np.inf
    sig_hi = min(sig_hi, sig_jam)
    if not np.isfinite(sig_hi):     # g unbounded without a jamming stress: cannot happen
        sig_hi = sig_lo * 1e12       # with the checks above; kept as a guard
    if not sig_lo >= _TINY:
        # The stress at the lowest rate underflows: no grid can hold it, and a floor would
        # answer for another rate (1e-300 1/s once returned exactly 1 Pa*s). Refuse instead.
        lowest = float(rates.min()) * (_TINY / sig_lo) if sig_lo > 0 else float("inf")
        raise InputRangeError("shear_rate_1_per_s", float(rates.min()),
                              f"a rate whose shear stress is a representable number (here "
                              f"above about {min(lowest, 1e300):.2g} 1/s)")
    if np.isfinite(sig_jam) and sig_lo >= sig_jam:
        sig_lo = sig_jam * 1e-6
    for scale in (model.stress_scale, model.star):   # show the features near the range too
        if scale is not None and np.isfinite(scale) and scale > 0:
            sig_lo = min(sig_lo, max(scale * 1e-3, sig_lo * 1e-3))
    decades = max(np.log10(sig_hi / sig_lo), 1.0) if np.isfinite(sig_hi) else 1.0
    n = int(np.clip(points_per_decade * decades, 200, 20000))
    if np.isfinite(sig_jam):
        grid = np.logspace(np.log10(sig_lo), np.log10(sig_jam), n, endpoint=False)
        grid = np.union1d(grid, sig_jam * (1.0 - np.logspace(-1, -13, 200)))
        grid = grid[grid > sig_lo * 0.999]
    else:
        grid = np.logspace(np.log10(sig_lo), np.log10(sig_hi), n)
    g_grid = model.g(grid)
    rate_grid = model.rate(grid, g_grid)
    envelope = np.maximum.accumulate(rate_grid)

    # Bracket every requested rate on the rising envelope, then refine by bisection.
    k = np.searchsorted(envelope, rates, side="left")
    reach = k < grid.size
    kk = np.clip(k, 1, grid.size - 1)
    sigma = np.full(rates.shape, np.inf)
    sigma[reach] = np.exp(_refine(model, rates[reach], np.log(grid[kk - 1][reach]),
                                  np.log(grid[kk][reach])))
    viscosity = np.where(reach, sigma / rates, np.inf)

    # Markers that need the grid: yield stress, S-shape, jamming, onsets.
    flowing = np.flatnonzero(rate_grid > 0)
    if law.yield_stress_Pa > 0 and flowing.size:
        markers["apparent_yield_stress_Pa"] = _yield_stress(model, grid, flowing[0])
    else:
        markers["apparent_yield_stress_Pa"] = 0.0
    falls = np.flatnonzero((rate_grid[1:] < rate_grid[:-1] * (1 - 1e-9)) & (rate_grid[:-1] > 0))
    dst = np.zeros(rates.shape, bool)
    if falls.size:
        top = envelope[falls[0]]
        recovers = envelope[-1] > top * (1 + 1e-9)
        if recovers:
            bottom = float(rate_grid[falls[0]:np.flatnonzero(envelope > top)[0]].min())
            markers["dst_low_1_per_s"], markers["dst_high_1_per_s"] = bottom, float(top)
            dst = (rates >= bottom) & (rates <= top)
            messages.append(f"Discontinuous shear thickening between {bottom:.3g} and "
                            f"{top:.3g} 1/s: the stress jumps from "
                            f"{grid[falls[0]]:.3g} Pa to a higher branch.")
        else:
            markers["shear_jamming_1_per_s"] = float(top)
            messages.append(f"Shear jamming: above {top:.3g} 1/s (stress "
                            f"{grid[falls[0]]:.3g} Pa) the suspension cannot flow steadily "
                            f"(phi = {phi:.3g} >= frictional packing limit "
                            f"{model.phi_mu:.3g}).")
    if np.any(~reach) and "shear_jamming_1_per_s" not in markers:
        markers["shear_jamming_1_per_s"] = float(envelope[-1])
    _onset_markers(model, markers, grid, sig_jam)

    # Regime labels from the local slope of the grid segment of each point.
    with np.errstate(divide="ignore", invalid="ignore"):
        seg = np.log(grid[kk] / grid[kk - 1]) / np.log(rate_grid[kk] / rate_grid[kk - 1]) - 1
    slope = np.where(np.isfinite(seg), seg, -1.0)
    regime = np.where(slope < -PLATEAU_SLOPE, "thinning",
                      np.where(slope > PLATEAU_SLOPE, "thickening", "plateau")).astype(object)
    ys = markers["apparent_yield_stress_Pa"]
    regime[(ys > 0) & (sigma < 2.0 * ys)] = "yield"
    regime[dst] = "discontinuous-thickening"
    regime[~reach] = "jammed"
    relative = viscosity / eta_l
    return FlowCurve(rates, sigma, viscosity, relative, eta_l, regime.astype(str), markers,
                     tuple(messages))


#: Smallest stress the flow-curve grid holds: the smallest normal float, times 1e4 so the
#: grid below the lowest stress and the bisection keep full precision. [Pa]
_TINY = float(np.finfo(float).tiny) * 1e4


def _plateau_markers(model, law, critical_reduced_stress):
    eta_rest = float(np.asarray(law.viscosity(0.0)))
    newtonian = law.name == "newtonian"
    g0 = float(model.g0) * model.medium if model.brownian else np.nan
    g_hs = float(model.g_hs) * model.medium
    return {
        "zero_shear_relative_viscosity": g0,
        "high_shear_relative_viscosity": g_hs,
        "zero_shear_viscosity_Pa_s": g0 * eta_rest if np.isfinite(eta_rest) else np.nan,
        "high_shear_viscosity_Pa_s": g_hs * eta_rest if newtonian else np.nan,
        "thinning_onset_1_per_s": np.nan,
        "thickening_onset_1_per_s": np.nan,
        "dst_low_1_per_s": np.nan,
        "dst_high_1_per_s": np.nan,
        "shear_jamming_1_per_s": np.nan,
        "apparent_yield_stress_Pa": 0.0,
        "brownian_stress_Pa": (model.stress_scale / critical_reduced_stress
                               if model.brownian else np.nan),
    }


def _yield_stress(model, grid, first_flowing):
    """Stress where the rate leaves zero: sigma = sqrt((1 - phi) g(sigma)) m tau_y."""
    ty = model.law.yield_stress_Pa * model.medium

    def excess(s):
        return s - np.sqrt((1.0 - model.phi) * model.g(s)) * ty

    lo = np.log(grid[first_flowing - 1]) if first_flowing > 0 else np.log(grid[0]) - 30
    hi = np.log(grid[first_flowing])
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if excess(np.exp(mid)) < 0:
            lo = mid
        else:
            hi = mid
    return float(np.exp(0.5 * (lo + hi)))


def _onset_markers(model, markers, grid, sig_jam):
    """Thinning and thickening onsets: g 10 % below g_0, 10 % above its minimum."""
    top = sig_jam * (1 - 1e-12) if np.isfinite(sig_jam) else grid[-1]
    scales = [s for s in (model.stress_scale, model.star) if s is not None and np.isfinite(s)]
    low = min([grid[0]] + [s * 1e-4 for s in scales])
    high = max([top] + [s * 1e4 for s in scales if s * 1e4 < sig_jam])
    aux = np.logspace(np.log10(low), np.log10(high), 2000)
    g_aux = model.g(aux)

    def rate_at(s):
        return float(model.rate(np.asarray([s]), model.g(np.asarray([s])))[0])

    if model.brownian:
        s = _first_crossing(model, aux, g_aux, (1 - ONSET_CHANGE) * float(model.g0), False)
        if np.isfinite(s):
            markers["thinning_onset_1_per_s"] = rate_at(s)
    eta_rest = float(np.asarray(model.law.viscosity(0.0)))
    if not np.isfinite(markers["thinning_onset_1_per_s"]) and np.isfinite(eta_rest):
        # No Brownian thinning: the onset of thinning of the whole suspension (a thinning
        # liquid), by the same 10 % definition against its zero-shear viscosity.
        g_rest = float(model.g0) if model.brownian else float(model.g_hs)
        rates_aux = model.rate(aux, g_aux)
        with np.errstate(divide="ignore", invalid="ignore"):
            eta_aux = aux / rates_aux
        below = np.nonzero(eta_aux < (1 - ONSET_CHANGE) * g_rest * model.medium * eta_rest)[0]
        if below.size and below[0] > 0:
            markers["thinning_onset_1_per_s"] = float(rates_aux[below[0]])
    if model.thickening:
        i_min = int(np.argmin(g_aux))
        s = _first_crossing(model, aux[i_min:], g_aux[i_min:],
                            (1 + ONSET_CHANGE) * float(g_aux[i_min]), True)
        if np.isfinite(s):
            markers["thickening_onset_1_per_s"] = rate_at(s)


# --- Newtonian liquid without thickening: the flow curve in closed form ---------------------


def _newtonian_inputs(shear_rate_1_per_s, medium_viscosity_Pa_s, high_shear_relative_viscosity,
                      zero_shear_relative_viscosity, stress_scale_Pa):
    """Checked, broadcast inputs of the closed form, and where the Brownian term applies."""
    rate = positive(shear_rate_1_per_s, "shear_rate_1_per_s")
    mu = positive(medium_viscosity_Pa_s, "medium_viscosity_Pa_s")
    plateaus = {"high_shear_relative_viscosity": high_shear_relative_viscosity,
                "zero_shear_relative_viscosity": zero_shear_relative_viscosity}
    g = {}
    for name, value in plateaus.items():
        if value is None:
            continue
        try:
            arr = np.asarray(value, dtype=float)
        except (TypeError, ValueError):
            raise InputRangeError(name, value, "a number or an array of numbers") from None
        bad = np.isnan(arr) | (arr <= 0.0)
        if np.any(bad):
            raise InputRangeError(name, arr[bad].flat[0], "a value > 0 (inf allowed)")
        g[name] = arr
    g_hs = g["high_shear_relative_viscosity"]
    g0 = g.get("zero_shear_relative_viscosity", np.inf)
    if stress_scale_Pa is None:
        scale, g0 = np.asarray(1.0), np.inf
    else:
        scale = positive(stress_scale_Pa, "stress_scale_Pa")
    rate, mu, g_hs, g0, scale = np.broadcast_arrays(rate, mu, g_hs, g0, scale)
    jammed = np.isinf(g_hs)
    brownian = np.isfinite(g0) & ~jammed
    g_hs = np.where(jammed, 1.0, g_hs)
    g0 = np.where(brownian, g0, g_hs)
    return rate, mu, g_hs, g0, np.where(brownian, scale, 1.0), brownian, jammed


def _newtonian_stress(rate, mu, g_hs, g0, scale, brownian):
    """Positive root of sigma**2 + sigma (s_c - mu rate g_hs) - mu rate g_0 s_c = 0."""
    a = mu * rate
    b = scale - a * g_hs
    root = np.hypot(b, 2.0 * np.sqrt(a * g0 * scale))    # sqrt(b**2 + 4c) without overflow
    # Cancellation-free: 2c/(b + root) where b > 0, (root - b)/2 otherwise.
    sigma = np.where(b > 0, 2.0 * a * g0 * scale / np.where(b > 0, b + root, 1.0),
                     0.5 * (root - b))
    return np.where(brownian, sigma, a * g_hs)


@guarded
def newtonian_flow_viscosity(shear_rate_1_per_s, medium_viscosity_Pa_s,
                             high_shear_relative_viscosity, zero_shear_relative_viscosity=None,
                             stress_scale_Pa=None):
    r"""Viscosity of a Brownian suspension in a Newtonian liquid, in closed form.

    The flow curve of `flow_curve` for a Newtonian liquid without frictional thickening,
    where Krieger's stress interpolation [1]_ between the two plateaus makes the stress at a
    shear rate the root of a quadratic. Vectorised: every argument broadcasts, so each
    element may be a different suspension (one value per row of a table).

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, > 0. [1/s]
    medium_viscosity_Pa_s : float or array_like
        Viscosity of the medium the particles see: the liquid's viscosity times the
        constant `medium_factor` of `flow_curve` (droplets). [Pa*s]
    high_shear_relative_viscosity : float or array_like
        g_inf, the particles' relative viscosity at high stress (the relation at the
        high-shear packing limit); ``inf`` (jammed) gives ``inf``. [-]
    zero_shear_relative_viscosity : float or array_like, optional
        g_0, the relative viscosity at low stress (the relation at the zero-shear packing
        limit). None, or ``inf`` for an element, leaves the Brownian term out there, as
        `flow_curve` does at and above the zero-shear packing limit. [-]
    stress_scale_Pa : float or array_like, optional
        sigma_c, the stress at which the interpolation is midway between the plateaus:
        `CRITICAL_REDUCED_STRESS` k_B T / a**3. None leaves the Brownian term out. [Pa]

    Returns
    -------
    viscosity : float or numpy.ndarray
        Viscosity of the suspension at the shear rate. [Pa*s]

    Raises
    ------
    InputRangeError
        A rate, viscosity or stress scale that is not positive and finite; a relative
        viscosity that is NaN or not positive.

    See Also
    --------
    flow_curve : the general solve (any liquid law, thickening, S-shaped curves).
    newtonian_flow_regime : the regime label at the same points.
    krieger_shear_thinning : the interpolation in terms of the reduced stress.

    Notes
    -----
    With a Newtonian medium of viscosity mu, the stress at a rate solves
    sigma = mu gammadot g(sigma), with Krieger's interpolation

    .. math:: g(\sigma) = g_\infty + \frac{g_0 - g_\infty}{1 + \sigma/\sigma_c}

    Multiplying out gives

    .. math:: \sigma^2 + \sigma\,(\sigma_c - \mu\dot\gamma g_\infty)
              - \mu\dot\gamma g_0 \sigma_c = 0,

    whose one positive root is taken in the cancellation-free form
    2c / (b + sqrt(b**2 + 4c)) where b > 0 (c = mu gammadot g_0 sigma_c); the viscosity is
    sigma / gammadot. Without the Brownian term, sigma = mu gammadot g_inf. This is exactly
    what `flow_curve` solves numerically for a Newtonian liquid, no thickening and the same
    plateaus; the rate tends to zero at mu g_0 and to infinity at mu g_inf, the plateaus of
    Krieger & Dougherty's relation at the two packing limits [2]_.

    References
    ----------
    .. [1] I. M. Krieger, "Rheology of monodisperse latices," Adv. Colloid Interface Sci.,
       vol. 3, no. 2, pp. 111-136, 1972.
    .. [2] I. M. Krieger and T. J. Dougherty, "A mechanism for non-Newtonian flow in
       suspensions of rigid spheres," Trans. Soc. Rheol., vol. 3, pp. 137-152, 1959.

    Examples
    --------
    Illustrative call: plateaus 20 and 4 in water, midway stress 0.04 Pa; the viscosity
    falls from about 0.02 towards 0.004 Pa*s as the rate rises.

    >>> newtonian_flow_viscosity([1e-3, 1.0, 1e5], 1e-3, 4.0, 20.0, 0.04).tolist()
    [0.019992, 0.0155261, 0.0040016]
    """
    rate, mu, g_hs, g0, scale, brownian, jammed = _newtonian_inputs(
        shear_rate_1_per_s, medium_viscosity_Pa_s, high_shear_relative_viscosity,
        zero_shear_relative_viscosity, stress_scale_Pa)
    sigma = _newtonian_stress(rate, mu, g_hs, g0, scale, brownian)
    eta = np.where(jammed, np.inf, np.where(brownian, sigma / rate, mu * g_hs))
    return scalar_or_array(eta, shear_rate_1_per_s, medium_viscosity_Pa_s,
                           high_shear_relative_viscosity, zero_shear_relative_viscosity,
                           stress_scale_Pa)


@guarded
def newtonian_flow_regime(shear_rate_1_per_s, medium_viscosity_Pa_s,
                          high_shear_relative_viscosity, zero_shear_relative_viscosity=None,
                          stress_scale_Pa=None):
    r"""Regime label of `newtonian_flow_viscosity` at each point, from its exact local slope.

    The labels of `flow_curve` (see `REGIMES`), from the slope d ln eta / d ln gammadot of
    Krieger's interpolation [1]_ in a Newtonian liquid: below -`PLATEAU_SLOPE` "thinning",
    above +`PLATEAU_SLOPE` "thickening", else "plateau"; "jammed" where the high-shear
    relative viscosity is ``inf``.

    Parameters
    ----------
    shear_rate_1_per_s, medium_viscosity_Pa_s, high_shear_relative_viscosity : array_like
        As in `newtonian_flow_viscosity`. [1/s], [Pa*s], [-]
    zero_shear_relative_viscosity, stress_scale_Pa : array_like, optional
        As in `newtonian_flow_viscosity`. [-], [Pa]

    Returns
    -------
    regime : str or numpy.ndarray of str
        One label per point.

    See Also
    --------
    newtonian_flow_viscosity : the viscosity at the same points.

    Notes
    -----
    Differentiating sigma = mu gammadot g(sigma) gives the exact local slope

    .. math:: \frac{d\ln\eta}{d\ln\dot\gamma} = \frac{s}{1 - s}, \qquad
              s = \frac{d\ln g}{d\ln\sigma}
                = -\frac{u}{1 + u}\,\frac{(g_0 - g_\infty)/(1 + u)}{g(\sigma)},
              \quad u = \sigma/\sigma_c.

    `flow_curve` labels by the secant slope of the stress-grid segment holding each point,
    so the two labels may differ for slopes within a few thousandths of +-`PLATEAU_SLOPE`.

    References
    ----------
    .. [1] I. M. Krieger, "Rheology of monodisperse latices," Adv. Colloid Interface Sci.,
       vol. 3, no. 2, pp. 111-136, 1972.

    Examples
    --------
    Illustrative call: the plateaus at the ends of the curve, thinning in between.

    >>> newtonian_flow_regime([1e-5, 1.0, 1e7], 1e-3, 4.0, 20.0, 0.04).tolist()
    ['plateau', 'thinning', 'plateau']
    """
    rate, mu, g_hs, g0, scale, brownian, jammed = _newtonian_inputs(
        shear_rate_1_per_s, medium_viscosity_Pa_s, high_shear_relative_viscosity,
        zero_shear_relative_viscosity, stress_scale_Pa)
    sigma = _newtonian_stress(rate, mu, g_hs, g0, scale, brownian)
    u = sigma / scale
    g = g_hs + (g0 - g_hs) / (1.0 + u)
    s = -(u / (1.0 + u)) * ((g0 - g_hs) / (1.0 + u)) / g
    slope = np.where(brownian, s / (1.0 - s), 0.0)
    regime = np.where(slope < -PLATEAU_SLOPE, "thinning",
                      np.where(slope > PLATEAU_SLOPE, "thickening", "plateau"))
    regime = np.where(jammed, "jammed", regime)
    inputs = (shear_rate_1_per_s, medium_viscosity_Pa_s, high_shear_relative_viscosity,
              zero_shear_relative_viscosity, stress_scale_Pa)
    return str(regime) if all(np.ndim(x) == 0 for x in inputs) else regime
