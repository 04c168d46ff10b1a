"""Maximum packing fraction phi_max of a particle size distribution, and of non-spheres.

phi_max sets where the viscosity of a suspension diverges. This module estimates it from the
sizes a formulator measured:

- published estimators registered with kind "packing": `ouchiyama_tanaka`, `desmond_weeks`,
  `compressible_packing` (de Larrard), `furnas` (very different sizes only);
- `simulation`: a jamming simulation of the actual distribution (soft spheres compressed
  and relaxed to the jamming point, O'Hern et al. 2003), the reference the others are
  measured against; `simulate_jamming` gives the full result with errors and diagnostics;
- `simulation_fit`: the fast default, a correction of the Ouchiyama-Tanaka estimate
  calibrated on our own simulations (data in ``predictor/data/packing_calibration.json``,
  made by ``tests/benchmarks/calibrate_packing.py``);
- `max_packing` (dispatcher) and `packing_estimates` (every applicable estimate side by side,
  with the spread, so phi_max can be shown as a range);
- `phi_max_for_aspect_ratio` and `intrinsic_viscosity_for_aspect_ratio` for spheroids.

Conventions: sizes are diameters in metres (only ratios matter); ``fractions`` are volume
fractions of the solids unless ``basis`` says otherwise; every method returns ``phi_mono``
for a single size, where ``phi_mono`` is the packing fraction of equal spheres in the chosen
reference state (`REFERENCE_STATES`). Bad input raises `InputRangeError`; use outside a
method's validity range warns with `ValidityWarning`.
"""

from __future__ import annotations

import math
import threading
import time
import warnings
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, field

import numpy as np

from ._checks import as_array, guarded, in_range, positive, scalar_or_array
from ._jit import lazy_njit
from .errors import InputRangeError, LoadlineError, ValidityWarning
from .registry import Param, get_model, model, models
from .sizes import SizeDistribution

#: Packing fraction of equal spheres in each reference state, with its source.
#: - random-close: 0.64 +- 0.02, Berryman, Phys. Rev. A 27, 1053 (1983);
#: - random-loose: 0.550 +- 0.001, Jerkins et al., Phys. Rev. Lett. 101, 018301 (2008);
#: - low-shear / high-shear: Brownian hard spheres, where the zero-shear viscosity and the
#:   high-shear viscosity diverge, about 0.63 and 0.71 (de Kruif et al., J. Chem. Phys. 83,
#:   4717, 1985; from memory, not checked against the source).
REFERENCE_STATES = {
    "random-close": 0.64,
    "random-loose": 0.55,
    "low-shear": 0.63,
    "high-shear": 0.71,
}

#: Packing fraction of equal spheres at random close packing used to scale methods that have
#: no equal-sphere parameter of their own.
PHI_RCP = REFERENCE_STATES["random-close"]

#: Largest FIRE time step, in units of sqrt(mass / spring constant) (our tuning).
DT_MAX = 0.25

PHI_MONO = Param("phi_mono", "-", (0.3, 0.75),
                 "packing fraction of equal spheres in the chosen reference state")

#: Size ratio of neighbouring classes above which `furnas` (no interaction between classes)
#: applies; Furnas' binary data approach the limit for ratios of about 10 and more (from
#: memory, not checked against the source).
FURNAS_MIN_RATIO = 7.0


class SimulationInterrupted(LoadlineError):
    """A jamming simulation was stopped (time limit, callback or Ctrl-C) before any result."""


# ------------------------------------------------------------------------------------------
# input handling
# ------------------------------------------------------------------------------------------
@guarded
def reference_phi(state: str = "random-close") -> float:
    """Packing fraction of equal spheres in a reference state (see `REFERENCE_STATES`).

    Examples
    --------
    >>> reference_phi("random-loose")
    0.55
    """
    key = str(state).strip().lower().replace("_", "-").replace(" ", "-")
    if key not in REFERENCE_STATES:
        raise InputRangeError("state", state, "one of " + ", ".join(REFERENCE_STATES))
    return REFERENCE_STATES[key]


@guarded
def volume_distribution(diameters_m, fractions, basis: str = "volume"):
    """Checked (diameters ascending, volume fractions summing to 1) arrays.

    Accepts a `SizeDistribution` as ``diameters_m`` (with ``fractions=None``). Unsorted
    classes are sorted, repeated sizes merged, empty classes dropped.

    Raises
    ------
    InputRangeError
        Non-finite, zero or negative sizes, negative fractions, mismatched lengths, or
        fractions whose total is not 1 (or 100) within 0.1 %.
    """
    if isinstance(diameters_m, SizeDistribution):
        if fractions is not None:
            raise InputRangeError("fractions", "given twice",
                                  "None when a SizeDistribution is passed")
        return diameters_m.diameters_m.copy(), diameters_m.fractions.copy()
    d = np.atleast_1d(positive(diameters_m, "diameters_m")).ravel()
    if fractions is None:
        raise InputRangeError("fractions", None, "one fraction per diameter")
    f = np.atleast_1d(as_array(fractions, "fractions")).ravel()
    if d.size != f.size:
        raise InputRangeError("fractions", f"{f.size} values", f"{d.size} (one per diameter)")
    if np.any(f < 0):
        raise InputRangeError("fractions", f[f < 0][0], "values >= 0")
    total = f.sum()
    for scale in (1.0, 100.0):
        if abs(total - scale) <= 1e-3 * scale:
            break
    else:
        raise InputRangeError("sum of fractions", total, "1 (or 100 %) within 0.1 %")
    if basis == "number":
        f = f * (d / d.max()) ** 3
    elif basis not in ("volume", "mass"):
        raise InputRangeError("basis", basis, "'volume', 'mass' (one material) or 'number'")
    if d.max() / d.min() > 1e30:
        raise InputRangeError("diameters_m", d.max(), f"sizes within a factor 1e30 of the "
                              f"smallest ({d.min():.3g} m)")
    keep = f > 0
    d, f = d[keep], f[keep]
    order = np.argsort(d, kind="stable")
    d, f = d[order], f[order]
    uniq, inverse = np.unique(d, return_inverse=True)
    if uniq.size != d.size:
        merged = np.zeros(uniq.size)
        np.add.at(merged, inverse, f)
        d, f = uniq, merged
    return d, f / f.sum()


def _number_stats(d, f):
    """Number fractions, number-mean diameter, polydispersity delta and skewness S."""
    sums = _Blends(d, f[None, :], np.ones((1, 1)))
    mean, delta, skew = sums.stats()
    n = f * (d.max() / d) ** 3
    return n / n.sum(), float(mean[0]), float(delta[0]), float(skew[0])


class _Blends:
    """Class sums of blends: rows `shares` (m, J) of powders `components` (J, K) on classes
    `d` (K,), volume basis, each powder's fractions summing to 1.

    The estimators below need only sums over classes of the number distribution, whole
    (``moments``: sum f d**(k-3), k = 0..3) or over the classes coarser than the
    number-mean diameter (``coarse``), and the coarse-side cumulative volume (Furnas). They
    are linear in the fractions, so a blend's sums are its shares times each powder's:
    every blend of a table costs O(J), not O(K). One distribution is J = 1.
    """

    def __init__(self, d, components, shares):
        self.d = d
        self.g = np.asarray(components, dtype=float)
        self.w = np.asarray(shares, dtype=float)
        scale = d / d.max()                      # scale-free powers: no overflow for nm sizes
        self.powers = np.stack([scale ** (k - 3) for k in range(4)])     # (4, K)
        self.moments = self.w @ (self.g @ self.powers.T)                 # (m, 4)
        self.mean = self.moments[:, 1] / self.moments[:, 0]              # in units of d.max()

    def stats(self):
        """Number-mean diameter [m], polydispersity delta and skewness S of each blend."""
        a = self.moments
        m = self.mean
        e2, e3 = a[:, 2] / a[:, 0] / m**2, a[:, 3] / a[:, 0] / m**3
        var = e2 - 1.0
        delta = np.sqrt(np.maximum(var, 0.0))
        with np.errstate(divide="ignore", invalid="ignore"):
            skew = np.where(var > 1e-24, (e3 - 3.0 * e2 + 2.0)
                            / np.where(var > 1e-24, var, 1.0) ** 1.5, 0.0)
        return m * self.d.max(), delta, skew

    def coarse(self):
        """Sums f d**(k-3) over the classes coarser than each blend's mean, (m, 4)."""
        terms = self.g[:, None, :] * self.powers[None, :, :]             # (J, 4, K)
        suffix = np.concatenate([np.cumsum(terms[:, :, ::-1], axis=-1)[:, :, ::-1],
                                 np.zeros(terms.shape[:2] + (1,))], axis=-1)
        first = np.searchsorted(self.d / self.d.max(), self.mean, side="right")
        return np.einsum("mj,jkm->mk", self.w, suffix[:, :, first])

    def furnas(self, phi0):
        """The Furnas bound of each blend (no interaction between size classes).

        gamma_i = phi0 / (1 - (1 - phi0) coarser_i - finer_i) = phi0 / (phi0 coarser_i + f_i)
        (finer_i = 1 - coarser_i - f_i), minimised over the classes: one linear function of
        the shares per class. Empty classes need no mask: their value never exceeds that of
        the next finer filled class, nor phi0 when none is finer.
        """
        h = phi0 * (np.cumsum(self.g[:, ::-1], axis=-1)[:, ::-1] - self.g) + self.g
        worst = np.empty(self.w.shape[0])
        for start in range(0, worst.size, 4096):      # bounded memory: (4096, K) at a time
            worst[start:start + 4096] = (self.w[start:start + 4096] @ h).max(axis=-1)
        return np.minimum(phi0 / worst, 1.0)


