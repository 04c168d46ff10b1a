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
- `flow_curves`: the same solve for many suspensions at once (one row each), used by the
  formulation engine (`predictor.engine`);
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


class _Liquid:
    """A liquid law plus an additive yield stress (e.g. from flocculated solids) [Pa].

    The extra yield stress adds to the law's stress at every rate, as in a
    Herschel-Bulkley law; the inverse subtracts it first. Parameters may be arrays (rows).
    """

    def __init__(self, law, extra_yield_stress_Pa=0.0):
        self.law, self.name = law, law.name
        self.extra = np.asarray(extra_yield_stress_Pa, dtype=float)
        self.params = law.params
        self.yield_stress_Pa = np.asarray(law.params.get("yield_stress_Pa", 0.0),
                                          dtype=float) + self.extra

    def viscosity(self, shear_rate_1_per_s):
        rate = np.asarray(shear_rate_1_per_s, dtype=float)
        eta = np.asarray(self.law.viscosity(rate), dtype=float)
        if not np.any(self.extra > 0):
            return eta
        with np.errstate(divide="ignore", invalid="ignore"):
            extra = np.where(rate > 0, self.extra / np.where(rate > 0, rate, 1.0), np.inf)
        return eta + np.where(self.extra > 0, extra, 0.0)

    def stress(self, shear_rate_1_per_s):
        return self.law.stress(shear_rate_1_per_s) + self.extra

    def shear_rate(self, shear_stress_Pa):
        tau = np.asarray(shear_stress_Pa, dtype=float)
        if not np.any(self.extra > 0):
            return self.law.shear_rate(tau)
        with np.errstate(invalid="ignore"):
            return self.law.shear_rate(np.maximum(tau - self.extra, 0.0))


def _arr(value):
    return np.asarray(np.nan if value is None else value, dtype=float)


