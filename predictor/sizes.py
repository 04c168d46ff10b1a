"""Particle size distributions: construction, conversion between bases, and statistics.

A `SizeDistribution` holds class sizes (ascending) and the volume fraction of the solids in
each class. It is built from a measured table (`from_table`), a generator (`lognormal`,
`rosin_rammler`, `single`) or a blend of several distributions (`blend`), and it carries the
statistics a formulator reads off a laser-diffraction report (D10, D50, D90, span, Sauter and
De Brouckere means) plus those the packing estimators use (number-basis polydispersity and
skewness of the radius).

Conventions for the whole module (numpy only):

- sizes are diameters in metres; amounts are stored on the volume basis and sum to 1;
- for a single material the mass basis equals the volume basis; number fractions follow from
  n_i proportional to f_i / d_i**3;
- quantiles (D10, D50, D90) interpolate the cumulative volume curve linearly in log(d)
  between class boundaries placed at the geometric mid-points of neighbouring class sizes
  (the outer boundaries mirror the first and last mid-points); a one-class distribution has
  every quantile equal to its size (common practice, no source);
- bad input raises `InputRangeError` whose message names the row and the column.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ._checks import as_array, guarded, in_range, positive
from .errors import InputRangeError

BASES = ("volume", "mass", "number")
#: Most classes a distribution read from a file keeps. Laser-diffraction instruments report
#: about 50 to 120 classes; finer tables are rebinned (log-spaced, volume kept), which bounds
#: the work of the packing estimators and the simulation (common practice, no source).
MAX_CLASSES = 200

#: z-value of the 10 % / 90 % points of a normal distribution.
_Z90 = 1.2815515655446004


def _erf(x):
    """Vectorised error function (numpy has none; math.erf per element is fast enough)."""
    return np.vectorize(math.erf, otypes=[float])(x)


def _normal_cdf(z):
    return 0.5 * (1.0 + _erf(np.asarray(z, dtype=float) / math.sqrt(2.0)))


@guarded
def class_edges(diameters_m) -> np.ndarray:
    """Class boundaries at the geometric mid-points of ascending class sizes.

    The outer boundaries mirror the first and last inner ones in log(d); a single class gets
    zero width. Common practice for log-spaced laser-diffraction classes, no source.

    Parameters
    ----------
    diameters_m : array_like
        Ascending class sizes. [m]

    Returns
    -------
    edges_m : numpy.ndarray
        ``len(diameters_m) + 1`` boundaries. [m]

    Examples
    --------
    >>> class_edges([1e-6, 4e-6]) * 1e6
    array([0.5, 2. , 8. ])
    """
    d = np.asarray(diameters_m, dtype=float)
    if d.size == 1:
        return np.array([d[0], d[0]])
    logd = np.log(d)
    mid = 0.5 * (logd[1:] + logd[:-1])
    first = logd[0] - (mid[0] - logd[0])
    last = logd[-1] + (logd[-1] - mid[-1])
    return np.exp(np.concatenate([[first], mid, [last]]))


def _mass_to_volume(shares, densities):
    v = np.asarray(shares, dtype=float) / np.asarray(densities, dtype=float)
    return v / v.sum()


@dataclass(frozen=True, eq=False)
class SizeDistribution:
    """A particle size distribution on the volume basis.

    Parameters
    ----------
    diameters_m : numpy.ndarray
        Class sizes, strictly ascending, positive. [m]
    fractions : numpy.ndarray
        Volume fraction of the solids in each class; non-negative, sums to 1. [-]

    Notes
    -----
    Instances are immutable (read-only arrays) and compare equal when both arrays are equal.
    Build them with the class methods; the constructor checks and normalises ``fractions``
    (a total within 1e-6 of 1 is rescaled to exactly 1).

    Examples
    --------
    >>> dist = SizeDistribution.lognormal(10e-6, 1.5)
    >>> round(dist.d50_m * 1e6, 3)
    10.0
    """

    diameters_m: np.ndarray
    fractions: np.ndarray

    def __post_init__(self):
        d = as_array(self.diameters_m, "diameters_m").ravel()
        f = as_array(self.fractions, "fractions").ravel()
        if d.size == 0:
            raise InputRangeError("diameters_m", "[]", "at least one class")
        if d.shape != f.shape:
            raise InputRangeError("fractions", f"{f.size} values",
                                  f"one value per class ({d.size})")
        # 1 pm to 1 m: far wider than any powder, narrow enough that class edges and
        # moments stay within double precision.
        in_range(d, "diameters_m", 1e-12, 1.0)
        if np.any(np.diff(d) <= 0):
            i = int(np.argmax(np.diff(d) <= 0)) + 1
            raise InputRangeError(f"diameters_m[{i}]", d[i],
                                  f"a size above the previous class ({d[i - 1]:.6g} m)")
        if np.any(f < 0):
            i = int(np.argmax(f < 0))
            raise InputRangeError(f"fractions[{i}]", f[i], "a value >= 0")
        total = f.sum()
        if abs(total - 1.0) > 1e-6:
            raise InputRangeError("sum of fractions", total, "1 (volume fractions of the solids)")
        f = f / total
        d, f = d.copy(), f.copy()
        d.setflags(write=False)
        f.setflags(write=False)
        object.__setattr__(self, "diameters_m", d)
        object.__setattr__(self, "fractions", f)

    # -- identity ---------------------------------------------------------------------------
    def __eq__(self, other):
        if not isinstance(other, SizeDistribution):
            return NotImplemented
        return (np.array_equal(self.diameters_m, other.diameters_m)
                and np.array_equal(self.fractions, other.fractions))

    def __hash__(self):
        return hash((self.diameters_m.tobytes(), self.fractions.tobytes()))

    def __repr__(self):
        return (f"SizeDistribution({self.diameters_m.size} classes, "
                f"D50={self.d50_m:.4g} m, span={self.span:.3g})")

    # -- constructors -----------------------------------------------------------------------
    @classmethod
    @guarded
    def single(cls, diameter_m: float) -> SizeDistribution:
        """All solids at one size.

        Examples
        --------
        >>> SizeDistribution.single(2e-6).polydispersity
        0.0
        """
        d = positive(diameter_m, "diameter_m")
        if d.ndim != 0:
            raise InputRangeError("diameter_m", d.ravel()[0], "a single number")
        return cls(np.array([float(d)]), np.array([1.0]))

    @classmethod
    @guarded
    def lognormal(cls, median_m: float, geometric_std: float, basis: str = "volume",
                  n_classes: int = 161, span_sigmas: float = 4.0) -> SizeDistribution:
        r"""A lognormal distribution sampled on log-spaced classes.

        Parameters
        ----------
        median_m : float
            Median diameter on the given basis. [m]
        geometric_std : float
            Geometric standard deviation exp(sigma), sigma the standard deviation of ln(d);
            1 gives a single size. [-]
        basis : {"volume", "mass", "number"}
            Basis of the median.
        n_classes : int
            Number of log-spaced classes.
        span_sigmas : float
            The grid covers ``span_sigmas`` standard deviations beyond the volume and the
            number medians on both sides; the tails beyond are added to the end classes.

        Notes
        -----
        A lognormal in number with median m_n and sigma is a lognormal in volume with the
        same sigma and median m_v = m_n exp(3 sigma^2) (Hatch-Choate relation). Class
        amounts are the exact lognormal probabilities between the class boundaries.

        Examples
        --------
        >>> dist = SizeDistribution.lognormal(5e-6, 1.2)
        >>> round(dist.de_brouckere_diameter_m / 5e-6, 4)   # exp(sigma**2 / 2)
        1.0168
        """
        if basis not in BASES:
            raise InputRangeError("basis", basis, "'volume', 'mass' or 'number'")
        median = float(positive(median_m, "median_m"))
        gsd = float(as_array(geometric_std, "geometric_std"))
        if gsd < 1.0:
            raise InputRangeError("geometric_std", gsd, "a value >= 1")
        if gsd == 1.0:
            return cls.single(median)
        sigma = math.log(gsd)
        if sigma > 2.0:
            raise InputRangeError("geometric_std", gsd, f"a value <= {math.exp(2.0):.4g}")
        n = int(n_classes)
        if n < 8:
            raise InputRangeError("n_classes", n_classes, "an integer >= 8")
        mu_v = math.log(median) + (3.0 * sigma**2 if basis == "number" else 0.0)
        mu_n = mu_v - 3.0 * sigma**2
        lo = mu_n - span_sigmas * sigma
        hi = mu_v + span_sigmas * sigma
        logd = np.linspace(lo, hi, n)
        edges = np.log(class_edges(np.exp(logd)))
        cdf = _normal_cdf((edges - mu_v) / sigma)
        cdf[0], cdf[-1] = 0.0, 1.0
        return cls(np.exp(logd), np.diff(cdf))

    @classmethod
    @guarded
    def rosin_rammler(cls, characteristic_m: float, uniformity: float, n_classes: int = 161,
                      min_diameter_m: float | None = None) -> SizeDistribution:
        r"""A Rosin-Rammler (Weibull) distribution on the volume (mass) basis.

        Parameters
        ----------
        characteristic_m : float
            Size d' at which 63.2 % of the volume is finer. [m]
        uniformity : float
            Uniformity (spread) exponent n; larger is narrower. [-]
        n_classes : int
            Number of log-spaced classes.
        min_diameter_m : float, optional
            Smallest class size; default the size with 0.01 % finer. [m]

        Notes
        -----
        .. math:: Q_3(d) = 1 - \exp[-(d/d')^n]

        Rosin & Rammler [1]_. The number-basis statistics depend on the smallest size kept:
        the number density diverges at small sizes when n < 3.

        References
        ----------
        .. [1] P. Rosin and E. Rammler, "The laws governing the fineness of powdered coal,"
           J. Inst. Fuel, vol. 7, pp. 29-36, 1933.

        Examples
        --------
        >>> dist = SizeDistribution.rosin_rammler(10e-6, 2.0)
        >>> round(dist.d50_m * 1e6, 2)     # d' (ln 2)**(1/n)
        8.33
        """
        dp = float(positive(characteristic_m, "characteristic_m"))
        n_rr = float(positive(uniformity, "uniformity"))
        if n_rr < 0.3 or n_rr > 20:
            raise InputRangeError("uniformity", n_rr, "a value in [0.3, 20]")
        n = int(n_classes)
        if n < 8:
            raise InputRangeError("n_classes", n_classes, "an integer >= 8")
        d_lo = dp * (-math.log1p(-1e-4)) ** (1.0 / n_rr)
        if min_diameter_m is not None:
            d_lo = float(positive(min_diameter_m, "min_diameter_m"))
        d_hi = dp * math.log(1e6) ** (1.0 / n_rr)
        if d_lo >= d_hi:
            raise InputRangeError("min_diameter_m", d_lo, f"a size below {d_hi:.4g} m")
        d = np.geomspace(d_lo, d_hi, n)
        q = 1.0 - np.exp(-(class_edges(d) / dp) ** n_rr)
        q[0], q[-1] = 0.0, 1.0
        return cls(d, np.diff(q))

    @classmethod
    @guarded
    def from_table(cls, sizes_m, amounts, basis: str = "volume", cumulative: bool = False,
                   normalise: bool = False, columns: tuple[str, str] = ("size_m", "amount"),
                   first_row: int = 0) -> SizeDistribution:
        """A distribution from a measured table of size classes and amounts.

        Parameters
        ----------
        sizes_m : array_like
            Class sizes, strictly ascending. With ``n`` amounts, give ``n`` sizes (class
            mid-points, or for a cumulative table the size each value is "passing") or
            ``n + 1`` class edges (representative size: geometric mean of the edges). [m]
        amounts : array_like
            Amount per class, or cumulative amount passing when ``cumulative``; in percent
            (totalling 100) or as fractions (totalling 1).
        basis : {"volume", "mass", "number"}
            Basis of the amounts; mass equals volume for one material.
        cumulative : bool
            Amounts are cumulative percent (or fraction) passing, non-decreasing. An amount
            already passing the smallest size is put in a class one log-step below it.
        normalise : bool
            Accept any positive total (for example grams retained on sieves).
        columns : tuple of str
            Column names used in error messages.
        first_row : int
            Number reported for the first row in error messages (a CSV reader passes the
            line number of the first data row).

        Raises
        ------
        InputRangeError
            Empty or one-row table, a non-numeric cell, a size <= 0, unsorted or repeated
            sizes, a negative amount, a decreasing cumulative curve, or amounts that do not
            total 100 % (or 1). The message names the row and the column.

        Examples
        --------
        A cumulative volume table in percent passing (illustrative values):

        >>> dist = SizeDistribution.from_table([1e-6, 2e-6, 4e-6, 8e-6], [0, 30, 80, 100],
        ...                                    cumulative=True)
        >>> round(dist.d50_m * 1e6, 3)
        2.639
        """
        size_col, amount_col = columns
        sizes = _column(sizes_m, size_col, first_row)
        values = _column(amounts, amount_col, first_row)
        if values.size < 2:
            raise InputRangeError(f"table ({amount_col})", f"{values.size} rows",
                                  "at least two rows of sizes and amounts")
        if basis not in BASES:
            raise InputRangeError("basis", basis, "'volume', 'mass' or 'number'")
        edges = sizes.size == values.size + 1 and not cumulative
        if not edges and sizes.size != values.size:
            raise InputRangeError(f"column {size_col}", f"{sizes.size} rows",
                                  f"{values.size} sizes (one per amount)"
                                  + ("" if cumulative else f" or {values.size + 1} class edges"))
        for i, size in enumerate(sizes):
            if size <= 0:
                raise InputRangeError(f"row {first_row + i}, column {size_col}", size,
                                      "a size > 0 m")
            if i and size <= sizes[i - 1]:
                raise InputRangeError(f"row {first_row + i}, column {size_col}", size,
                                      f"a size above the previous row ({sizes[i - 1]:.6g}); "
                                      "sort the classes by increasing size")
        for i, a in enumerate(values):
            if a < 0:
                raise InputRangeError(f"row {first_row + i}, column {amount_col}", a,
                                      "an amount >= 0")
        if cumulative:
            for i in range(1, values.size):
                if values[i] < values[i - 1]:
                    raise InputRangeError(
                        f"row {first_row + i}, column {amount_col}", values[i],
                        f"a cumulative amount >= the previous row ({values[i - 1]:.6g})")
            total = values[-1]
        else:
            total = values.sum()
        scale = _total_scale(total, amount_col, cumulative, normalise)
        values = values / scale
        if edges:
            rep, amount = np.sqrt(sizes[1:] * sizes[:-1]), values
        elif cumulative:
            # Row k holds what passes sizes[k]: class k lies between sizes[k-1] and sizes[k];
            # what already passes the smallest size goes one log-step below it.
            amount = np.concatenate([[values[0]], np.diff(values)])
            rep = np.concatenate([[sizes[0] * math.sqrt(sizes[0] / sizes[1])],
                                  np.sqrt(sizes[1:] * sizes[:-1])])
        else:
            rep, amount = sizes, values
        amount = np.clip(amount, 0.0, None)
        if amount.sum() <= 0:
            raise InputRangeError(f"column {amount_col}", 0.0, "some amount > 0")
        keep = amount > 0
        rep, amount = rep[keep], amount[keep]
        if basis == "number":
            amount = amount * rep**3
        return cls(rep, amount / amount.sum())

    @classmethod
    @guarded
    def blend(cls, distributions, shares, basis: str = "volume",
              densities_kg_per_m3=None) -> SizeDistribution:
        """Several powders mixed in the given shares.

        Parameters
        ----------
        distributions : sequence of SizeDistribution
        shares : array_like
            Share of each powder in the blend, on ``basis``; totalling 1 (or 100). [-]
        basis : {"volume", "mass"}
        densities_kg_per_m3 : array_like, optional
            Particle density of each powder; required for ``basis="mass"``. [kg/m**3]

        Examples
        --------
        >>> coarse = SizeDistribution.single(10e-6)
        >>> fine = SizeDistribution.single(1e-6)
        >>> mix = SizeDistribution.blend([coarse, fine], [0.5, 0.5], basis="mass",
        ...                              densities_kg_per_m3=[2000.0, 4000.0])
        >>> mix.fractions.round(4).tolist()       # fine first: sizes ascend
        [0.3333, 0.6667]
        """
        dists = list(distributions)
        if not dists or not all(isinstance(x, SizeDistribution) for x in dists):
            raise InputRangeError("distributions", repr(distributions)[:60],
                                  "a non-empty list of SizeDistribution")
        s = as_array(shares, "shares").ravel()
        if s.size != len(dists):
            raise InputRangeError("shares", f"{s.size} values", f"{len(dists)} shares")
        if np.any(s < 0):
            raise InputRangeError("shares", s[s < 0][0], "shares >= 0")
        scale = _total_scale(s.sum(), "shares", False, False)
        s = s / scale
        if basis == "mass":
            if densities_kg_per_m3 is None:
                raise InputRangeError("densities_kg_per_m3", None,
                                      "one density per powder for mass shares")
            rho = positive(densities_kg_per_m3, "densities_kg_per_m3").ravel()
            if rho.size != len(dists):
                raise InputRangeError("densities_kg_per_m3", f"{rho.size} values",
                                      f"{len(dists)} densities")
            s = _mass_to_volume(s, rho)
        elif basis != "volume":
            raise InputRangeError("basis", basis, "'volume' or 'mass'")
        d = np.concatenate([x.diameters_m for x in dists])
        f = np.concatenate([w * x.fractions for w, x in zip(s, dists, strict=True)])
        keep = f > 0
        d, f = d[keep], f[keep]
        uniq, inverse = np.unique(d, return_inverse=True)
        out = np.zeros(uniq.size)
        np.add.at(out, inverse, f)
        return cls(uniq, out / out.sum())

    # -- conversions ------------------------------------------------------------------------
    def to_dict(self) -> dict:
        """JSON-safe plain lists; `from_dict` rebuilds the same distribution exactly."""
        return {"basis": "volume", "diameters_m": [float(x) for x in self.diameters_m],
                "fractions": [float(x) for x in self.fractions]}

    @classmethod
    def from_dict(cls, data: dict) -> SizeDistribution:
        """Inverse of `to_dict`.

        Examples
        --------
        >>> dist = SizeDistribution.lognormal(3e-6, 1.4)
        >>> SizeDistribution.from_dict(dist.to_dict()) == dist
        True
        """
        if not isinstance(data, dict) or "diameters_m" not in data or "fractions" not in data:
            raise InputRangeError("size distribution", repr(data)[:60],
                                  "a dict with 'diameters_m' and 'fractions'")
        if data.get("basis", "volume") != "volume":
            raise InputRangeError("basis", data.get("basis"), "'volume'")
        return cls(np.asarray(data["diameters_m"], dtype=float),
                   np.asarray(data["fractions"], dtype=float))

    @property
    def number_fractions(self) -> np.ndarray:
        """Number fraction in each class. [-]"""
        n = self.fractions / self.diameters_m**3
        return n / n.sum()

    def fractions_on(self, basis: str) -> np.ndarray:
        """Class amounts on the "volume", "mass" (one material) or "number" basis."""
        if basis in ("volume", "mass"):
            return self.fractions.copy()
        if basis == "number":
            return self.number_fractions
        raise InputRangeError("basis", basis, "'volume', 'mass' or 'number'")

    def resample(self, n_classes: int = 64, low_m: float | None = None,
                 high_m: float | None = None) -> SizeDistribution:
        """The same distribution on a log-spaced grid of ``n_classes`` classes.

        The cumulative volume curve is interpolated linearly in log(d) at the new class
        boundaries, so D10/D50/D90 are kept.

        Examples
        --------
        >>> dist = SizeDistribution.lognormal(5e-6, 1.5)
        >>> round(dist.resample(40).d50_m / dist.d50_m, 3)
        1.0
        """
        n = int(n_classes)
        if n < 1:
            raise InputRangeError("n_classes", n_classes, "an integer >= 1")
        edges = class_edges(self.diameters_m)
        lo = edges[0] if low_m is None else float(positive(low_m, "low_m"))
        hi = edges[-1] if high_m is None else float(positive(high_m, "high_m"))
        if self.diameters_m.size == 1 or n == 1:
            return SizeDistribution.single(float(np.exp(np.sum(self.fractions
                                                               * np.log(self.diameters_m)))))
        if hi <= lo:
            raise InputRangeError("high_m", hi, f"a size above low_m ({lo:.4g} m)")
        new_edges = np.geomspace(lo, hi, n + 1)
        cum = np.concatenate([[0.0], np.cumsum(self.fractions)])
        q = np.interp(np.log(new_edges), np.log(edges), cum)
        q[0], q[-1] = 0.0, 1.0
        amount = np.clip(np.diff(q), 0.0, None)
        rep = np.sqrt(new_edges[1:] * new_edges[:-1])
        keep = amount > 0
        return SizeDistribution(rep[keep], amount[keep] / amount[keep].sum())

    def limit_classes(self, max_classes: int = MAX_CLASSES, field: str = "size table"
                      ) -> SizeDistribution:
        """This distribution, or, above `max_classes` classes, its `resample` onto
        `max_classes` log-spaced classes (the cumulative volume curve is kept, so D10, D50
        and D90 are too), with a `UserWarning` saying so.

        Examples
        --------
        >>> import warnings
        >>> dist = SizeDistribution.lognormal(5e-6, 1.5, n_classes=1000)
        >>> with warnings.catch_warnings(record=True):
        ...     warnings.simplefilter("always")
        ...     small = dist.limit_classes(200)
        >>> small.diameters_m.size <= 200, round(small.d50_m / dist.d50_m, 3)
        (True, 1.0)
        """
        if self.diameters_m.size <= max_classes:
            return self
        import warnings

        warnings.warn(f"{field}: {self.diameters_m.size} size classes were rebinned onto "
                      f"{max_classes} log-spaced classes (volume kept; D10, D50 and D90 "
                      "unchanged) to bound the work.", UserWarning, stacklevel=2)
        return self.resample(max_classes)

    # -- statistics -------------------------------------------------------------------------
    def quantile_m(self, fraction_finer: float) -> float:
        """Size below which ``fraction_finer`` of the volume lies (D10 is 0.1). [m]"""
        p = float(as_array(fraction_finer, "fraction_finer"))
        if not 0.0 <= p <= 1.0:
            raise InputRangeError("fraction_finer", p, "a value in [0, 1]")
        if self.diameters_m.size == 1:
            return float(self.diameters_m[0])
        edges = class_edges(self.diameters_m)
        cum = np.concatenate([[0.0], np.cumsum(self.fractions)])
        # Strictly increasing abscissa for the inverse interpolation: drop flat steps.
        keep = np.concatenate([[True], np.diff(cum) > 0])
        return float(np.exp(np.interp(p, cum[keep], np.log(edges[keep]))))

    @property
    def d10_m(self) -> float:
        """Volume-basis D10. [m]"""
        return self.quantile_m(0.1)

    @property
    def d50_m(self) -> float:
        """Volume-basis median D50. [m]"""
        return self.quantile_m(0.5)

    @property
    def d90_m(self) -> float:
        """Volume-basis D90. [m]"""
        return self.quantile_m(0.9)

    @property
    def span(self) -> float:
        """(D90 - D10) / D50. [-]"""
        return (self.d90_m - self.d10_m) / self.d50_m

    @property
    def sauter_diameter_m(self) -> float:
        """Sauter mean D[3,2] = sum(n d^3) / sum(n d^2) = 1 / sum(f / d). [m]"""
        return float(1.0 / np.sum(self.fractions / self.diameters_m))

    @property
    def de_brouckere_diameter_m(self) -> float:
        """De Brouckere mean D[4,3] = sum(f d), f the volume fractions. [m]"""
        return float(np.sum(self.fractions * self.diameters_m))

    @property
    def number_mean_diameter_m(self) -> float:
        """Number-mean diameter D[1,0]. [m]"""
        return float(np.sum(self.number_fractions * self.diameters_m))

    def number_moment(self, k: float) -> float:
        """k-th raw moment of the diameter on the number basis, sum(n d^k). [m**k]"""
        return float(np.sum(self.number_fractions * self.diameters_m**k))

    @property
    def polydispersity(self) -> float:
        """Standard deviation over mean of the radius, number basis (delta). [-]"""
        x = self.diameters_m / self.number_mean_diameter_m
        n = self.number_fractions
        var = np.sum(n * (x - 1.0) ** 2)
        return float(math.sqrt(max(var, 0.0)))

    @property
    def skewness(self) -> float:
        """Skewness of the radius, number basis; 0 for a single size. [-]"""
        x = self.diameters_m / self.number_mean_diameter_m
        n = self.number_fractions
        var = np.sum(n * (x - 1.0) ** 2)
        if var <= 1e-24:
            return 0.0
        return float(np.sum(n * (x - 1.0) ** 3) / var**1.5)


def _column(values, name: str, first_row: int) -> np.ndarray:
    """Float array of a table column; a non-numeric or non-finite cell names its row."""
    try:
        items = list(np.ravel(np.asarray(values, dtype=object)))
    except Exception:  # pragma: no cover - defensive: np.asarray(object) rarely fails
        raise InputRangeError(f"column {name}", repr(values)[:40], "a column of numbers") from None
    out = np.empty(len(items))
    for i, cell in enumerate(items):
        try:
            x = float(cell)
        except (TypeError, ValueError):
            raise InputRangeError(f"row {first_row + i}, column {name}", repr(cell),
                                  "a number") from None
        if not math.isfinite(x):
            raise InputRangeError(f"row {first_row + i}, column {name}", x, "a finite number")
        out[i] = x
    return out


def _total_scale(total: float, name: str, cumulative: bool, normalise: bool) -> float:
    """100 for percent, 1 for fractions, or the total itself when normalising."""
    what = "final cumulative amount" if cumulative else "sum of amounts"
    if normalise:
        if total <= 0:
            raise InputRangeError(f"{what} ({name})", total, "a total > 0")
        return float(total)
    for scale in (100.0, 1.0):
        if abs(total - scale) <= 0.01 * scale:
            return scale
    raise InputRangeError(f"{what} ({name})", total,
                          "100 (percent) or 1 (fractions) within 1 %",
                          "Pass normalise=True to accept any positive total.")