def _scalar(value, field: str, low: float, high: float) -> float:
    """One finite number in [low, high], or `InputRangeError` naming the field."""
    arr = as_array(value, field)
    if arr.ndim != 0:
        raise InputRangeError(field, arr.ravel()[0] if arr.size else "[]", "a single number")
    return float(in_range(arr, field, low, high))


def _warn(message: str):
    warnings.warn(message, ValidityWarning, stacklevel=3)


# ------------------------------------------------------------------------------------------
# published estimators
# ------------------------------------------------------------------------------------------
@model("packing", PHI_MONO,
       validity="spheres of any size distribution; analytic, no fitted range",
       source="Ouchiyama & Tanaka, Ind. Eng. Chem. Fundam. 1981/1984")
@guarded
def ouchiyama_tanaka(diameters_m, fractions, phi_mono=0.64):
    r"""Packing fraction of a random packing of spheres of any size distribution.

    The analytic estimate of Ouchiyama & Tanaka [1]_, [2]_: each particle is surrounded by
    a shell of neighbours whose number follows from the mean diameter, with the
    equal-sphere packing fraction ``phi_mono`` as the only parameter.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    With number fractions :math:`f_i`, number-mean diameter :math:`\bar D` and the step
    function :math:`H`:

    .. math::
        \phi = \frac{\sum D_i^3 f_i}{\sum (D_i-\bar D)^3 H(D_i-\bar D) f_i
               + \frac{1}{\beta}\sum\left[(D_i+\bar D)^3 - (D_i-\bar D)^3 H(D_i-\bar D)\right]
               f_i}

    .. math::
        \beta = 1 + \frac{4}{13}(8\phi_0 - 1)\,\bar D\,
        \frac{\sum (D_i+\bar D)^2\left(1 - \frac{3}{8}\frac{\bar D}{D_i+\bar D}\right) f_i}
             {\sum\left[D_i^3 - (D_i-\bar D)^3 H(D_i-\bar D)\right] f_i}

    For equal spheres :math:`\beta = 8\phi_0` and :math:`\phi = \phi_0`. The coordination
    constant (4/13)(8 phi_0 - 1), the factor (1 - (3/8) D/(D_i + D)) and the porosity sum
    were checked against a secondary restatement (open code citing Ouchiyama & Tanaka,
    Ind. Eng. Chem. Fundam. 25, 125, 1986); they pass the equal-sphere limit, which the
    test suite checks. No fitted range; compared by the authors with
    packings of mixed beads. As written here the expression exceeds the Furnas bound for
    blends of very different sizes (ratio above about 5) rich in the coarse size: treat it
    as the fine-matrix picture there.

    References
    ----------
    .. [1] N. Ouchiyama and T. Tanaka, "Porosity of a mass of solid particles having a range
       of sizes," Ind. Eng. Chem. Fundam., vol. 20, no. 1, pp. 66-71, 1981.
    .. [2] N. Ouchiyama and T. Tanaka, "Porosity estimation for random packings of
       spherical particles," Ind. Eng. Chem. Fundam., vol. 23, no. 4, pp. 490-493, 1984.

    Examples
    --------
    Illustrative call, equal volumes of spheres 1 and 3 um:

    >>> round(ouchiyama_tanaka([1e-6, 3e-6], [0.5, 0.5]), 4)
    0.6778
    """
    d, f = volume_distribution(diameters_m, fractions)
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    return _ouchiyama_tanaka(d, f, phi0)


def _ouchiyama_tanaka(d, f, phi0):
    return float(_ouchiyama_tanaka_blends(_Blends(d, f[None, :], np.ones((1, 1))), phi0)[0])


def _ouchiyama_tanaka_blends(sums: _Blends, phi0):
    """`_ouchiyama_tanaka` from the class sums of blends (see `_Blends`), (m,)."""
    a, m = sums.moments, sums.mean
    n0 = a[:, 0]
    e2, e3 = a[:, 2] / n0 / m**2, a[:, 3] / n0 / m**3
    p = sums.coarse()
    # sum of n (x - 1)**3 H(x - 1), x = d/mean, expanded over the coarse classes
    above = np.maximum((p[:, 3] - 3 * m * p[:, 2] + 3 * m**2 * p[:, 1] - m**3 * p[:, 0])
                       / (n0 * m**3), 0.0)
    # sum n (x + 1)**2 (1 - 0.375/(x + 1)) = e2 + 2.25 and sum n (x + 1)**3 = e3 + 3 e2 + 4
    beta = 1.0 + (4.0 / 13.0) * (8.0 * phi0 - 1.0) * (e2 + 2.25) / (e3 - above)
    return e3 / (above + (e3 + 3.0 * e2 + 4.0 - above) / beta)


@model("packing", PHI_MONO,
       validity="fitted to simulated sphere packings, polydispersity up to about 0.4",
       source="Desmond & Weeks, Phys. Rev. E 2014")
@guarded
def desmond_weeks(diameters_m, fractions, phi_mono=0.64):
    r"""Random close packing from the polydispersity and skewness of the radius.

    The empirical fit of Desmond & Weeks [1]_ to simulated jammed packings of many
    distribution shapes (Eq. (3) of [1]_, coefficients from memory, not checked against
    the source).

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    .. math:: \phi_{rcp} = \frac{\phi_0}{\phi^*}\left(\phi^* + c_1\delta + c_2 S\delta^2\right)

    with :math:`\phi^* = 0.634`, :math:`c_1 = 0.0658`, :math:`c_2 = 0.0857` (from memory);
    :math:`\delta` is the standard deviation over the mean of the radius and :math:`S` its
    skewness, both on the number basis. The factor :math:`\phi_0/\phi^*` (our own choice,
    no source) makes the result equal ``phi_mono`` for a single size, so it serves the other
    reference states. The fit covers polydispersity up to about 0.4 and skewness of about
    -1.5 to 4 (both from memory); beyond, `max_packing` issues a `ValidityWarning`. At a
    strongly negative skewness (a trace of much finer spheres) the formula can even fall
    below phi_mono.

    References
    ----------
    .. [1] K. W. Desmond and E. R. Weeks, "Influence of particle size distribution on
       random close packing of spheres," Phys. Rev. E, vol. 90, no. 2, 022204, 2014,
       doi:10.1103/PhysRevE.90.022204.

    Examples
    --------
    Illustrative call, equal volumes of spheres 1 and 3 um:

    >>> round(desmond_weeks([1e-6, 3e-6], [0.5, 0.5]), 4)
    0.715
    """
    d, f = volume_distribution(diameters_m, fractions)
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    return _desmond_weeks(d, f, phi0)


_DW = (0.634, 0.0658, 0.0857)


