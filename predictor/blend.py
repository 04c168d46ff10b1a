"""Blend design: the shares of two or three powders that pack densest or flow easiest.

Given the size distribution (and density) of each powder, `optimise_blend` scans the volume
shares on a grid, returns the maximum packing fraction of every blend (the whole curve, for
plotting) and the best shares; at a fixed total loading it also returns the relative
viscosity of each blend in two views:

- one suspension of the blended sizes: Krieger-Dougherty with the blend's phi_max;
- the multimodal view of Farris (1968): each powder, from coarse to fine, sees the liquid
  plus the finer powders as its liquid; valid for powders of very different sizes.

numpy only; results are a frozen dataclass of plain arrays.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np

from ._checks import guarded, in_range, positive
from .errors import InputRangeError
from .packing import DEFAULT_METHOD, max_packing_blends, reference_phi, volume_distribution
from .registry import get_model
from .sizes import SizeDistribution
from .suspension import krieger_dougherty


@dataclass(frozen=True)
class BlendResult:
    """Every blend on the grid and the best ones.

    ``shares`` has one row per blend and one column per powder (volume shares of the solids,
    rows sum to 1); ``mass_shares`` the same on the mass basis (None without densities).
    ``relative_viscosity`` and ``relative_viscosity_farris`` are None without a loading.
    """

    shares: np.ndarray
    mass_shares: np.ndarray | None
    phi_max: np.ndarray
    relative_viscosity: np.ndarray | None
    relative_viscosity_farris: np.ndarray | None
    phi_total: float | None
    best_packing_shares: np.ndarray
    best_phi_max: float
    best_viscosity_shares: np.ndarray | None
    best_relative_viscosity: float | None
    best_farris_shares: np.ndarray | None
    best_relative_viscosity_farris: float | None


@guarded
def share_grid(n_powders: int, n_points: int = 101) -> np.ndarray:
    """Volume shares on a regular grid of the simplex, ``n_points`` per edge.

    Examples
    --------
    >>> share_grid(2, 3).tolist()
    [[0.0, 1.0], [0.5, 0.5], [1.0, 0.0]]
    >>> share_grid(3, 11).shape
    (66, 3)
    """
    k = int(n_powders)
    m = int(n_points) - 1
    if m < 1:
        raise InputRangeError("n_points", n_points, "an integer >= 2")
    if k == 1:
        return np.ones((1, 1))
    rows = [c + (m - sum(c),) for c in itertools.product(range(m + 1), repeat=k - 1)
            if sum(c) <= m]
    return np.array(rows, dtype=float) / m


def _krieger_dougherty(phi, phi_max, intrinsic_viscosity):
    """`suspension.krieger_dougherty`, ``inf`` where phi is past 1 (no room left)."""
    phi = np.asarray(phi, dtype=float)
    inside = np.isfinite(phi) & (phi <= 1.0)
    eta = krieger_dougherty(np.where(inside, phi, 0.0), phi_max, intrinsic_viscosity)
    return np.where(inside, eta, np.inf)


@guarded
def farris_viscosity(phi_classes, phi_max_classes, intrinsic_viscosity=2.5):
    r"""Relative viscosity of a multimodal suspension in Farris' view.

    Farris [1]_: when the size classes differ enough in size, each class flows in the
    suspension of the finer classes as in a liquid, so the relative viscosities multiply.
    Here each class's own relative viscosity is Krieger-Dougherty with its own phi_max.

    Parameters
    ----------
    phi_classes : array_like
        Volume fraction of each class in the whole suspension, coarsest first; the last
        axis runs over classes. [-]
    phi_max_classes : array_like
        Maximum packing fraction of each class on its own. [-]
    intrinsic_viscosity : float, optional
        [eta] of the particles. [-]

    Returns
    -------
    relative_viscosity : float or numpy.ndarray
        ``inf`` where a class reaches its own packing limit. [-]

    Notes
    -----
    .. math:: \eta_r = \prod_k H\!\left(\frac{\phi_k}{1 - \sum_{j<k}\phi_j}\right)

    classes ordered coarse to fine, H the monomodal relation (Eq. (10) of [1]_, from
    memory, not checked against the source). Valid for size ratios of about 10 and more
    between neighbouring classes.

    References
    ----------
    .. [1] R. J. Farris, "Prediction of the viscosity of multimodal suspensions from
       unimodal viscosity data," Trans. Soc. Rheol., vol. 12, no. 2, pp. 281-301, 1968.

    Examples
    --------
    Two classes of 0.3 each, phi_max 0.64 each:

    >>> round(float(farris_viscosity([0.3, 0.3], [0.64, 0.64])), 3)
    16.186
    """
    phi = np.asarray(phi_classes, dtype=float)
    pm = np.asarray(phi_max_classes, dtype=float)
    coarser = np.cumsum(phi, axis=-1) - phi
    free = 1.0 - coarser
    with np.errstate(divide="ignore", invalid="ignore"):
        local = np.where(free > 0, phi / free, np.inf)
    h = _krieger_dougherty(local, pm, intrinsic_viscosity)
    out = np.prod(h, axis=-1)
    return float(out) if np.ndim(out) == 0 else out


def _no_interaction_bound(shares, own_phi_max):
    """Furnas' no-interaction packing of powders (coarse first) each packing at its own."""
    coarser = np.cumsum(shares, axis=1) - shares
    finer = 1.0 - coarser - shares
    with np.errstate(divide="ignore"):
        gamma = own_phi_max / (1.0 - (1.0 - own_phi_max) * coarser - finer)
    return np.min(np.where(shares > 0, gamma, np.inf), axis=1)