class _Model:
    """The stress-dependent relative viscosity g(sigma) and the liquid of suspensions.

    Every quantity is a float (one suspension) or an array of shape (n, 1) (n rows, which
    broadcast against stresses of shape (n, K)); ``None`` or ``nan`` switches a mechanism
    off (no Brownian radius, no onset stress).
    """

    def __init__(self, phi, law, medium_factor, relation, relation_params, phi_max_zero_shear,
                 phi_max_high_shear, phi_max_frictional, onset_stress_Pa, radius_m,
                 temperature_K, critical_reduced_stress, yield_stress_Pa=0.0):
        self.phi, self.medium = _arr(phi), _arr(medium_factor)
        self.law = law if isinstance(law, _Liquid) else _Liquid(law, yield_stress_Pa)
        self.spec = get_model(relation, kind="suspension")
        self.has_phi_max = "phi_max" in self.spec.param_names()
        params = {k: v for k, v in (relation_params or {}).items() if k != "phi_max"}
        if self.has_phi_max:
            params["phi_max"] = phi_max_high_shear
        self.params = self.spec.check_params(params)
        self.params.pop("phi_max", None)
        self.phi_hs = _arr(phi_max_high_shear)
        star = _arr(onset_stress_Pa)
        self.thickening = np.isfinite(star) & self.has_phi_max
        self.star = np.where(self.thickening, star, np.nan)
        self.phi_mu = np.where(self.thickening, _arr(phi_max_frictional), self.phi_hs)
        self.radius = _arr(radius_m)
        self.phi0 = phi0 = _arr(phi_max_zero_shear)
        self.brownian = np.isfinite(self.radius) & np.isfinite(phi0) & self.has_phi_max
        safe_radius = np.where(np.isfinite(self.radius), self.radius, 1.0)
        self.stress_scale = np.where(np.isfinite(self.radius), critical_reduced_stress
                                     * BOLTZMANN_J_PER_K * _arr(temperature_K)
                                     / safe_radius**3, np.nan)
        self.g_hs = self.relation(self.phi_hs)
        self.g0 = np.where(self.brownian,
                           self.relation(np.where(self.brownian, phi0, self.phi_hs)), np.nan)
        self.g_mu = self.relation(self.phi_mu)

    _ARRAYS = ("phi", "medium", "phi_hs", "phi0", "thickening", "star", "phi_mu", "radius",
               "brownian", "stress_scale", "g_hs", "g0", "g_mu")

    def _mapped(self, func):
        """A copy with `func` applied to every per-row array (parameters included)."""
        sub = object.__new__(_Model)
        sub.__dict__.update(self.__dict__)
        shape = np.shape(self.phi)
        for name in self._ARRAYS:
            setattr(sub, name, func(np.broadcast_to(getattr(self, name), shape)))
        sub.params = {k: func(np.broadcast_to(v, shape)) for k, v in self.params.items()}
        law = self.law.law
        sub.law = _Liquid(type(law)(law.name, {k: func(np.broadcast_to(v, shape))
                                               for k, v in law.params.items()}),
                          func(np.broadcast_to(self.law.extra, shape)))
        return sub

    def take(self, rows):
        """The model of a subset of rows (boolean mask or indices over the first axis)."""
        return self._mapped(lambda v: v[rows])

    def rows(self):
        """A one-suspension model as one row (arrays of shape (1, 1))."""
        return self._mapped(lambda v: np.reshape(v, (1, 1)))

    def relation(self, phi_max):
        """Relative viscosity of the particles at one packing limit (array or float)."""
        if not self.has_phi_max:
            return np.asarray(self.spec.func(self.phi, **self.params), dtype=float)
        return np.asarray(self.spec.func(self.phi, phi_max=phi_max, **self.params), dtype=float)

    def g(self, sigma):
        """Particle relative viscosity at stress sigma (our combination, see flow_curve)."""
        sigma = np.asarray(sigma, dtype=float)
        if np.any(self.thickening):
            with np.errstate(over="ignore", invalid="ignore"):
                f = np.where(self.thickening,
                             -np.expm1(-sigma / np.where(self.thickening, self.star, 1.0)), 0.0)
            g = self.relation(f * self.phi_mu + (1.0 - f) * self.phi_hs)
        else:
            g = np.broadcast_to(self.g_hs, np.broadcast(sigma, self.phi).shape)
        if np.any(self.brownian):
            with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
                w = 1.0 / (1.0 + sigma / np.where(self.brownian, self.stress_scale, 1.0))
                g = np.where(self.brownian & (w > 0), g + (self.g0 - g) * w, g)
        return g

    def stress(self, rate, g):
        """Macroscopic stress at a rate for particle relative viscosity g (Chateau et al.)."""
        one = 1.0 - self.phi
        finite = np.isfinite(g)
        gg = np.where(finite, g, 1.0)
        with np.errstate(invalid="ignore", over="ignore"):
            s = np.sqrt(one * gg) * self.medium * self.law.stress(rate * np.sqrt(gg / one))
        return np.where(finite, s, np.inf)

    def rate(self, sigma, g):
        """Macroscopic rate carrying stress sigma for particle relative viscosity g."""
        one = 1.0 - self.phi
        finite = np.isfinite(g)
        gg = np.where(finite, g, 1.0)
        with np.errstate(over="ignore", invalid="ignore"):
            local = self.law.shear_rate(sigma / (self.medium * np.sqrt(one * gg)))
        return np.where(finite, local * np.sqrt(one / gg), 0.0)

    def plateaus(self):
        """Lowest and highest particle relative viscosity over all stresses."""
        vals = [self.g_hs, np.where(self.brownian, self.g0, self.g_hs),
                np.where(self.thickening, self.g_mu, self.g_hs)]
        return np.minimum.reduce(vals), np.maximum.reduce(vals)

    def jamming_stress(self):
        """Stress above which phi_J(sigma) <= phi (inf if never)."""
        on = self.thickening & (self.phi >= self.phi_mu)
        with np.errstate(divide="ignore", invalid="ignore"):
            f = (self.phi_hs - self.phi) / (self.phi_hs - self.phi_mu)
            # phi == phi_mu jams only as sigma -> inf; e**-60 is as good
            sig = np.where(f >= 1.0, 60.0 * self.star,
                           -self.star * np.log1p(-np.clip(f, 0.0, 1.0 - 1e-16)))
        return np.where(on, np.where(self.phi >= self.phi_hs, 0.0, sig), np.inf)


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
    Every array broadcasts: rows of a model (n, 1) against brackets (n, M).
    """
    def f(x):
        with np.errstate(divide="ignore", over="ignore"):
            return x - np.log(model.stress(rates, model.g(np.exp(x))))

    lo, hi = np.broadcast_arrays(lo, hi)
    lo, hi = lo.astype(float), hi.astype(float)
    f_lo, f_hi = f(lo), f(hi)
    side = np.zeros(lo.shape, int)
    for _ in range(60):
        ok = np.isfinite(f_lo) & np.isfinite(f_hi) & (f_hi != f_lo)
        with np.errstate(invalid="ignore", over="ignore"):
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
        if np.all((hi - lo < 1e-13) | (np.abs(fx) < 1e-14)):
            break
    return np.where(np.abs(f_lo) < np.abs(f_hi), lo, hi)


def _grid_bounds(model, rates, sig_jam):
    """Lowest and highest stress of the grid of each row (the stress-space search range)."""
    g_lo, g_hi = model.plateaus()
    sig_lo = model.stress(rates.min(axis=-1, keepdims=True), g_lo) / 4.0
    with np.errstate(over="ignore"):
        sig_hi = np.where(np.isfinite(g_hi), model.stress(
            rates.max(axis=-1, keepdims=True), g_hi) * 4.0, np.inf)
    sig_hi = np.minimum(sig_hi, sig_jam)
    sig_hi = np.where(np.isfinite(sig_hi), sig_hi, sig_lo * 1e12)   # guard; see the checks
    sig_lo = np.where(np.isfinite(sig_jam) & (sig_lo >= sig_jam), sig_jam * 1e-6, sig_lo)
    for scale in (model.stress_scale, model.star):   # show the features near the range too
        use = np.isfinite(scale) & (scale > 0)
        sig_lo = np.where(use, np.minimum(sig_lo, np.maximum(np.where(use, scale, 1.0) * 1e-3,
                                                             sig_lo * 1e-3)), sig_lo)
    return sig_lo, sig_hi


def _grid(model, rates, sig_jam, points_per_decade):
    """Stress grid of each row (n, G): log-spaced, dense just below the jamming stress."""
    sig_lo, sig_hi = _grid_bounds(model, rates, sig_jam)
    decades = np.maximum(np.log10(sig_hi / sig_lo), 1.0)
    # Each row its own number of points (as if alone); shorter rows repeat their last one.
    n = np.clip(points_per_decade * decades, 200, 20000).astype(int)
    jam = np.isfinite(sig_jam)
    j = np.arange(int(np.max(n)))
    t = np.where(jam, np.minimum(j, n - 1) / n, np.minimum(j / np.maximum(n - 1, 1), 1.0))
    top = np.where(jam, sig_jam, sig_hi)
    grid = np.exp(np.log(sig_lo) + t * (np.log(top) - np.log(sig_lo)))
    near = np.where(jam, np.where(jam, sig_jam, 1.0) * (1.0 - np.logspace(-1, -13, 200)),
                    sig_hi)
    near = np.where(near > sig_lo * 0.999, near, sig_lo)
    return np.sort(np.concatenate([grid, near], axis=-1), axis=-1)


@dataclass
class _Solved:
    """What `_solve` finds for rows (n, M) of a model, with row markers (n,)."""

    sigma: np.ndarray
    regime: np.ndarray
    apparent_yield_stress_Pa: np.ndarray
    dst_low_1_per_s: np.ndarray
    dst_high_1_per_s: np.ndarray
    shear_jamming_1_per_s: np.ndarray
    fall_stress_Pa: np.ndarray


def _solve(model, rates, points_per_decade=60.0, regimes=True):
    """Stress at every rate of every row (model arrays (n, 1), rates (M,) or (n, M)).

    Without `regimes` the slope labels are left empty ("jammed" and
    "discontinuous-thickening" are still set): a search that only needs the viscosity
    skips their six extra model evaluations.

    Rows without frictional thickening have a stress-rate curve that rises monotonically
    (g is bounded by its plateaus, the stress rises with g), so the root lies between the
    stresses at the two plateaus and is refined there directly. Rows with thickening may
    turn back (S-shaped curve, shear jamming): their rate is computed on a stress grid,
    each requested rate is bracketed on the rising envelope, then refined.
    """
    n = model.phi.shape[0]
    rates = np.broadcast_to(rates, (n, rates.shape[-1]))     # (M,) or (n, M)
    m = rates.shape[1]
    sigma = np.full((n, m), np.inf)
    dst = np.zeros((n, m), bool)
    nan = np.full(n, np.nan)
    low, high, jam_rate, fall = nan.copy(), nan.copy(), nan.copy(), nan.copy()
    sig_jam = model.jamming_stress()
    dead = ((~np.isfinite(model.g_hs) & ~model.thickening) | (sig_jam == 0.0)).ravel()
    jam_rate[dead] = 0.0
    if np.any(~dead):
        # The stress at the lowest rate underflows: no grid or bracket can hold it, and a
        # floor would answer for another rate (1e-300 1/s once returned exactly 1 Pa*s).
        live = model.take(~dead)
        low_rate = rates[~dead].min(axis=-1, keepdims=True)
        with np.errstate(under="ignore"):
            s_lo = live.stress(low_rate, live.plateaus()[0]).ravel() / 4.0
        bad = ~(s_lo >= _TINY)
        if np.any(bad):
            rate = float(low_rate.ravel()[bad][0])
            lowest = rate * (_TINY / s_lo[bad][0]) if s_lo[bad][0] > 0 else float("inf")
            raise InputRangeError("shear_rate_1_per_s", rate,
                                  f"a rate whose shear stress is a representable number "
                                  f"(here above about {min(lowest, 1e300):.2g} 1/s)")
    mono = ~dead & ~model.thickening.ravel()
    if mono.any():
        sub = model.take(mono)
        g_lo, g_hi = sub.plateaus()
        r = rates[mono]
        lo, hi = np.log(sub.stress(r, g_lo)), np.log(sub.stress(r, g_hi))
        sigma[mono] = np.exp(_refine(sub, r, lo, hi))
    thick = np.flatnonzero(~dead & model.thickening.ravel())
    for part in np.array_split(thick, max(1, thick.size // 2000)):
        if part.size:
            _solve_on_grid(model.take(part), rates[part], sig_jam[part], points_per_decade,
                           part, sigma, dst, low, high, jam_rate, fall)
    ys = _apparent_yield_stress(model, sig_jam)
    regime = (_regimes(model, rates, sigma, ys[:, None]) if regimes
              else np.full(sigma.shape, "", dtype=object))
    regime[dst] = "discontinuous-thickening"
    regime[~np.isfinite(sigma)] = "jammed"
    return _Solved(sigma, regime, ys, low, high, jam_rate, fall)


def _solve_on_grid(model, rates, sig_jam, points_per_decade, rows, sigma, dst, low, high,
                   jam_rate, fall):
    """`_solve` for rows that may thicken: bracket on the grid's rising envelope."""
    grid = _grid(model, rates, sig_jam, points_per_decade)
    rate_grid = model.rate(grid, model.g(grid))
    envelope = np.maximum.accumulate(rate_grid, axis=1)
    size = grid.shape[1]
    k = (envelope[:, :, None] < rates[:, None, :]).sum(axis=1)      # (n, M)
    reach = k < size
    kk = np.clip(k, 1, size - 1)
    lo = np.log(np.take_along_axis(grid, kk - 1, axis=1))
    hi = np.log(np.take_along_axis(grid, kk, axis=1))
    sigma[rows] = np.where(reach, np.exp(_refine(model, rates, lo, hi)), np.inf)
    # S-shape: the first fall of the rate along the grid; it recovers (discontinuous
    # thickening) or never does (shear jamming).
    falls = (rate_grid[:, 1:] < rate_grid[:, :-1] * (1 - 1e-9)) & (rate_grid[:, :-1] > 0)
    has = falls.any(axis=1)
    first = np.argmax(falls, axis=1)
    r = np.arange(grid.shape[0])
    top = envelope[r, first]
    recovers = has & (envelope[:, -1] > top * (1 + 1e-9))
    above = envelope > top[:, None]
    until = np.where(above.any(axis=1), np.argmax(above, axis=1), size)
    j = np.arange(size)
    window = (j >= first[:, None]) & (j < until[:, None])
    bottom = np.where(window, rate_grid, np.inf).min(axis=1)
    low[rows] = np.where(recovers, bottom, np.nan)
    high[rows] = np.where(recovers, top, np.nan)
    jam_rate[rows] = np.where(has & ~recovers, top, np.where(reach.all(axis=1), np.nan,
                                                            envelope[:, -1]))
    fall[rows] = np.where(has, grid[r, first], np.nan)
    dst[rows] = recovers[:, None] & (rates >= bottom[:, None]) & (rates <= top[:, None])