def _desmond_weeks(d, f, phi0):
    _, _, delta, skew = _number_stats(d, f)
    star, c1, c2 = _DW
    return float(phi0 / star * (star + c1 * delta + c2 * skew * delta**2))


def _cpm_gamma(d, y, beta, loosening, wall):
    """gamma_i of the compressible packing model; d descending, y volume fractions.

    All class pairs at once (n x n arrays; n is a few hundred classes at most), so the
    packing estimates need no compiled code.
    """
    di, dj = d[:, None], d[None, :]
    bi, bj = beta[:, None], beta[None, :]
    coarser = dj > di                  # class j coarser than class i: wall effect on i
    if wall > 0:
        b = 1.0 - np.where(coarser, 1.0 - di / dj, 0.0) ** wall
    else:
        b = np.zeros_like(di * dj)
    if loosening > 0:                  # class j finer (or equal): loosening effect on i
        a = np.sqrt(1.0 - np.where(coarser, 0.0, 1.0 - dj / di) ** loosening)
    else:
        a = np.zeros_like(di * dj)
    effect = np.where(coarser, 1.0 - bi + b * bi * (1.0 - 1.0 / bj), 1.0 - a * bi / bj)
    counted = (y[None, :] != 0.0) & ~np.eye(d.size, dtype=bool)
    s = 1.0 - np.sum(np.where(counted, effect * y[None, :], 0.0), axis=1)
    return np.where(s > 0, beta / np.where(s > 0, s, 1.0), np.inf)


@model("packing", PHI_MONO,
       Param("compaction_index", "-", (2.0, 50.0),
             "compaction index K of the packing process (9 = vibration and compression)"),
       validity="multi-class mixtures of rounded grains; validated on aggregates and beads",
       source="de Larrard, Concrete Mixture Proportioning, 1999")
@guarded
def compressible_packing(diameters_m, fractions, phi_mono=0.64, compaction_index=9.0):
    r"""Packing fraction of a multi-class blend from the compressible packing model.

    De Larrard's compressible packing model [1]_: each class i has a virtual packing
    density :math:`\beta_i`; coarser classes disturb it by the wall effect, finer ones by
    the loosening effect; the compaction index K links the virtual to the actual packing.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]
    compaction_index : float, optional
        Compaction index K; 4.1 pouring, 4.5 rodding, 4.75 vibration, 9 vibration with
        compression (from memory, not checked against the source). [-]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    Classes ordered from coarse (j < i) to fine (j > i), :math:`y_j` volume fractions:

    .. math::
        \gamma_i = \frac{\beta_i}{1 - \sum_{j<i}\left[1-\beta_i+b_{ij}\beta_i
        (1-1/\beta_j)\right]y_j - \sum_{j>i}\left[1 - a_{ij}\beta_i/\beta_j\right]y_j}

    .. math::
        a_{ij} = \sqrt{1-(1-d_j/d_i)^{1.02}},\quad b_{ij} = 1-(1-d_i/d_j)^{1.50},\quad
        K = \sum_i \frac{y_i/\beta_i}{1/\phi - 1/\gamma_i}

    solved for :math:`\phi`. Here every class has the same virtual density
    :math:`\beta = \phi_0 (1 + 1/K)` so that one size gives :math:`\phi_0`. Exponents 1.02
    and 1.50 and the K values are from memory (not checked against [1]_).

    References
    ----------
    .. [1] F. de Larrard, Concrete Mixture Proportioning: A Scientific Approach. London,
       U.K.: E & FN Spon, 1999, ch. 1.
    .. [2] T. Sedran and F. de Larrard, "Optimization of self-compacting concrete thanks to
       packing model," in Proc. 1st Int. RILEM Symp. Self-Compacting Concrete, 1999.

    Examples
    --------
    Illustrative call, equal volumes of spheres 1 and 3 um:

    >>> round(compressible_packing([1e-6, 3e-6], [0.5, 0.5]), 4)
    0.713
    """
    d, f = volume_distribution(diameters_m, fractions)
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    k = _scalar(compaction_index, "compaction_index", 1e-3, 1e6)
    return _compressible_packing(d, f, phi0, k)


def _compressible_packing(d, f, phi0, k, loosening=1.02, wall=1.50):
    if d.size == 1:
        return phi0
    beta_value = phi0 * (1.0 + 1.0 / k)
    order = np.argsort(-d)
    dd, yy = np.ascontiguousarray(d[order]), np.ascontiguousarray(f[order])
    beta = np.full(dd.size, beta_value)
    gamma = _cpm_gamma(dd, yy, beta, loosening, wall)
    upper = float(np.min(gamma))
    if not np.isfinite(upper):
        upper = 1.0

    def excess(phi):
        return np.sum((yy / beta) / (1.0 / phi - 1.0 / gamma)) - k

    upper = min(upper, 1.0)
    lo, hi = 1e-3, upper * (1.0 - 1e-12)
    if excess(hi) < 0:
        return float(hi)
    from scipy.optimize import brentq

    return float(brentq(excess, lo, hi, xtol=1e-12))


@model("packing", PHI_MONO,
       validity="classes whose neighbouring sizes differ by a factor of about 7 or more",
       source="Furnas, Ind. Eng. Chem. 1931")
@guarded
def furnas(diameters_m, fractions, phi_mono=0.64):
    r"""Packing fraction of classes of very different sizes that do not interact.

    The limit of infinite size ratio (Furnas [1]_, written for any number of classes as in
    the no-interaction case of [2]_): each class packs at ``phi_mono`` either as the
    skeleton that finer classes fill, or inside the voids of the coarser classes.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    Classes from coarse to fine, :math:`y_j` volume fractions, :math:`\phi_0` = phi_mono:

    .. math::
        \phi = \min_i \frac{\phi_0}{1 - (1-\phi_0)\sum_{j<i} y_j - \sum_{j>i} y_j}

    For two classes the maximum over the composition is
    :math:`1-(1-\phi_0)^2`, reached at a coarse share :math:`\phi_0/(1-(1-\phi_0)^2)`.
    An upper bound for finite size ratios; `max_packing` warns when neighbouring classes
    differ by less than `FURNAS_MIN_RATIO`.

    References
    ----------
    .. [1] C. C. Furnas, "Grading aggregates I: Mathematical relations for beds of broken
       solids of maximum density," Ind. Eng. Chem., vol. 23, no. 9, pp. 1052-1058, 1931.
    .. [2] F. de Larrard, Concrete Mixture Proportioning: A Scientific Approach. London,
       U.K.: E & FN Spon, 1999, sec. 1.2.

    Examples
    --------
    At the optimum coarse share the two-class limit 1 - (1 - 0.64)**2:

    >>> share = 0.64 / (1 - 0.36**2)
    >>> round(furnas([1e-7, 1e-4], [1 - share, share]), 4)
    0.8704
    """
    d, f = volume_distribution(diameters_m, fractions)
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    return _furnas(d, f, phi0)


def _furnas(d, f, phi0):
    return float(_Blends(d, f[None, :], np.ones((1, 1))).furnas(phi0)[0])


def _furnas_message(d, f) -> str | None:
    if d.size < 2:
        return None
    ratio = float(np.min(d[1:] / d[:-1]))
    if ratio < FURNAS_MIN_RATIO:
        return (f"furnas assumes classes that do not interact; neighbouring sizes differ by a "
                f"factor {ratio:.3g} here, below {FURNAS_MIN_RATIO:g}: the result is an upper "
                "bound")
    return None


def _desmond_weeks_message(d, f) -> str | None:
    _, _, delta, skew = _number_stats(d, f)
    if delta > 0.4:
        return (f"desmond-weeks is used at polydispersity {delta:.3g}, beyond its fitted range "
                "(up to about 0.4)")
    if delta > 0 and not -1.5 <= skew <= 4.0:
        return (f"desmond-weeks is used at skewness {skew:.3g}, beyond its fitted range "
                "(about -1.5 to 4)")
    return None


