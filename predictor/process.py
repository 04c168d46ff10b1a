r"""Process checks: pipe and hose flow, restart pressure, stirred tanks, coating sag and levelling.

Pure numpy functions of SI floats and arrays. Each published relation is one registered
function (kind "process"); the process questions (`pipe_pressure_drop`, `stirred_tank`,
`coating`) combine them over any flow curve:

- a registry liquid law (``law=..., **params``), or
- a whole formulation (`pipe_flow_of`, `stirred_tank_of`, `coating_of`): its flow curve from
  `predictor.predict` on a fixed grid of shear rates, inverted by interpolation.

Laminar pipe flow of any flow curve is the Rabinowitsch-Mooney relation integrated by
Gauss-Legendre quadrature; the closed forms (`hagen_poiseuille`, `buckingham_reiner`,
`herschel_bulkley_pipe`) are its checks. Pressure drops, pump choices and restart pressures
are screening numbers: pump and pressure-equipment selection defers to licensed engineering
practice and local codes (`CAUTION`).
"""

from __future__ import annotations

import functools
import warnings
from dataclasses import dataclass

import numpy as np

from ._checks import as_array, guarded, in_range, positive, scalar_or_array
from .errors import InputRangeError, ValidityWarning
from .registry import Param, model

GRAVITY_M_PER_S2 = 9.80665   # standard gravity (CGPM 1901)

#: Shown beside every process number by the app, the CLI and the report.
CAUTION = (
    "Process numbers are screening estimates from a predicted flow curve. Pump, hose, vessel "
    "and pressure-equipment selection defers to licensed engineering practice, the "
    "equipment makers' data and local codes; confirm the flow curve by measurement, allow "
    "margins, and never exceed a component's rated pressure."
)

#: Newtonian laminar-turbulent band 2100-4000 (common practice, no source); the upper end
#: of the transitional band is the critical Reynolds number times this ratio.
TRANSITION_BAND = 4000.0 / 2100.0

#: Upper ends of the data behind each turbulent correlation (see their Notes); beyond them
#: a ValidityWarning is given.
COLEBROOK_MAX_RE = 1e8
DODGE_METZNER_MAX_RE = 1e5
DARBY_MAX_RE = 1e6

#: Typical impellers: Metzner-Otto constant k_s, laminar power constant K_p = Po Re and
#: turbulent power number (values from memory, not checked against the sources; they vary
#: with the geometry: blade width, clearance, baffles).
IMPELLERS: dict[str, tuple[float, float, float]] = {
    "disc turbine": (11.5, 70.0, 5.0),
    "pitched-blade turbine": (13.0, 50.0, 1.3),
    "propeller": (10.0, 41.0, 0.35),
    "anchor": (25.0, 300.0, 0.35),
    "helical ribbon": (30.0, 350.0, 0.35),
}



# --- Laminar pipe flow: closed forms ---------------------------------------------------------


@model("process", validity="laminar flow of a Newtonian liquid in a straight round pipe",
       source="Hagen 1839; Poiseuille 1840")
@guarded
def hagen_poiseuille(flow_rate_m3_per_s, diameter_m, length_m, viscosity_Pa_s):
    r"""Pressure drop of laminar Newtonian flow in a round pipe (Hagen-Poiseuille).

    The exact solution of steady laminar flow of a Newtonian liquid in a straight pipe,
    restated in every fluid-mechanics text, e.g. Eq. (3.9) of [1]_ (equation number from
    memory, not checked against the source).

    Parameters
    ----------
    flow_rate_m3_per_s : float or array_like
        Volumetric flow rate, > 0. [m**3/s]
    diameter_m : float or array_like
        Inner diameter of the pipe, > 0. [m]
    length_m : float or array_like
        Length of the pipe, > 0. [m]
    viscosity_Pa_s : float or array_like
        Viscosity, > 0. [Pa*s]

    Returns
    -------
    pressure_drop_Pa : float or numpy.ndarray
        Frictional pressure drop. [Pa]

    Notes
    -----
    .. math:: \Delta p = \frac{128 \mu L Q}{\pi D^4}

    Valid below the critical Reynolds number (about 2100).

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    Water-like liquid, 1 L/min through 10 m of 10 mm pipe (illustrative call):

    >>> round(hagen_poiseuille(1e-3 / 60, 0.01, 10.0, 1e-3), 3)
    679.061
    """
    q = positive(flow_rate_m3_per_s, "flow_rate_m3_per_s")
    d = positive(diameter_m, "diameter_m")
    length = positive(length_m, "length_m")
    mu = positive(viscosity_Pa_s, "viscosity_Pa_s")
    return scalar_or_array(128.0 * mu * length * q / (np.pi * d**4),
                           flow_rate_m3_per_s, diameter_m, length_m, viscosity_Pa_s)


@model("process", validity="laminar flow of a Bingham plastic in a round pipe",
       source="Buckingham 1921; Reiner 1926")
@guarded
def buckingham_reiner(wall_shear_stress_Pa, yield_stress_Pa, plastic_viscosity_Pa_s):
    r"""Nominal wall shear rate 8V/D of laminar Bingham-plastic pipe flow (Buckingham-Reiner).

    The Buckingham-Reiner equation, Eq. (3.13) of [1]_ (equation number from memory, not
    checked against the source); the form is restated in Darby's text [2]_.

    Parameters
    ----------
    wall_shear_stress_Pa : float or array_like
        Wall shear stress tau_w = D dp/(4 L), > 0. [Pa]
    yield_stress_Pa : float or array_like
        Bingham yield stress, >= 0. [Pa]
    plastic_viscosity_Pa_s : float or array_like
        Plastic viscosity, > 0. [Pa*s]

    Returns
    -------
    nominal_shear_rate_1_per_s : float or numpy.ndarray
        8V/D, V the mean velocity; 0 where tau_w <= tau_y (no flow). [1/s]

    Notes
    -----
    .. math:: \frac{8V}{D} = \frac{\tau_w}{\mu_p}\left(1 - \frac{4}{3}x + \frac{1}{3}x^4
              \right), \quad x = \tau_y / \tau_w

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.
    .. [2] R. Darby, *Chemical Engineering Fluid Mechanics*, 2nd ed. New York: Marcel
       Dekker, 2001.

    Examples
    --------
    Hand calculation: tau_w = 20 Pa, tau_y = 10 Pa, mu_p = 0.1 Pa s (x = 0.5):

    >>> round(buckingham_reiner(20.0, 10.0, 0.1), 4)
    70.8333
    """
    tw = positive(wall_shear_stress_Pa, "wall_shear_stress_Pa")
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    mu = positive(plastic_viscosity_Pa_s, "plastic_viscosity_Pa_s")
    x = np.minimum(ty / tw, 1.0)
    rate = tw / mu * (1.0 - 4.0 * x / 3.0 + x**4 / 3.0)
    return scalar_or_array(np.maximum(rate, 0.0), wall_shear_stress_Pa, yield_stress_Pa,
                           plastic_viscosity_Pa_s)


@model("process", validity="laminar flow of a Herschel-Bulkley (or power-law, tau_y = 0) "
       "liquid in a round pipe", source="Chhabra & Richardson 2008, Eq. (3.17)")
@guarded
def herschel_bulkley_pipe(wall_shear_stress_Pa, yield_stress_Pa, consistency_Pa_s, flow_index):
    r"""Nominal wall shear rate 8V/D of laminar Herschel-Bulkley pipe flow (closed form).

    The Rabinowitsch-Mooney integral done in closed form for tau = tau_y + K gammadot^n, as in
    [1]_ (Eq. (3.17) there, from memory, not checked against the source); with tau_y = 0 it is
    the power-law result 8V/D = (4n/(3n+1)) (tau_w/K)^(1/n).

    Parameters
    ----------
    wall_shear_stress_Pa : float or array_like
        Wall shear stress, > 0. [Pa]
    yield_stress_Pa : float or array_like
        Yield stress, >= 0. [Pa]
    consistency_Pa_s : float or array_like
        Consistency K, > 0. [Pa*s]
    flow_index : float or array_like
        Flow index n, > 0. [-]

    Returns
    -------
    nominal_shear_rate_1_per_s : float or numpy.ndarray
        8V/D; 0 where tau_w <= tau_y. [1/s]

    Notes
    -----
    With s = tau_w - tau_y,

    .. math:: \frac{8V}{D} = \frac{4 n s^{1 + 1/n}}{K^{1/n}\tau_w^3}\left[
              \frac{s^2}{3n+1} + \frac{2\tau_y s}{2n+1} + \frac{\tau_y^2}{n+1}\right]

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    Power law, n = 0.5, K = 1 Pa s^n, tau_w = 10 Pa: 8V/D = (4 0.5/2.5) 100 (hand calculation):

    >>> round(herschel_bulkley_pipe(10.0, 0.0, 1.0, 0.5), 6)
    80.0
    """
    tw = positive(wall_shear_stress_Pa, "wall_shear_stress_Pa")
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    k = positive(consistency_Pa_s, "consistency_Pa_s")
    n = positive(flow_index, "flow_index")
    s = np.maximum(tw - ty, 0.0)
    bracket = s**2 / (3 * n + 1) + 2 * ty * s / (2 * n + 1) + ty**2 / (n + 1)
    rate = 4 * n * s ** (1 + 1 / n) / (k ** (1 / n) * tw**3) * bracket
    return scalar_or_array(rate, wall_shear_stress_Pa, yield_stress_Pa, consistency_Pa_s,
                           flow_index)