def _apparent_yield_stress(model, sig_jam):
    """Stress where the rate leaves zero: sigma = sqrt((1 - phi) g(sigma)) m tau_y (rows)."""
    n = model.phi.shape[0]
    ty = np.broadcast_to(model.law.yield_stress_Pa * model.medium, (n, 1))
    out = np.zeros(n)
    rows = np.flatnonzero(ty.ravel() > 0)
    if rows.size == 0:
        return out
    sub = model.take(rows)
    t = ty[rows]
    g_lo, g_hi = sub.plateaus()
    one = 1.0 - sub.phi
    lo = np.log(np.sqrt(one * g_lo) * t)
    with np.errstate(over="ignore", invalid="ignore"):
        hi = np.where(np.isfinite(g_hi), np.log(np.sqrt(one * np.where(
            np.isfinite(g_hi), g_hi, 1.0)) * t), np.log(sig_jam[rows] * (1 - 1e-12)))
    for _ in range(64):
        mid = 0.5 * (lo + hi)
        s = np.exp(mid)
        below = s - np.sqrt(one * sub.g(s)) * t < 0
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    out[rows] = np.exp(0.5 * (lo + hi)).ravel()
    return out


def _regimes(model, rates, sigma, ys):
    """Regime labels from the exact local slope d ln eta / d ln gammadot at each point.

    Differentiating ln sigma = F(ln rate, ln sigma), F = ln S(rate, g(sigma)), gives
    d ln sigma / d ln rate = F_r / (1 - F_x); both partial derivatives are taken by
    central differences of the model functions (no further solve).
    """
    h = 1e-6
    finite = np.isfinite(sigma)
    s = np.where(finite, sigma, 1.0)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        g = model.g(s)
        f_r = (np.log(model.stress(rates * np.exp(h), g))
               - np.log(model.stress(rates * np.exp(-h), g))) / (2 * h)
        up = np.log(model.stress(rates, model.g(s * np.exp(h))))
        down = np.log(model.stress(rates, model.g(s * np.exp(-h))))
        mid = np.log(model.stress(rates, g))
        f_x = np.where(np.isfinite(up), (up - down) / (2 * h), (mid - down) / h)
        slope = f_r / (1.0 - f_x) - 1.0
    slope = np.where(np.isfinite(slope), slope, np.where(f_x >= 1.0, 1.0, -1.0))
    regime = np.where(slope < -PLATEAU_SLOPE, "thinning",
                      np.where(slope > PLATEAU_SLOPE, "thickening", "plateau")).astype(object)
    regime[(ys > 0) & (sigma < 2.0 * ys)] = "yield"
    return regime