# ------------------------------------------------------------------------------------------
# the jamming simulation
# ------------------------------------------------------------------------------------------
@lazy_njit(nogil=True)
def _forces(x, rad, pi, pj, box, f):  # pragma: no cover - compiled
    """Harmonic contact forces (unit spring constant); energy, sum of overlaps, contacts."""
    n = x.shape[0]
    for i in range(n):
        f[i, 0] = 0.0
        f[i, 1] = 0.0
        f[i, 2] = 0.0
    energy = 0.0
    overlap_sum = 0.0
    contacts = 0
    for p in range(pi.shape[0]):
        i = pi[p]
        j = pj[p]
        dx = x[i, 0] - x[j, 0]
        dy = x[i, 1] - x[j, 1]
        dz = x[i, 2] - x[j, 2]
        dx -= box * np.rint(dx / box)
        dy -= box * np.rint(dy / box)
        dz -= box * np.rint(dz / box)
        s = rad[i] + rad[j]
        r2 = dx * dx + dy * dy + dz * dz
        if r2 < s * s:
            r = math.sqrt(r2)
            ov = s - r
            energy += 0.5 * ov * ov
            overlap_sum += ov
            contacts += 1
            c = ov / r
            f[i, 0] += c * dx
            f[i, 1] += c * dy
            f[i, 2] += c * dz
            f[j, 0] -= c * dx
            f[j, 1] -= c * dy
            f[j, 2] -= c * dz
    return energy, overlap_sum, contacts


@lazy_njit(nogil=True)
def _fire(x, v, mass, rad, pi, pj, box, x_ref, half_skin, st, max_steps, e_zero,
          f_rel):  # pragma: no cover - compiled
    """FIRE energy minimisation (Bitzek et al. 2006) with the FIRE 2.0 Euler step.

    ``st`` = [dt, alpha, n_positive, dt_max, steps_done]. Returns 0 jammed (net forces below
    f_rel times the mean overlap, energy per particle above e_zero), 1 unjammed (energy per
    particle below e_zero), 2 neighbour list to rebuild, 3 step budget used.
    """
    n = x.shape[0]
    f = np.zeros_like(x)
    dt = st[0]
    alpha = st[1]
    n_pos = int(st[2])
    dt_max = st[3]
    hs2 = half_skin * half_skin
    status = 3
    done = max_steps
    for step in range(max_steps):
        energy, ov_sum, contacts = _forces(x, rad, pi, pj, box, f)
        if step % 20 == 0:
            if energy / n < e_zero:
                status = 1
                done = step
                break
            fmax2 = 0.0
            d2max = 0.0
            for i in range(n):
                g = f[i, 0] ** 2 + f[i, 1] ** 2 + f[i, 2] ** 2
                if g > fmax2:
                    fmax2 = g
                d2 = ((x[i, 0] - x_ref[i, 0]) ** 2 + (x[i, 1] - x_ref[i, 1]) ** 2
                      + (x[i, 2] - x_ref[i, 2]) ** 2)
                if d2 > d2max:
                    d2max = d2
            mean_ov = ov_sum / max(contacts, 1)
            if fmax2 < (f_rel * mean_ov) ** 2:
                status = 0
                done = step
                break
            if d2max > hs2:
                status = 2
                done = step
                break
        power = 0.0
        for i in range(n):
            power += f[i, 0] * v[i, 0] + f[i, 1] * v[i, 1] + f[i, 2] * v[i, 2]
        if power > 0.0:
            n_pos += 1
            if n_pos > 5:
                dt = min(dt * 1.1, dt_max)
                alpha *= 0.99
        else:
            n_pos = 0
            dt = max(dt * 0.5, 0.02 * dt_max)
            alpha = 0.1
            for i in range(n):
                for k in range(3):
                    x[i, k] -= 0.5 * dt * v[i, k]
                    v[i, k] = 0.0
        vn = 0.0
        fn = 0.0
        for i in range(n):
            for k in range(3):
                v[i, k] += dt * f[i, k] / mass[i]
                vn += v[i, k] * v[i, k]
                fn += f[i, k] * f[i, k]
        if fn > 0.0:
            scale = alpha * math.sqrt(vn / fn)
            for i in range(n):
                for k in range(3):
                    v[i, k] = (1.0 - alpha) * v[i, k] + scale * f[i, k]
        for i in range(n):
            for k in range(3):
                x[i, k] += dt * v[i, k]
    st[0] = dt
    st[1] = alpha
    st[2] = n_pos
    st[4] += done
    return status


def _neighbour_pairs(x, rad, box, skin, max_groups=6):
    """Pairs closer than the sum of radii plus the skin (cKDTree with a periodic box).

    Spheres are grouped by radius (bins a factor 2 wide) and each pair of groups is searched
    with its own cut-off, so a few large spheres do not force a long cut-off on the many
    small ones.
    """
    from scipy.spatial import cKDTree

    xw = np.mod(x, box)
    level = np.minimum(np.floor(np.log2(rad.max() / rad)).astype(int), max_groups - 1)
    groups = [g for g in (np.flatnonzero(level == k) for k in range(level.max() + 1)) if g.size]
    trees = [cKDTree(xw[g], boxsize=box) for g in groups]
    rmax = [rad[g].max() for g in groups]
    ii, jj = [np.zeros(0, dtype=np.int64)], [np.zeros(0, dtype=np.int64)]
    for a in range(len(groups)):
        for b in range(a, len(groups)):
            cut = rmax[a] + rmax[b] + skin
            if a == b:
                p = trees[a].query_pairs(cut, output_type="ndarray")
                if p.size:
                    ii.append(groups[a][p[:, 0]])
                    jj.append(groups[a][p[:, 1]])
            else:
                m = trees[a].sparse_distance_matrix(trees[b], cut, output_type="ndarray")
                if m.size:
                    ii.append(groups[a][m["i"]])
                    jj.append(groups[b][m["j"]])
    i, j = np.concatenate(ii), np.concatenate(jj)
    sep = xw[i] - xw[j]
    sep -= box * np.rint(sep / box)
    keep = np.einsum("ij,ij->i", sep, sep) < (rad[i] + rad[j] + skin) ** 2
    return i[keep].astype(np.int64), j[keep].astype(np.int64)


@guarded
def sample_diameters(diameters_m, fractions, n_particles: int) -> np.ndarray:
    """Diameters of ``n_particles`` spheres that follow the distribution in number.

    Stratified: the k-th sphere takes the class at number-quantile (k + 1/2) / N, so each
    class gets its share rounded to whole spheres. The largest classes of a wide distribution
    may get no sphere at all; `JammingResult.volume_not_represented` reports how much.
    """
    d, f = volume_distribution(diameters_m, fractions)
    n = int(_scalar(n_particles, "n_particles", 1, 200_000))
    number = f / (d / d.max()) ** 3
    cum = np.cumsum(number / number.sum())
    cum[-1] = 1.0
    idx = np.searchsorted(cum, (np.arange(n) + 0.5) / n, side="right")
    return d[np.minimum(idx, d.size - 1)]


@dataclass(frozen=True)
class JammingResult:
    """Result of `simulate_jamming`.

    ``phi`` is the mean jamming packing fraction over the finished seeds and ``phi_error``
    its standard error (standard deviation over seeds / sqrt(seeds); nan for one seed).
    """

    phi: float
    phi_error: float
    phi_per_seed: tuple[float, ...]
    n_particles: int
    box_over_largest: float
    volume_not_represented: float
    unresolved_minimisations: int
    force_evaluations: int
    elapsed_s: float
    interrupted: bool
    sample_diameters_m: np.ndarray = field(repr=False)
    tolerance: float = 1e-4

    @property
    def sample_distribution(self) -> SizeDistribution:
        """Size distribution (volume basis) of the spheres actually simulated."""
        d, counts = np.unique(self.sample_diameters_m, return_counts=True)
        vol = counts * d**3
        return SizeDistribution(d, vol / vol.sum())


class _Stop:
    def __init__(self, deadline, callback):
        self.deadline = deadline
        self.callback = callback
        self.event = threading.Event()
        self.lock = threading.Lock()

    def check(self, progress=None) -> bool:
        if self.event.is_set():
            return True
        if self.deadline is not None and time.perf_counter() > self.deadline:
            self.event.set()
            return True
        if progress is not None and self.callback is not None:
            with self.lock:
                if self.callback(progress):
                    self.event.set()
                    return True
        return False