# --- Reynolds numbers and the laminar-turbulent transition -----------------------------------


@model("process", validity="any time-independent liquid, with n' and K' at the wall stress",
       source="Metzner & Reed, AIChE J. 1955")
@guarded
def metzner_reed_reynolds(density_kg_per_m3, mean_velocity_m_per_s, diameter_m,
                          consistency_prime_Pa_s, flow_index_prime):
    r"""Generalised (Metzner-Reed) Reynolds number of pipe flow.

    Defined by Metzner and Reed [1]_ so that the laminar Fanning friction factor is 16/Re for
    every time-independent liquid; n' and K' describe the laminar pipe-flow curve at the wall
    stress, tau_w = K' (8V/D)^n' (restated in Chapter 3 of [2]_).

    Parameters
    ----------
    density_kg_per_m3 : float or array_like
        Density, > 0. [kg/m**3]
    mean_velocity_m_per_s : float or array_like
        Mean velocity Q/(pi D^2/4), > 0. [m/s]
    diameter_m : float or array_like
        Inner diameter, > 0. [m]
    consistency_prime_Pa_s : float or array_like
        K' = tau_w / (8V/D)^n', > 0. [Pa*s]
    flow_index_prime : float or array_like
        n' = d ln tau_w / d ln(8V/D), > 0. [-]

    Returns
    -------
    reynolds : float or numpy.ndarray
        Re_MR. [-]

    Notes
    -----
    .. math:: Re_{MR} = \frac{\rho V^{2-n'} D^{n'}}{K' 8^{n'-1}} = \frac{8 \rho V^2}{\tau_w}

    References
    ----------
    .. [1] A. B. Metzner and J. C. Reed, "Flow of non-Newtonian fluids - correlation of the
       laminar, transition, and turbulent-flow regions," AIChE J., vol. 1, no. 4,
       pp. 434-440, 1955, doi: 10.1002/aic.690010409.
    .. [2] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    Newtonian limit (n' = 1, K' = mu): rho V D / mu (hand calculation):

    >>> round(metzner_reed_reynolds(1000.0, 2.0, 0.05, 1e-3, 1.0), 6)
    100000.0
    """
    rho = positive(density_kg_per_m3, "density_kg_per_m3")
    v = positive(mean_velocity_m_per_s, "mean_velocity_m_per_s")
    d = positive(diameter_m, "diameter_m")
    k = positive(consistency_prime_Pa_s, "consistency_prime_Pa_s")
    n = positive(flow_index_prime, "flow_index_prime")
    re = rho * v ** (2 - n) * d**n / (k * 8.0 ** (n - 1))
    return scalar_or_array(re, density_kg_per_m3, mean_velocity_m_per_s, diameter_m,
                           consistency_prime_Pa_s, flow_index_prime)


@model("process", validity="power-law liquids, 0 < n <= 1 (about 2100 at n = 1)",
       source="Ryan & Johnson, AIChE J. 1959")
@guarded
def ryan_johnson_critical_reynolds(flow_index):
    r"""Critical Metzner-Reed Reynolds number of laminar flow of a power-law liquid.

    The stability criterion of Ryan and Johnson [1]_ as restated in Chapter 3 of [2]_: about
    2100 at n = 1, rising to a maximum of about 2400 near n = 0.4 and falling to about 1600 at
    n = 0.1.

    Parameters
    ----------
    flow_index : float or array_like
        Power-law flow index n (n' for other liquids), > 0. [-]

    Returns
    -------
    critical_reynolds : float or numpy.ndarray
        Re_MR above which stable laminar flow ceases. [-]

    Notes
    -----
    .. math:: Re_{MR,c} = \frac{6464 n (2 + n)^{(2 + n)/(1 + n)}}{(1 + 3n)^2}

    The constant 6464 is checked against secondary restatements (open code citing [1]_),
    not against the paper; it gives 2099 at n = 1.

    References
    ----------
    .. [1] N. W. Ryan and M. M. Johnson, "Transition from laminar to turbulent flow in pipes,"
       AIChE J., vol. 5, no. 4, pp. 433-435, 1959, doi: 10.1002/aic.690050407.
    .. [2] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    >>> round(ryan_johnson_critical_reynolds(1.0))
    2099
    """
    n = positive(flow_index, "flow_index")
    re = 6464.0 * n * (2 + n) ** ((2 + n) / (1 + n)) / (1 + 3 * n) ** 2
    return scalar_or_array(re, flow_index)


def _hanks_x(hedstrom):
    """x_c = tau_y/tau_w at transition: x/(1 - x)^3 = He/16800, by bisection (vectorised)."""
    target = hedstrom / 16800.0
    lo, hi = np.zeros_like(target), np.ones_like(target)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        below = mid / (1 - mid) ** 3 < target
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    return 0.5 * (lo + hi)


@model("process", validity="Bingham plastics in round pipes, any Hedstrom number",
       source="Hanks, AIChE J. 1963")
@guarded
def hanks_critical_reynolds(hedstrom_number):
    r"""Critical Bingham Reynolds number rho V D / mu_p of laminar Bingham-plastic pipe flow.

    Hanks' criterion [1]_ as restated in Chapter 3 of [2]_ (from memory, not checked against
    either source): the critical yield ratio x_c = tau_y/tau_w follows from the Hedstrom
    number He = rho tau_y D^2 / mu_p^2, and the critical Reynolds number from x_c.

    Parameters
    ----------
    hedstrom_number : float or array_like
        He, >= 0. [-]

    Returns
    -------
    critical_reynolds : float or numpy.ndarray
        Re_B,c; 2100 at He = 0. [-]

    Notes
    -----
    .. math:: \frac{x_c}{(1 - x_c)^3} = \frac{He}{16800}, \qquad
              Re_{B,c} = \frac{He}{8 x_c}\left(1 - \frac{4}{3}x_c + \frac{1}{3}x_c^4\right)

    References
    ----------
    .. [1] R. W. Hanks, "The laminar-turbulent transition for fluids with a yield stress,"
       AIChE J., vol. 9, no. 3, pp. 306-309, 1963, doi: 10.1002/aic.690090307.
    .. [2] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    >>> round(hanks_critical_reynolds(0.0))
    2100
    """
    he = in_range(hedstrom_number, "hedstrom_number", 0.0, np.inf)
    x = _hanks_x(he)
    small = x < 1e-6    # He -> 0: He/(8 x) -> 16800/8 = 2100
    xs = np.where(small, 1.0, x)
    re = np.where(small, 2100.0 * (1 - 4 * x / 3),
                  he / (8 * xs) * (1 - 4 * xs / 3 + xs**4 / 3))
    return scalar_or_array(re, hedstrom_number)


# --- Turbulent friction factors (Fanning: f = 2 tau_w / (rho V^2), a quarter of Darcy's) ----


@model("process", validity="turbulent Newtonian flow, 4e3 <= Re <= 1e8, eps/D <= 0.05",
       source="Colebrook, J. ICE 1939")