@guarded
def flow_curve(shear_rate_1_per_s, phi, *, liquid_law_name="newtonian", liquid_params=None,
               medium_factor=1.0, relation="krieger-dougherty", relation_params=None,
               phi_max_zero_shear=None, phi_max_high_shear=0.64, phi_max_frictional=None,
               onset_stress_Pa=None, radius_m=None, temperature_K=298.15,
               critical_reduced_stress=CRITICAL_REDUCED_STRESS, points_per_decade=60,
               yield_stress_Pa=0.0):
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
    yield_stress_Pa : float, optional
        Yield stress added to the liquid law's own (e.g. from flocculated solids), as in a
        Herschel-Bulkley law: the liquid's stress is tau_y + tau_law(gammadot). [Pa]

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
               "points_per_decade": points_per_decade, "yield_stress_Pa": yield_stress_Pa}
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
    law = _Liquid(liquid_law(liquid_law_name, **(liquid_params or {})),
                  float(in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, 1e7)))
    messages: list[str] = []

    def warn(text):
        messages.append(text)
        warnings.warn(text, ValidityWarning, stacklevel=3)

    model = _Model(phi, law, medium_factor, relation, relation_params, phi_max_zero_shear,
                   phi_hs, phi_max_frictional, onset_stress_Pa, radius_m, temperature_K,
                   critical_reduced_stress)
    notes = _notes(model, critical_reduced_stress)
    for name in ("validity", "coarse", "glass"):
        text = notes[name][0]
        if text and name == "coarse":
            messages.append(text)
        elif text:
            warn(text)
    if notes["coarse"][0] or notes["glass"][0]:
        model.brownian = np.asarray(False)

    eta_l = np.asarray(law.viscosity(rates), dtype=float) * np.ones_like(rates)
    markers = _plateau_markers(model, law, critical_reduced_stress)
    sig_jam = float(model.jamming_stress())
    if notes["no_flow"][0]:
        warn(notes["no_flow"][0])
        inf = np.full_like(rates, np.inf)
        markers["shear_jamming_1_per_s"] = 0.0
        return FlowCurve(rates, inf, inf, inf, eta_l, np.full(rates.shape, "jammed"),
                         markers, tuple(messages))

    solved = _solve(model.rows(), rates, points_per_decade)
    sigma = solved.sigma[0]
    viscosity = sigma / rates
    markers["apparent_yield_stress_Pa"] = float(solved.apparent_yield_stress_Pa[0])
    low, high = float(solved.dst_low_1_per_s[0]), float(solved.dst_high_1_per_s[0])
    jam_rate, fall = float(solved.shear_jamming_1_per_s[0]), float(solved.fall_stress_Pa[0])
    if np.isfinite(high):
        markers["dst_low_1_per_s"], markers["dst_high_1_per_s"] = low, high
        messages.append(f"Discontinuous shear thickening between {low:.3g} and "
                        f"{high:.3g} 1/s: the stress jumps from {fall:.3g} Pa to a higher "
                        "branch.")
    if np.isfinite(jam_rate):
        markers["shear_jamming_1_per_s"] = jam_rate
        messages.append(f"Shear jamming: above {jam_rate:.3g} 1/s (stress "
                        f"{fall:.3g} Pa) the suspension cannot flow steadily "
                        f"(phi = {phi:.3g} >= frictional packing limit "
                        f"{float(model.phi_mu):.3g}).")
    sig_lo, sig_hi = (float(np.ravel(x)[0]) for x in _grid_bounds(model, rates, sig_jam))
    _onset_markers(model, markers, sig_lo, sig_hi, sig_jam)
    relative = viscosity / eta_l
    return FlowCurve(rates, sigma, viscosity, relative, eta_l, solved.regime[0].astype(str),
                     markers, tuple(messages))


