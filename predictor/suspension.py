"""Relative viscosity of suspensions of solid particles in a Newtonian liquid.

Each function is one published relation of the relative viscosity eta_r = eta / eta_liquid
as a function of the particle volume fraction phi. All are pure numpy and broadcast over
every argument. Conventions for the whole module:

- phi outside [0, 1] or a non-finite input raises `InputRangeError`;
- a divergent relation returns ``inf`` for phi >= its divergence point (phi_max);
- parameters outside their registry bounds are refused by `relative_viscosity`.
"""

from __future__ import annotations

import numpy as np

from ._checks import as_array, fraction, guarded, in_range, positive, scalar_or_array
from .registry import Param, model

PHI_MAX = Param("phi_max", "-", (0.2, 1.0), "maximum packing fraction")
INTRINSIC = Param("intrinsic_viscosity", "-", (2.5, 20.0), "intrinsic viscosity [eta]")


def _reduced(phi, phi_max):
    """phi / phi_max with checks; the common argument of the divergent relations."""
    phi = fraction(phi, "phi")
    phi_max = in_range(phi_max, "phi_max", 0.0, 1.0, low_open=True)
    return phi, phi_max, phi / phi_max


@model("suspension", INTRINSIC,
       validity="dilute, non-interacting spheres, phi below about 0.03",
       source="Einstein, Ann. Phys. 1906/1911", phi_range=(0.0, 0.03))
@guarded
def einstein(phi, intrinsic_viscosity=2.5):
    r"""Relative viscosity of a dilute suspension of rigid spheres.

    Einstein's first-order result [1]_ (with the 1911 correction of the coefficient) for
    force-free rigid spheres in a Newtonian liquid.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    intrinsic_viscosity : float or array_like, optional
        Intrinsic viscosity [eta]; 2.5 for spheres. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid. [-]

    Notes
    -----
    .. math:: \eta_r = 1 + [\eta]\,\phi

    Valid for phi -> 0, in practice phi below about 0.02 to 0.03 [2]_.

    References
    ----------
    .. [1] A. Einstein, "Eine neue Bestimmung der Moleküldimensionen," Ann. Phys., vol. 19,
       pp. 289-306, 1906; correction: Ann. Phys., vol. 34, pp. 591-592, 1911.
    .. [2] A. Einstein, "Bemerkung zu meiner Arbeit: Eine Beziehung zwischen dem elastischen
       Verhalten ...," Kolloid-Z., vol. 27, p. 137, 1920.

    Examples
    --------
    Illustrative call:

    >>> einstein(0.02)
    1.05
    """
    phi = fraction(phi, "phi")
    k = in_range(intrinsic_viscosity, "intrinsic_viscosity", 0.0, np.inf, low_open=True)
    return scalar_or_array(1.0 + k * phi, phi, k)


#: Huggins-type coefficients k_H of the phi**2 term (from memory, not checked against the
#: sources): Brownian spheres at low shear (Batchelor 1977); non-Brownian spheres in pure
#: straining (7.6) and, approximately, in simple shear (5.2) (Batchelor & Green 1972).
BATCHELOR_COEFFICIENTS = {"brownian": 6.2, "pure-straining": 7.6, "simple-shear": 5.2}


@model("suspension",
       Param("huggins_coefficient", "-", (5.0, 7.6), "coefficient k_H of the phi**2 term"),
       validity="semi-dilute spheres, phi below about 0.1",
       source="Batchelor & Green 1972; Batchelor 1977", phi_range=(0.0, 0.1))
@guarded
def batchelor(phi, huggins_coefficient=6.2):
    r"""Relative viscosity of a semi-dilute suspension of spheres, to second order in phi.

    The second-order expansion of Batchelor & Green [1]_ and Batchelor [2]_; the
    coefficient of phi**2 depends on the flow and on Brownian motion, see
    `BATCHELOR_COEFFICIENTS`.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    huggins_coefficient : float or array_like, optional
        Coefficient k_H of the phi**2 term: 6.2 Brownian, 7.6 pure straining, about 5.2
        simple shear (from memory, not checked against the sources). [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid. [-]

    Notes
    -----
    .. math:: \eta_r = 1 + 2.5\,\phi + k_H\,\phi^2

    Valid to phi of about 0.1; the range 5.2 to 7.6 of k_H is listed in Table 6 of [3]_.

    References
    ----------
    .. [1] G. K. Batchelor and J. T. Green, "The determination of the bulk stress in a
       suspension of spherical particles to order c^2," J. Fluid Mech., vol. 56, no. 3,
       pp. 401-427, 1972.
    .. [2] G. K. Batchelor, "The effect of Brownian motion on the bulk stress in a suspension
       of spherical particles," J. Fluid Mech., vol. 83, no. 1, pp. 97-117, 1977.
    .. [3] Review of suspension viscosity relations, Entropy, vol. 23, p. 979, 2021, Table 6.

    Examples
    --------
    Illustrative call (Brownian coefficient):

    >>> batchelor(0.1)
    1.312
    """
    phi = fraction(phi, "phi")
    k = as_array(huggins_coefficient, "huggins_coefficient")
    return scalar_or_array(1.0 + 2.5 * phi + k * phi**2, phi, k)