def _jam_one(diam, seed, phi_start, tolerance, e_zero, f_rel, max_steps, stop: _Stop,
             seed_index, n_seeds, started):
    """One seed of the O'Hern et al. protocol; returns (phi_J, unresolved, steps) or None."""
    rng = np.random.default_rng(seed)
    d = diam / np.mean(diam)            # length unit: number-mean diameter
    rad0 = 0.5 * d
    mass = np.maximum(1.0, d * d)       # keeps the stiffest mode ~ uniform across sizes
    volume = float(np.sum(np.pi / 6.0 * d**3))
    box = (volume / phi_start) ** (1.0 / 3.0)
    x = rng.uniform(0.0, box, (d.size, 3))
    skin = 0.2
    st = np.array([0.0, 0.1, 0.0, DT_MAX, 0.0])
    phi, step = phi_start, 0.01
    lo = hi = None
    unresolved = 0
    while True:
        rad = rad0 * (phi / phi_start) ** (1.0 / 3.0)
        v = np.zeros_like(x)
        st[0], st[1], st[2] = 0.1 * st[3], 0.1, 0.0
        left = max_steps
        status = 3
        while left > 0:
            if stop.check():
                return None
            pi, pj = _neighbour_pairs(x, rad, box, skin)
            before = st[4]
            status = _fire(x, v, mass, rad, pi, pj, box, x.copy(), 0.5 * skin, st,
                           min(left, 5000), e_zero, f_rel)
            left -= int(st[4] - before)
            if status in (0, 1):
                break
        # A state that did not settle is not mechanically stable: count it as unjammed so
        # that slow relaxation never lowers phi_J, and report how often it happened.
        jammed = status == 0
        if status == 3:
            unresolved += 1
        if jammed:
            hi = phi if hi is None else min(hi, phi)
        else:
            lo = phi if lo is None else max(lo, phi)
        progress = {"seed_index": seed_index, "n_seeds": n_seeds, "phi": phi,
                    "bracket": (lo, hi), "force_evaluations": int(st[4]),
                    "elapsed_s": time.perf_counter() - started}
        if stop.check(progress):
            return None
        if lo is not None and hi is not None:
            if hi - lo < tolerance:
                return 0.5 * (lo + hi), unresolved, int(st[4])
            phi = 0.5 * (lo + hi)
        elif hi is None:
            phi = phi + step
        else:
            phi = phi - step
        if not 0.05 < phi < 0.98:
            raise LoadlineError(f"jamming simulation left the range of packing fractions "
                                f"(phi = {phi:.3g}); check the size distribution")


def simulate_jamming(diameters_m, fractions=None, basis: str = "volume",
                     n_particles: int = 2000, n_seeds: int = 3, seed: int = 0,
                     time_limit_s: float | None = 300.0,
                     callback: Callable[[dict], bool | None] | None = None,
                     tolerance: float = 1e-4, workers: int = 2) -> JammingResult:
    r"""Random close packing of the distribution by a jamming simulation.

    The protocol of O'Hern, Silbert, Liu & Nagel [1]_: spheres drawn from the distribution
    are placed at random in a periodic cube; they interact by a one-sided harmonic
    repulsion; the energy is minimised (FIRE, [2]_) and the packing fraction is raised or
    lowered by bisection until the jamming point, where the minimised energy first becomes
    non-zero, is bracketed to ``tolerance``. Seeds give independent packings.

    Parameters
    ----------
    diameters_m, fractions : array_like
        The size distribution (or a `SizeDistribution` as ``diameters_m``). [m], [-]
    basis : {"volume", "mass", "number"}
        Basis of ``fractions``.
    n_particles : int
        Spheres per packing.
    n_seeds : int
        Independent packings; the error is the standard error over them.
    seed : int
        First random seed; seeds ``seed .. seed + n_seeds - 1`` are used.
    time_limit_s : float or None
        Wall-time limit; seeds not finished by then are dropped. [s]
    callback : callable, optional
        Called after each minimisation with a progress dict (``seed_index``, ``n_seeds``,
        ``phi``, ``bracket``, ``force_evaluations``, ``elapsed_s``); return True to stop.
    tolerance : float
        Width of the final bracket on phi_J.
    workers : int
        Seeds run in parallel threads (the compiled minimiser releases the GIL).

    Returns
    -------
    JammingResult

    Raises
    ------
    SimulationInterrupted
        When stopped before any seed finished.

    Notes
    -----
    A state counts as jammed only when the minimiser has balanced the forces (largest net
    force below 1e-4 of the mean overlap) with an energy per particle above 1e-16 (in units
    of the spring constant times the squared mean diameter); a state still relaxing when the
    step budget runs out counts as unjammed, so a loose test can never report phi too low
    (`JammingResult.unresolved_minimisations` counts them). Equal spheres give 0.639 in the
    large-system limit in [1]_; 2000 spheres give about 0.64. Spring constant equal for all
    pairs and masses max(1, (d / mean d)^2) are our choices; they do not change the jamming
    point, only the speed.

    Reliability: the box should span at least three of the largest spheres
    (``box_over_largest``), and the spheres must represent the volume distribution
    (``volume_not_represented`` below about 0.01). A lognormal of sigma = 0.6 (ln d) needs
    about 2000 spheres for the first and loses about 2 % of its volume in the coarse tail;
    a two-size blend at size ratio 5 with half its volume fine has only 16 coarse spheres in
    2000: use 4000 and more there. `max_packing` warns when these limits are passed.

    References
    ----------
    .. [1] C. S. O'Hern, L. E. Silbert, A. J. Liu and S. R. Nagel, "Jamming at zero
       temperature and zero applied stress: The epitome of disorder," Phys. Rev. E, vol. 68,
       no. 1, 011306, 2003, doi:10.1103/PhysRevE.68.011306.
    .. [2] E. Bitzek, P. Koskinen, F. Gähler, M. Moseler and P. Gumbsch, "Structural
       relaxation made simple," Phys. Rev. Lett., vol. 97, no. 17, 170201, 2006.

    Examples
    --------
    Illustrative call (small, fast):

    >>> res = simulate_jamming([1e-6], [1.0], n_particles=200, n_seeds=1)
    >>> 0.60 < res.phi < 0.66
    True
    """
    d, f = volume_distribution(diameters_m, fractions, basis)
    n = int(_scalar(n_particles, "n_particles", 20, 200_000))
    seeds = int(_scalar(n_seeds, "n_seeds", 1, 100))
    seed = int(_scalar(seed, "seed", 0, 2**31))
    workers = int(_scalar(workers, "workers", 1, 64))
    tol = _scalar(tolerance, "tolerance", 1e-6, 1e-2)
    if time_limit_s is not None:
        time_limit_s = _scalar(time_limit_s, "time_limit_s", 1e-6, 1e7)
    diam = sample_diameters(d, f, n)
    # Minimum-image forces need the box to exceed twice the longest neighbour distance
    # (largest diameter + skin) at the densest packing tried (phi = 0.9), with 5 % margin;
    # refuse boxes too small for the sizes. Units: number-mean diameter, skin 0.2.
    scaled = diam / np.mean(diam)
    ratio = (np.sum(np.pi / 6.0 * scaled**3) / 0.9) ** (1.0 / 3.0) / scaled.max()
    limit = 2.1 * (1.0 + 0.2 / scaled.max())
    if ratio < limit:
        needed = int(math.ceil(n * (limit / ratio) ** 3))
        raise InputRangeError("n_particles", n, f"at least about {needed} for these sizes "
                              f"(the periodic box must span {limit:.2g} largest spheres)")
    started = time.perf_counter()
    stop = _Stop(None if time_limit_s is None else started + float(time_limit_s), callback)
    phi_guess = _ouchiyama_tanaka(*volume_distribution(diam, diam**3 / np.sum(diam**3)),
                                  PHI_RCP)
    phi_start = max(0.3, phi_guess - 0.04)
    args = (phi_start, tol, 1e-16, 1e-4, 400_000, stop)
    results = []
    interrupted = False
    pool = ThreadPoolExecutor(max_workers=max(1, min(int(workers), seeds)))
    try:
        futures = [pool.submit(_jam_one, diam, int(seed) + k, *args, k, seeds, started)
                   for k in range(seeds)]
        for fut in futures:
            results.append(fut.result())
    except KeyboardInterrupt:
        stop.event.set()
        interrupted = True
        results = [fut.result() for fut in futures if fut.done() and not fut.cancelled()]
    finally:
        stop.event.set() if interrupted else None
        pool.shutdown(wait=True)
    done = [r for r in results if r is not None]
    interrupted = interrupted or len(done) < seeds
    if not done:
        raise SimulationInterrupted(
            "jamming simulation stopped before any packing was finished "
            f"(time_limit_s = {time_limit_s}); allow more time or fewer particles")
    phis = np.array([r[0] for r in done])
    err = float(np.std(phis, ddof=1) / math.sqrt(phis.size)) if phis.size > 1 else math.nan
    volume = np.pi / 6.0 * diam**3
    box = (volume.sum() / phis.mean()) ** (1.0 / 3.0)
    return JammingResult(
        phi=float(phis.mean()), phi_error=err, phi_per_seed=tuple(float(p) for p in phis),
        n_particles=n, box_over_largest=float(box / diam.max()),
        volume_not_represented=float(np.sum(f[d > diam.max()])),
        unresolved_minimisations=int(sum(r[1] for r in done)),
        force_evaluations=int(sum(r[2] for r in done)),
        elapsed_s=time.perf_counter() - started, interrupted=interrupted,
        sample_diameters_m=diam, tolerance=tol)