def _worded(mask, make, *columns) -> np.ndarray:
    """`make(*values)` for each row where `mask` (flat), once per distinct tuple of values;
    "" elsewhere."""
    mask = np.ravel(mask)
    out = np.full(mask.shape, "", dtype=object)
    cols = [np.ravel(c) for c in columns]
    seen: dict[tuple, str] = {}
    for i in np.flatnonzero(mask):
        key = tuple(float(c[i]) for c in cols)
        if key not in seen:
            seen[key] = make(*key)
        out[i] = seen[key]
    return out


def _notes(model, critical_reduced_stress) -> dict:
    """The notes `flow_curve` gives suspensions at their own phi, per row (flat arrays of
    str, "" where none), in its order: "validity" (the relation outside its range),
    "coarse" (Brownian term left out for a large radius), "glass" (no zero-shear plateau),
    "no_flow" (at or above the packing limit). The one wording of these notes: `flow_curve`
    uses it for its one row, `flow_notes` for many.
    """
    shape = np.shape(model.phi)

    def flat(value):
        return np.broadcast_to(np.asarray(value), shape).ravel()

    phi, phi_hs, radius = flat(model.phi), flat(model.phi_hs), flat(model.radius)
    scale = flat(model.stress_scale) / critical_reduced_stress
    spec = model.spec
    x = phi / phi_hs if spec.phi_range_relative and model.has_phi_max else phi
    low, high = spec.phi_range
    with np.errstate(invalid="ignore"):
        outside = (x < low) | (x > high)
    validity = _worded(outside, lambda p, m: spec.validity_message(
        p, {"phi_max": m} if model.has_phi_max else {}) or "", phi, phi_hs)
    brownian = flat(model.brownian)
    coarse = brownian & (radius > BROWNIAN_RADIUS_LIMIT_m)
    glass = brownian & ~coarse & ~np.isfinite(flat(model.g0))
    no_flow = ((~np.isfinite(flat(model.g_hs)) & ~flat(model.thickening))
               | (flat(model.jamming_stress()) == 0.0))
    return {
        "validity": validity,
        "coarse": _worded(coarse, lambda a, s: (
            f"Brownian shear thinning is negligible for particles of radius {a * 1e6:.3g} um "
            f"(stress scale k_B T/a^3 = {s:.2g} Pa) and is left out."), radius, scale),
        "glass": _worded(glass, lambda p, m, s: (
            f"phi = {p:.3g} is at or above the zero-shear packing limit {m:.3g}: Krieger's "
            "interpolation has no zero-shear plateau there (a Brownian glass with a yield "
            f"stress of order k_B T/a^3 = {s:.3g} Pa); the Brownian term is left out."),
            phi, flat(model.phi0), scale),
        "no_flow": _worded(no_flow, lambda p, m: (
            f"phi = {p:.3g} is at or above the packing limit {m:.3g}: no flow is predicted "
            "at any shear rate."), phi, phi_hs),
    }


