"""Loadings: mass fraction <-> volume fraction for a liquid with several dispersed ingredients.

Pure numpy, vectorised over leading axes: the last axis runs over the ingredients.
"""

from __future__ import annotations

import numpy as np

from ._checks import as_array, fraction, guarded, positive
from .errors import InputRangeError


@guarded
def volume_fractions(loadings, is_mass, densities_kg_per_m3, liquid_density_kg_per_m3):
    r"""Volume fraction of each ingredient from loadings given on a mass or volume basis.

    Each ingredient's loading is a fraction of the whole formulation, by mass where
    `is_mass` is true and by volume otherwise; the liquid makes up the rest. Mixed bases are
    solved exactly as one linear system (mass balance, ideal mixing: volumes add).

    Parameters
    ----------
    loadings : array_like, shape (..., n)
        Loading of each ingredient as a fraction of the formulation (0 to 1). [-]
    is_mass : array_like of bool, shape (n,) or (..., n)
        True where the loading is a mass fraction, False where it is a volume fraction.
    densities_kg_per_m3 : array_like, shape (..., n)
        Density of each ingredient. [kg/m**3]
    liquid_density_kg_per_m3 : float or array_like, shape (...)
        Density of the continuous liquid. [kg/m**3]

    Returns
    -------
    phi : numpy.ndarray, shape (..., n)
        Volume fraction of each ingredient in the formulation. [-]

    Raises
    ------
    InputRangeError
        Loadings outside 0-1, or loadings that together exceed the whole formulation.

    Notes
    -----
    With the mixture density :math:`\rho_m = \rho_L + \sum_k (\rho_k - \rho_L)\phi_k`, a mass
    fraction satisfies :math:`w_i \rho_m = \rho_i \phi_i`; volume fractions are known
    directly. Ideal mixing (no volume change) is common practice, no source.

    Examples
    --------
    40 wt% of a 3900 kg/m3 powder in water (1000 kg/m3), by hand:
    (0.4/3900) / (0.4/3900 + 0.6/1000) = 0.145985.

    >>> float(volume_fractions([0.4], [True], [3900.0], 1000.0)[0])
    0.145985
    """
    w = as_array(loadings, "loading")
    if w.ndim == 0:
        w = w[None]
    if np.any((w < 0) | (w > 1)):
        raise InputRangeError("loading", w[(w < 0) | (w > 1)].flat[0], "a fraction from 0 to 1")
    rho = positive(densities_kg_per_m3, "density_kg_per_m3")
    rho_l = positive(liquid_density_kg_per_m3, "liquid density_kg_per_m3")
    mass = np.broadcast_to(np.asarray(is_mass, dtype=bool), w.shape)
    rho = np.broadcast_to(rho, w.shape)
    rho_l = np.broadcast_to(np.asarray(rho_l, dtype=float)[..., None], w.shape)
    for name, part in (("total mass loading", np.where(mass, w, 0.0)),
                       ("total volume loading", np.where(mass, 0.0, w))):
        total = part.sum(axis=-1)
        if np.any(total > 1.0 + 1e-12):
            raise InputRangeError(name, float(np.max(total)), "at most 100 % of the formulation")
    n = w.shape[-1]
    eye = np.eye(n)
    # Mass rows: w_i (rho_k - rho_L) - delta_ik rho_i; volume rows: delta_ik.
    a = np.where(mass[..., :, None], w[..., :, None] * (rho - rho_l)[..., None, :]
                 - eye * rho[..., :, None], eye)
    b = np.where(mass, -w * rho_l, w)
    try:
        phi = np.linalg.solve(a, b[..., None])[..., 0]
    except np.linalg.LinAlgError:
        raise InputRangeError("densities_kg_per_m3", "(these densities)",
                              "densities for which the mass balance has one solution") from None
    total = phi.sum(axis=-1)
    if np.any(phi < -1e-12) or np.any(total > 1.0 + 1e-9):
        raise InputRangeError("loadings", float(np.max(total)),
                              "loadings whose volumes together stay below the whole formulation")
    return np.clip(phi, 0.0, 1.0)


@guarded
def mass_fractions(phi, densities_kg_per_m3, liquid_density_kg_per_m3):
    r"""Mass fraction of each ingredient from its volume fraction (ideal mixing).

    Parameters
    ----------
    phi : array_like, shape (..., n)
        Volume fraction of each ingredient. [-]
    densities_kg_per_m3 : array_like, shape (..., n)
        Density of each ingredient. [kg/m**3]
    liquid_density_kg_per_m3 : float or array_like, shape (...)
        Density of the continuous liquid. [kg/m**3]

    Returns
    -------
    w : numpy.ndarray, shape (..., n)
        Mass fraction of each ingredient. [-]

    Notes
    -----
    .. math:: w_i = \frac{\rho_i \phi_i}{\rho_L (1 - \sum_k \phi_k) + \sum_k \rho_k \phi_k}

    Examples
    --------
    The inverse of the `volume_fractions` example:

    >>> float(mass_fractions([0.145985], [3900.0], 1000.0)[0])
    0.4
    """
    phi = as_array(phi, "phi")
    if phi.ndim == 0:
        phi = phi[None]
    total = phi.sum(axis=-1)
    if np.any(phi < 0) or np.any(total > 1.0):
        raise InputRangeError("phi", float(np.max(total)),
                              "volume fractions adding up to at most 1")
    rho = positive(densities_kg_per_m3, "density_kg_per_m3")
    rho_l = positive(liquid_density_kg_per_m3, "liquid density_kg_per_m3")
    masses = rho * phi
    return masses / (np.asarray(rho_l)[..., None] * (1.0 - total)[..., None]
                     + masses.sum(axis=-1, keepdims=True))


@guarded
def mixture_density(phi, densities_kg_per_m3, liquid_density_kg_per_m3):
    """Density of the formulation from volume fractions (ideal mixing). [kg/m**3]

    Examples
    --------
    >>> mixture_density([0.2], [2500.0], 1000.0)
    1300.0
    """
    phi = np.atleast_1d(fraction(phi, "phi"))
    if np.any(phi.sum(axis=-1) > 1.0):
        raise InputRangeError("phi", float(np.max(phi.sum(axis=-1))),
                              "volume fractions adding up to at most 1")
    rho = positive(densities_kg_per_m3, "density_kg_per_m3")
    rho_l = positive(liquid_density_kg_per_m3, "liquid density_kg_per_m3")
    result = rho_l * (1.0 - phi.sum(axis=-1)) + (rho * phi).sum(axis=-1)
    return float(result) if np.ndim(result) == 0 else result