@model("suspension", PHI_MAX, INTRINSIC,
       validity="0 <= phi < phi_max; hard spheres or particles of known [eta]",
       source="Krieger & Dougherty, Trans. Soc. Rheol. 1959")
@guarded
def krieger_dougherty(phi, phi_max=0.64, intrinsic_viscosity=2.5):
    r"""Relative viscosity of a concentrated suspension, diverging at phi_max.

    The Krieger-Dougherty relation [1]_, as written in Eq. (1) of [2]_.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges. [-]
    intrinsic_viscosity : float or array_like, optional
        Intrinsic viscosity [eta]; 2.5 for spheres. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \left(1 - \frac{\phi}{\phi_m}\right)^{-[\eta]\,\phi_m}

    Tends to Einstein's 1 + [eta] phi as phi -> 0; with [eta] phi_max = 2 it is Quemada's
    relation. Hard-sphere fits (Krieger 1972, from memory, not checked against the source):
    low shear [eta] = 3.13, phi_max = 0.57; high shear [eta] = 2.67, phi_max = 0.68.

    References
    ----------
    .. [1] I. M. Krieger and T. J. Dougherty, "A mechanism for non-Newtonian flow in
       suspensions of rigid spheres," Trans. Soc. Rheol., vol. 3, pp. 137-152, 1959.
    .. [2] R. S. Farr, "Simple heuristic for the viscosity of polydisperse hard spheres,"
       J. Chem. Phys., vol. 141, 214503, 2014; arXiv:1306.1442, Eq. (1).

    Examples
    --------
    Illustrative call:

    >>> krieger_dougherty(0.3, phi_max=0.64, intrinsic_viscosity=2.5)
    2.75120
    """
    phi, phi_max, x = _reduced(phi, phi_max)
    k = as_array(intrinsic_viscosity, "intrinsic_viscosity")
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(x < 1.0, np.power(np.clip(1.0 - x, 0.0, None), -k * phi_max), np.inf)
    return scalar_or_array(eta, phi, phi_max, k)


@model("suspension", PHI_MAX,
       validity="0 <= phi < phi_max; concentrated suspensions and dispersions",
       source="Quemada, Rheol. Acta 1977")
@guarded
def quemada(phi, phi_max=0.64):
    r"""Relative viscosity from Quemada's minimum-energy-dissipation argument.

    Quemada's relation [1]_; identical to Krieger-Dougherty with [eta] phi_max = 2.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \left(1 - \frac{\phi}{\phi_m}\right)^{-2}

    Its dilute limit is 1 + (2/phi_max) phi, i.e. Einstein's only for phi_max = 0.8.

    Citation: the form (1 - phi/phi_m)^-2 was checked against open codes; one of them cites
    Quemada's 1998 paper [2]_ for it rather than the 1977 one [1]_. We cite [1]_ as the
    origin, where Quemada derived the exponent 2 from minimum energy dissipation, and [2]_
    as the restatement actually read; both give the same formula, so the choice changes no
    number.

    References
    ----------
    .. [1] D. Quemada, "Rheology of concentrated disperse systems and minimum energy
       dissipation principle," Rheol. Acta, vol. 16, pp. 82-94, 1977.
    .. [2] D. Quemada, "Rheological modelling of complex fluids. I. The concept of effective
       volume fraction revisited," Eur. Phys. J. Appl. Phys., vol. 1, pp. 119-127, 1998.

    Examples
    --------
    Illustrative call:

    >>> quemada(0.32, phi_max=0.64)
    4.0
    """
    phi, phi_max, x = _reduced(phi, phi_max)
    with np.errstate(divide="ignore"):
        eta = np.where(x < 1.0, 1.0 / np.clip(1.0 - x, 0.0, None) ** 2, np.inf)
    return scalar_or_array(eta, phi, phi_max)


@model("suspension", PHI_MAX,
       validity="0 <= phi < phi_max; fitted to latex suspensions",
       source="Maron & Pierce, J. Colloid Sci. 1956")