@guarded
def flow_notes(phi, *, relation="krieger-dougherty", relation_params=None,
               phi_max_zero_shear=np.nan, phi_max_high_shear=0.64, phi_max_frictional=np.nan,
               onset_stress_Pa=np.nan, radius_m=np.nan, temperature_K=298.15,
               critical_reduced_stress=CRITICAL_REDUCED_STRESS):
    """The notes `flow_curve` gives each of n suspensions, joined with "; " per row.

    Arguments as in `flow_curves` (floats or arrays (n,); ``nan``: not given). The same
    checks and wording as `flow_curve` (validity range of the relation, Brownian term left
    out, no zero-shear plateau, no flow), for many rows at once.

    Returns
    -------
    numpy.ndarray
        (n,) object array of str, "" where `flow_curve` gives no note.

    Examples
    --------
    >>> flow_notes([0.3, 0.7], phi_max_high_shear=0.64).tolist()[1]
    'phi = 0.7 is at or above the packing limit 0.64: no flow is predicted at any shear rate.'
    """
    phi = np.atleast_1d(in_range(phi, "phi", 0.0, 1.0, high_open=True)).astype(float)
    n = phi.size

    def column(value):
        return np.broadcast_to(np.asarray(value, dtype=float), (n,)).reshape(n, 1)

    model = _Model(column(phi), _Liquid(liquid_law("newtonian", viscosity_Pa_s=1.0), 0.0),
                   1.0, relation, {k: column(v) for k, v in (relation_params or {}).items()},
                   column(phi_max_zero_shear), column(phi_max_high_shear),
                   column(phi_max_frictional), column(onset_stress_Pa), column(radius_m),
                   column(positive(temperature_K, "temperature_K")),
                   float(positive(critical_reduced_stress, "critical_reduced_stress")))
    notes = _notes(model, float(critical_reduced_stress))
    out = notes["validity"]
    for name in ("coarse", "glass", "no_flow"):
        part = notes[name]
        both = (out != "") & (part != "")
        out = np.where(both, out + "; " + part, np.where(part != "", part, out))
    return out.astype(object)