def _simulation_message(result: JammingResult) -> str | None:
    problems = []
    if result.box_over_largest < 3.0:
        problems.append(f"the box spans only {result.box_over_largest:.2g} largest diameters "
                        "(want 3 or more)")
    if result.volume_not_represented > 0.01:
        problems.append(f"{100 * result.volume_not_represented:.2g} % of the volume lies in "
                        "sizes no simulated sphere has")
    if result.unresolved_minimisations:
        problems.append(f"{result.unresolved_minimisations} minimisations did not settle")
    if not problems:
        return None
    return "simulation is unreliable here: " + "; ".join(problems) + "; use more particles"


@model("packing", PHI_MONO,
       Param("n_particles", "-", (20, 200000), "spheres per simulated packing"),
       Param("n_seeds", "-", (1, 100), "independent packings averaged"),
       Param("seed", "-", (0, 2**31), "first random seed"),
       Param("time_limit_s", "s", (1, 86400), "wall-time limit"),
       validity="spheres; box of at least three largest diameters; random close state",
       source="O'Hern, Silbert, Liu & Nagel, Phys. Rev. E 2003 (protocol)")
def simulation(diameters_m, fractions, phi_mono=0.64, n_particles=2000, n_seeds=3, seed=0,
               time_limit_s=300.0):
    r"""Maximum packing fraction from a jamming simulation of the actual distribution.

    The mean over seeds of `simulate_jamming` [1]_; use that function for the error, the
    diagnostics, progress reporting and interruption.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state; the simulated random
        close packing is scaled by phi_mono / 0.64 for other states (our assumption, no
        source). [-]
    n_particles : int, optional
        Spheres per simulated packing. [-]
    n_seeds : int, optional
        Independent packings averaged. [-]
    seed : int, optional
        First random seed. [-]
    time_limit_s : float, optional
        Wall-time limit. [s]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    See `simulate_jamming` for the protocol, its convergence test and where it stops
    being reliable. Seconds per call, not milliseconds: not for sliders.

    References
    ----------
    .. [1] C. S. O'Hern, L. E. Silbert, A. J. Liu and S. R. Nagel, "Jamming at zero
       temperature and zero applied stress: The epitome of disorder," Phys. Rev. E, vol. 68,
       no. 1, 011306, 2003, doi:10.1103/PhysRevE.68.011306.

    Examples
    --------
    Illustrative call (small, fast):

    >>> 0.60 < simulation([1e-6], [1.0], n_particles=200, n_seeds=1) < 0.66
    True
    """
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    result = simulate_jamming(diameters_m, fractions, n_particles=n_particles, n_seeds=n_seeds,
                              seed=seed, time_limit_s=time_limit_s)
    message = _simulation_message(result)
    if message:
        _warn(message)
    return float(result.phi * phi0 / PHI_RCP)


# ------------------------------------------------------------------------------------------
# the fast default: Ouchiyama-Tanaka corrected on our simulations
# ------------------------------------------------------------------------------------------
#: Polydispersity beyond which the correction of `simulation_fit` is held constant in delta
#: (the calibration reaches 0.66); the Ouchiyama-Tanaka part keeps rising.
FIT_DELTA_LIMIT = 0.7
#: Skewness beyond which the correction is held constant in skewness (calibration: 6.2).
FIT_SKEW_LIMIT = 6.5


def _fit_features(delta, skew):
    """Terms of the correction of `simulation_fit`; all vanish for a single size."""
    x = np.minimum(delta, FIT_DELTA_LIMIT)
    return [x**2, np.minimum(skew, FIT_SKEW_LIMIT) * x**2, x**3]


#: Coefficients of `_fit_features`, least squares on predictor/data/packing_calibration.json
#: (made by tests/benchmarks/calibrate_packing.py; regression values of our own).
SIMULATION_FIT_COEFFICIENTS = (0.30056, 0.014693, -0.47844)


@model("packing", PHI_MONO,
       validity="lognormal sigma(ln d) up to 0.6 and two-size blends up to size ratio 5 "
                "(calibration range)",
       source="Ouchiyama & Tanaka 1981, corrected on Loadline's jamming simulations")
@guarded
def simulation_fit(diameters_m, fractions, phi_mono=0.64):
    r"""Fast maximum packing fraction: Ouchiyama-Tanaka corrected on jamming simulations.

    The default of `max_packing`. The estimate of Ouchiyama & Tanaka [1]_ plus a
    correction in the number-basis polydispersity :math:`\delta` and skewness :math:`S`
    fitted to our own jamming simulations (`simulate_jamming`, protocol of [2]_). Not a
    published relation: its data are in ``predictor/data/packing_calibration.json`` and the
    script that made them is ``tests/benchmarks/calibrate_packing.py``.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes. [m]
    fractions : array_like
        Volume fraction of the solids in each class. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Notes
    -----
    .. math::
        \phi = \min\left[\phi_{OT} + \frac{\phi_0}{0.64}\left(c_1 x^2 + c_2 s x^2
        + c_3 x^3\right),\ \phi_{Furnas}\right], \quad
        x = \min(\delta, 0.7),\ s = \min(S, 6.5)

    with :math:`\delta`, :math:`S` the number-basis polydispersity and skewness and
    `SIMULATION_FIT_COEFFICIENTS` (3 coefficients, 11 simulated distributions: largest
    residual 0.006, largest leave-one-out error 0.011). The simulated packing fractions are
    scaled by 0.64 / (simulated equal-sphere value, 0.6376 at 2000 spheres) so the fit
    describes the rise with polydispersity, not the finite-size offset of the protocol.
    Calibrated on lognormal distributions with sigma(ln d) 0 to 0.6 and two-size blends
    with size ratios 2 to 5; the correction is held constant beyond delta = 0.7 and
    S = 6.5, where the Ouchiyama-Tanaka part alone carries the trend, and `max_packing`
    warns beyond polydispersity 0.8. The cap by the no-interaction (Furnas) bound matters
    for blends of very different sizes rich in the coarse powder, where the
    Ouchiyama-Tanaka expression (as written here) exceeds that bound.

    References
    ----------
    .. [1] N. Ouchiyama and T. Tanaka, "Porosity estimation for random packings of
       spherical particles," Ind. Eng. Chem. Fundam., vol. 23, no. 4, pp. 490-493, 1984.
    .. [2] C. S. O'Hern, L. E. Silbert, A. J. Liu and S. R. Nagel, "Jamming at zero
       temperature and zero applied stress: The epitome of disorder," Phys. Rev. E, vol. 68,
       no. 1, 011306, 2003.

    Examples
    --------
    Equal spheres give phi_mono:

    >>> simulation_fit([1e-6], [1.0])
    0.64
    """
    d, f = volume_distribution(diameters_m, fractions)
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    return _simulation_fit(d, f, phi0)


def _simulation_fit(d, f, phi0):
    return float(_simulation_fit_blends(_Blends(d, f[None, :], np.ones((1, 1))), phi0)[0])