@guarded
def maron_pierce(phi, phi_max=0.64):
    r"""Relative viscosity of the Maron-Pierce form, diverging at phi_max.

    Maron & Pierce [1]_; the same algebraic form as Quemada's relation, used by Mueller,
    Llewellin & Mader [2]_ with a shape-dependent phi_max.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \left(1 - \frac{\phi}{\phi_m}\right)^{-2}

    References
    ----------
    .. [1] S. H. Maron and P. E. Pierce, "Application of Ree-Eyring generalized flow theory
       to suspensions of spherical particles," J. Colloid Sci., vol. 11, pp. 80-95, 1956.
    .. [2] S. Mueller, E. W. Llewellin and H. M. Mader, "The rheology of suspensions of
       solid particles," Proc. R. Soc. A, vol. 466, pp. 1201-1228, 2010.

    Examples
    --------
    Illustrative call:

    >>> maron_pierce(0.48, phi_max=0.64)
    16.0
    """
    return quemada(phi, phi_max)


@model("suspension", PHI_MAX,
       validity="0 <= phi < phi_max; bitumen emulsions and filled suspensions",
       source="Eilers, Kolloid-Z. 1941")
@guarded
def eilers(phi, phi_max=0.64):
    r"""Relative viscosity from Eilers' empirical relation, diverging at phi_max.

    Eilers' relation [1]_ in the form quoted by Mueller, Llewellin & Mader [2]_.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \left[1 + \frac{1.25\,\phi}{1 - \phi/\phi_m}\right]^2

    Tends to 1 + 2.5 phi as phi -> 0. Formula from memory, not checked against [1]_.

    References
    ----------
    .. [1] H. Eilers, "Die Viskosität von Emulsionen hochviskoser Stoffe als Funktion der
       Konzentration," Kolloid-Z., vol. 97, pp. 313-321, 1941.
    .. [2] S. Mueller, E. W. Llewellin and H. M. Mader, "The rheology of suspensions of
       solid particles," Proc. R. Soc. A, vol. 466, pp. 1201-1228, 2010.

    Examples
    --------
    Illustrative call:

    >>> eilers(0.32, phi_max=0.64)
    3.24
    """
    phi, phi_max, x = _reduced(phi, phi_max)
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(x < 1.0, (1.0 + 1.25 * phi / (1.0 - x)) ** 2, np.inf)
    return scalar_or_array(eta, phi, phi_max)


@model("suspension",
       Param("crowding_factor", "-", (1.35, 1.91), "self-crowding factor k"),
       INTRINSIC,
       validity="0 <= phi < 1/k; monodisperse spheres for k about 1.35-1.91",
       source="Mooney, J. Colloid Sci. 1951")
@guarded
def mooney(phi, crowding_factor=1.43, intrinsic_viscosity=2.5):
    r"""Relative viscosity from Mooney's self-crowding argument.

    Mooney's relation [1]_; it diverges at phi = 1/k.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    crowding_factor : float or array_like, optional
        Self-crowding factor k, reported between 1.35 and 1.91 (from memory, not checked
        against the source); the relation diverges at phi = 1/k. [-]
    intrinsic_viscosity : float or array_like, optional
        Intrinsic viscosity [eta]; 2.5 for spheres. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= 1/k. [-]

    Notes
    -----
    .. math:: \eta_r = \exp\left(\frac{[\eta]\,\phi}{1 - k\,\phi}\right)

    References
    ----------
    .. [1] M. Mooney, "The viscosity of a concentrated suspension of spherical particles,"
       J. Colloid Sci., vol. 6, pp. 162-170, 1951.

    Examples
    --------
    Illustrative call:

    >>> mooney(0.2, crowding_factor=1.43)
    2.01432
    """
    phi = fraction(phi, "phi")
    k = positive(crowding_factor, "crowding_factor")
    eta_i = as_array(intrinsic_viscosity, "intrinsic_viscosity")
    denom = 1.0 - k * phi
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        eta = np.where(denom > 0.0, np.exp(eta_i * phi / np.where(denom > 0, denom, 1.0)), np.inf)
    return scalar_or_array(eta, phi, k, eta_i)


@model("suspension", PHI_MAX,
       validity="0 <= phi < phi_max; glass beads in polymer melts and liquids",
       source="Chong, Christiansen & Baer, J. Appl. Polym. Sci. 1971")
@guarded
def chong(phi, phi_max=0.64):
    r"""Relative viscosity from the relation of Chong, Christiansen & Baer.

    The empirical relation of [1]_, fitted to glass beads of several size ratios.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges; the authors used about
        0.605 for their monomodal beads (from memory, not checked against the source). [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \left[1 + 0.75\,\frac{\phi/\phi_m}{1 - \phi/\phi_m}\right]^2

    Its dilute limit is 1 + (1.5/phi_max) phi, Einstein's for phi_max = 0.6.

    References
    ----------
    .. [1] J. S. Chong, E. B. Christiansen and A. D. Baer, "Rheology of concentrated
       suspensions," J. Appl. Polym. Sci., vol. 15, pp. 2007-2021, 1971.

    Examples
    --------
    Illustrative call:

    >>> chong(0.32, phi_max=0.64)
    3.0625
    """
    phi, phi_max, x = _reduced(phi, phi_max)
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(x < 1.0, (1.0 + 0.75 * x / (1.0 - x)) ** 2, np.inf)
    return scalar_or_array(eta, phi, phi_max)