#: Smallest stress the flow-curve grid holds: the smallest normal float, times 1e4 so the
#: grid below the lowest stress and the bisection keep full precision. [Pa]
_TINY = float(np.finfo(float).tiny) * 1e4


def _plateau_markers(model, law, critical_reduced_stress):
    eta_rest = float(np.asarray(law.viscosity(0.0)))
    newtonian = law.name == "newtonian" and not np.any(law.extra > 0)
    g0 = float(model.g0) * float(model.medium) if model.brownian else np.nan
    g_hs = float(model.g_hs) * float(model.medium)
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
        "brownian_stress_Pa": (float(model.stress_scale) / critical_reduced_stress
                               if model.brownian else np.nan),
    }


def _onset_markers(model, markers, sig_lo, sig_hi, sig_jam):
    """Thinning and thickening onsets: g 10 % below g_0, 10 % above its minimum."""
    top = sig_jam * (1 - 1e-12) if np.isfinite(sig_jam) else sig_hi
    scales = [float(s) for s in (model.stress_scale, model.star) if np.isfinite(s)]
    low = min([sig_lo] + [s * 1e-4 for s in scales])
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


@dataclass(frozen=True)
class FlowCurves:
    """Flow curves of n suspensions at the same M shear rates (arrays (n, M) and (n,))."""

    shear_rate_1_per_s: np.ndarray
    shear_stress_Pa: np.ndarray
    viscosity_Pa_s: np.ndarray
    liquid_viscosity_Pa_s: np.ndarray
    regime: np.ndarray
    apparent_yield_stress_Pa: np.ndarray
    dst_low_1_per_s: np.ndarray
    dst_high_1_per_s: np.ndarray
    shear_jamming_1_per_s: np.ndarray