def _simulation_fit_blends(sums: _Blends, phi0):
    """`_simulation_fit` from the class sums of blends (see `_Blends`), (m,)."""
    _, delta, skew = sums.stats()
    base = _ouchiyama_tanaka_blends(sums, phi0)
    correction = sum(c * t for c, t in zip(SIMULATION_FIT_COEFFICIENTS,
                                           _fit_features(delta, skew), strict=True))
    # Interaction between classes only lowers the packing: never above the Furnas bound.
    # Random close packing of spheres rises with polydispersity (Desmond & Weeks 2014;
    # Farr & Groot 2009): never below the single-size value either (the fitted correction
    # can dip by ~1e-5 for a trace of fines).
    return np.maximum(np.minimum(base + phi0 / PHI_RCP * correction, sums.furnas(phi0)),
                      phi0)


def _simulation_fit_message(d, f) -> str | None:
    return _calibration_note(_number_stats(d, f)[2])


def _calibration_note(delta: float) -> str | None:
    if delta > 0.8:
        return (f"simulation-fit is used at polydispersity {delta:.3g}, beyond its calibration "
                "(up to about 0.7)")
    return None


def _simulation_sample_message(d, f, n_particles: int = 2000) -> str | None:
    """Why `simulation` cannot represent a distribution with `n_particles` spheres, or None.

    Spheres follow the distribution in number (`sample_diameters`): a coarse class holding
    much of the volume but few of the particles may get no sphere at all, and the simulated
    packing is then that of the fine classes only. Checked before the simulation runs.
    """
    n = int(min(max(n_particles, 1), 200_000))
    diam = sample_diameters(d, f, n)
    missing = float(np.sum(f[d > diam.max()]))
    if missing <= 0.01:
        return None
    number = f / (d / d.max()) ** 3
    share = float(np.sum(number[d > diam.max()]) / number.sum())
    needed = f"about {min(1.0 / share, 1e300):.2g}" if share > 0 else "too many"
    return (f"the simulation cannot represent this distribution: with {n} spheres "
            f"{100 * missing:.3g} % of the volume (sizes above {diam.max() * 1e6:.3g} um, up "
            f"to {d.max() * 1e6:.3g} um) gets no sphere, a size ratio of "
            f"{d.max() / d.min():.3g} too large for the box; it would need {needed} spheres. "
            "Use the estimators above.")


_MESSAGES = {"desmond-weeks": _desmond_weeks_message, "furnas": _furnas_message,
             "simulation-fit": _simulation_fit_message,
             "simulation": _simulation_sample_message}

DEFAULT_METHOD = "simulation-fit"


# ------------------------------------------------------------------------------------------
# dispatcher and summary
# ------------------------------------------------------------------------------------------
@guarded
def max_packing(diameters_m, fractions=None, basis: str = "volume", method: str | None = None,
                state: str = "random-close", **params) -> float:
    """Maximum packing fraction of a size distribution by any registered method.

    Parameters
    ----------
    diameters_m : array_like or SizeDistribution
        Class sizes, or a `SizeDistribution` (then ``fractions`` is None). [m]
    fractions : array_like
        Amount in each class on ``basis``, totalling 1 (or 100). [-]
    basis : {"volume", "mass", "number"}
        Basis of ``fractions``; mass equals volume for one material.
    method : str, optional
        A registry name of kind "packing" (`predictor.models("packing")`); default
        ``"simulation-fit"``, fast (well under a millisecond for 200 classes).
    state : str
        Reference state of the packing (`REFERENCE_STATES`): "random-close" (default),
        "random-loose", "low-shear" or "high-shear" (Brownian hard spheres). It sets
        ``phi_mono``; a ``phi_mono`` in ``params`` overrides it.
    **params
        The method's own parameters (for example ``compaction_index``).

    Returns
    -------
    phi_max : float
        Maximum packing fraction. [-]

    Warns
    -----
    ValidityWarning
        When the distribution lies outside the method's validity range.

    Examples
    --------
    >>> round(max_packing([1e-6, 3e-6], [0.5, 0.5], method="ouchiyama-tanaka"), 4)
    0.6778
    >>> max_packing([5e-6], [1.0], state="random-loose")
    0.55
    """
    name = DEFAULT_METHOD if method is None else method
    spec = get_model(name, kind="packing")
    d, f = volume_distribution(diameters_m, fractions, basis)
    params = dict(params)
    params.setdefault("phi_mono", reference_phi(state))
    values = spec.check_params(params)
    check = _MESSAGES.get(spec.name)
    message = check(d, f) if check else None
    if message:
        _warn(message)
    return float(spec.func(d, f, **values))


@guarded
def max_packing_blends(diameters_m, components, shares, phi_mono=0.64):
    """`max_packing` (default method) of many blends of the same powders, in one call.

    For a table of formulations (one row each) mixing the same powders in different
    shares: the simulation-fit estimate of every blend, with the validity message
    `max_packing` would warn. The estimate of one blend equals `max_packing` of that blend
    (`sizes.SizeDistribution.blend`) to rounding; its cost per blend does not grow with
    the number of size classes.

    Parameters
    ----------
    diameters_m : array_like
        Class sizes (K,) shared by the powders, ascending. [m]
    components : array_like
        Volume fractions (J, K) of each powder in each class; each row sums to 1. [-]
    shares : array_like
        Volume shares (m, J) of the powders in each blend; each row sums to 1. [-]
    phi_mono : float, optional
        Packing fraction of equal spheres in the reference state. [-]

    Returns
    -------
    phi_max : numpy.ndarray
        (m,) maximum packing fraction of each blend. [-]
    messages : numpy.ndarray
        (m,) the validity message of each blend ("" where none).

    Examples
    --------
    Spheres of 1 and 3 um alone, then equal volumes of both (`simulation_fit` of the mix):

    >>> phi, notes = max_packing_blends([1e-6, 3e-6], [[1.0, 0.0], [0.0, 1.0]],
    ...                                 [[1.0, 0.0], [0.5, 0.5]])
    >>> phi.round(4).tolist(), round(simulation_fit([1e-6, 3e-6], [0.5, 0.5]), 4)
    ([0.64, 0.7028], 0.7028)
    """
    d = np.atleast_1d(positive(diameters_m, "diameters_m")).ravel()
    if np.any(np.diff(d) <= 0):
        raise InputRangeError("diameters_m", d[1:][np.diff(d) <= 0][0], "ascending sizes")
    g = np.atleast_2d(in_range(components, "components", 0.0, np.inf))
    w = np.atleast_2d(in_range(shares, "shares", 0.0, np.inf))
    if g.ndim != 2 or g.shape[1] != d.size:
        raise InputRangeError("components", f"an array of shape {g.shape}",
                              f"(J, {d.size}): one fraction per class for each powder")
    if w.ndim != 2 or w.shape[1] != g.shape[0]:
        raise InputRangeError("shares", f"an array of shape {w.shape}",
                              f"(m, {g.shape[0]}): one share per powder in each blend")
    for name, arr in (("components", g), ("shares", w)):
        total = arr.sum(axis=1)
        if np.any(np.abs(total - 1.0) > 1e-6):
            raise InputRangeError(f"sum of {name}", total[np.abs(total - 1.0) > 1e-6][0],
                                  "1 in every row")
    phi0 = _scalar(phi_mono, "phi_mono", *PHI_MONO.bounds)
    sums = _Blends(d, g, w)
    phi = _simulation_fit_blends(sums, phi0)
    _, delta, _ = sums.stats()
    messages = np.array([_calibration_note(x) or "" if x > 0.8 else "" for x in delta],
                        dtype=object)
    return phi, messages


@dataclass(frozen=True)
class PackingEstimates:
    """Every applicable estimate of phi_max side by side (`packing_estimates`).

    ``estimates`` maps method name to phi_max; ``skipped`` maps method name to the reason
    it was left out; ``low`` / ``high`` span the estimates; ``default`` is the value of
    `max_packing` without a method.
    """

    estimates: dict
    skipped: dict
    default: float
    low: float
    high: float
    state: str

    @property
    def spread(self) -> float:
        """high - low. [-]"""
        return self.high - self.low


