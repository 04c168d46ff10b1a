r"""The continuous phase: viscosity of the liquid itself, Newtonian or not.

Pure numpy, SI units, vectorised over every argument. Three groups of functions:

- Newtonian liquids from a temperature: `water_viscosity` (IAPWS 2008 with Kell's density),
  `glycerol_water_viscosity` (Cheng 2008) and the Arrhenius temperature shift.
- Liquid laws, each a registered relation of kind "liquid": the apparent viscosity
  eta = tau / gammadot as a function of the shear rate (`newtonian`, `power_law`,
  `carreau_yasuda`, `cross`, `bingham`, `herschel_bulkley`, `casson`), with the dispatchers
  `liquid_viscosity`, `liquid_stress` and the inverse `liquid_shear_rate`.
- Rigid particles in a non-Newtonian liquid (Chateau, Ovarlez & Trung 2008): the local
  shear-rate amplification and the scaled yield stress and consistency.

Conventions: a shear rate must be >= 0; at a shear rate of exactly 0 a yield-stress law (and
a power law with n < 1) returns ``inf``, its limit; no regularisation is applied, because the
flow-curve builder (`predictor.shear.flow_curve`) works in stress space and never evaluates a
law at zero rate. Non-finite inputs raise `InputRangeError`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._checks import fraction, guarded, in_range, positive, scalar_or_array
from .errors import InputRangeError
from .registry import Param, get_model, model

ATMOSPHERIC_PRESSURE_MPa = 0.101325

# --- Water -------------------------------------------------------------------------------

#: Reference constants of the IAPWS 2008 viscosity formulation, Eqs. (3)-(7) of [R12-08].
_T_STAR_K, _RHO_STAR, _MU_STAR_Pa_s = 647.096, 322.0, 1.0e-6
#: Coefficients H_i of the dilute-gas part, Table 1 of the release (Eq. 11).
_H0 = np.array([1.67752, 2.20462, 0.6366564, -0.241605])
#: Coefficients H_ij of the residual part, Table 2 of the release (Eq. 12); row i, column j.
_H1 = np.array([
    [5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0.0, 0.0],
    [8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0.0, 0.0, 0.0],
    [-1.08374, 1.88797, -7.72479e-1, 0.0, 0.0, 0.0, 0.0],
    [-2.89555e-1, 1.26613, -4.89837e-1, 0.0, 6.98452e-2, 0.0, -4.35673e-3],
    [0.0, 0.0, -2.57040e-1, 0.0, 0.0, 8.72102e-3, 0.0],
    [0.0, 1.20573e-1, 0.0, 0.0, 0.0, 0.0, -5.93264e-4],
])
#: Kell's density of air-free water at 101.325 kPa, Eq. (16) of [Kell 1975]: numerator
#: coefficients of t**0..t**5 (t in degC, IPTS-68) and the denominator coefficient.
_KELL_NUM = np.array([999.83952, 16.945176, -7.9870401e-3, -46.170461e-6, 105.56302e-9,
                      -280.54253e-12])
_KELL_DEN = 16.879850e-3


@guarded
def iapws_2008_viscosity(temperature_K, density_kg_per_m3):
    r"""Viscosity of water substance from temperature and density (IAPWS 2008).

    The IAPWS Formulation 2008 for the viscosity of ordinary water substance [1]_, [2]_,
    without its critical enhancement (mu_2 = 1), which matters only within about a kelvin
    of the critical point.

    Parameters
    ----------
    temperature_K : float or array_like
        Temperature (ITS-90). [K]
    density_kg_per_m3 : float or array_like
        Density of the water. [kg/m**3]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Dynamic viscosity. [Pa*s]

    Raises
    ------
    InputRangeError
        Temperature outside 235-1173.15 K or density outside 0-1400 kg/m**3.

    Notes
    -----
    .. math::
        \mu = \mu^* \bar\mu_0(\bar T)\,\bar\mu_1(\bar T, \bar\rho), \qquad
        \bar\mu_0 = \frac{100\sqrt{\bar T}}{\sum_{i=0}^{3} H_i/\bar T^i}, \qquad
        \bar\mu_1 = \exp\Big[\bar\rho \sum_{i=0}^{5}\big(\tfrac{1}{\bar T}-1\big)^i
        \sum_{j=0}^{6} H_{ij}(\bar\rho-1)^j\Big]

    with T* = 647.096 K, rho* = 322.0 kg/m**3, mu* = 1e-6 Pa s (Eqs. 10-12, Tables 1-2 of
    [2]_). The release covers the stable fluid from the melting line to 1173.15 K and up to
    1000 MPa; this function accepts 235-1173.15 K (the release also gives values in the
    metastable liquid) and leaves the pressure range to the caller. The check values of
    Table 4 of [2]_ are reproduced to their 9 printed digits (see the tests).

    References
    ----------
    .. [1] M. L. Huber, R. A. Perkins, A. Laesecke, D. G. Friend, J. V. Sengers,
       M. J. Assael, I. N. Metaxa, E. Vogel, R. Mares and K. Miyagawa, "New international
       formulation for the viscosity of H2O," J. Phys. Chem. Ref. Data, vol. 38, no. 2,
       pp. 101-125, 2009, doi:10.1063/1.3088050.
    .. [2] IAPWS, "Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
       Substance," IAPWS R12-08, 2008.

    Examples
    --------
    From Table 4 of [2]_: 298.15 K and 998 kg/m**3 give 889.735100 uPa s.

    >>> round(iapws_2008_viscosity(298.15, 998.0) * 1e6, 6)
    889.7351
    """
    t = in_range(temperature_K, "temperature_K", 235.0, 1173.15)
    rho = in_range(density_kg_per_m3, "density_kg_per_m3", 0.0, 1400.0)
    tb = t / _T_STAR_K
    rb = rho / _RHO_STAR
    mu0 = 100.0 * np.sqrt(tb) / (_H0[0] + _H0[1] / tb + _H0[2] / tb**2 + _H0[3] / tb**3)
    x = 1.0 / tb - 1.0
    y = rb - 1.0
    inner = np.zeros(np.broadcast(x, y).shape)
    for i in range(5, -1, -1):          # Horner in (1/Tbar - 1) over rows of H_ij
        row = np.zeros_like(inner)
        for j in range(6, -1, -1):      # Horner in (rhobar - 1) along the row
            row = row * y + _H1[i, j]
        inner = inner * x + row
    mu1 = np.exp(rb * inner)
    return scalar_or_array(_MU_STAR_Pa_s * mu0 * mu1, t, rho)


@guarded
def water_density(temperature_K):
    r"""Density of air-free liquid water at 101.325 kPa, from Kell's correlation.

    Kell's rational function [1]_ (Eq. 16 there), with the temperature converted from ITS-90
    to IPTS-68 by t68 = 1.00024 t90 (the usual linear approximation [2]_).

    Parameters
    ----------
    temperature_K : float or array_like
        Temperature (ITS-90), 273.15 to 373.15 K. [K]

    Returns
    -------
    density_kg_per_m3 : float or numpy.ndarray
        Density. [kg/m**3]

    Notes
    -----
    .. math::
        \rho = \frac{999.83952 + 16.945176\,t - 7.9870401\times10^{-3}t^2
        - 46.170461\times10^{-6}t^3 + 105.56302\times10^{-9}t^4
        - 280.54253\times10^{-12}t^5}{1 + 16.879850\times10^{-3}\,t}

    Coefficients as quoted in [2]_; that page prints the denominator coefficient as
    16.897850e-3, which is off by 270 ppm from IAPWS-95 at 20 degC, while 16.879850e-3 agrees
    with IAPWS-95 within 5 ppm from 0 to 100 degC (measured against the `iapws` package; the
    tests allow 20 ppm), so the printed value is taken to be a transposition. Kell states validity
    0-150 degC at 1 atm. Above 373.124 K water at 1 atm is superheated (metastable).

    References
    ----------
    .. [1] G. S. Kell, "Density, thermal expansivity, and compressibility of liquid water
       from 0 to 150 C: correlations and tables for atmospheric pressure and saturation
       reviewed and expressed on 1968 temperature scale," J. Chem. Eng. Data, vol. 20, no. 1,
       pp. 97-105, 1975, doi:10.1021/je60064a005.
    .. [2] F. E. Jones and G. L. Harris, "ITS-90 density of water formulation for volumetric
       standards calibration," J. Res. Natl. Inst. Stand. Technol., vol. 97, no. 3,
       pp. 335-340, 1992, Eq. (1).

    Examples
    --------
    Illustrative call (IAPWS-95 gives 998.2072 kg/m**3 at 20 degC):

    >>> round(water_density(293.15), 3)
    998.204
    """
    t90 = in_range(temperature_K, "temperature_K", 273.15, 373.15) - 273.15
    t = 1.00024 * t90
    num = np.polynomial.polynomial.polyval(t, _KELL_NUM)
    return scalar_or_array(num / (1.0 + _KELL_DEN * t), t90)


@guarded
def water_viscosity(temperature_K):
    r"""Viscosity of liquid water at atmospheric pressure, 0 to 100 degC.

    `iapws_2008_viscosity` [1]_ evaluated at the density from `water_density` (Kell [2]_)
    at 0.101325 MPa.

    Parameters
    ----------
    temperature_K : float or array_like
        Temperature (ITS-90), 273.15 to 373.15 K. [K]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Dynamic viscosity. [Pa*s]

    Raises
    ------
    InputRangeError
        Temperature outside 273.15-373.15 K, or not finite.

    Notes
    -----
    Within 1e-5 relative of the `iapws` package (IAPWS-95 density) from 0 to 100 degC
    (measured: 9e-6); the release
    gives 1.001596 mPa s at 20 degC and 0.101325 MPa (Sec. 2.4 of [1]_), reproduced to
    2e-5 relative: the density correlation, not the viscosity formulation, sets that
    residual. Above 373.124 K the state is superheated liquid (boiling at 1 atm).

    References
    ----------
    .. [1] IAPWS, "Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
       Substance," IAPWS R12-08, 2008; M. L. Huber et al., J. Phys. Chem. Ref. Data,
       vol. 38, no. 2, pp. 101-125, 2009.
    .. [2] G. S. Kell, J. Chem. Eng. Data, vol. 20, no. 1, pp. 97-105, 1975.

    Examples
    --------
    Water at 20 degC (the release: 1.001596 mPa s):

    >>> round(water_viscosity(293.15) * 1e3, 5)
    1.00160
    """
    t = in_range(temperature_K, "temperature_K", 273.15, 373.15)
    return scalar_or_array(iapws_2008_viscosity(t, water_density(t)), t)


@guarded
def glycerol_water_viscosity(glycerol_mass_fraction, temperature_K):
    r"""Viscosity of a glycerol-water mixture from its glycerol mass fraction and temperature.

    Cheng's correlation [1]_: a weighted geometric mean of the viscosities of water and
    glycerol, with a weight alpha fitted to handbook data.

    Parameters
    ----------
    glycerol_mass_fraction : float or array_like
        Mass fraction of glycerol in the liquid, 0 to 1. [-]
    temperature_K : float or array_like
        Temperature, 273.15 to 373.15 K. [K]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Dynamic viscosity of the mixture. [Pa*s]

    Notes
    -----
    With T in degC and C the glycerol mass fraction (viscosities in mPa s):

    .. math::
        \mu_w = 1.790\,e^{(-1230 - T)T/(36100 + 360T)}, \quad
        \mu_g = 12100\,e^{(-1233 + T)T/(9900 + 70T)}, \\
        a = 0.705 - 0.0017\,T, \quad b = (4.9 + 0.036\,T)\,a^{2.5}, \\
        \alpha = 1 - C + \frac{a\,b\,C(1 - C)}{a\,C + b(1 - C)}, \quad
        \mu = \mu_w^{\alpha}\,\mu_g^{1-\alpha}

    Stated range 0-100 wt% and 0-100 degC (abstract of [1]_). The formula is as quoted in
    public implementations, not read in the paper text. Note that mu_w here is Cheng's own
    fit (1.0049 mPa s at 20 degC), not IAPWS.

    References
    ----------
    .. [1] N.-S. Cheng, "Formula for the viscosity of a glycerol-water mixture," Ind. Eng.
       Chem. Res., vol. 47, no. 9, pp. 3285-3288, 2008, doi:10.1021/ie071349z.

    Examples
    --------
    50 wt% glycerol at 20 degC (handbook value about 6.00 mPa s, from memory):

    >>> round(glycerol_water_viscosity(0.5, 293.15) * 1e3, 3)
    6.002
    """
    c = fraction(glycerol_mass_fraction, "glycerol_mass_fraction")
    tk = in_range(temperature_K, "temperature_K", 273.15, 373.15)
    t = tk - 273.15
    mu_w = 1.790 * np.exp((-1230.0 - t) * t / (36100.0 + 360.0 * t))
    mu_g = 12100.0 * np.exp((-1233.0 + t) * t / (9900.0 + 70.0 * t))
    a = 0.705 - 0.0017 * t
    b = (4.9 + 0.036 * t) * a**2.5
    with np.errstate(invalid="ignore", divide="ignore"):
        mix = np.where((c > 0) & (c < 1), a * b * c * (1 - c) / (a * c + b * (1 - c)), 0.0)
    alpha = 1.0 - c + mix
    return scalar_or_array(1e-3 * mu_w**alpha * mu_g ** (1.0 - alpha), c, tk)


# --- Temperature shift -------------------------------------------------------------------


@guarded
def arrhenius_shift(temperature_K, reference_temperature_K, activation_temperature_K):
    r"""Arrhenius (Andrade) factor eta(T) / eta(T_ref) of a liquid's viscosity.

    The Arrhenius-type temperature dependence of liquid viscosity, as proposed by Andrade
    [1]_, written with the activation temperature E/R.

    Parameters
    ----------
    temperature_K : float or array_like
        Working temperature. [K]
    reference_temperature_K : float or array_like
        Temperature at which the viscosity is known. [K]
    activation_temperature_K : float or array_like
        Activation energy divided by the gas constant, E/R (>= 0). [K]

    Returns
    -------
    shift : float or numpy.ndarray
        Factor a_T multiplying the viscosity at the reference temperature. [-]

    Notes
    -----
    .. math:: a_T = \exp\left[\frac{E}{R}\left(\frac{1}{T} - \frac{1}{T_\mathrm{ref}}\right)\right]

    A fair description of simple liquids over a few tens of kelvin; it misses the curvature
    of glass-forming liquids near their glass transition (common practice, no source).

    References
    ----------
    .. [1] E. N. da C. Andrade, "A theory of the viscosity of liquids. Part I," Phil. Mag.
       Ser. 7, vol. 17, no. 112, pp. 497-511, 1934; Part II, pp. 698-732, 1934 (Part II's
       citation seen).

    Examples
    --------
    Illustrative call: E/R = 2000 K, from 25 degC to 50 degC.

    >>> arrhenius_shift(323.15, 298.15, 2000.0)
    0.595141
    """
    t = positive(temperature_K, "temperature_K")
    tr = positive(reference_temperature_K, "reference_temperature_K")
    ta = in_range(activation_temperature_K, "activation_temperature_K", 0.0, np.inf)
    return scalar_or_array(np.exp(ta * (1.0 / t - 1.0 / tr)), t, tr, ta)


@guarded
def arrhenius_viscosity(temperature_K, reference_viscosity_Pa_s, reference_temperature_K,
                        activation_temperature_K):
    r"""Viscosity at a temperature from a reference value and an Arrhenius activation.

    eta(T) = eta_ref a_T, with a_T from `arrhenius_shift` (Andrade [1]_).

    Parameters
    ----------
    temperature_K : float or array_like
        Working temperature. [K]
    reference_viscosity_Pa_s : float or array_like
        Viscosity at the reference temperature. [Pa*s]
    reference_temperature_K : float or array_like
        Reference temperature. [K]
    activation_temperature_K : float or array_like
        Activation energy over the gas constant, E/R. [K]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Viscosity at `temperature_K`. [Pa*s]

    References
    ----------
    .. [1] E. N. da C. Andrade, "A theory of the viscosity of liquids," Phil. Mag. Ser. 7,
       vol. 17, pp. 497-511 and 698-732, 1934 (Part II's citation seen).

    Examples
    --------
    Illustrative call:

    >>> arrhenius_viscosity(323.15, 0.1, 298.15, 2000.0)
    0.0595141
    """
    eta = positive(reference_viscosity_Pa_s, "reference_viscosity_Pa_s")
    shift = arrhenius_shift(temperature_K, reference_temperature_K, activation_temperature_K)
    return scalar_or_array(eta * shift, eta, temperature_K, reference_temperature_K,
                           activation_temperature_K)


@guarded
def arrhenius_from_two_points(temperature_1_K, viscosity_1_Pa_s, temperature_2_K,
                              viscosity_2_Pa_s):
    r"""Activation temperature E/R of the Arrhenius law through two measured viscosities.

    Parameters
    ----------
    temperature_1_K, temperature_2_K : float or array_like
        The two temperatures; they must differ. [K]
    viscosity_1_Pa_s, viscosity_2_Pa_s : float or array_like
        The viscosities measured at them. [Pa*s]

    Returns
    -------
    activation_temperature_K : float or numpy.ndarray
        E/R; negative when the viscosity rises with temperature (then not an Arrhenius
        liquid). [K]

    Raises
    ------
    InputRangeError
        Equal temperatures, or non-positive values.

    Notes
    -----
    .. math:: \frac{E}{R} = \frac{\ln(\eta_1/\eta_2)}{1/T_1 - 1/T_2}

    References
    ----------
    .. [1] E. N. da C. Andrade, "A theory of the viscosity of liquids," Phil. Mag. Ser. 7,
       vol. 17, pp. 497-511 and 698-732, 1934 (Part II's citation seen).

    Examples
    --------
    Illustrative call (inverts the `arrhenius_viscosity` example):

    >>> round(arrhenius_from_two_points(298.15, 0.1, 323.15, 0.0595141201), 3)
    2000.0
    """
    t1 = positive(temperature_1_K, "temperature_1_K")
    t2 = positive(temperature_2_K, "temperature_2_K")
    e1 = positive(viscosity_1_Pa_s, "viscosity_1_Pa_s")
    e2 = positive(viscosity_2_Pa_s, "viscosity_2_Pa_s")
    gap = 1.0 / t1 - 1.0 / t2
    if np.any(np.abs(gap) < 1e-12 / np.minimum(t1, t2)):
        raise InputRangeError("temperature_2_K", t2, "a temperature different from "
                              "temperature_1_K")
    return scalar_or_array(np.log(e1 / e2) / gap, t1, t2, e1, e2)


# --- Liquid laws -------------------------------------------------------------------------

VISCOSITY = Param("viscosity_Pa_s", "Pa*s", (1e-6, 1e6), "Newtonian viscosity")
ETA0 = Param("zero_shear_viscosity_Pa_s", "Pa*s", (1e-6, 1e8), "zero-shear viscosity eta_0")
ETA_INF = Param("infinite_shear_viscosity_Pa_s", "Pa*s", (0.0, 1e6),
                "infinite-shear viscosity eta_inf (<= eta_0)")
TIME = Param("time_constant_s", "s", (1e-9, 1e6), "time constant lambda (1/lambda = onset rate)")
FLOW_INDEX = Param("flow_index", "-", (0.05, 2.0), "flow index n")
THINNING_INDEX = Param("flow_index", "-", (0.0, 1.0), "power-law index n of the thinning part")
CONSISTENCY = Param("consistency_Pa_s", "Pa*s", (1e-6, 1e6),
                    "consistency K: apparent viscosity at 1 1/s (K in Pa*s**n)")
YIELD = Param("yield_stress_Pa", "Pa", (0.0, 1e5), "yield stress tau_y")


def _rate(shear_rate_1_per_s):
    return in_range(shear_rate_1_per_s, "shear_rate_1_per_s", 0.0, np.inf)


def _power(x, exponent):
    """x**exponent for x >= 0 with 0**negative = inf and 0**0 = 1, silently."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return np.power(x, exponent)


@model("liquid", VISCOSITY, validity="Newtonian liquids: viscosity independent of shear rate",
       source="Newton's law of viscosity")
@guarded
def newtonian(shear_rate_1_per_s, viscosity_Pa_s=1e-3):
    r"""Apparent viscosity of a Newtonian liquid: the same at every shear rate.

    Newton's law of viscosity, tau = eta gammadot, as stated in [1]_ (Eq. 1.1).

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    viscosity_Pa_s : float or array_like, optional
        Viscosity eta. [Pa*s]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity tau / gammadot. [Pa*s]

    Notes
    -----
    .. math:: \eta(\dot\gamma) = \eta

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, ch. 1.

    Examples
    --------
    Illustrative call:

    >>> newtonian(100.0, viscosity_Pa_s=0.05)
    0.05
    """
    rate = _rate(shear_rate_1_per_s)
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    return scalar_or_array(eta * np.ones_like(rate), rate, eta)


@model("liquid", CONSISTENCY, FLOW_INDEX,
       validity="over the measured range only: no plateau at low or high shear rate",
       source="Ostwald-de Waele power law")
@guarded
def power_law(shear_rate_1_per_s, consistency_Pa_s=1.0, flow_index=0.5):
    r"""Apparent viscosity of a power-law (Ostwald-de Waele) liquid.

    The two-parameter power law, Eq. (2.5) of Chhabra & Richardson [1]_ (equation number
    from memory, not checked against the source).

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    consistency_Pa_s : float or array_like, optional
        Consistency K, written as the apparent viscosity at 1 1/s so that its unit is
        Pa s; numerically equal to K in Pa s**n. [Pa*s]
    flow_index : float or array_like, optional
        Flow index n: < 1 shear thinning, 1 Newtonian, > 1 shear thickening. [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity; ``inf`` at zero rate for n < 1 and 0 for n > 1. [Pa*s]

    Notes
    -----
    .. math:: \tau = K\dot\gamma^n, \qquad \eta = K\dot\gamma^{\,n-1}

    An empirical fit: it has no low-shear plateau, so it overstates the viscosity at rest
    of a shear-thinning liquid; use it only over the range of rates it was fitted on.

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 2.3.

    Examples
    --------
    Illustrative call: K = 2 Pa s**0.5 at 100 1/s gives 2 * 100**-0.5 = 0.2 Pa s.

    >>> power_law(100.0, consistency_Pa_s=2.0, flow_index=0.5)
    0.2
    """
    rate = _rate(shear_rate_1_per_s)
    k = positive(consistency_Pa_s, "consistency_Pa_s")
    n = positive(flow_index, "flow_index")
    return scalar_or_array(k * _power(rate, n - 1.0), rate, k, n)


def _check_plateaus(eta0, eta_inf):
    eta0 = positive(eta0, "zero_shear_viscosity_Pa_s")
    eta_inf = in_range(eta_inf, "infinite_shear_viscosity_Pa_s", 0.0, np.inf)
    if np.any(eta_inf > eta0):
        bad = np.broadcast_to(eta_inf, np.broadcast(eta0, eta_inf).shape)[
            np.broadcast_to(eta_inf > eta0, np.broadcast(eta0, eta_inf).shape)].flat[0]
        raise InputRangeError("infinite_shear_viscosity_Pa_s", bad,
                              "a value no larger than zero_shear_viscosity_Pa_s")
    return eta0, eta_inf


@model("liquid", ETA0, ETA_INF, TIME, THINNING_INDEX,
       Param("yasuda_exponent", "-", (0.1, 5.0), "transition sharpness a (2: Carreau)"),
       validity="shear-thinning polymer solutions and melts with two plateaus",
       source="Carreau 1972; Yasuda, Armstrong & Cohen 1981")
@guarded
def carreau_yasuda(shear_rate_1_per_s, zero_shear_viscosity_Pa_s=1.0,
                   infinite_shear_viscosity_Pa_s=1e-3, time_constant_s=1.0, flow_index=0.5,
                   yasuda_exponent=2.0):
    r"""Apparent viscosity of a Carreau-Yasuda liquid (plateau, power-law thinning, plateau).

    The Carreau-Yasuda law [1]_, [2]_; with a = 2 it is Carreau's law [3]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    zero_shear_viscosity_Pa_s : float or array_like, optional
        Low-shear plateau eta_0. [Pa*s]
    infinite_shear_viscosity_Pa_s : float or array_like, optional
        High-shear plateau eta_inf, at most eta_0. [Pa*s]
    time_constant_s : float or array_like, optional
        Time constant lambda; thinning starts near gammadot = 1/lambda. [s]
    flow_index : float or array_like, optional
        Power-law index n of the thinning region, 0 to 1. [-]
    yasuda_exponent : float or array_like, optional
        Sharpness a of the transition; 2 gives Carreau's law. [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity. [Pa*s]

    Notes
    -----
    .. math::
        \eta = \eta_\infty + (\eta_0 - \eta_\infty)
        \left[1 + (\lambda\dot\gamma)^a\right]^{(n-1)/a}

    Tends to eta_0 as gammadot -> 0 and to eta_inf as gammadot -> inf; between them the
    slope of log eta against log gammadot approaches n - 1. The law as written in [2]_
    (Eq. 1; equation number from memory, not checked against the source).

    References
    ----------
    .. [1] K. Yasuda, R. C. Armstrong and R. E. Cohen, "Shear flow properties of concentrated
       solutions of linear and star branched polystyrenes," Rheol. Acta, vol. 20, no. 2,
       pp. 163-178, 1981.
    .. [2] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 2.3.
    .. [3] P. J. Carreau, "Rheological equations from molecular network theories,"
       Trans. Soc. Rheol., vol. 16, no. 1, pp. 99-127, 1972.

    Examples
    --------
    Illustrative call at lambda gammadot = 1 (Carreau, n = 0.5, eta_inf = 0):
    eta = 2**-0.25 eta_0.

    >>> carreau_yasuda(1.0, 1.0, 0.0, 1.0, 0.5, 2.0)
    0.840896
    """
    rate = _rate(shear_rate_1_per_s)
    eta0, eta_inf = _check_plateaus(zero_shear_viscosity_Pa_s, infinite_shear_viscosity_Pa_s)
    lam = positive(time_constant_s, "time_constant_s")
    n = in_range(flow_index, "flow_index", 0.0, 1.0)
    a = positive(yasuda_exponent, "yasuda_exponent")
    with np.errstate(over="ignore"):
        eta = eta_inf + (eta0 - eta_inf) * (1.0 + (lam * rate) ** a) ** ((n - 1.0) / a)
    return scalar_or_array(eta, rate, eta0, eta_inf, lam, n, a)


@model("liquid", ETA0, ETA_INF, TIME,
       Param("cross_exponent", "-", (0.1, 1.0), "exponent m of the Cross law"),
       validity="shear-thinning dispersions and polymer solutions with two plateaus",
       source="Cross, J. Colloid Sci. 1965")
@guarded
def cross(shear_rate_1_per_s, zero_shear_viscosity_Pa_s=1.0, infinite_shear_viscosity_Pa_s=1e-3,
          time_constant_s=1.0, cross_exponent=2.0 / 3.0):
    r"""Apparent viscosity of a Cross liquid (two plateaus joined by a power law).

    Cross's law [1]_ as written in [2]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    zero_shear_viscosity_Pa_s : float or array_like, optional
        Low-shear plateau eta_0. [Pa*s]
    infinite_shear_viscosity_Pa_s : float or array_like, optional
        High-shear plateau eta_inf, at most eta_0. [Pa*s]
    time_constant_s : float or array_like, optional
        Time constant lambda: the viscosity is midway between the plateaus at
        gammadot = 1/lambda. [s]
    cross_exponent : float or array_like, optional
        Exponent m; the thinning slope tends to -m. Cross proposed m = 2/3 (from memory,
        not checked against the source). [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity. [Pa*s]

    Notes
    -----
    .. math:: \eta = \eta_\infty + \frac{\eta_0 - \eta_\infty}{1 + (\lambda\dot\gamma)^m}

    The exponent is limited to m <= 1, where the shear stress rises monotonically with the
    shear rate (so a stress fixes one rate).

    References
    ----------
    .. [1] M. M. Cross, "Rheology of non-Newtonian fluids: a new flow equation for
       pseudoplastic systems," J. Colloid Sci., vol. 20, no. 5, pp. 417-437, 1965.
    .. [2] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 2.3.

    Examples
    --------
    At gammadot = 1/lambda the viscosity is midway between the plateaus:

    >>> cross(10.0, 2.0, 0.0, 0.1, 0.67)
    1.0
    """
    rate = _rate(shear_rate_1_per_s)
    eta0, eta_inf = _check_plateaus(zero_shear_viscosity_Pa_s, infinite_shear_viscosity_Pa_s)
    lam = positive(time_constant_s, "time_constant_s")
    m = positive(cross_exponent, "cross_exponent")
    with np.errstate(over="ignore"):
        eta = eta_inf + (eta0 - eta_inf) / (1.0 + (lam * rate) ** m)
    return scalar_or_array(eta, rate, eta0, eta_inf, lam, m)


@model("liquid", YIELD, Param("plastic_viscosity_Pa_s", "Pa*s", (1e-6, 1e6),
                              "plastic viscosity mu_p"),
       validity="yield-stress liquids with a linear flow curve above the yield stress",
       source="Bingham 1922")
@guarded
def bingham(shear_rate_1_per_s, yield_stress_Pa=10.0, plastic_viscosity_Pa_s=0.1):
    r"""Apparent viscosity of a Bingham plastic: a yield stress, then a constant slope.

    Bingham's law [1]_, as in [2]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    yield_stress_Pa : float or array_like, optional
        Yield stress tau_y. [Pa]
    plastic_viscosity_Pa_s : float or array_like, optional
        Plastic viscosity mu_p, the slope of the flow curve above the yield stress. [Pa*s]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity tau / gammadot; ``inf`` at zero rate. [Pa*s]

    Notes
    -----
    .. math:: \tau = \tau_y + \mu_p\dot\gamma, \qquad \eta = \tau_y/\dot\gamma + \mu_p

    As gammadot -> 0 the apparent viscosity tends to infinity; no regularisation is
    applied (see the module notes).

    References
    ----------
    .. [1] E. C. Bingham, Fluidity and Plasticity. New York: McGraw-Hill, 1922.
    .. [2] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 1.3.2.

    Examples
    --------
    Illustrative call: 10 Pa + 0.1 Pa s * 50 1/s = 15 Pa, over 50 1/s:

    >>> bingham(50.0, yield_stress_Pa=10.0, plastic_viscosity_Pa_s=0.1)
    0.3
    """
    rate = _rate(shear_rate_1_per_s)
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    mu = positive(plastic_viscosity_Pa_s, "plastic_viscosity_Pa_s")
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(rate > 0, ty / np.where(rate > 0, rate, 1.0), np.where(ty > 0, np.inf, 0))
    return scalar_or_array(eta + mu, rate, ty, mu)


@model("liquid", YIELD, CONSISTENCY, FLOW_INDEX,
       validity="yield-stress liquids: gels, pastes, muds, concentrated emulsions",
       source="Herschel & Bulkley 1926")
@guarded
def herschel_bulkley(shear_rate_1_per_s, yield_stress_Pa=10.0, consistency_Pa_s=1.0,
                     flow_index=0.5):
    r"""Apparent viscosity of a Herschel-Bulkley liquid: yield stress plus a power law.

    The Herschel-Bulkley law [1]_, as in [2]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    yield_stress_Pa : float or array_like, optional
        Yield stress tau_y. [Pa]
    consistency_Pa_s : float or array_like, optional
        Consistency K, written as the stress above yield at 1 1/s over 1 1/s (Pa s;
        numerically K in Pa s**n). [Pa*s]
    flow_index : float or array_like, optional
        Flow index n. [-]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity tau / gammadot; ``inf`` at zero rate. [Pa*s]

    Notes
    -----
    .. math:: \tau = \tau_y + K\dot\gamma^n, \qquad \eta = \tau_y/\dot\gamma + K\dot\gamma^{n-1}

    With tau_y = 0 it is the power law; with n = 1 it is Bingham's law.

    References
    ----------
    .. [1] W. H. Herschel and R. Bulkley, "Konsistenzmessungen von Gummi-Benzollösungen,"
       Kolloid-Z., vol. 39, no. 4, pp. 291-300, 1926.
    .. [2] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 1.3.2.

    Examples
    --------
    Illustrative call: (10 + 1 * 4**0.5) / 4 = 3.0 Pa s.

    >>> herschel_bulkley(4.0, yield_stress_Pa=10.0, consistency_Pa_s=1.0, flow_index=0.5)
    3.0
    """
    rate = _rate(shear_rate_1_per_s)
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    k = positive(consistency_Pa_s, "consistency_Pa_s")
    n = positive(flow_index, "flow_index")
    with np.errstate(divide="ignore", invalid="ignore"):
        plastic = np.where(rate > 0, ty / np.where(rate > 0, rate, 1.0),
                           np.where(ty > 0, np.inf, 0.0))
    return scalar_or_array(plastic + k * _power(rate, n - 1.0), rate, ty, k, n)


@model("liquid", YIELD, Param("casson_viscosity_Pa_s", "Pa*s", (1e-6, 1e6),
                              "Casson viscosity mu_c"),
       validity="yield-stress dispersions: inks, chocolate, blood, pigment pastes",
       source="Casson 1959")
@guarded
def casson(shear_rate_1_per_s, yield_stress_Pa=10.0, casson_viscosity_Pa_s=0.1):
    r"""Apparent viscosity of a Casson liquid.

    Casson's law [1]_, as in [2]_.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    yield_stress_Pa : float or array_like, optional
        Casson yield stress tau_y. [Pa]
    casson_viscosity_Pa_s : float or array_like, optional
        Casson viscosity mu_c, the high-shear limit of the apparent viscosity. [Pa*s]

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity tau / gammadot; ``inf`` at zero rate. [Pa*s]

    Notes
    -----
    .. math::
        \sqrt{\tau} = \sqrt{\tau_y} + \sqrt{\mu_c\dot\gamma}, \qquad
        \eta = \left(\sqrt{\tau_y/\dot\gamma} + \sqrt{\mu_c}\right)^2

    References
    ----------
    .. [1] N. Casson, "A flow equation for pigment-oil suspensions of the printing ink type,"
       in Rheology of Disperse Systems, C. C. Mill, Ed. London: Pergamon, 1959, pp. 84-104.
    .. [2] R. P. Chhabra and J. F. Richardson, Non-Newtonian Flow and Applied Rheology,
       2nd ed. Oxford, U.K.: Butterworth-Heinemann, 2008, Sec. 1.3.2.

    Examples
    --------
    Illustrative call: (sqrt(10/10) + sqrt(0.04))**2 = 1.44 Pa s.

    >>> casson(10.0, yield_stress_Pa=10.0, casson_viscosity_Pa_s=0.04)
    1.44
    """
    rate = _rate(shear_rate_1_per_s)
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    mu = positive(casson_viscosity_Pa_s, "casson_viscosity_Pa_s")
    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.where(rate > 0, np.sqrt(ty / np.where(rate > 0, rate, 1.0)),
                        np.where(ty > 0, np.inf, 0.0))
    return scalar_or_array((root + np.sqrt(mu)) ** 2, rate, ty, mu)


# --- Dispatchers: viscosity, stress and the inverse (stress -> shear rate) ------------------


@guarded
def liquid_viscosity(shear_rate_1_per_s, law: str = "newtonian", **params):
    """Apparent viscosity of a liquid law from the registry, parameters checked.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    law : str
        Registry name of a relation of kind "liquid" (see ``predictor.models("liquid")``).
    **params
        The law's parameters (SI); missing ones take their defaults; values outside the
        registry bounds raise `InputRangeError`.

    Returns
    -------
    viscosity_Pa_s : float or numpy.ndarray
        Apparent viscosity tau / gammadot. [Pa*s]

    Examples
    --------
    >>> liquid_viscosity(4.0, "herschel-bulkley", yield_stress_Pa=10.0, flow_index=0.5)
    3.0
    """
    spec = get_model(law, kind="liquid")
    return spec.func(shear_rate_1_per_s, **spec.check_params(params))


@guarded
def liquid_stress(shear_rate_1_per_s, law: str = "newtonian", **params):
    """Shear stress of a liquid law at a shear rate (the yield stress at zero rate).

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Shear rate, >= 0. [1/s]
    law : str
        Registry name of a relation of kind "liquid".
    **params
        The law's parameters (SI).

    Returns
    -------
    shear_stress_Pa : float or numpy.ndarray
        tau = eta(gammadot) gammadot; at gammadot = 0 it is the yield stress (0 for laws
        without one). [Pa]

    Examples
    --------
    >>> liquid_stress(50.0, "bingham", yield_stress_Pa=10.0, plastic_viscosity_Pa_s=0.1)
    15.0
    """
    spec = get_model(law, kind="liquid")
    values = spec.check_params(params)
    rate = _rate(shear_rate_1_per_s)
    eta = spec.func(rate, **values)
    floor = np.asarray(values.get("yield_stress_Pa", 0.0), dtype=float)
    with np.errstate(invalid="ignore"):
        tau = np.where(rate > 0, eta * rate, floor)
    return scalar_or_array(tau, shear_rate_1_per_s, *values.values())


def _rate_newtonian(tau, viscosity_Pa_s):
    return tau / viscosity_Pa_s


def _rate_power_law(tau, consistency_Pa_s, flow_index):
    return (tau / consistency_Pa_s) ** (1.0 / flow_index)


def _rate_bingham(tau, yield_stress_Pa, plastic_viscosity_Pa_s):
    return np.clip(tau - yield_stress_Pa, 0.0, None) / plastic_viscosity_Pa_s


def _rate_herschel_bulkley(tau, yield_stress_Pa, consistency_Pa_s, flow_index):
    return (np.clip(tau - yield_stress_Pa, 0.0, None) / consistency_Pa_s) ** (1.0 / flow_index)


def _rate_casson(tau, yield_stress_Pa, casson_viscosity_Pa_s):
    excess = np.clip(np.sqrt(tau) - np.sqrt(yield_stress_Pa), 0.0, None)
    return excess**2 / casson_viscosity_Pa_s


#: Closed-form inverses tau -> gammadot; laws absent here are inverted numerically.
_INVERSES = {
    "newtonian": _rate_newtonian,
    "power-law": _rate_power_law,
    "bingham": _rate_bingham,
    "herschel-bulkley": _rate_herschel_bulkley,
    "casson": _rate_casson,
}


def _carreau_yasuda_kernel(rate, zero_shear_viscosity_Pa_s, infinite_shear_viscosity_Pa_s,
                           time_constant_s, flow_index, yasuda_exponent):
    """`carreau_yasuda` without the input checks, for the inner loop of the inversion."""
    with np.errstate(over="ignore"):
        return infinite_shear_viscosity_Pa_s + (
            zero_shear_viscosity_Pa_s - infinite_shear_viscosity_Pa_s) * (
            1.0 + (time_constant_s * rate) ** yasuda_exponent) ** (
            (flow_index - 1.0) / yasuda_exponent)


def _cross_kernel(rate, zero_shear_viscosity_Pa_s, infinite_shear_viscosity_Pa_s,
                  time_constant_s, cross_exponent):
    """`cross` without the input checks, for the inner loop of the inversion."""
    with np.errstate(over="ignore"):
        return infinite_shear_viscosity_Pa_s + (
            zero_shear_viscosity_Pa_s - infinite_shear_viscosity_Pa_s) / (
            1.0 + (time_constant_s * rate) ** cross_exponent)


#: Unchecked viscosity kernels of the laws inverted numerically (inputs checked once, before).
_KERNELS = {"carreau-yasuda": _carreau_yasuda_kernel, "cross": _cross_kernel}


def _invert_numerically(func, tau, values):
    """Shear rate where func's stress equals tau; bisection on log(rate), vectorised.

    Used for laws with two viscosity plateaus (Cross, Carreau-Yasuda), whose stress rises
    monotonically with rate (m <= 1, n >= 0) and lies between eta_inf*rate and eta_0*rate.
    """
    func = _KERNELS.get(func.__name__.replace("_", "-"), func)
    eta0 = values["zero_shear_viscosity_Pa_s"]
    # In logs, with no floor: a floor (once 1e-300) answered for another stress when
    # tau / eta_0 underflowed; ln(tau) - ln(eta_0) holds any positive tau.
    with np.errstate(divide="ignore"):
        lo = np.where(tau > 0, np.log(np.where(tau > 0, tau, 1.0)) - np.log(eta0), 0.0)
    hi = lo.copy()
    for _ in range(700):                # expand until the stress at hi reaches tau
        need = np.exp(hi) * func(np.exp(hi), **values) < tau
        if not need.any():
            break
        hi = np.where(need, hi + 2.3, hi)
    for _ in range(64):
        mid = 0.5 * (lo + hi)
        low_side = np.exp(mid) * func(np.exp(mid), **values) < tau
        lo = np.where(low_side, mid, lo)
        hi = np.where(low_side, hi, mid)
    return np.where(tau > 0, np.exp(0.5 * (lo + hi)), 0.0)


@guarded
def liquid_shear_rate(shear_stress_Pa, law: str = "newtonian", **params):
    """Shear rate at which a liquid law carries a given shear stress (the inverse law).

    Parameters
    ----------
    shear_stress_Pa : float or array_like
        Shear stress, >= 0. [Pa]
    law : str
        Registry name of a relation of kind "liquid".
    **params
        The law's parameters (SI).

    Returns
    -------
    shear_rate_1_per_s : float or numpy.ndarray
        The rate; 0 at or below the yield stress. [1/s]

    Notes
    -----
    Closed form for the Newtonian, power-law, Bingham, Herschel-Bulkley and Casson laws;
    bisection on log(rate) to machine precision for Cross and Carreau-Yasuda.

    Examples
    --------
    >>> liquid_shear_rate(15.0, "bingham", yield_stress_Pa=10.0, plastic_viscosity_Pa_s=0.1)
    50.0
    """
    spec = get_model(law, kind="liquid")
    values = spec.check_params(params)
    tau = in_range(shear_stress_Pa, "shear_stress_Pa", 0.0, np.inf)
    arrays = {k: np.asarray(v, dtype=float) for k, v in values.items()}
    inverse = _INVERSES.get(spec.name)
    if inverse is not None:
        rate = inverse(tau, **arrays)
    else:
        rate = _invert_numerically(spec.func, np.broadcast_to(tau, np.broadcast(
            tau, *arrays.values()).shape).astype(float), arrays)
    return scalar_or_array(rate, shear_stress_Pa, *values.values())


@dataclass(frozen=True)
class LiquidLaw:
    """A liquid law with its parameters checked once: stress, inverse and viscosity.

    Made by `liquid_law`; used by the flow-curve builder to evaluate the law many times
    without re-checking parameters. Every method is vectorised and takes SI arrays.
    """

    name: str
    params: dict

    def viscosity(self, shear_rate_1_per_s):
        """Apparent viscosity at a shear rate (>= 0). [Pa*s]"""
        return get_model(self.name).func(shear_rate_1_per_s, **self.params)

    def stress(self, shear_rate_1_per_s):
        """Shear stress at a shear rate; the yield stress at zero rate. [Pa]"""
        rate = np.asarray(shear_rate_1_per_s, dtype=float)
        eta = np.asarray(self.viscosity(rate), dtype=float)
        with np.errstate(invalid="ignore"):
            return np.where(rate > 0, eta * rate, self.yield_stress_Pa)

    def shear_rate(self, shear_stress_Pa):
        """Shear rate carrying a stress (>= 0); 0 at or below the yield stress. [1/s]"""
        tau = np.asarray(shear_stress_Pa, dtype=float)
        arrays = {k: np.asarray(v, dtype=float) for k, v in self.params.items()}
        inverse = _INVERSES.get(self.name)
        if inverse is not None:
            with np.errstate(over="ignore"):
                return inverse(tau, **arrays)
        shape = np.broadcast(tau, *arrays.values()).shape
        return _invert_numerically(get_model(self.name).func,
                                   np.broadcast_to(tau, shape).astype(float), arrays)

    @property
    def yield_stress_Pa(self):
        """The law's yield stress: a float, or an array when the parameters are arrays."""
        value = np.asarray(self.params.get("yield_stress_Pa", 0.0), dtype=float)
        return float(value) if value.ndim == 0 else value


@guarded
def liquid_law(law: str = "newtonian", **params) -> LiquidLaw:
    """The registered liquid law `law` with its parameters checked against the registry.

    Parameters
    ----------
    law : str
        Registry name of a relation of kind "liquid".
    **params
        The law's parameters (SI); missing ones take their defaults.

    Returns
    -------
    LiquidLaw

    Examples
    --------
    >>> law = liquid_law("bingham", yield_stress_Pa=10.0, plastic_viscosity_Pa_s=0.1)
    >>> float(law.stress(50.0)), float(law.shear_rate(15.0))
    (15.0, 50.0)
    """
    spec = get_model(law, kind="liquid")
    return LiquidLaw(spec.name, spec.check_params(params))


# --- Rigid particles in a non-Newtonian liquid -------------------------------------------


@guarded
def local_shear_rate_factor(phi, relative_viscosity):
    r"""Ratio of the root-mean-square local shear rate in the liquid to the macroscopic rate.

    The energy estimate of Chateau, Ovarlez & Trung [1]_: rigid particles at volume
    fraction phi, whose Newtonian relative viscosity is g(phi), make the liquid between
    them shear faster on average.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the rigid particles, below 1. [-]
    relative_viscosity : float or array_like
        Newtonian relative viscosity g(phi) of the same suspension (>= 1). [-]

    Returns
    -------
    factor : float or numpy.ndarray
        sqrt(<gammadot_local**2>) / gammadot. [-]

    Notes
    -----
    .. math:: \langle\dot\gamma_\mathrm{local}^2\rangle = \dot\gamma^2\,\frac{g(\phi)}{1-\phi}

    Dissipation in the liquid, (1 - phi) eta_l <gammadot_local**2>, equals the
    macroscopic eta_l g gammadot**2. Approach seen in the abstract of [1]_ (arXiv:1006.2293);
    the formula is from memory, consistent with the two estimates below.

    References
    ----------
    .. [1] X. Chateau, G. Ovarlez and K. L. Trung, "Homogenization approach to the behavior
       of suspensions of noncolloidal particles in yield stress fluids," J. Rheol., vol. 52,
       no. 2, pp. 489-506, 2008, doi:10.1122/1.2838254.

    Examples
    --------
    Illustrative call:

    >>> local_shear_rate_factor(0.3, 2.7512)
    1.98249
    """
    phi = in_range(phi, "phi", 0.0, 1.0, high_open=True)
    g = in_range(relative_viscosity, "relative_viscosity", 1.0, np.inf)
    return scalar_or_array(np.sqrt(g / (1.0 - phi)), phi, g)


@guarded
def chateau_yield_stress_factor(phi, relative_viscosity):
    r"""Yield stress of a suspension of rigid particles in a yield-stress liquid, relative.

    The homogenisation estimate of Chateau, Ovarlez & Trung [1]_.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the rigid particles, below 1. [-]
    relative_viscosity : float or array_like
        Newtonian relative viscosity g(phi) of the same particles (>= 1). [-]

    Returns
    -------
    factor : float or numpy.ndarray
        tau_y(phi) / tau_y(0). [-]

    Notes
    -----
    .. math:: \frac{\tau_y(\phi)}{\tau_y(0)} = \sqrt{(1-\phi)\,g(\phi)}

    Noncolloidal particles, isotropic suspension, no interaction between particles and
    liquid other than mechanical. Formula from memory (approach seen in [1]_); it follows
    from `local_shear_rate_factor` and the dissipation balance.

    References
    ----------
    .. [1] X. Chateau, G. Ovarlez and K. L. Trung, J. Rheol., vol. 52, no. 2, pp. 489-506,
       2008, doi:10.1122/1.2838254.

    Examples
    --------
    Illustrative call:

    >>> chateau_yield_stress_factor(0.3, 2.7512)
    1.38775
    """
    phi = in_range(phi, "phi", 0.0, 1.0, high_open=True)
    g = in_range(relative_viscosity, "relative_viscosity", 1.0, np.inf)
    return scalar_or_array(np.sqrt((1.0 - phi) * g), phi, g)


@guarded
def chateau_consistency_factor(phi, relative_viscosity, flow_index):
    r"""Consistency of a suspension of rigid particles in a power-law liquid, relative.

    The homogenisation estimate of Chateau, Ovarlez & Trung [1]_ for a Herschel-Bulkley or
    power-law liquid of flow index n: the suspension keeps the index n.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the rigid particles, below 1. [-]
    relative_viscosity : float or array_like
        Newtonian relative viscosity g(phi) of the same particles (>= 1). [-]
    flow_index : float or array_like
        Flow index n of the liquid. [-]

    Returns
    -------
    factor : float or numpy.ndarray
        K(phi) / K(0). [-]

    Notes
    -----
    .. math:: \frac{K(\phi)}{K(0)} = (1-\phi)^{(1-n)/2}\,g(\phi)^{(1+n)/2}

    n = 1 gives g(phi), the Newtonian result. Formula from memory (approach seen in [1]_).

    References
    ----------
    .. [1] X. Chateau, G. Ovarlez and K. L. Trung, J. Rheol., vol. 52, no. 2, pp. 489-506,
       2008, doi:10.1122/1.2838254.

    Examples
    --------
    Illustrative call:

    >>> chateau_consistency_factor(0.3, 2.7512, 0.5)
    1.95396
    """
    phi = in_range(phi, "phi", 0.0, 1.0, high_open=True)
    g = in_range(relative_viscosity, "relative_viscosity", 1.0, np.inf)
    n = positive(flow_index, "flow_index")
    return scalar_or_array((1.0 - phi) ** ((1.0 - n) / 2.0) * g ** ((1.0 + n) / 2.0), phi, g, n)


@guarded
def suspension_in_liquid_stress(shear_rate_1_per_s, phi, relative_viscosity,
                                law: str = "newtonian", **params):
    r"""Shear stress of rigid particles in a (non-Newtonian) liquid at a shear rate.

    The general form of the estimate of Chateau, Ovarlez & Trung [1]_: the liquid works at
    the local rate gammadot sqrt(g/(1 - phi)), and the dissipation balance gives the stress.

    Parameters
    ----------
    shear_rate_1_per_s : float or array_like
        Macroscopic shear rate, >= 0. [1/s]
    phi : float or array_like
        Volume fraction of the rigid particles, below 1. [-]
    relative_viscosity : float or array_like
        Newtonian relative viscosity g(phi) (>= 1). [-]
    law : str
        Registry name of the liquid law.
    **params
        The liquid law's parameters (SI).

    Returns
    -------
    shear_stress_Pa : float or numpy.ndarray
        Macroscopic shear stress. [Pa]

    Notes
    -----
    .. math::
        \Sigma(\dot\gamma) = \sqrt{(1-\phi)\,g}\;
        \tau_\ell\!\left(\dot\gamma\sqrt{g/(1-\phi)}\right)

    For a Herschel-Bulkley liquid this is tau_y sqrt((1 - phi) g) + K (1 - phi)^((1-n)/2)
    g^((1+n)/2) gammadot**n, i.e. `chateau_yield_stress_factor` and
    `chateau_consistency_factor`; for a Newtonian liquid it is g eta gammadot.

    References
    ----------
    .. [1] X. Chateau, G. Ovarlez and K. L. Trung, J. Rheol., vol. 52, no. 2, pp. 489-506,
       2008, doi:10.1122/1.2838254.

    Examples
    --------
    Illustrative call (Newtonian liquid: g eta gammadot):

    >>> suspension_in_liquid_stress(10.0, 0.3, 2.0, "newtonian", viscosity_Pa_s=0.1)
    2.0
    """
    rate = _rate(shear_rate_1_per_s)
    factor = local_shear_rate_factor(phi, relative_viscosity)
    scale = chateau_yield_stress_factor(phi, relative_viscosity)
    tau = liquid_stress(rate * np.asarray(factor), law, **params)
    return scalar_or_array(np.asarray(scale) * tau, rate, phi, relative_viscosity)