@guarded
def flow_curves(shear_rate_1_per_s, phi, *, liquid_law_name="newtonian", liquid_params=None,
                medium_factor=1.0, relation="krieger-dougherty", relation_params=None,
                phi_max_zero_shear=np.nan, phi_max_high_shear=0.64, phi_max_frictional=np.nan,
                onset_stress_Pa=np.nan, radius_m=np.nan, temperature_K=298.15,
                yield_stress_Pa=0.0, critical_reduced_stress=CRITICAL_REDUCED_STRESS,
                points_per_decade=60, regimes=True):
    r"""`flow_curve` of n suspensions at once: one row per suspension, the same shear rates.

    The same model and the same solve as `flow_curve` (which is this function for one row
    plus its markers and messages), vectorised over rows: every per-suspension argument is
    a float or an array of shape (n,). ``nan`` switches a mechanism off in a row (no
    zero-shear limit or radius: no Brownian thinning; no onset stress: no thickening).
    Rows share one liquid law and one relation (group rows by them). The Brownian term is
    left out where the radius exceeds `BROWNIAN_RADIUS_LIMIT_m` or phi reaches the
    zero-shear limit, as in `flow_curve`; no warnings are raised here.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rates, > 0: (M,) shared by the rows, or (n, M) one set per row. [1/s]
    phi : float or array_like
        Effective volume fraction of the particles, per row, in [0, 1). [-]
    liquid_law_name : str, optional
        Registry name of the liquid law shared by the rows.
    liquid_params : dict, optional
        The law's parameters, floats or arrays (n,). SI.
    medium_factor : float or array_like, optional
        Relative viscosity of the medium over the bare liquid (droplets). [-]
    relation : str, optional
        Registry name of the suspension relation shared by the rows.
    relation_params : dict, optional
        The relation's other parameters, floats or arrays (n,).
    phi_max_zero_shear, phi_max_high_shear, phi_max_frictional : float or array_like
        Packing limits as in `flow_curve`; ``nan``: not given. [-]
    onset_stress_Pa : float or array_like, optional
        Onset stress of frictional thickening; ``nan``: none. [Pa]
    radius_m : float or array_like, optional
        Brownian radius; ``nan``: none. [m]
    temperature_K : float or array_like, optional
        Temperature. [K]
    yield_stress_Pa : float or array_like, optional
        Yield stress added to the liquid law's own (see `flow_curve`). [Pa]
    critical_reduced_stress : float, optional
        As in `flow_curve`. [-]
    points_per_decade : int, optional
        As in `flow_curve`.
    regimes : bool, optional
        Label each point's regime from its local slope; False leaves those labels empty
        (for searches that need only the viscosity; "jammed" and "discontinuous-thickening"
        are still set).

    Returns
    -------
    FlowCurves
        shear_stress_Pa, viscosity_Pa_s (``inf`` where jammed), liquid_viscosity_Pa_s and
        regime, each (n, M); apparent_yield_stress_Pa, dst_low_1_per_s, dst_high_1_per_s,
        shear_jamming_1_per_s, each (n,).

    Examples
    --------
    Two suspensions in a Newtonian liquid, Krieger-Dougherty at 0.3 and 0.5 with phi_max
    0.64, no Brownian or frictional physics: 0.01 (1 - phi/0.64)**-1.6 Pa*s at every rate:

    >>> fc = flow_curves([1.0, 10.0], [0.3, 0.5], liquid_params={"viscosity_Pa_s": 0.01})
    >>> np.round(fc.viscosity_Pa_s, 4).tolist()
    [[0.0275, 0.0275], [0.1138, 0.1138]]
    """
    rates = np.atleast_1d(as_array(shear_rate_1_per_s, "shear_rate_1_per_s")).astype(float)
    phi = np.atleast_1d(in_range(phi, "phi", 0.0, 1.0, high_open=True)).astype(float)
    n = phi.size
    if rates.ndim > 2 or (rates.ndim == 2 and rates.shape[0] != n) or np.any(rates <= 0):
        raise InputRangeError("shear_rate_1_per_s", rates.ravel()[0] if rates.size else rates,
                              "rates > 0, shared (M,) or one row per suspension (n, M)")

    def column(value):
        return np.broadcast_to(np.asarray(value, dtype=float), (n,)).reshape(n, 1)

    params = {k: column(v) for k, v in (liquid_params or {}).items()}
    law = _Liquid(liquid_law(liquid_law_name, **params),
                  column(in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, 1e7)))
    model = _Model(column(phi), law, column(positive(medium_factor, "medium_factor")),
                   relation, {k: column(v) for k, v in (relation_params or {}).items()},
                   column(phi_max_zero_shear), column(phi_max_high_shear),
                   column(phi_max_frictional), column(onset_stress_Pa), column(radius_m),
                   column(positive(temperature_K, "temperature_K")),
                   float(positive(critical_reduced_stress, "critical_reduced_stress")))
    model.brownian = model.brownian & (model.radius <= BROWNIAN_RADIUS_LIMIT_m) \
        & np.isfinite(model.g0)
    solved = _solve(model, rates, float(points_per_decade), regimes=bool(regimes))
    with np.errstate(invalid="ignore"):
        eta_l = np.broadcast_to(np.asarray(law.viscosity(rates), dtype=float),
                                (n, rates.shape[-1]))
    return FlowCurves(rates, solved.sigma, solved.sigma / rates, eta_l,
                      solved.regime.astype(str), solved.apparent_yield_stress_Pa,
                      solved.dst_low_1_per_s, solved.dst_high_1_per_s,
                      solved.shear_jamming_1_per_s)