@guarded
def colebrook(reynolds, relative_roughness):
    r"""Fanning friction factor of turbulent Newtonian pipe flow (Colebrook equation).

    Colebrook's equation [1]_, the basis of the Moody chart [2]_, solved by Newton's method
    in 1/sqrt(f). Returns the Fanning factor, a quarter of the Darcy factor read off the
    Moody chart.

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number rho V D / mu, > 0. [-]
    relative_roughness : float or array_like
        Roughness over diameter eps/D, >= 0. [-]

    Returns
    -------
    friction_factor : float or numpy.ndarray
        Fanning friction factor. [-]

    Notes
    -----
    In Darcy form, f_D = 4 f:

    .. math:: \frac{1}{\sqrt{f_D}} = -2 \log_{10}\left(\frac{\varepsilon/D}{3.7}
              + \frac{2.51}{Re \sqrt{f_D}}\right)

    References
    ----------
    .. [1] C. F. Colebrook, "Turbulent flow in pipes, with particular reference to the
       transition region between the smooth and rough pipe laws," J. Inst. Civ. Eng.,
       vol. 11, no. 4, pp. 133-156, 1939, doi: 10.1680/ijoti.1939.13150.
    .. [2] L. F. Moody, "Friction factors for pipe flow," Trans. ASME, vol. 66,
       pp. 671-684, 1944.

    Examples
    --------
    Smooth pipe at Re = 1e5: Darcy 0.0180 on the Moody chart (4 f):

    >>> round(4 * colebrook(1e5, 0.0), 4)
    0.018
    """
    re = positive(reynolds, "reynolds")
    rr = in_range(relative_roughness, "relative_roughness", 0.0, 1.0)
    y = np.full(np.broadcast(re, rr).shape, 8.0)       # y = 1/sqrt(f_D), start near 8
    for _ in range(50):
        inner = rr / 3.7 + 2.51 * y / re
        g = y + 2.0 * np.log10(inner)
        dg = 1.0 + 2.0 / np.log(10.0) * (2.51 / re) / inner
        step = g / dg
        y = y - step
        if np.all(np.abs(step) < 1e-13 * np.abs(y)):
            break
    return scalar_or_array(1.0 / (4.0 * y**2), reynolds, relative_roughness)


@model("process", validity="turbulent power-law flow in smooth pipes; data 0.36 <= n' <= 1, "
       "2900 <= Re_MR <= 36000", source="Dodge & Metzner, AIChE J. 1959")
@guarded
def dodge_metzner(reynolds, flow_index):
    r"""Fanning friction factor of turbulent power-law flow in smooth pipes (Dodge-Metzner).

    The correlation of Dodge and Metzner [1]_ as restated in Chapter 3 of [2]_ (from memory,
    not checked against the sources); with n' = 1 it is the Nikuradse smooth-pipe law.
    Solved by Newton's method in 1/sqrt(f).

    Parameters
    ----------
    reynolds : float or array_like
        Metzner-Reed Reynolds number, > 0. [-]
    flow_index : float or array_like
        n' at the wall stress, > 0. [-]

    Returns
    -------
    friction_factor : float or numpy.ndarray
        Fanning friction factor. [-]

    Notes
    -----
    .. math:: \frac{1}{\sqrt{f}} = \frac{4}{n'^{0.75}}\log_{10}\left(Re_{MR} f^{1 - n'/2}
              \right) - \frac{0.4}{n'^{1.2}}

    References
    ----------
    .. [1] D. W. Dodge and A. B. Metzner, "Turbulent flow of non-Newtonian systems," AIChE J.,
       vol. 5, no. 2, pp. 189-204, 1959, doi: 10.1002/aic.690050214.
    .. [2] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008.

    Examples
    --------
    >>> round(dodge_metzner(1e4, 0.5), 6)
    0.004874
    """
    re = positive(reynolds, "reynolds")
    n = positive(flow_index, "flow_index")
    a, b = 4.0 / n**0.75, 0.4 / n**1.2
    y = np.full(np.broadcast(re, n).shape, 15.0)     # y = 1/sqrt(f)
    for _ in range(60):
        # f = y**-2: log10(Re f^(1 - n/2)) = log10(Re) - (2 - n) log10(y)
        g = y - a * (np.log10(re) - (2 - n) * np.log10(y)) + b
        dg = 1.0 + a * (2 - n) / (y * np.log(10.0))
        step = g / dg
        y = np.maximum(y - step, 1e-3)
        if np.all(np.abs(step) < 1e-13 * np.abs(y)):
            break
    return scalar_or_array(1.0 / y**2, reynolds, flow_index)


def _buckingham_reiner_x(reynolds, hedstrom):
    """x = tau_y/tau_w of laminar Bingham flow from 8 Re/He = (1 - 4x/3 + x^4/3)/x."""
    with np.errstate(divide="ignore"):
        target = np.where(hedstrom > 0, 8 * reynolds / np.where(hedstrom > 0, hedstrom, 1.0),
                          np.inf)
    lo, hi = np.zeros_like(target), np.ones_like(target)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        above = (1 - 4 * mid / 3 + mid**4 / 3) / mid > target   # the left side falls with x
        lo, hi = np.where(above, mid, lo), np.where(above, hi, mid)
    return np.where(np.isfinite(target), 0.5 * (lo + hi), 0.0)


@model("process", validity="Bingham plastics, laminar to turbulent; Re_B up to about 1e6",
       source="Darby, Mun & Boger, Chem. Eng. 1992")
@guarded
def darby_mun_boger(reynolds, hedstrom_number):
    r"""Fanning friction factor of Bingham-plastic pipe flow, laminar to turbulent (Darby).

    The correlation of Darby, Mun and Boger [1]_ as given in Darby's text [2]_ (checked
    against a secondary restatement in open code citing [2]_): a turbulent power law in the
    Bingham Reynolds number blended with the exact laminar (Buckingham-Reiner) factor.

    Parameters
    ----------
    reynolds : float or array_like
        Bingham Reynolds number rho V D / mu_p, > 0. [-]
    hedstrom_number : float or array_like
        He = rho tau_y D^2 / mu_p^2, >= 0. [-]

    Returns
    -------
    friction_factor : float or numpy.ndarray
        Fanning friction factor. [-]

    Notes
    -----
    .. math:: f = (f_L^m + f_T^m)^{1/m}, \quad m = 1.7 + \frac{40000}{Re_B}, \quad
              f_T = 10^a Re_B^{-0.193}, \quad a = -1.47\,(1 + 0.146\, e^{-2.9 \times
              10^{-5} He})

    f_L is the laminar Buckingham-Reiner factor, 16/Re_B (1 + He/(6 Re_B) - He^4/(3 f_L^3
    Re_B^7)), solved exactly here through x = tau_y/tau_w.

    References
    ----------
    .. [1] R. Darby, R. Mun and D. V. Boger, "Predict friction loss in slurry pipes,"
       Chem. Eng., vol. 99, no. 9, pp. 116-119, 1992.
    .. [2] R. Darby, *Chemical Engineering Fluid Mechanics*, 2nd ed. New York: Marcel
       Dekker, 2001.

    Examples
    --------
    A slurry, D = 0.254 m, V = 2.3 m/s, rho = 1300 kg/m3, tau_y = 6 Pa, mu_p = 0.02 Pa s:
    Darcy factor 0.01905 (the restatement's example), so Fanning 0.004763:

    >>> round(darby_mun_boger(0.254 * 2.3 * 1300 / 0.02, 0.254**2 * 1300 * 6 / 0.02**2), 6)
    0.004763
    """
    re = positive(reynolds, "reynolds")
    he = in_range(hedstrom_number, "hedstrom_number", 0.0, np.inf)
    x = _buckingham_reiner_x(re, he)
    with np.errstate(divide="ignore", invalid="ignore"):
        f_lam = np.where(x > 0, 2 * he / (np.where(x > 0, x, 1.0) * re**2), 16.0 / re)
    a = -1.47 * (1 + 0.146 * np.exp(-2.9e-5 * he))
    f_turb = 10.0**a * re**-0.193
    m = 1.7 + 40000.0 / re
    # (f_L^m + f_T^m)^(1/m) written to avoid overflow of the power at small Re
    big = np.maximum(f_lam, f_turb)
    f = big * ((f_lam / big) ** m + (f_turb / big) ** m) ** (1.0 / m)
    return scalar_or_array(f, reynolds, hedstrom_number)


# --- Flow curves: one interface for a liquid law and a formulation's predicted curve ---------


@dataclass(frozen=True)
class FlowCurve:
    """A monotone flow curve: shear rate at a stress and stress at a shear rate (SI arrays).

    Built by `law_curve` (a registry liquid law, exact inverse) or `table_curve` (a
    tabulated curve, e.g. a formulation's prediction, interpolated in log-log).
    """

    rate: object            # callable: stress [Pa] -> shear rate [1/s]
    stress: object          # callable: shear rate [1/s] -> stress [Pa]
    yield_stress_Pa: float
    law: str                # registry law name, or "table"
    params: dict
    moment: object = None   # callable (tau, power) -> int_{tau_y}^{tau} t^power rate dt, exact

    @property
    def is_newtonian(self) -> bool:
        return self.law == "newtonian"

    @property
    def is_bingham(self) -> bool:
        return self.law == "bingham"

    def viscosity(self, shear_rate_1_per_s):
        """Apparent viscosity tau/gammadot at a shear rate (> 0). [Pa*s]"""
        rate = np.asarray(shear_rate_1_per_s, dtype=float)
        return self.stress(rate) / rate