@model("suspension",
       validity="spheres, phi up to about 0.6 (range of the data correlated)",
       source="Thomas, J. Colloid Sci. 1965", phi_range=(0.0, 0.6))
@guarded
def thomas(phi):
    r"""Relative viscosity from Thomas' correlation of many published data sets.

    Thomas' empirical correlation [1]_ of extrapolated high-shear data for uniform spheres.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid. [-]

    Notes
    -----
    .. math:: \eta_r = 1 + 2.5\,\phi + 10.05\,\phi^2 + 0.00273\,e^{16.6\,\phi}

    Coefficients checked against a secondary restatement (an open CFD code's slurry
    viscosity model citing [1]_). It does not diverge; do not use it past phi of about 0.6.

    References
    ----------
    .. [1] D. G. Thomas, "Transport characteristics of suspension: VIII. A note on the
       viscosity of Newtonian suspensions of uniform spherical particles," J. Colloid Sci.,
       vol. 20, pp. 267-277, 1965.

    Examples
    --------
    Illustrative call:

    >>> thomas(0.3)
    3.05165
    """
    phi = fraction(phi, "phi")
    eta = 1.0 + 2.5 * phi + 10.05 * phi**2 + 0.00273 * np.exp(16.6 * phi)
    return scalar_or_array(eta, phi)


@model("suspension", PHI_MAX,
       validity="concentrated only, phi/phi_max above about 0.8 (asymptotic near phi_max)",
       source="Frankel & Acrivos, Chem. Eng. Sci. 1967",
       phi_range=(0.8, 1.0), phi_range_relative=True)
@guarded
def frankel_acrivos(phi, phi_max=0.64):
    r"""Relative viscosity of a suspension close to its maximum packing (lubrication limit).

    The asymptotic result of Frankel & Acrivos [1]_ from lubrication between neighbouring
    spheres; valid near phi_max only, and meaningless in the dilute limit.

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the dispersed phase. [-]
    phi_max : float or array_like, optional
        Maximum packing fraction, where the viscosity diverges. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        Viscosity of the suspension divided by that of the liquid; ``inf`` where
        phi >= phi_max. [-]

    Notes
    -----
    .. math:: \eta_r = \frac{9}{8}\,\frac{(\phi/\phi_m)^{1/3}}{1 - (\phi/\phi_m)^{1/3}}

    Flagged as outside its validity for phi/phi_max below 0.8 (our own threshold, common
    practice, no source).

    References
    ----------
    .. [1] N. A. Frankel and A. Acrivos, "On the viscosity of a concentrated suspension of
       solid spheres," Chem. Eng. Sci., vol. 22, pp. 847-853, 1967.

    Examples
    --------
    Illustrative call:

    >>> frankel_acrivos(0.6, phi_max=0.64)
    51.7339
    """
    phi, phi_max, x = _reduced(phi, phi_max)
    c = np.cbrt(x)
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.where(x < 1.0, 9.0 / 8.0 * c / (1.0 - c), np.inf)
    return scalar_or_array(eta, phi, phi_max)


@guarded
def effective_volume_fraction(phi, layer_thickness_m, radius_m):
    r"""Volume fraction swollen by an adsorbed or steric layer around each particle.

    A shell of thickness delta around spheres of radius a occupies
    phi_eff = phi (1 + delta/a)^3 (geometry; the usual hard-sphere mapping of sterically
    stabilised particles, common practice, no source).

    Parameters
    ----------
    phi : float or array_like
        Volume fraction of the bare particles. [-]
    layer_thickness_m : float or array_like
        Thickness delta of the adsorbed or steric layer. [m]
    radius_m : float or array_like
        Particle radius a. [m]

    Returns
    -------
    phi_eff : float or numpy.ndarray
        Effective volume fraction; may exceed phi_max, where divergent relations give inf. [-]

    Examples
    --------
    Illustrative call: a 10 nm layer on 100 nm particles at phi = 0.3.

    >>> effective_volume_fraction(0.3, 10e-9, 100e-9)
    0.3993
    """
    phi = fraction(phi, "phi")
    delta = in_range(layer_thickness_m, "layer_thickness_m", 0.0, np.inf)
    a = positive(radius_m, "radius_m")
    return scalar_or_array(phi * (1.0 + delta / a) ** 3, phi, delta, a)