@guarded
def optimise_blend(distributions, densities_kg_per_m3=None, phi_total: float | None = None,
                   n_points: int = 101, method: str | None = None,
                   state: str = "random-close", intrinsic_viscosity: float = 2.5
                   ) -> BlendResult:
    """Shares of two or three powders that maximise phi_max or minimise the viscosity.

    Parameters
    ----------
    distributions : sequence of SizeDistribution
        Two or three powders.
    densities_kg_per_m3 : array_like, optional
        Particle density of each powder, for the mass shares in the result. [kg/m**3]
    phi_total : float, optional
        Total solids volume fraction of the suspension; with it the relative viscosity of
        every blend is returned too. [-]
    n_points : int
        Grid points per edge of the share simplex (101: steps of 0.01).
    method : str, optional
        Packing method (default that of `predictor.packing.max_packing`).
    state : str
        Reference state of the packing (`predictor.packing.REFERENCE_STATES`).
    intrinsic_viscosity : float
        [eta] of the particles. [-]

    Returns
    -------
    BlendResult

    Notes
    -----
    Each blend's phi_max is capped by the no-interaction (Furnas) bound in which every
    powder packs at its own phi_max: interaction between powders only lowers the packing,
    and the fast estimators can overshoot that bound for powders of very different sizes.
    At a fixed loading, the Krieger-Dougherty viscosity falls as phi_max rises, so its best
    blend is the best-packing blend; the Farris view can differ, and is the one to trust
    for powders of very different sizes. The grid optimum is exact to the grid step.

    Examples
    --------
    >>> coarse = SizeDistribution.single(20e-6)
    >>> fine = SizeDistribution.single(2e-6)
    >>> res = optimise_blend([coarse, fine], phi_total=0.55, n_points=21)
    >>> res.best_packing_shares.round(2).tolist()
    [0.75, 0.25]
    """
    dists = list(distributions)
    if not 2 <= len(dists) <= 3 or not all(isinstance(x, SizeDistribution) for x in dists):
        raise InputRangeError("distributions", f"{len(dists)} items",
                              "two or three SizeDistribution objects")
    spec = get_model(method or "simulation-fit", kind="packing")
    values = spec.check_params({"phi_mono": reference_phi(state)})
    grid = share_grid(len(dists), n_points)
    union = np.unique(np.concatenate([x.diameters_m for x in dists]))
    table = np.zeros((len(dists), union.size))
    for k, x in enumerate(dists):
        table[k, np.searchsorted(union, x.diameters_m)] = x.fractions
    mixed = grid @ table
    if spec.name == DEFAULT_METHOD:     # every blend at once
        phi_max = max_packing_blends(union, table, grid, values["phi_mono"])[0]
    else:
        phi_max = np.empty(grid.shape[0])
        for row in range(grid.shape[0]):
            d, f = volume_distribution(union, mixed[row])
            phi_max[row] = spec.func(d, f, **values)
    # Interaction between powders only lowers the packing: cap by the no-interaction
    # (Furnas) bound with each powder packing at its own phi_max, coarse powders first.
    own = np.array([spec.func(x.diameters_m, x.fractions, **values) for x in dists])
    order = np.argsort([-x.de_brouckere_diameter_m for x in dists])
    phi_max = np.minimum(phi_max, _no_interaction_bound(grid[:, order], own[order]))
    best = int(np.argmax(phi_max))
    mass = None
    if densities_kg_per_m3 is not None:
        rho = positive(densities_kg_per_m3, "densities_kg_per_m3").ravel()
        if rho.size != len(dists):
            raise InputRangeError("densities_kg_per_m3", f"{rho.size} values",
                                  f"{len(dists)} densities")
        mass = grid * rho
        mass = mass / mass.sum(axis=1, keepdims=True)
    eta = eta_f = None
    best_eta = best_f = None
    if phi_total is not None:
        phi = float(in_range(phi_total, "phi_total", 0.0, 1.0, high_open=True))
        k_eta = float(in_range(intrinsic_viscosity, "intrinsic_viscosity", 0.0, 50.0,
                               low_open=True))
        eta = _krieger_dougherty(phi, phi_max, k_eta)
        eta_f = farris_viscosity(phi * grid[:, order], own[order], k_eta)
        best_eta = int(np.argmin(eta))
        best_f = int(np.argmin(eta_f))
    return BlendResult(
        shares=grid, mass_shares=mass, phi_max=phi_max, relative_viscosity=eta,
        relative_viscosity_farris=eta_f, phi_total=phi_total,
        best_packing_shares=grid[best], best_phi_max=float(phi_max[best]),
        best_viscosity_shares=None if best_eta is None else grid[best_eta],
        best_relative_viscosity=None if best_eta is None else float(eta[best_eta]),
        best_farris_shares=None if best_f is None else grid[best_f],
        best_relative_viscosity_farris=None if best_f is None else float(eta_f[best_f]))
