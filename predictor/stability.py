"""Storage: will the particles settle (or the droplets cream)?

Pure numpy functions of SI floats or arrays, and a small frozen verdict for the app and
the CLI. Sign convention for the whole module: a velocity is positive downwards (settling,
particle denser than the liquid) and negative upwards (creaming, droplet lighter than the
liquid). Non-finite inputs raise `InputRangeError`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._checks import as_array, fraction, guarded, in_range, positive, scalar_or_array
from .errors import InputRangeError

STANDARD_GRAVITY = 9.80665            # m/s2, CGPM 1901 conventional value
BOLTZMANN = 1.380649e-23              # J/K, exact in the SI since 2019
RICHARDSON_ZAKI_STOKES = 4.65         # Stokes-regime exponent, Richardson & Zaki (1954)
BERIS_CRITICAL = 0.143                # Beris et al. (1985), abstract: sphere falls only below


@guarded
def stokes_velocity(diameter_m, particle_density_kg_per_m3, liquid_density_kg_per_m3,
                    viscosity_Pa_s, gravity_m_per_s2=STANDARD_GRAVITY):
    r"""Terminal velocity of a single sphere in creeping flow (Stokes' law).

    Stokes' drag on a sphere [1]_ balanced against its buoyant weight.

    Parameters
    ----------
    diameter_m : float or array_like
        Particle or droplet diameter d. [m]
    particle_density_kg_per_m3 : float or array_like
        Density of the particle or droplet. [kg/m**3]
    liquid_density_kg_per_m3 : float or array_like
        Density of the liquid. [kg/m**3]
    viscosity_Pa_s : float or array_like
        Viscosity of the liquid around the particle (its low-shear value). [Pa*s]
    gravity_m_per_s2 : float or array_like, optional
        Gravitational (or centrifugal) acceleration. [m/s**2]

    Returns
    -------
    velocity_m_per_s : float or numpy.ndarray
        Positive when settling, negative when creaming. [m/s]

    Notes
    -----
    .. math:: v_0 = \frac{(\rho_p - \rho_f)\, g\, d^2}{18\,\eta}

    Valid for a particle Reynolds number rho_f |v| d / eta below about 0.1-1 (common
    practice, no source); see `particle_reynolds`.

    References
    ----------
    .. [1] G. G. Stokes, "On the effect of the internal friction of fluids on the motion of
       pendulums," Trans. Camb. Phil. Soc., vol. 9, part II, pp. 8-106, 1851.

    Examples
    --------
    Illustrative call: a 10 um silica sphere (2650 kg/m3) in water (1000 kg/m3, 1 mPa*s).

    >>> stokes_velocity(10e-6, 2650.0, 1000.0, 1e-3, gravity_m_per_s2=9.81)
    8.99250e-05
    """
    d = positive(diameter_m, "diameter_m")
    rho_p = positive(particle_density_kg_per_m3, "particle_density_kg_per_m3")
    rho_f = positive(liquid_density_kg_per_m3, "liquid_density_kg_per_m3")
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    g = positive(gravity_m_per_s2, "gravity_m_per_s2")
    v = (rho_p - rho_f) * g * d**2 / (18.0 * eta)
    return scalar_or_array(v, d, rho_p, rho_f, eta, g)


@guarded
def particle_reynolds(diameter_m, velocity_m_per_s, liquid_density_kg_per_m3,
                      viscosity_Pa_s):
    """Particle Reynolds number rho_f |v| d / eta, to check that Stokes' law applies. [-]

    Examples
    --------
    >>> particle_reynolds(10e-6, 9e-5, 1000.0, 1e-3)
    0.0009
    """
    d = positive(diameter_m, "diameter_m")
    v = as_array(velocity_m_per_s, "velocity_m_per_s")
    rho_f = positive(liquid_density_kg_per_m3, "liquid_density_kg_per_m3")
    eta = positive(viscosity_Pa_s, "viscosity_Pa_s")
    return scalar_or_array(rho_f * np.abs(v) * d / eta, d, v, rho_f, eta)


@guarded
def richardson_zaki(phi, exponent=RICHARDSON_ZAKI_STOKES):
    r"""Hindrance factor of settling in a suspension, v / v0 = (1 - phi)^n.

    The empirical relation of Richardson & Zaki [1]_; n = 4.65 in the Stokes regime.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the settling particles. [-]
    exponent : float or array_like, optional
        Richardson-Zaki exponent n (see `richardson_zaki_exponent`). [-]

    Returns
    -------
    factor : float or numpy.ndarray
        Hindered over single-particle settling velocity. [-]

    Notes
    -----
    .. math:: \frac{v}{v_0} = (1 - \phi)^n

    Fitted to sedimentation and fluidisation of uniform spheres; it ignores the rise of
    viscosity with loading as a separate effect (the exponent contains it), so the liquid's
    own viscosity goes into `stokes_velocity` together with this factor.

    References
    ----------
    .. [1] J. F. Richardson and W. N. Zaki, "Sedimentation and fluidisation: Part I,"
       Trans. Inst. Chem. Eng., vol. 32, pp. 35-53, 1954.

    Examples
    --------
    Illustrative call:

    >>> richardson_zaki(0.2)
    0.354298
    """
    phi = fraction(phi, "phi")
    n = in_range(exponent, "exponent", 0.0, 10.0)
    return scalar_or_array((1.0 - phi) ** n, phi, n)


@guarded
def richardson_zaki_exponent(reynolds):
    r"""Richardson-Zaki exponent n from the particle Reynolds number (no wall effect).

    The piecewise correlation of Richardson & Zaki [1]_ for a vessel much wider than the
    particles (d/D -> 0). Coefficients checked against a secondary restatement (a
    transcription of the 1997 reprint of [1]_).

    Parameters
    ----------
    reynolds : float or array_like
        Particle Reynolds number at the terminal velocity (>= 0). [-]

    Returns
    -------
    exponent : float or numpy.ndarray
        4.65 below Re = 0.2; 4.35 Re^-0.03 to 1; 4.45 Re^-0.1 to 500; 2.39 above. [-]

    References
    ----------
    .. [1] J. F. Richardson and W. N. Zaki, "Sedimentation and fluidisation: Part I,"
       Trans. Inst. Chem. Eng., vol. 32, pp. 35-53, 1954.

    Examples
    --------
    >>> richardson_zaki_exponent(0.01)
    4.65
    """
    re = in_range(reynolds, "reynolds", 0.0, np.inf)
    with np.errstate(divide="ignore"):
        n = np.select([re < 0.2, re < 1.0, re < 500.0],
                      [4.65, 4.35 * np.where(re > 0, re, 1.0) ** -0.03,
                       4.45 * np.where(re > 0, re, 1.0) ** -0.1], 2.39)
    return scalar_or_array(n, re)


@guarded
def hindered_settling_velocity(diameter_m, phi, particle_density_kg_per_m3,
                               liquid_density_kg_per_m3, viscosity_Pa_s,
                               exponent=RICHARDSON_ZAKI_STOKES,
                               gravity_m_per_s2=STANDARD_GRAVITY):
    r"""Settling (or creaming) velocity of particles at volume fraction phi.

    Stokes' velocity in the liquid times the Richardson-Zaki factor [1]_.

    Parameters
    ----------
    diameter_m : float or array_like
        Particle or droplet diameter. [m]
    phi : float or array_like
        Volume fraction of the settling particles. [-]
    particle_density_kg_per_m3, liquid_density_kg_per_m3 : float or array_like
        Densities. [kg/m**3]
    viscosity_Pa_s : float or array_like
        Low-shear viscosity of the liquid around the particles (a thickened liquid's
        zero-shear value; not the suspension's, whose rise with phi is in the exponent).
        [Pa*s]
    exponent : float or array_like, optional
        Richardson-Zaki exponent. [-]
    gravity_m_per_s2 : float or array_like, optional
        Acceleration. [m/s**2]

    Returns
    -------
    velocity_m_per_s : float or numpy.ndarray
        Positive when settling, negative when creaming. [m/s]

    Notes
    -----
    .. math:: v = v_0 (1 - \phi)^n

    References
    ----------
    .. [1] J. F. Richardson and W. N. Zaki, "Sedimentation and fluidisation: Part I,"
       Trans. Inst. Chem. Eng., vol. 32, pp. 35-53, 1954.

    Examples
    --------
    Illustrative call:

    >>> hindered_settling_velocity(10e-6, 0.2, 2650.0, 1000.0, 1e-3, gravity_m_per_s2=9.81)
    3.18602e-05
    """
    v0 = stokes_velocity(diameter_m, particle_density_kg_per_m3, liquid_density_kg_per_m3,
                         viscosity_Pa_s, gravity_m_per_s2)
    return scalar_or_array(np.asarray(v0) * np.asarray(richardson_zaki(phi, exponent)),
                           diameter_m, phi, particle_density_kg_per_m3,
                           liquid_density_kg_per_m3, viscosity_Pa_s, exponent,
                           gravity_m_per_s2)


@guarded
def clear_layer_time(height_m, velocity_m_per_s):
    r"""Time for a clear (or serum) layer of a given height to form.

    In batch settling of uniform particles the upper interface falls at the hindered
    settling velocity from the start (the constant-rate period of Kynch's theory [1]_), so
    a clear layer of height h takes h / |v|.

    Parameters
    ----------
    height_m : float or array_like
        Height of clear liquid that counts as visible separation. [m]
    velocity_m_per_s : float or array_like
        Hindered settling (or creaming) velocity. [m/s]

    Returns
    -------
    time_s : float or numpy.ndarray
        ``inf`` where the velocity is zero. [s]

    References
    ----------
    .. [1] G. J. Kynch, "A theory of sedimentation," Trans. Faraday Soc., vol. 48,
       pp. 166-176, 1952 (from memory, not checked against the source).

    Examples
    --------
    Illustrative call: 1 mm at 1 um/s.

    >>> clear_layer_time(1e-3, 1e-6)
    1000.0
    """
    h = in_range(height_m, "height_m", 0.0, np.inf)
    v = np.abs(as_array(velocity_m_per_s, "velocity_m_per_s"))
    with np.errstate(divide="ignore"):
        t = np.where(v > 0, h / np.where(v > 0, v, 1.0), np.inf)
    return scalar_or_array(t, h, v)


@guarded
def gravitational_peclet(diameter_m, particle_density_kg_per_m3, liquid_density_kg_per_m3,
                         temperature_K=298.15, gravity_m_per_s2=STANDARD_GRAVITY):
    r"""Gravitational Peclet number: settling over Brownian motion across one radius.

    Pe_g = v0 a / D0, the Stokes velocity v0 over the Stokes-Einstein diffusivity
    D0 = k_B T / (6 pi eta a) [1]_, which does not depend on the viscosity.

    Parameters
    ----------
    diameter_m : float or array_like
        Particle diameter d = 2a. [m]
    particle_density_kg_per_m3, liquid_density_kg_per_m3 : float or array_like
        Densities. [kg/m**3]
    temperature_K : float or array_like, optional
        Absolute temperature. [K]
    gravity_m_per_s2 : float or array_like, optional
        Acceleration. [m/s**2]

    Returns
    -------
    peclet : float or numpy.ndarray
        Pe_g >= 0; well below 1 Brownian motion wins, well above 1 the particles settle. [-]

    Notes
    -----
    .. math:: \mathrm{Pe}_g = \frac{v_0 a}{D_0} = \frac{4\pi a^4 |\Delta\rho| g}{3 k_B T}

    Conventions differ by constant factors (some authors use d, or drop 4 pi / 3); this is
    the one consistent with `shear`'s Pe = 6 pi eta a^3 gammadot / (k_B T). Its inverse
    times a is the gravitational length k_B T / (Delta m g) (`gravitational_length`).

    References
    ----------
    .. [1] A. Einstein, "Über die von der molekularkinetischen Theorie der Wärme geforderte
       Bewegung von in ruhenden Flüssigkeiten suspendierten Teilchen," Ann. Phys., vol. 17,
       pp. 549-560, 1905.

    Examples
    --------
    Illustrative call: a 1 um silica sphere in water at 25 C.

    >>> gravitational_peclet(1e-6, 2650.0, 1000.0, 298.15, 9.81)
    1.02945
    """
    d = positive(diameter_m, "diameter_m")
    drho = _density_difference(particle_density_kg_per_m3, liquid_density_kg_per_m3)
    temp = positive(temperature_K, "temperature_K")
    g = positive(gravity_m_per_s2, "gravity_m_per_s2")
    a = 0.5 * d
    pe = 4.0 * np.pi * a**4 * np.abs(drho) * g / (3.0 * BOLTZMANN * temp)
    return scalar_or_array(pe, d, drho, temp, g)


@guarded
def gravitational_length(diameter_m, particle_density_kg_per_m3, liquid_density_kg_per_m3,
                         temperature_K=298.15, gravity_m_per_s2=STANDARD_GRAVITY):
    r"""Scale height k_B T / (Delta m g) of the sedimentation-equilibrium profile. [m]

    At equilibrium the number density falls as exp(-z / l_g) with height (Perrin's
    barometric distribution); ``inf`` when the densities match.

    Examples
    --------
    Illustrative call: 1 um silica in water at 25 C.

    >>> gravitational_length(1e-6, 2650.0, 1000.0, 298.15, 9.81)
    4.85698e-07
    """
    pe = np.asarray(gravitational_peclet(diameter_m, particle_density_kg_per_m3,
                                         liquid_density_kg_per_m3, temperature_K,
                                         gravity_m_per_s2))
    a = 0.5 * positive(diameter_m, "diameter_m")
    with np.errstate(divide="ignore"):
        length = np.where(pe > 0, a / np.where(pe > 0, pe, 1.0), np.inf)
    return scalar_or_array(length, diameter_m, particle_density_kg_per_m3,
                           liquid_density_kg_per_m3, temperature_K, gravity_m_per_s2)


@guarded
def beris_yield_parameter(yield_stress_Pa, diameter_m, particle_density_kg_per_m3,
                          liquid_density_kg_per_m3, gravity_m_per_s2=STANDARD_GRAVITY):
    r"""Yield-stress parameter Y of a sphere in a Bingham liquid (held when Y > 0.143).

    The ratio of the yield stress to the buoyant weight per projected area used by Beris
    et al. [1]_, whose computations show a sphere falls only when Y < 0.143.

    Parameters
    ----------
    yield_stress_Pa : float or array_like
        Yield stress of the liquid (or of the medium around the particle). [Pa]
    diameter_m : float or array_like
        Sphere diameter d = 2R. [m]
    particle_density_kg_per_m3, liquid_density_kg_per_m3 : float or array_like
        Densities; |Delta rho| is used, so a creaming droplet is treated alike. [kg/m**3]
    gravity_m_per_s2 : float or array_like, optional
        Acceleration. [m/s**2]

    Returns
    -------
    Y : float or numpy.ndarray
        ``inf`` when the densities match. [-]

    Notes
    -----
    .. math:: Y = \frac{3\,\tau_y}{2 R\, |\rho_p - \rho_f|\, g}

    The critical value 0.143 is from the abstract of [1]_; the definition of Y is from
    memory, not checked against the source (it is consistent with the often-quoted
    equivalent tau_y / (g d Delta rho) > 0.048, also from memory). Rigid sphere, creeping
    flow; wall slip, thixotropy and vibration in transport are not covered.

    References
    ----------
    .. [1] A. N. Beris, J. A. Tsamopoulos, R. C. Armstrong and R. A. Brown, "Creeping
       motion of a sphere through a Bingham plastic," J. Fluid Mech., vol. 158,
       pp. 219-244, 1985.

    Examples
    --------
    Illustrative call: 1 Pa holds a 100 um silica sphere in water.

    >>> beris_yield_parameter(1.0, 100e-6, 2650.0, 1000.0, 9.81)
    1.85340
    """
    tau = in_range(yield_stress_Pa, "yield_stress_Pa", 0.0, np.inf)
    d = positive(diameter_m, "diameter_m")
    drho = np.abs(_density_difference(particle_density_kg_per_m3, liquid_density_kg_per_m3))
    g = positive(gravity_m_per_s2, "gravity_m_per_s2")
    with np.errstate(under="ignore"):
        weight = d * drho * g            # may underflow to 0 for absurd inputs
    with np.errstate(divide="ignore", invalid="ignore"):
        # No yield stress holds nothing (Y = 0); no net weight is held by any yield stress.
        y = np.where(tau == 0.0, 0.0,
                     np.where(weight > 0, 3.0 * tau / np.where(weight > 0, weight, 1.0), np.inf))
    return scalar_or_array(y, tau, d, drho, g)


@dataclass(frozen=True)
class StorageVerdict:
    """A plain verdict on settling or creaming, with the numbers behind it.

    `stable` is True when no clear layer of `clear_layer_m` is expected within
    `storage_time_s` (or the particles are held or Brownian); `reason` is one of
    "density-matched", "held-by-yield-stress", "brownian", "slow", "settles", "creams".
    """

    stable: bool
    reason: str
    message: str
    direction: str                    # "settles", "creams" or "neutral"
    stokes_velocity_m_per_s: float
    hindered_velocity_m_per_s: float
    clear_layer_time_s: float
    clear_layer_m: float
    storage_time_s: float
    gravitational_peclet: float
    gravitational_length_m: float
    yield_parameter: float
    particle_reynolds: float
    richardson_zaki_exponent: float


@guarded
def storage_verdict(diameter_m, particle_density_kg_per_m3, liquid_density_kg_per_m3,
                    viscosity_Pa_s, phi=0.0, yield_stress_Pa=0.0, *,
                    clear_layer_m=1e-3, storage_time_s=180 * 86400.0,
                    container_height_m=0.1, temperature_K=298.15,
                    exponent=RICHARDSON_ZAKI_STOKES,
                    gravity_m_per_s2=STANDARD_GRAVITY) -> StorageVerdict:
    """Will a visible clear layer form during storage? A verdict with its numbers.

    Scalars only. The checks, in order (our own decision rules; thresholds other than
    Beris' 0.143 are common practice, no source):

    1. densities equal: nothing settles;
    2. a yield stress with Beris' Y >= 0.143 holds the particle (`beris_yield_parameter`);
    3. gravitational length at least the container height: at sedimentation equilibrium
       the top keeps at least exp(-1) of the bottom concentration, a gradient but no clear
       layer (`gravitational_length`);
    4. otherwise the clear-layer time (`clear_layer_time` of the hindered velocity) is
       compared with the storage time.

    Parameters
    ----------
    diameter_m : float
        Diameter of the particles that settle first (the coarse end, e.g. D90). [m]
    particle_density_kg_per_m3, liquid_density_kg_per_m3 : float
        Densities. [kg/m**3]
    viscosity_Pa_s : float
        Low-shear viscosity of the liquid around the particles. [Pa*s]
    phi : float, optional
        Volume fraction of the dispersed phase (for the hindrance factor). [-]
    yield_stress_Pa : float, optional
        Yield stress of the liquid, 0 if none. [Pa]
    clear_layer_m : float, optional
        Clear-layer height that counts as visible separation (default 1 mm). [m]
    storage_time_s : float, optional
        Storage time (default 180 days). [s]
    container_height_m : float, optional
        Fill height of the container. [m]
    temperature_K : float, optional
        Storage temperature. [K]
    exponent : float, optional
        Richardson-Zaki exponent. [-]
    gravity_m_per_s2 : float, optional
        Acceleration. [m/s**2]

    Returns
    -------
    StorageVerdict

    Examples
    --------
    Illustrative (invented) case: 10 um silica at 20 vol% in water.

    >>> v = storage_verdict(10e-6, 2650.0, 1000.0, 1e-3, phi=0.2)
    >>> v.stable, v.reason
    (False, 'settles')
    """
    args = {"diameter_m": diameter_m, "phi": phi, "yield_stress_Pa": yield_stress_Pa,
            "clear_layer_m": clear_layer_m, "storage_time_s": storage_time_s,
            "container_height_m": container_height_m,
            "particle_density_kg_per_m3": particle_density_kg_per_m3,
            "liquid_density_kg_per_m3": liquid_density_kg_per_m3,
            "viscosity_Pa_s": viscosity_Pa_s, "temperature_K": temperature_K,
            "exponent": exponent, "gravity_m_per_s2": gravity_m_per_s2}
    for name, value in args.items():
        if np.ndim(value) != 0:
            raise InputRangeError(name, f"an array of shape {np.shape(value)}",
                                  "a single number (storage_verdict takes scalars)")
    storage = float(positive(storage_time_s, "storage_time_s"))
    layer = float(positive(clear_layer_m, "clear_layer_m"))
    height = float(positive(container_height_m, "container_height_m"))
    v0 = float(stokes_velocity(diameter_m, particle_density_kg_per_m3,
                               liquid_density_kg_per_m3, viscosity_Pa_s, gravity_m_per_s2))
    v = float(hindered_settling_velocity(diameter_m, phi, particle_density_kg_per_m3,
                                         liquid_density_kg_per_m3, viscosity_Pa_s, exponent,
                                         gravity_m_per_s2))
    t_clear = float(clear_layer_time(layer, v))
    pe = float(gravitational_peclet(diameter_m, particle_density_kg_per_m3,
                                    liquid_density_kg_per_m3, temperature_K,
                                    gravity_m_per_s2))
    l_g = float(gravitational_length(diameter_m, particle_density_kg_per_m3,
                                     liquid_density_kg_per_m3, temperature_K,
                                     gravity_m_per_s2))
    y = float(beris_yield_parameter(yield_stress_Pa, diameter_m, particle_density_kg_per_m3,
                                    liquid_density_kg_per_m3, gravity_m_per_s2))
    re = float(particle_reynolds(diameter_m, v0, liquid_density_kg_per_m3, viscosity_Pa_s))
    direction = "settles" if v0 > 0 else "creams" if v0 < 0 else "neutral"
    layer_name = "clear layer on top" if direction == "settles" else "serum layer at the bottom"
    numbers = (f"Stokes velocity {_speed(v0)}, hindered {_speed(v)}; a {layer * 1e3:g} mm "
               f"{layer_name} in {_duration(t_clear)}; Pe_g {pe:.3g}")
    if float(yield_stress_Pa) > 0:
        numbers += f"; yield parameter Y {y:.3g} (held above {BERIS_CRITICAL})"
    if direction == "neutral":
        stable, reason, head = True, "density-matched", "Densities match: nothing settles."
    elif float(yield_stress_Pa) > 0 and y >= BERIS_CRITICAL:
        stable, reason = True, "held-by-yield-stress"
        head = "Held in place by the yield stress at rest."
    elif l_g >= height:
        stable, reason = True, "brownian"
        head = (f"Brownian motion keeps the particles spread over the container "
                f"(gravitational length {l_g:.3g} m; at equilibrium the top holds "
                f"{100 * np.exp(-height / l_g):.0f} % of the bottom concentration).")
    elif t_clear > storage:
        stable, reason = True, "slow"
        head = (f"Stable for the storage time of {_duration(storage)}: no "
                f"{layer * 1e3:g} mm {layer_name} expected.")
    else:
        stable, reason = False, direction
        head = (f"It {direction}: a {layer * 1e3:g} mm {layer_name} forms within "
                f"{_duration(t_clear)}, before the {_duration(storage)} of storage.")
    if re > 0.1:
        numbers += f"; particle Reynolds {re:.2g}: Stokes' law at the edge of its validity"
    return StorageVerdict(stable, reason, f"{head} ({numbers}.)", direction, v0, v, t_clear,
                          layer, storage, pe, l_g, y, re, float(exponent))


def _density_difference(particle, liquid) -> np.ndarray:
    return (positive(particle, "particle_density_kg_per_m3")
            - positive(liquid, "liquid_density_kg_per_m3"))


def _speed(v: float) -> str:
    v = abs(v)
    for unit, scale in (("mm/s", 1e-3), ("um/s", 1e-6), ("nm/s", 1e-9)):
        if v >= scale:
            return f"{v / scale:.3g} {unit}"
    return f"{v:.3g} m/s"


def _duration(t: float) -> str:
    if not np.isfinite(t):
        return "never"
    for unit, scale in (("years", 365.25 * 86400), ("days", 86400.0), ("h", 3600.0),
                        ("min", 60.0)):
        if t >= scale:
            return f"{t / scale:.3g} {unit}"
    return f"{t:.3g} s"