@guarded
def packing_estimates(diameters_m, fractions=None, basis: str = "volume",
                      state: str = "random-close", include_simulation: bool = False,
                      **simulation_params) -> PackingEstimates:
    """Every applicable packing estimate of a distribution, with their range.

    Methods outside their validity range are listed in ``skipped`` with the reason (furnas
    for classes closer than a factor `FURNAS_MIN_RATIO`; desmond-weeks beyond its fitted
    polydispersity); the simulation runs only with ``include_simulation`` (seconds).

    Examples
    --------
    >>> est = packing_estimates(SizeDistribution.lognormal(5e-6, 1.3))
    >>> sorted(est.estimates)
    ['compressible-packing', 'desmond-weeks', 'ouchiyama-tanaka', 'simulation-fit']
    >>> est.low <= est.default <= est.high
    True
    """
    d, f = volume_distribution(diameters_m, fractions, basis)
    phi0 = reference_phi(state)
    estimates, skipped = {}, {}
    for spec in models("packing"):
        if spec.name == "simulation" and not include_simulation:
            skipped[spec.name] = "not run here: the simulation runs on demand (seconds)"
            continue
        check = _MESSAGES.get(spec.name)
        if spec.name == "simulation":
            message = check(d, f, simulation_params.get("n_particles", 2000))
        else:
            message = check(d, f) if check else None
        if message:
            skipped[spec.name] = message
            continue
        kwargs = {"phi_mono": phi0}
        if spec.name == "simulation":
            kwargs.update(simulation_params)   # its own reliability warnings are shown
            estimates[spec.name] = float(spec.func(d, f, **kwargs))
            continue
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityWarning)
            estimates[spec.name] = float(spec.func(d, f, **kwargs))
    values = list(estimates.values())
    default = estimates.get(DEFAULT_METHOD, float(_simulation_fit(d, f, phi0)))
    return PackingEstimates(estimates, skipped, default, float(min(values)),
                            float(max(values)), state)


# ------------------------------------------------------------------------------------------
# non-spherical particles
# ------------------------------------------------------------------------------------------
#: phi_m1 and b of the phi_max(aspect ratio) fit of Mueller, Llewellin & Mader (2011), for
#: smooth and rough particles (checked against a secondary restatement: two independent
#: volcanology codes citing Eq. 49 of Mader, Llewellin & Mueller 2013).
ASPECT_RATIO_FITS = {"smooth": (0.656, 1.08), "rough": (0.55, 1.00)}


@guarded
def phi_max_for_aspect_ratio(aspect_ratio, surface: str = "smooth"):
    r"""Maximum packing fraction of equal spheroids of a given aspect ratio.

    The lognormal-in-log10 fit of Mueller, Llewellin & Mader [1]_, [2]_ to packing data of
    prolate and oblate particles.

    Parameters
    ----------
    aspect_ratio : float or array_like
        Long over short axis for prolate particles (> 1), short over long for oblate (< 1),
        1 for spheres. [-]
    surface : {"smooth", "rough"}
        Fit for smooth-faced or rough particles.

    Returns
    -------
    phi_max : float or numpy.ndarray
        Maximum packing fraction. [-]

    Warns
    -----
    ValidityWarning
        Outside 0.04 <= aspect_ratio <= 22, the range of the data of [1]_.

    Notes
    -----
    .. math:: \phi_m = \phi_{m1}\exp\left[-\frac{(\log_{10} r_p)^2}{2 b^2}\right]

    smooth :math:`\phi_{m1} = 0.656`, :math:`b = 1.08`; rough 0.55 and 1.00 (checked
    against a secondary restatement: two independent codes citing Eq. 49 of Mader,
    Llewellin & Mueller 2013). Valid 0.04 <= r_p <= 22 (seen in [2]_). Note that
    phi_m1 = 0.656 for spheres is the fit's value, not the random close packing 0.64.

    References
    ----------
    .. [1] S. Mueller, E. W. Llewellin and H. M. Mader, "The rheology of suspensions of
       solid particles," Proc. R. Soc. A, vol. 466, pp. 1201-1228, 2010,
       doi:10.1098/rspa.2009.0445.
    .. [2] S. Mueller, E. W. Llewellin and H. M. Mader, "The effect of particle shape on
       suspension viscosity and implications for magmatic flows," Geophys. Res. Lett.,
       vol. 38, L13316, 2011, doi:10.1029/2011GL047167.

    Examples
    --------
    >>> round(phi_max_for_aspect_ratio(10.0), 4)
    0.4273
    """
    rp = positive(aspect_ratio, "aspect_ratio")
    if surface not in ASPECT_RATIO_FITS:
        raise InputRangeError("surface", surface, "'smooth' or 'rough'")
    if np.any((rp < 0.04) | (rp > 22.0)):
        _warn(f"phi_max_for_aspect_ratio is used at aspect ratio "
              f"{float(rp[(rp < 0.04) | (rp > 22.0)].flat[0]):.3g}, outside the data range "
              "0.04 to 22 of Mueller et al.")
    phi_m1, b = ASPECT_RATIO_FITS[surface]
    return scalar_or_array(phi_m1 * np.exp(-np.log10(rp) ** 2 / (2.0 * b * b)), aspect_ratio)


@guarded
def intrinsic_viscosity_for_aspect_ratio(aspect_ratio):
    r"""Intrinsic viscosity [eta] of rigid spheroids of a given aspect ratio.

    The interpolation of Kuhn & Kuhn [1]_ over the exact results for Brownian spheroids
    (Simha [2]_ for long rods and thin disks), as used for the Einstein coefficient of
    non-spherical particles by Mueller, Llewellin & Mader [3]_.

    Parameters
    ----------
    aspect_ratio : float or array_like
        Long over short axis for prolate particles (> 1), short over long for oblate (< 1),
        1 for spheres. [-]

    Returns
    -------
    intrinsic_viscosity : float or numpy.ndarray
        [eta]; 2.5 for spheres. [-]

    Notes
    -----
    With :math:`p` the aspect ratio (formulas from memory, not checked against [1]_):

    .. math::
        [\eta] = 2.5 + \frac{32}{15\pi}\left(\frac{1}{p}-1\right)
        - 0.628\,\frac{1-p}{1-0.075p}, \quad p < 1

    .. math:: [\eta] = 2.5 + 0.4075\,(p-1)^{1.508}, \quad 1 \le p \le 15

    .. math::
        [\eta] = 1.6 + p^2\left[\frac{1}{5(\ln 2p - 1/2)} + \frac{1}{15(\ln 2p - 3/2)}
        \right], \quad p > 15

    The branches meet within 3 % at p = 15 and tend to Simha's thin-disk limit
    :math:`32/(15\pi p)` as p -> 0. Rotational Brownian motion randomises orientation
    (low Peclet number); aligned particles in strong shear have lower [eta].

    References
    ----------
    .. [1] W. Kuhn and H. Kuhn, "Die Abhängigkeit der Viskosität vom Strömungsgefälle bei
       hochverdünnten Suspensionen und Lösungen," Helv. Chim. Acta, vol. 28, pp. 97-127,
       1945.
    .. [2] R. Simha, "The influence of Brownian movement on the viscosity of solutions,"
       J. Phys. Chem., vol. 44, no. 1, pp. 25-34, 1940.
    .. [3] S. Mueller, E. W. Llewellin and H. M. Mader, "The rheology of suspensions of
       solid particles," Proc. R. Soc. A, vol. 466, pp. 1201-1228, 2010.

    Examples
    --------
    >>> intrinsic_viscosity_for_aspect_ratio(1.0)
    2.5
    >>> round(intrinsic_viscosity_for_aspect_ratio(5.0), 3)
    5.796
    """
    p = in_range(aspect_ratio, "aspect_ratio", 1e-3, 1e3)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        oblate = (2.5 + 32.0 / (15.0 * np.pi) * (1.0 / p - 1.0)
                  - 0.628 * (1.0 - p) / (1.0 - 0.075 * p))
        mid = 2.5 + 0.4075 * np.abs(p - 1.0) ** 1.508
        log2p = np.log(2.0 * p)
        long = 1.6 + p**2 * (1.0 / (5.0 * (log2p - 0.5)) + 1.0 / (15.0 * (log2p - 1.5)))
    out = np.where(p < 1.0, oblate, np.where(p <= 15.0, mid, long))
    return scalar_or_array(out, aspect_ratio)