@guarded
def law_curve(law: str = "newtonian", **params) -> FlowCurve:
    """`FlowCurve` of a registry liquid law, parameters checked against the registry."""
    from .liquids import liquid_law

    checked = liquid_law(law, **params)
    return FlowCurve(checked.shear_rate, checked.stress, checked.yield_stress_Pa,
                     checked.name, dict(checked.params))


@guarded
def table_curve(shear_rate_1_per_s, shear_stress_Pa, yield_stress_Pa=0.0) -> FlowCurve:
    """`FlowCurve` of a tabulated curve: log-log interpolation, power-law extrapolation.

    Below the first point the rate falls linearly in stress to 0 at the yield stress (or to
    0 at zero stress without one); above the last point the last log-log slope continues.
    Stresses are made non-decreasing (a discontinuous-thickening jump becomes a step). The
    moments int t^p gammadot dt of the Rabinowitsch-Mooney and sag integrals are exact for
    this piecewise power law (`FlowCurve.moment`).
    """
    rates = as_array(shear_rate_1_per_s, "shear_rate_1_per_s")
    stresses = as_array(shear_stress_Pa, "shear_stress_Pa")
    if rates.ndim != 1 or rates.size < 2 or np.any(np.diff(rates) <= 0) or rates[0] <= 0:
        raise InputRangeError("shear_rate_1_per_s", rates, "at least 2 increasing rates > 0")
    if stresses.shape != rates.shape or np.any(stresses <= 0):
        raise InputRangeError("shear_stress_Pa", stresses,
                              f"{rates.size} stresses > 0, one per shear rate")
    stresses = np.maximum.accumulate(stresses)
    _single(yield_stress_Pa=yield_stress_Pa)
    ty = float(min(max(float(as_array(yield_stress_Pa, "yield_stress_Pa")), 0.0), stresses[0]))
    span = max(stresses[0] - ty, 1e-12 * stresses[0])
    log_r, log_s = np.log(rates), np.log(stresses)
    top_slope = max((log_s[-1] - log_s[-2]) / (log_r[-1] - log_r[-2]), 1e-3)
    # one far point continues the last log-log slope, so np.interp also extrapolates above
    log_r = np.append(log_r, log_r[-1] + 50.0)           # 5e21 times the last rate
    log_s = np.append(log_s, log_s[-1] + 50.0 * min(top_slope, 10.0))

    def rate(tau):
        tau = np.asarray(tau, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            mid = np.exp(np.interp(np.log(np.maximum(tau, 1e-300)), log_s, log_r))
        low = rates[0] * np.clip((tau - ty) / span, 0.0, None)
        return np.where(tau < stresses[0], low, mid)

    def stress(gamma):
        gamma = np.asarray(gamma, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            mid = np.exp(np.interp(np.log(np.maximum(gamma, 1e-300)), log_r, log_s))
        low = ty + (stresses[0] - ty) * gamma / rates[0]
        return np.where(gamma < rates[0], low, mid)

    # Exact moments: between knots the rate is a power law r_i (t/s_i)^b_i, below the first
    # knot linear from the yield stress, so int t^p rate dt has closed forms per segment.
    knot_s, knot_r = np.exp(log_s), np.exp(log_r)
    width = np.diff(log_s)
    with np.errstate(divide="ignore", invalid="ignore"):
        b = np.where(width > 0, np.diff(log_r) / np.where(width > 0, width, 1.0), 0.0)
    cumulative = {}

    def low_part(tau, p):
        t = np.clip(tau, ty, stresses[0])
        return rates[0] / span * ((t ** (p + 2) - ty ** (p + 2)) / (p + 2)
                                  - ty * (t ** (p + 1) - ty ** (p + 1)) / (p + 1))

    def segment(k, tau, p):
        e = p + b[k] + 1.0
        with np.errstate(over="ignore"):
            grow = np.exp(e * (np.log(np.maximum(tau, 1e-300)) - log_s[k]))
        return np.where(width[k] > 0, knot_r[k] * knot_s[k] ** (p + 1) * (grow - 1.0) / e, 0.0)

    def moment(tau, p):
        tau = np.asarray(tau, dtype=float)
        if p not in cumulative:
            steps = segment(np.arange(width.size), knot_s[1:], p)
            cumulative[p] = np.concatenate(([low_part(stresses[0], p)], steps)).cumsum()
        k = np.clip(np.searchsorted(knot_s, tau, side="right") - 1, 0, width.size - 1)
        above = cumulative[p][k] + segment(k, np.maximum(tau, knot_s[0]), p)
        return np.where(tau < stresses[0], low_part(tau, p), above)

    return FlowCurve(rate, stress, ty, "table", {}, moment)


@functools.cache
def _nodes(count: int = 32):
    """Gauss-Legendre nodes and weights on [0, 1]."""
    x, w = np.polynomial.legendre.leggauss(count)
    return 0.5 * (x + 1.0), 0.5 * w


def _stress_integral(curve: FlowCurve, tau_w, power: int):
    """int_{tau_y}^{tau_w} tau^power gammadot(tau) d tau: exact for a tabulated curve
    (`FlowCurve.moment`), else by Gauss-Legendre quadrature.

    Substituting tau = tau_y + (tau_w - tau_y) s^2 smooths the (tau - tau_y)^(1/n) start of
    yield-stress and power-law curves, so 32 nodes reach about 1e-10 relative error.
    """
    if curve.moment is not None:
        return curve.moment(tau_w, power)
    s, w = _nodes()
    tau_w = np.asarray(tau_w, dtype=float)[..., None]
    span = np.maximum(tau_w - curve.yield_stress_Pa, 0.0)
    tau = curve.yield_stress_Pa + span * s**2
    return np.sum(w * tau**power * curve.rate(tau) * 2.0 * span * s, axis=-1)


def _nominal_rate(curve: FlowCurve, tau_w):
    """8V/D of laminar flow at wall stress tau_w (Rabinowitsch-Mooney) and gammadot_w."""
    tau_w = np.asarray(tau_w, dtype=float)
    return 4.0 / tau_w**3 * _stress_integral(curve, tau_w, 2), curve.rate(tau_w)


def _laminar_wall_stress(curve: FlowCurve, nominal_rate):
    """Wall stress giving a nominal rate 8V/D: safeguarded Newton in ln(tau_w), vectorised.

    d ln(8V/D) / d ln tau_w = 4 gammadot_w / (8V/D) - 3 = 1/n' (from the Rabinowitsch-Mooney
    relation). The bracket starts at tau(3/4 8V/D), a lower bound because 8V/D <= 4/3
    gammadot_w for any rising curve, and grows tenfold until the rate is reached.
    """
    target = np.asarray(nominal_rate, dtype=float)
    lo = np.log(np.maximum(curve.stress(0.75 * target), 1e-300))
    hi = lo.copy()
    for _ in range(200):
        gamma, _ = _nominal_rate(curve, np.exp(hi))
        short = gamma < target
        if not short.any():
            break
        hi = np.where(short, hi + 2.3, hi)
    x = 0.5 * (lo + hi)
    log_target = np.log(target)
    for _ in range(100):
        gamma, gamma_w = _nominal_rate(curve, np.exp(x))
        with np.errstate(divide="ignore", invalid="ignore"):
            g = np.where(gamma > 0, np.log(np.where(gamma > 0, gamma, 1.0)) - log_target, -np.inf)
            slope = np.where(gamma > 0, 4.0 * gamma_w / np.where(gamma > 0, gamma, 1.0) - 3.0,
                             0.0)
        lo = np.where(g < 0, x, lo)
        hi = np.where(g > 0, x, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            newton = x - g / slope
        # a converged point keeps its Newton step (the bracket may already sit on it)
        done = np.isfinite(newton) & (np.abs(newton - x) < 1e-13 * np.maximum(1.0, np.abs(x)))
        inside = np.isfinite(newton) & (newton > lo) & (newton < hi)
        x = np.where(done | inside, newton, 0.5 * (lo + hi))
        if np.all(done | (hi - lo < 1e-15 * np.maximum(1.0, np.abs(x)))):
            break
    return np.exp(x)


# --- Pipe and hose flow -----------------------------------------------------------------------


@dataclass(frozen=True)
class PipeFlow:
    """Flow of a liquid in a round pipe or hose at one or many flow rates (SI).

    Arrays run over the flow rates (floats and a str regime for a single flow rate).
    `reynolds` is the Reynolds number the regime was judged by: Bingham rho V D/mu_p for a
    Bingham law, the Metzner-Reed number otherwise (rho V D/mu for a Newtonian liquid).
    `friction_factor` is Fanning's. `plug_radius_m` is the radius inside which the stress is
    below the yield stress (0 without one). `startup_pressure_Pa` is the pressure needed to
    restart a line standing full (4 tau_y L / D).
    """

    flow_rate_m3_per_s: np.ndarray
    mean_velocity_m_per_s: np.ndarray
    pressure_drop_Pa: np.ndarray
    regime: np.ndarray
    reynolds: np.ndarray
    critical_reynolds: np.ndarray
    hedstrom_number: float
    flow_index: np.ndarray
    friction_factor: np.ndarray
    wall_shear_stress_Pa: np.ndarray
    wall_shear_rate_1_per_s: np.ndarray
    plug_radius_m: np.ndarray
    correlation: np.ndarray
    yield_stress_Pa: float
    startup_pressure_Pa: float
    diameter_m: float
    length_m: float
    density_kg_per_m3: float
    warnings: tuple[str, ...] = ()

    def rows(self) -> list[dict]:
        """One plain dict per flow rate (for tables, CSV and JSON)."""
        keys = ("flow_rate_m3_per_s", "mean_velocity_m_per_s", "pressure_drop_Pa", "regime",
                "reynolds", "critical_reynolds", "flow_index", "friction_factor",
                "wall_shear_stress_Pa", "wall_shear_rate_1_per_s", "plug_radius_m",
                "correlation")
        columns = {k: np.atleast_1d(getattr(self, k)) for k in keys}
        return [{k: (str(v[i]) if v.dtype.kind in "UO" else float(v[i]))
                 for k, v in columns.items()} for i in range(columns["reynolds"].size)]


@guarded
def restart_pressure(yield_stress_Pa, diameter_m, length_m):
    r"""Pressure needed to restart a pipe standing full of a yield-stress material.

    Force balance on the plug (common practice, no source): the pressure on the cross
    section must overcome the yield stress on the whole wall.

    Parameters
    ----------
    yield_stress_Pa : float or array_like
        Yield stress, >= 0. [Pa]
    diameter_m : float or array_like
        Inner diameter, > 0. [m]
    length_m : float or array_like
        Length of the filled line, > 0. [m]

    Returns
    -------
    pressure_Pa : float or numpy.ndarray
        4 tau_y L / D. [Pa]

    Notes
    -----
    .. math:: \Delta p \, \pi D^2 / 4 = \tau_y \pi D L

    Gelled (thixotropic) materials can need more after a long standstill.

    Examples
    --------
    >>> restart_pressure(20.0, 0.025, 10.0)
    32000.0
    """
    ty = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    d = positive(diameter_m, "diameter_m")
    length = positive(length_m, "length_m")
    return scalar_or_array(4.0 * ty * length / d, yield_stress_Pa, diameter_m, length_m)


def _single(**values):
    """`InputRangeError` for the first of `values` that is an array, not a single number."""
    for name, value in values.items():
        if value is not None and np.ndim(value):
            raise InputRangeError(name, value, "a single number")


def _check_pipe(flow_rate_m3_per_s, diameter_m, length_m, density_kg_per_m3, roughness_m):
    _single(diameter_m=diameter_m, length_m=length_m, density_kg_per_m3=density_kg_per_m3,
            roughness_m=roughness_m)
    q = positive(flow_rate_m3_per_s, "flow_rate_m3_per_s")
    # screening bounds of our own: hoses to large pipes, a line up to 1000 km
    d = float(in_range(diameter_m, "diameter_m", 0.0, 10.0, low_open=True))
    length = float(in_range(length_m, "length_m", 0.0, 1e6, low_open=True))
    rho = float(positive(density_kg_per_m3, "density_kg_per_m3"))
    eps = float(in_range(roughness_m, "roughness_m", 0.0, 0.5 * d))
    return q, d, length, rho, eps


def _pipe(curve: FlowCurve, q, d, length, rho, eps) -> PipeFlow:
    """Pipe flow of `curve` at flow rates q (array) in one pipe: the engine of every caller."""
    area = np.pi * d**2 / 4
    v = q / area
    nominal = 8.0 * v / d
    tw_lam = _laminar_wall_stress(curve, nominal)
    gamma_lam, gw_lam = _nominal_rate(curve, tw_lam)
    n_lam = gamma_lam / np.maximum(4.0 * gw_lam - 3.0 * gamma_lam, 1e-300)
    ty = curve.yield_stress_Pa
    notes = []
    if curve.is_bingham:
        mu_p = curve.params["plastic_viscosity_Pa_s"]
        he = rho * ty * d**2 / mu_p**2
        re = rho * v * d / mu_p
        re_c = np.broadcast_to(hanks_critical_reynolds(he), re.shape)
        f_turb = darby_mun_boger(re, he)
        corr = "darby-mun-boger"
        laminar = re < re_c
        re_top = DARBY_MAX_RE
        n_t = n_lam
    else:
        he = 0.0
        re = 8.0 * rho * v**2 / tw_lam                 # Metzner-Reed at the laminar stress
        re_c = ryan_johnson_critical_reynolds(np.clip(n_lam, 0.05, 2.0))
        laminar = re < re_c
        # per flow rate, so a point gives the same answer alone or inside a system curve
        newtonian_like = curve.is_newtonian | (np.abs(n_lam - 1.0) < 0.05)
        # n' and Re_MR at the turbulent wall stress: fixed point from the laminar values
        f_turb, n_t, re_t = np.zeros_like(v), n_lam.copy(), re.copy()
        turb = ~laminar
        if turb.any():
            vt, nom_t, nt, ret = v[turb], nominal[turb], n_lam[turb], re[turb]
            nl = newtonian_like[turb]
            for _ in range(6):
                ft = np.where(nl, colebrook(ret, eps / d),
                              dodge_metzner(ret, np.clip(nt, 0.05, 2.0)))
                tw_t = 0.5 * ft * rho * vt**2
                g_t, gw_t = _nominal_rate(curve, tw_t)
                nt = g_t / np.maximum(4.0 * gw_t - 3.0 * g_t, 1e-300)
                ret = 8.0 * rho * vt**2 / tw_t * (g_t / nom_t) ** nt
            f_turb[turb], n_t[turb], re_t[turb] = ft, nt, ret
        re = np.where(laminar, re, re_t)
        corr = np.where(newtonian_like, "colebrook", "dodge-metzner")
        re_top = np.where(newtonian_like, COLEBROOK_MAX_RE, DODGE_METZNER_MAX_RE)
        power_law = ~laminar & ~newtonian_like
        if eps > 0 and np.any(power_law):
            notes.append("Dodge-Metzner is for smooth pipes; the roughness is not used.")
        used = power_law & ((n_t < 0.36) | (n_t > 1.0))
        if np.any(used):
            notes.append(f"Dodge-Metzner is used at n' = {float(np.min(n_t[used])):.3g} to "
                         f"{float(np.max(n_t[used])):.3g}, outside its data (0.36 to 1).")
    f_lam = 2.0 * tw_lam / (rho * v**2)
    transitional = ~laminar & (re < re_c * TRANSITION_BAND)
    f = np.where(laminar, f_lam, np.maximum(f_turb, f_lam) if not curve.is_bingham else f_turb)
    tw = 0.5 * f * rho * v**2
    regime = np.where(laminar, "laminar", np.where(transitional, "transitional", "turbulent"))
    corr = np.broadcast_to(corr, v.shape)
    if eps / d > 0.05 and np.any(~laminar & (corr == "colebrook")):
        notes.append(f"Relative roughness {eps / d:.3g} is beyond Colebrook's range (0.05).")
    beyond = ~laminar & (re > re_top)
    if np.any(beyond):
        k = int(np.argmax(np.where(beyond, re, -np.inf)))
        notes.append(f"flow_rate_m3_per_s = {float(q[k]):.4g} gives Re = {float(re[k]):.3g}, "
                     f"beyond the data of {corr[k]} (Re up to "
                     f"{float(np.broadcast_to(re_top, v.shape)[k]):.0e}); the pressure drop "
                     "there is an extrapolation.")
    for note in notes:
        warnings.warn(note, ValidityWarning, stacklevel=4)
    startup = 4.0 * ty * length / d
    return PipeFlow(
        q, v, 4.0 * tw * length / d, regime, re, np.asarray(re_c, dtype=float), float(he),
        np.where(laminar, n_lam, n_t), f, tw, curve.rate(tw), 0.5 * d * np.minimum(ty / tw, 1.0),
        np.where(laminar, "rabinowitsch-mooney", corr), ty, startup, d, length, rho,
        tuple(notes))


def _scalar_result(result: PipeFlow, scalar: bool) -> PipeFlow:
    if not scalar:
        return result
    from dataclasses import fields, replace

    return replace(result, **{
        f.name: (getattr(result, f.name).item() if isinstance(getattr(result, f.name),
                                                              np.ndarray) else
                 getattr(result, f.name)) for f in fields(result)})


@guarded
def pipe_pressure_drop(flow_rate_m3_per_s, diameter_m, length_m, density_kg_per_m3,
                       law: str = "newtonian", roughness_m=0.0, **params) -> PipeFlow:
    r"""Pressure drop, regime and wall conditions of a liquid law flowing in a round pipe.

    Laminar flow of any registry liquid law by the Rabinowitsch-Mooney relation [1]_,
    integrated numerically; the regime by the Metzner-Reed Reynolds number [2]_ against
    Ryan and Johnson's critical value (`ryan_johnson_critical_reynolds`), or for a Bingham
    law against Hanks' criterion (`hanks_critical_reynolds`); turbulent friction by
    Colebrook (Newtonian, n' within 0.05 of 1), Dodge-Metzner (other laws, smooth pipe) or
    Darby-Mun-Boger (Bingham).

    Parameters
    ----------
    flow_rate_m3_per_s : float or array_like
        Volumetric flow rate(s), > 0 (an array gives a system curve). [m**3/s]
    diameter_m : float
        Inner diameter, 0 to 10 m (0 excluded). [m]
    length_m : float
        Pipe length, 0 to 1e6 m (0 excluded). [m]
    density_kg_per_m3 : float
        Density of the liquid, > 0. [kg/m**3]
    law : str, optional
        Registry name of the liquid law (``predictor.models("liquid")``).
    roughness_m : float, optional
        Wall roughness, 0 (smooth) to D/2; used by Colebrook. [m]
    **params
        The law's parameters (SI).

    Returns
    -------
    PipeFlow

    Raises
    ------
    InputRangeError
        Zero, negative or non-finite flow rate, diameter, length or density.

    Warns
    -----
    ValidityWarning
        Where a turbulent correlation is used beyond its data.

    Notes
    -----
    Laminar: with tau_w = D dp/(4 L),

    .. math:: \frac{8V}{D} = \frac{4}{\tau_w^3}\int_{\tau_y}^{\tau_w}\tau^2\dot\gamma(\tau)
              \,d\tau

    solved for tau_w by a safeguarded Newton iteration (see `_laminar_wall_stress`). The
    transitional band runs from the critical Reynolds number to `TRANSITION_BAND` times it
    (2100-4000 for a Newtonian liquid; common practice, no source); there the larger of the
    laminar and turbulent friction factors is taken (our choice, on the safe side).
    For non-Bingham liquids n' and K' of the turbulent regime are evaluated at the
    turbulent wall stress (a fixed-point iteration).

    References
    ----------
    .. [1] R. P. Chhabra and J. F. Richardson, *Non-Newtonian Flow and Applied Rheology*,
       2nd ed. Oxford: Butterworth-Heinemann, 2008, ch. 3.
    .. [2] A. B. Metzner and J. C. Reed, AIChE J., vol. 1, no. 4, pp. 434-440, 1955.

    Examples
    --------
    Water at 10 L/min in 10 m of 25 mm smooth hose (illustrative call):

    >>> flow = pipe_pressure_drop(10e-3 / 60, 0.025, 10.0, 998.0, viscosity_Pa_s=1e-3)
    >>> flow.regime, round(flow.reynolds), round(flow.pressure_drop_Pa)
    ('turbulent', 8471, 743)
    """
    q, d, length, rho, eps = _check_pipe(flow_rate_m3_per_s, diameter_m, length_m,
                                         density_kg_per_m3, roughness_m)
    curve = law_curve(law, **params)
    return _scalar_result(_pipe(curve, np.atleast_1d(q), d, length, rho, eps),
                          np.ndim(flow_rate_m3_per_s) == 0)


#: Shear rates at which a formulation's flow curve is tabulated for the process checks.
TABLE_RATES_1_PER_S = np.logspace(-4, 6, 101)


@guarded
def formulation_curve(formulation) -> tuple[FlowCurve, float]:
    """The `FlowCurve` of a formulation (from `predictor.predict`) and its density.

    The one place the process checks meet the formulation layer: `predict` on
    `TABLE_RATES_1_PER_S` (10 points per decade), then `table_curve` with the apparent
    yield stress of the prediction.
    """
    from .formulation import Formulation, mixture, predict

    if not isinstance(formulation, Formulation):
        raise InputRangeError("formulation", type(formulation).__name__,
                              "a predictor.Formulation (e.g. from read_scenario)")
    frame = predict(formulation, TABLE_RATES_1_PER_S)
    stress = frame["shear_stress_Pa"].to_numpy(dtype=float)
    if not np.all(np.isfinite(stress)):
        raise InputRangeError("formulation", formulation.name or "(unnamed)",
                              "a formulation that flows at every shear rate from 1e-4 to "
                              "1e6 1/s (it is jammed at some of them)")
    ty = float(frame.attrs["markers"].get("apparent_yield_stress_Pa", 0.0) or 0.0)
    curve = table_curve(TABLE_RATES_1_PER_S, stress, ty if np.isfinite(ty) else 0.0)
    return curve, float(mixture(formulation).density_kg_per_m3)


@guarded
def pipe_flow_of(formulation, flow_rate_m3_per_s, diameter_m, length_m,
                 roughness_m=0.0) -> PipeFlow:
    """`pipe_pressure_drop` for a whole formulation, from its predicted flow curve.

    Parameters
    ----------
    formulation : predictor.Formulation
        The product; its flow curve comes from `predictor.predict` (`formulation_curve`)
        and its density from `predictor.mixture`.
    flow_rate_m3_per_s : float or array_like
        Volumetric flow rate(s), > 0. [m**3/s]
    diameter_m : float
        Inner diameter, > 0. [m]
    length_m : float
        Pipe length, > 0. [m]
    roughness_m : float, optional
        Wall roughness, 0 to D/2. [m]

    Returns
    -------
    PipeFlow
    """
    curve, rho = formulation_curve(formulation)
    q, d, length, rho, eps = _check_pipe(flow_rate_m3_per_s, diameter_m, length_m, rho,
                                         roughness_m)
    return _scalar_result(_pipe(curve, np.atleast_1d(q), d, length, rho, eps),
                          np.ndim(flow_rate_m3_per_s) == 0)


# --- Stirred tanks -----------------------------------------------------------------------------


@model("process", Param("impeller_constant", "-", (1.0, 100.0),
                        "Metzner-Otto constant ks of the impeller"),
       validity="laminar mixing (impeller Reynolds number below about 10)",
       source="Metzner & Otto, AIChE J. 1957")
@guarded
def metzner_otto(rotational_speed_1_per_s, impeller_constant=11.5):
    r"""Effective shear rate around an impeller in laminar mixing (Metzner-Otto).

    Metzner and Otto [1]_ found that the power drawn in laminar mixing of a shear-thinning
    liquid equals the Newtonian power at the viscosity the liquid has at k_s N, k_s a
    constant of the impeller type (typical values in `IMPELLERS`, from memory).

    Parameters
    ----------
    rotational_speed_1_per_s : float or array_like
        Impeller speed N in revolutions per second, > 0. [1/s]
    impeller_constant : float or array_like, optional
        Metzner-Otto constant k_s. [-]

    Returns
    -------
    shear_rate_1_per_s : float or numpy.ndarray
        k_s N. [1/s]

    Notes
    -----
    .. math:: \dot\gamma_{eff} = k_s N

    About 10-13 for turbines and propellers, 20-30 for close-clearance anchors and ribbons
    (from memory, not checked against the sources).

    References
    ----------
    .. [1] A. B. Metzner and R. E. Otto, "Agitation of non-Newtonian fluids," AIChE J.,
       vol. 3, no. 1, pp. 3-10, 1957, doi: 10.1002/aic.690030103.

    Examples
    --------
    >>> metzner_otto(2.0, 11.5)
    23.0
    """
    n = positive(rotational_speed_1_per_s, "rotational_speed_1_per_s")
    ks = in_range(impeller_constant, "impeller_constant", 1.0, 100.0)
    return scalar_or_array(ks * n, rotational_speed_1_per_s, impeller_constant)


@model("process", Param("power_constant", "-", (1.0, 2000.0),
                        "laminar power constant Kp = Po Re of the impeller"),
       validity="laminar mixing (impeller Reynolds number below about 10)",
       source="Rushton, Costich & Everett 1950; Metzner & Otto 1957")
@guarded
def laminar_impeller_power(viscosity_Pa_s, rotational_speed_1_per_s, impeller_diameter_m,
                           power_constant=70.0):
    r"""Power drawn by an impeller in laminar mixing, from the power number.

    In the laminar range the power number is K_p / Re with Re = rho N D^2 / eta, so the
    power P = Po rho N^3 D^5 = K_p eta N^2 D^3 does not depend on density [1]_. K_p is a
    constant of the impeller geometry (typical values in `IMPELLERS`, from memory).

    Parameters
    ----------
    viscosity_Pa_s : float or array_like
        Viscosity the impeller sees (at the Metzner-Otto shear rate), > 0. [Pa*s]
    rotational_speed_1_per_s : float or array_like
        Impeller speed N, revolutions per second, > 0. [1/s]
    impeller_diameter_m : float or array_like
        Impeller diameter D, > 0. [m]
    power_constant : float or array_like, optional
        K_p = Po Re in the laminar range. [-]

    Returns
    -------
    power_W : float or numpy.ndarray
        Shaft power. [W]

    Notes
    -----
    .. math:: P = K_p \eta N^2 D^3

    References
    ----------
    .. [1] J. H. Rushton, E. W. Costich and H. J. Everett, "Power characteristics of mixing
       impellers," Chem. Eng. Prog., vol. 46, pp. 395-404 and 467-476, 1950.

    Examples
    --------
    >>> round(laminar_impeller_power(10.0, 1.0, 0.2), 4)
    5.6
    """
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    n = positive(rotational_speed_1_per_s, "rotational_speed_1_per_s")
    d = positive(impeller_diameter_m, "impeller_diameter_m")
    kp = in_range(power_constant, "power_constant", 1.0, 2000.0)
    return scalar_or_array(kp * eta * n**2 * d**3, viscosity_Pa_s, rotational_speed_1_per_s,
                           impeller_diameter_m, power_constant)


@model("process", Param("power_number", "-", (0.05, 50.0), "impeller power number Po"),
       validity="cavern smaller than the tank; yield-stress liquids, turbulent power number",
       source="Elson, Cheesman & Nienow, Chem. Eng. Sci. 1986")
@guarded
def elson_cavern_diameter(impeller_diameter_m, rotational_speed_1_per_s, density_kg_per_m3,
                          yield_stress_Pa, power_number=5.0):
    r"""Diameter of the moving cavern around an impeller in a yield-stress liquid (Elson).

    Elson, Cheesman and Nienow [1]_ (from memory, not checked against the source): outside
    the cavern the stress is below the yield stress and the material stands still.

    Parameters
    ----------
    impeller_diameter_m : float or array_like
        Impeller diameter D, > 0. [m]
    rotational_speed_1_per_s : float or array_like
        Impeller speed N, revolutions per second, > 0. [1/s]
    density_kg_per_m3 : float or array_like
        Density, > 0. [kg/m**3]
    yield_stress_Pa : float or array_like
        Yield stress, > 0. [Pa]
    power_number : float or array_like, optional
        Power number Po of the impeller. [-]

    Returns
    -------
    cavern_diameter_m : float or numpy.ndarray
        D_c. [m]

    Notes
    -----
    .. math:: \left(\frac{D_c}{D}\right)^3 = \frac{4 Po}{\pi^3}\,
              \frac{\rho N^2 D^2}{\tau_y}

    Valid while D_c is smaller than the tank diameter.

    References
    ----------
    .. [1] T. P. Elson, D. J. Cheesman and A. W. Nienow, "X-ray studies of cavern sizes and
       mixing performance with fluids possessing a yield stress," Chem. Eng. Sci., vol. 41,
       no. 10, pp. 2555-2562, 1986, doi: 10.1016/0009-2509(86)80041-6.

    Examples
    --------
    >>> round(elson_cavern_diameter(0.1, 5.0, 1000.0, 10.0, 5.0), 4)
    0.2526
    """
    d = positive(impeller_diameter_m, "impeller_diameter_m")
    n = positive(rotational_speed_1_per_s, "rotational_speed_1_per_s")
    rho = positive(density_kg_per_m3, "density_kg_per_m3")
    ty = positive(yield_stress_Pa, "yield_stress_Pa")
    po = in_range(power_number, "power_number", 0.05, 50.0)
    dc = d * np.cbrt(4 * po / np.pi**3 * rho * n**2 * d**2 / ty)
    return scalar_or_array(dc, impeller_diameter_m, rotational_speed_1_per_s,
                           density_kg_per_m3, yield_stress_Pa, power_number)


@dataclass(frozen=True)
class StirredTank:
    """What an impeller sees and draws in a stirred tank (SI floats)."""

    impeller: str
    effective_shear_rate_1_per_s: float
    viscosity_Pa_s: float
    reynolds: float
    regime: str                  # laminar (Re < 10), transitional, turbulent (Re > 1e4)
    power_number: float
    power_W: float
    yield_stress_Pa: float
    cavern_diameter_m: float     # inf without a yield stress
    cavern: bool                 # True: the moving zone does not reach the tank wall
    warnings: tuple[str, ...] = ()


def _stirred(curve: FlowCurve, speed, d, tank, rho, impeller) -> StirredTank:
    if impeller not in IMPELLERS:
        raise InputRangeError("impeller", impeller, f"one of {', '.join(IMPELLERS)}")
    ks, kp, po_turb = IMPELLERS[impeller]
    rate = metzner_otto(speed, ks)
    eta = float(curve.viscosity(rate))
    re = rho * speed * d**2 / eta
    # Po = max(K_p/Re, Po_turb): each limit exact, continuous between (our choice; common
    # practice treats 10 < Re < 1e4 as transitional with no single published law).
    po = max(kp / re, po_turb)
    regime = "laminar" if re < 10 else ("turbulent" if re > 1e4 else "transitional")
    power = po * rho * speed**3 * d**5
    notes = []
    if regime != "laminar":
        notes.append(f"impeller Reynolds number {re:.3g} is above the laminar range (10): the "
                     "Metzner-Otto viscosity and the power are estimates.")
    ty = curve.yield_stress_Pa
    dc = float(elson_cavern_diameter(d, speed, rho, ty, po_turb)) if ty > 0 else np.inf
    for note in notes:
        warnings.warn(note, ValidityWarning, stacklevel=4)
    return StirredTank(impeller, float(rate), eta, float(re), regime, float(po), float(power),
                       float(ty), dc, bool(dc < tank), tuple(notes))


def _check_tank(speed, d, tank, rho):
    _single(rotational_speed_1_per_s=speed, impeller_diameter_m=d, tank_diameter_m=tank,
            density_kg_per_m3=rho)
    speed = float(in_range(speed, "rotational_speed_1_per_s", 0.0, 1e3, low_open=True))
    d = float(positive(d, "impeller_diameter_m"))
    tank = float(positive(tank, "tank_diameter_m"))
    if d >= tank:
        raise InputRangeError("impeller_diameter_m", d,
                              f"a diameter smaller than the tank's ({tank:g} m)")
    return speed, d, tank, float(positive(rho, "density_kg_per_m3"))


@guarded
def stirred_tank(rotational_speed_1_per_s, impeller_diameter_m, tank_diameter_m,
                 density_kg_per_m3, impeller: str = "disc turbine", law: str = "newtonian",
                 **params) -> StirredTank:
    """Metzner-Otto shear rate, viscosity, Reynolds number, power and cavern of a mixer.

    Combines `metzner_otto`, the impeller Reynolds number rho N D^2 / eta,
    `laminar_impeller_power` (Po = K_p/Re) joined to the turbulent power number, and
    `elson_cavern_diameter` for yield-stress liquids.

    Parameters
    ----------
    rotational_speed_1_per_s : float
        Impeller speed N, revolutions per second (rpm / 60), > 0. [1/s]
    impeller_diameter_m : float
        Impeller diameter, > 0 and below the tank's. [m]
    tank_diameter_m : float
        Tank diameter, > 0. [m]
    density_kg_per_m3 : float
        Density, > 0. [kg/m**3]
    impeller : str, optional
        One of `IMPELLERS`.
    law : str, optional
        Registry liquid law; ``**params`` its parameters (SI).

    Returns
    -------
    StirredTank

    Examples
    --------
    >>> tank = stirred_tank(2.0, 0.1, 0.3, 1000.0, law="newtonian", viscosity_Pa_s=5.0)
    >>> tank.regime, round(tank.power_W, 3)
    ('laminar', 1.4)
    """
    speed, d, tank, rho = _check_tank(rotational_speed_1_per_s, impeller_diameter_m,
                                      tank_diameter_m, density_kg_per_m3)
    return _stirred(law_curve(law, **params), speed, d, tank, rho, impeller)


@guarded
def stirred_tank_of(formulation, rotational_speed_1_per_s, impeller_diameter_m,
                    tank_diameter_m, impeller: str = "disc turbine") -> StirredTank:
    """`stirred_tank` for a whole formulation (its predicted flow curve and density)."""
    curve, rho = formulation_curve(formulation)
    speed, d, tank, rho = _check_tank(rotational_speed_1_per_s, impeller_diameter_m,
                                      tank_diameter_m, rho)
    return _stirred(curve, speed, d, tank, rho, impeller)


# --- Coatings: sag and levelling -------------------------------------------------------------


@model("process", validity="Newtonian film, sinusoidal ripple, wavelength >> thickness",
       source="Orchard, Appl. Sci. Res. A 1962")
@guarded
def orchard_levelling_time(viscosity_Pa_s, wavelength_m, thickness_m,
                           surface_tension_N_per_m):
    r"""Time for brush marks to level by a factor e, driven by surface tension (Orchard).

    Orchard's lubrication analysis [1]_ (form from memory, not checked against the source):
    a sinusoidal ripple of wavelength lambda on a film of mean thickness h decays as
    exp(-t / t_L).

    Parameters
    ----------
    viscosity_Pa_s : float or array_like
        Viscosity of the film at the levelling stress, > 0. [Pa*s]
    wavelength_m : float or array_like
        Ripple (brush-mark) wavelength, > 0. [m]
    thickness_m : float or array_like
        Mean wet film thickness, > 0. [m]
    surface_tension_N_per_m : float or array_like
        Surface tension, > 0. [N/m]

    Returns
    -------
    levelling_time_s : float or numpy.ndarray
        t_L. [s]

    Notes
    -----
    .. math:: t_L = \frac{3 \eta \lambda^4}{16 \pi^4 \sigma h^3}

    References
    ----------
    .. [1] S. E. Orchard, "On surface levelling in viscous liquids and gels," Appl. Sci.
       Res. A, vol. 11, pp. 451-464, 1962, doi: 10.1007/BF03184581.

    Examples
    --------
    1 Pa s, 1 mm marks, 100 um film, 35 mN/m (illustrative call):

    >>> round(orchard_levelling_time(1.0, 1e-3, 100e-6, 0.035), 4)
    0.055
    """
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    lam = positive(wavelength_m, "wavelength_m")
    h = positive(thickness_m, "thickness_m")
    sigma = positive(surface_tension_N_per_m, "surface_tension_N_per_m")
    return scalar_or_array(3 * eta * lam**4 / (16 * np.pi**4 * sigma * h**3), viscosity_Pa_s,
                           wavelength_m, thickness_m, surface_tension_N_per_m)


#: Levelling is reported as the time for the ripple amplitude to fall by this factor.
LEVELLING_FACTOR = 10.0


@dataclass(frozen=True)
class Coating:
    """Sag and levelling of a wet film on a vertical wall (SI floats)."""

    wall_shear_stress_Pa: float      # rho g h at the wall
    yield_stress_Pa: float
    stands: bool                     # the film does not sag: tau_y >= rho g h
    sag_velocity_m_per_s: float      # surface velocity of the sagging film (0 if it stands)
    levelling_stress_Pa: float       # largest stress of the levelling flow (first ripple)
    levelling_viscosity_Pa_s: float  # apparent viscosity at that stress (inf if it stands)
    levelling_time_s: float          # ripple down by LEVELLING_FACTOR; inf if it never is
    residual_amplitude_m: float      # ripple the yield stress holds (0 if none)


def _coating(curve: FlowCurve, h, rho, wavelength, amplitude, sigma) -> Coating:
    g = GRAVITY_M_PER_S2
    tau_w = rho * g * h
    ty = curve.yield_stress_Pa
    stands = ty >= tau_w
    # v_s = int_0^h gammadot(rho g (h - y)) dy = (1/(rho g)) int_{tau_y}^{tau_w} gammadot dtau
    sag = 0.0 if stands else float(_stress_integral(curve, tau_w, 0)) / (rho * g)
    # Levelling stress h dp/dx with p = sigma a k^2 sin(kx), k = 2 pi/lambda: c a
    c = sigma * h * (2 * np.pi / wavelength) ** 3
    tau_l = c * amplitude
    residual = min(ty / c, amplitude)
    end = amplitude / LEVELLING_FACTOR
    if residual >= end:
        eta_l = np.inf if ty >= tau_l else float(tau_l / curve.rate(tau_l))
        return Coating(float(tau_w), float(ty), bool(stands), sag, float(tau_l), eta_l,
                       np.inf, float(residual))
    eta_l = float(tau_l / curve.rate(tau_l))
    # Orchard: da/dt = -a / t_L(eta(c a)), so t = int_end^a0 t_L(eta(c a)) d(ln a)
    s, w = _nodes()
    log_a = np.log(end) + (np.log(amplitude) - np.log(end)) * s
    tau = c * np.exp(log_a)
    eta = tau / curve.rate(tau)
    t_l = orchard_levelling_time(eta, wavelength, h, sigma)
    time = float(np.sum(w * t_l) * (np.log(amplitude) - np.log(end)))
    return Coating(float(tau_w), float(ty), bool(stands), sag, float(tau_l), eta_l, time, 0.0)


def _check_coating(h, rho, wavelength, amplitude, sigma):
    _single(thickness_m=h, density_kg_per_m3=rho, wavelength_m=wavelength,
            amplitude_m=amplitude, surface_tension_N_per_m=sigma)
    h = float(in_range(h, "thickness_m", 0.0, 0.01, low_open=True))
    rho = float(positive(rho, "density_kg_per_m3"))
    wavelength = float(positive(wavelength, "wavelength_m"))
    amplitude = 0.25 * h if amplitude is None else amplitude
    amplitude = float(in_range(amplitude, "amplitude_m", 0.0, h, low_open=True))
    sigma = float(in_range(sigma, "surface_tension_N_per_m", 0.0, 1.0, low_open=True))
    return h, rho, wavelength, amplitude, sigma


@guarded
def coating(thickness_m, density_kg_per_m3, wavelength_m=1e-3, amplitude_m=None,
            surface_tension_N_per_m=0.035, law: str = "newtonian", **params) -> Coating:
    r"""Whether a wet film sags on a vertical wall, how fast, and how fast it levels.

    Sag: the wall stress of a film of thickness h is rho g h; the film stands where the
    yield stress exceeds it, otherwise its surface moves at

    .. math:: v_s = \frac{1}{\rho g}\int_{\tau_y}^{\rho g h}\dot\gamma(\tau)\,d\tau

    (rho g h^2 / (2 eta) for a Newtonian film; force balance, common practice, no source).
    Levelling: Orchard's decay rate (`orchard_levelling_time`) with the apparent viscosity
    of the flow curve at the momentary levelling stress 8 pi^3 sigma a h / lambda^3 (a the
    ripple amplitude), integrated while the ripple falls by `LEVELLING_FACTOR` (our
    extension of Orchard's Newtonian result to a flow curve); a yield stress holds a residual
    ripple tau_y lambda^3 / (8 pi^3 sigma h) and stops levelling there (time inf when that
    is above the target amplitude).

    Parameters
    ----------
    thickness_m : float
        Wet film thickness, 0 to 10 mm. [m]
    density_kg_per_m3 : float
        Density, > 0. [kg/m**3]
    wavelength_m : float, optional
        Brush-mark wavelength, > 0. [m]
    amplitude_m : float, optional
        Ripple amplitude, > 0 and at most the thickness; default a quarter of it. [m]
    surface_tension_N_per_m : float, optional
        Surface tension, > 0. [N/m]
    law : str, optional
        Registry liquid law; ``**params`` its parameters (SI).

    Returns
    -------
    Coating

    Examples
    --------
    >>> film = coating(100e-6, 1000.0, law="bingham", yield_stress_Pa=2.0,
    ...                plastic_viscosity_Pa_s=0.5)
    >>> film.stands, round(film.wall_shear_stress_Pa, 4)
    (True, 0.9807)
    """
    h, rho, lam, amp, sigma = _check_coating(thickness_m, density_kg_per_m3, wavelength_m,
                                             amplitude_m, surface_tension_N_per_m)
    return _coating(law_curve(law, **params), h, rho, lam, amp, sigma)


@guarded
def coating_of(formulation, thickness_m, wavelength_m=1e-3, amplitude_m=None,
               surface_tension_N_per_m=0.035) -> Coating:
    """`coating` for a whole formulation (its predicted flow curve and density)."""
    curve, rho = formulation_curve(formulation)
    h, rho, lam, amp, sigma = _check_coating(thickness_m, rho, wavelength_m, amplitude_m,
                                             surface_tension_N_per_m)
    return _coating(curve, h, rho, lam, amp, sigma)
