"""Uncertainty bands: sampling, order statistics, divergence kept, linearisation limit."""

from statistics import NormalDist

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from predictor import uncertainty
from predictor.errors import InputRangeError
from predictor.suspension import krieger_dougherty

Z975 = NormalDist().inv_cdf(0.975)


def test_sample_normal_reproduces_mean_and_covariance():
    # Law of large numbers: 200 000 draws estimate the covariance to about 1 %.
    cov = np.array([[4e-4, -3e-3], [-3e-3, 0.04]])
    s = uncertainty.sample_normal({"phi_max": 0.6, "intrinsic_viscosity": 3.0}, cov,
                                  200_000, seed=0)
    draws = np.stack([s["phi_max"], s["intrinsic_viscosity"]])
    assert draws.mean(axis=1) == pytest.approx([0.6, 3.0], rel=1e-3)
    assert np.cov(draws) == pytest.approx(cov, rel=0.03)


def test_samples_are_seeded_and_clipped():
    a = uncertainty.sample_normal({"phi_max": 0.99}, [[1e-2]], 1000, seed=3,
                                  bounds={"phi_max": (0.2, 1.0)})
    b = uncertainty.sample_normal({"phi_max": 0.99}, [[1e-2]], 1000, seed=3,
                                  bounds={"phi_max": (0.2, 1.0)})
    assert np.array_equal(a["phi_max"], b["phi_max"])
    assert a["phi_max"].max() == 1.0


def test_quantile_band_is_the_order_statistics():
    # Hand-worked: 0..100 at level 0.9 -> ranks 5 and 95; inf stays inf, no NaN.
    low, high = uncertainty.quantile_band(np.arange(101.0)[:, None], level=0.9)
    assert (low[0], high[0]) == (5.0, 95.0)
    v = np.r_[np.arange(90.0), np.full(11, np.inf)][:, None]
    low, high = uncertainty.quantile_band(v, level=0.9)
    assert low[0] == 5.0 and np.isinf(high[0])


def test_band_of_a_monotone_relation_is_the_relation_at_the_parameter_quantiles():
    # Quantiles are preserved by monotone maps: eta_r decreases with phi_max, so the band
    # at phi is KD at phi_max = mu -+ z sigma (z = 1.96, the normal 97.5 % quantile).
    mu, sd = 0.62, 0.01
    s = uncertainty.sample_independent({"phi_max": mu}, {"phi_max": sd}, 40_000, seed=1)
    phi = np.array([0.2, 0.4, 0.5])
    band = uncertainty.monte_carlo_band(krieger_dougherty, phi, s,
                                        fixed={"intrinsic_viscosity": 2.5},
                                        central={"phi_max": mu})
    assert band.high == pytest.approx(krieger_dougherty(phi, mu - Z975 * sd), rel=0.01)
    assert band.low == pytest.approx(krieger_dougherty(phi, mu + Z975 * sd), rel=0.01)


def test_divergence_is_never_hidden():
    # P(phi_max < phi) = Phi((phi - mu)/sd) of the samples diverge at phi; above 2.5 %
    # the upper bound must be inf, and the divergent share must match the normal cdf.
    mu, sd = 0.60, 0.02
    s = uncertainty.sample_independent({"phi_max": mu}, {"phi_max": sd}, 20_000, seed=2)
    phi = np.array([0.50, 0.56, 0.58, 0.59])
    band = uncertainty.monte_carlo_band(krieger_dougherty, phi, s,
                                        fixed={"intrinsic_viscosity": 2.5})
    expected = np.array([NormalDist(mu, sd).cdf(p) for p in phi])
    binomial_sd = np.sqrt(expected * (1 - expected) / 20_000)
    assert np.all(np.abs(band.divergent_fraction - expected) <= 4 * binomial_sd + 1e-4)
    assert np.isfinite(band.high[0]) and np.isinf(band.high[2:]).all()
    assert np.isfinite(band.central).all()


def test_linearised_band_matches_monte_carlo_for_small_uncertainty():
    # Delta method (GUM Eq. 13) is the small-uncertainty limit of the Monte Carlo band.
    s = uncertainty.sample_independent({"phi_max": 0.62}, {"phi_max": 0.002}, 40_000, seed=4)
    phi = np.array([0.2, 0.4])
    mc = uncertainty.monte_carlo_band(krieger_dougherty, phi, s,
                                      fixed={"intrinsic_viscosity": 2.5},
                                      central={"phi_max": 0.62})
    lin = uncertainty.linearised_band(krieger_dougherty, phi, {"phi_max": 0.62},
                                      [[0.002**2]], fixed={"intrinsic_viscosity": 2.5})
    assert lin.low == pytest.approx(mc.low, rel=2e-3)
    assert lin.high == pytest.approx(mc.high, rel=2e-3)
    assert lin.central == pytest.approx(mc.central)


@settings(max_examples=60, deadline=None)
@given(mu=st.floats(0.45, 0.74), sd=st.floats(0.0, 0.05), x=st.floats(0.0, 0.7),
       eta_i=st.floats(2.5, 5.0))
def test_band_contains_the_central_prediction(mu, sd, x, eta_i):
    s = uncertainty.sample_independent({"phi_max": mu}, {"phi_max": sd}, 200, seed=0,
                                       bounds={"phi_max": (0.2, 1.0)})
    band = uncertainty.monte_carlo_band(krieger_dougherty, [x], s,
                                        fixed={"intrinsic_viscosity": eta_i},
                                        central={"phi_max": mu})
    assert band.low[0] <= band.central[0] <= band.high[0]


def test_bad_options_raise_with_the_field_named():
    with pytest.raises(InputRangeError, match="level"):
        uncertainty.quantile_band(np.ones((5, 1)), level=1.5)
    with pytest.raises(InputRangeError, match="seed"):
        uncertainty.sample_independent({"a": 1.0}, {"a": 0.1}, 10, seed=None)
    with pytest.raises(InputRangeError, match="covariance"):
        uncertainty.sample_normal({"a": 1.0, "b": 2.0}, [[1.0]], 10)
    with pytest.raises(InputRangeError, match="standard deviation of a"):
        uncertainty.sample_independent({"a": 1.0}, {"a": -0.1}, 10)
    with pytest.raises(InputRangeError, match="standard deviation"):
        uncertainty.sample_independent({"a": 1.0}, {"b": 0.1}, 10)
