"""Calibration: recovery, intervals at their nominal rate, refusals, model comparison."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import optimize, stats

import predictor  # noqa: F401  (registers every relation)
from predictor import fitting
from predictor.errors import FitError, InputRangeError
from predictor.suspension import krieger_dougherty, quemada

PHI = np.array([0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5])
TRUE = {"phi_max": 0.60, "intrinsic_viscosity": 3.0}


def _noisy(seed, sigma=0.03, phi=PHI, **true):
    rng = np.random.default_rng(seed)
    eta = krieger_dougherty(phi, **(true or TRUE))
    return eta * np.exp(sigma * rng.standard_normal(phi.size))


def test_noise_free_data_are_recovered_exactly():
    # Limit check: least squares on exact Krieger-Dougherty values (Krieger & Dougherty
    # 1959, as written in Eq. (1) of Farr 2014) must return the generating parameters.
    r = fitting.fit(PHI, krieger_dougherty(PHI, **TRUE))
    assert r.params["phi_max"] == pytest.approx(0.60, rel=1e-8)
    assert r.params["intrinsic_viscosity"] == pytest.approx(3.0, rel=1e-8)
    assert r.rmse < 1e-10 and r.r2 == pytest.approx(1.0)


def test_covariance_matches_scipy_curve_fit():
    # Reference library used only here: scipy.optimize.curve_fit computes the same
    # s^2 (J^T J)^-1 covariance of least-squares estimates independently of our code.
    y = _noisy(3)
    r = fitting.fit(PHI, y)
    popt, pcov = optimize.curve_fit(lambda p, a, b: np.log(krieger_dougherty(p, a, b)),
                                    PHI, np.log(y), p0=[0.62, 2.8],
                                    bounds=([0.51, 2.5], [1.0, 20.0]))
    assert [r.params["phi_max"], r.params["intrinsic_viscosity"]] == pytest.approx(popt,
                                                                                   rel=1e-5)
    assert r.covariance == pytest.approx(pcov, rel=1e-3)
    # t interval with n - p = 8 degrees of freedom (Student t, 97.5 % quantile).
    half = stats.t.ppf(0.975, 8) * np.sqrt(pcov[0, 0])
    assert r.intervals["phi_max"] == pytest.approx((popt[0] - half, popt[0] + half), rel=1e-4)


def test_intervals_cover_the_truth_at_the_nominal_rate():
    # Coverage check over 200 seeds: a 95 % interval must contain the generating value in
    # about 95 % of repeated experiments (Bates & Watts 1988, ch. 2). Binomial sd for
    # 200 trials is 1.5 %; accept 89.5-99 % (about 3.5 sd below, 2.6 above).
    hits = np.zeros(2)
    n = 200
    for seed in range(n):
        r = fitting.fit(PHI, _noisy(seed))
        for i, k in enumerate(("phi_max", "intrinsic_viscosity")):
            lo, hi = r.intervals[k]
            hits[i] += lo <= TRUE[k] <= hi
    rate = hits / n
    assert np.all(rate >= 0.895) and np.all(rate <= 0.99), rate


def test_bootstrap_intervals_agree_with_the_jacobian_ones():
    # Two independent ways to the same interval (Efron & Tibshirani 1993, ch. 9): widths
    # must agree within a factor of 2 on well-behaved data; seeded, so reproducible.
    y = _noisy(7)
    jac = fitting.fit(PHI, y)
    boot = fitting.fit(PHI, y, interval="bootstrap", n_bootstrap=200, seed=1)
    again = fitting.fit(PHI, y, interval="bootstrap", n_bootstrap=200, seed=1)
    assert boot.intervals == again.intervals
    for k in jac.params:
        w_j = np.diff(jac.intervals[k])[0]
        w_b = np.diff(boot.intervals[k])[0]
        assert 0.5 < w_b / w_j < 2.0
        assert boot.intervals[k][0] <= boot.params[k] <= boot.intervals[k][1]
    assert boot.bootstrap.shape[1] == 2


def test_information_criteria_follow_the_gaussian_likelihood():
    # Akaike (1974), Schwarz (1978), Hurvich & Tsai (1989): with RSS in log space and the
    # variance estimated, -2 ln L = n ln(2 pi RSS / n) + n and k = p + 1.
    y = _noisy(11)
    r = fitting.fit(PHI, y)
    n, k = PHI.size, 3
    rss = np.sum(r.residuals**2)
    m2ll = n * np.log(2 * np.pi * rss / n) + n
    assert r.aic == pytest.approx(m2ll + 2 * k)
    assert r.bic == pytest.approx(m2ll + k * np.log(n))
    assert r.aicc == pytest.approx(m2ll + 2 * k + 2 * k * (k + 1) / (n - k - 1))


def test_compare_fits_prefers_the_generating_relation():
    # Quemada data (Quemada 1977): Krieger-Dougherty contains it, so it fits as well but
    # pays 2 in AIC for its extra parameter; a quemada-form relation must rank first.
    rng = np.random.default_rng(5)
    y = quemada(PHI, 0.62) * np.exp(0.02 * rng.standard_normal(PHI.size))
    comp = fitting.compare_fits(PHI, y, ["krieger-dougherty", "quemada", "eilers", "einstein"])
    assert comp.best.model == "quemada"
    rows = comp.rows()
    assert rows[0]["delta_aic"] == 0.0
    assert sum(r["akaike_weight"] for r in rows) == pytest.approx(1.0)
    assert [r["aic"] for r in rows] == sorted(r["aic"] for r in rows)


def test_compare_fits_lists_what_could_not_be_fitted():
    # Two points cannot fit a two-parameter relation (needs n >= p + 1), one-parameter ok.
    comp = fitting.compare_fits([0.1, 0.3], [1.3, 2.9], ["krieger-dougherty", "quemada"])
    assert "krieger-dougherty" in comp.failed and "need at least 3" in comp.failed[
        "krieger-dougherty"]
    assert comp.best.model == "quemada"


def test_fixed_parameters_are_held():
    r = fitting.fit(PHI, _noisy(2), fixed={"intrinsic_viscosity": 3.0})
    assert list(r.params) == ["phi_max"] and r.fixed == {"intrinsic_viscosity": 3.0}
    assert r.intervals["phi_max"][0] < 0.6 < r.intervals["phi_max"][1]


@settings(max_examples=50, deadline=None)
@given(eta_l=st.floats(1e-4, 10.0))
def test_absolute_and_relative_viscosities_give_the_same_fit(eta_l):
    # Property: relative viscosity is eta / eta_liquid, so the two inputs are one fit.
    y = _noisy(4)
    a = fitting.fit(PHI, y)
    b = fitting.fit(PHI, viscosity_Pa_s=y * eta_l, liquid_viscosity_Pa_s=eta_l)
    assert b.params["phi_max"] == pytest.approx(a.params["phi_max"], rel=1e-6)


@settings(max_examples=50, deadline=None)
@given(st.permutations(range(PHI.size)))
def test_order_of_points_does_not_matter(order):
    order = np.array(order)
    y = _noisy(8)
    a = fitting.fit(PHI, y)
    b = fitting.fit(PHI[order], y[order])
    assert b.params["phi_max"] == pytest.approx(a.params["phi_max"], rel=1e-6)


def test_band_contains_the_fit_and_widens_toward_phi_max():
    # Beyond the data (phi > 0.5) the band must widen monotonically toward phi_max and end
    # in a divergence once phi passes the lower end of phi_max's interval.
    r = fitting.fit(PHI, _noisy(9))
    x = np.linspace(0.05, 0.59, 40)
    band = r.band(x, n_samples=2000, seed=0)
    assert np.all(band.low <= band.central) and np.all(band.central <= band.high)
    beyond = x >= 0.5
    width = band.relative_width[beyond]
    assert np.all(np.diff(width[np.isfinite(width)]) > 0)
    assert width[-1] > 10 * band.relative_width[x <= 0.3].max()
    assert np.isinf(band.high[x > r.intervals["phi_max"][0] + 0.01]).all()
    assert band.central == pytest.approx(r.predict(x))


# --- refusals, each with its reason -------------------------------------------------------

@pytest.mark.parametrize("phi, eta, match", [
    ([0.1, 0.2], [1.3, 1.7], "need at least 3"),
    ([0.3, 0.3, 0.3, 0.3], [2.7, 2.8, 2.75, 2.9], "all points are at 1 loading"),
    ([0.1, 0.2, 0.3, 0.4], [1.3, 0.0, 2.8, 5.0], "must be positive"),
    ([0.1, 0.2, 0.3, 0.4], [1.3, -1.7, 2.8, 5.0], "must be positive"),
    ([0.1, 0.2, 0.3, 0.4], [1.3e-3, 1.7e-3, 2.8e-3, 5e-3], "mixed units"),
])
def test_refuses_what_cannot_be_fitted(phi, eta, match):
    with pytest.raises(FitError, match=match):
        fitting.fit(phi, eta)


def test_refuses_points_at_or_above_the_packing_limit():
    # The last point is far above any Krieger-Dougherty curve with phi_max above 0.5:
    # the fit runs into phi_max = max(phi) and must be refused, not returned.
    phi = np.array([0.1, 0.2, 0.3, 0.4, 0.5])
    eta = np.array([1.3, 1.8, 2.8, 5.0, 1e9])
    with pytest.raises(FitError, match="packing limit"):
        fitting.fit(phi, eta, fixed={"intrinsic_viscosity": 2.5})
    with pytest.raises(FitError, match="at or above the fixed phi_max"):
        fitting.fit(phi, eta, fixed={"phi_max": 0.5})


def test_refuses_mixed_inputs_and_bad_values():
    with pytest.raises(FitError, match="not both"):
        fitting.fit(PHI, _noisy(1), viscosity_Pa_s=_noisy(1), liquid_viscosity_Pa_s=1e-3)
    with pytest.raises(FitError, match="liquid_viscosity_Pa_s"):
        fitting.fit(PHI, viscosity_Pa_s=_noisy(1))
    with pytest.raises(InputRangeError, match="phi"):
        fitting.fit([0.1, np.nan, 0.3, 0.4], [1.3, 1.7, 2.8, 5.0])
    with pytest.raises(InputRangeError, match="phi"):
        fitting.fit([0.1, 0.2, 1.3, 0.4], [1.3, 1.7, 2.8, 5.0])
    with pytest.raises(InputRangeError, match="crowding_factor"):
        fitting.fit(PHI, _noisy(1), fixed={"crowding_factor": 1.5})
    with pytest.raises(InputRangeError, match="relative_viscosity"):
        fitting.fit(PHI, _noisy(1)[:5])


def test_refuses_parameters_the_data_cannot_separate():
    # Dilute data only: eta_r ~ 1 + [eta] phi (Einstein's limit of Krieger-Dougherty), so
    # phi_max is not identifiable next to [eta].
    phi = np.linspace(0.001, 0.004, 6)
    noise = np.exp(0.01 * np.random.default_rng(0).standard_normal(6))
    with pytest.raises(FitError, match="do not determine phi_max"):
        fitting.fit(phi, krieger_dougherty(phi, 0.6, 3.0) * noise)


# --- flow curves ----------------------------------------------------------------------------

def test_flow_curve_fit_recovers_a_power_law():
    # Ostwald-de Waele power law eta = K gammadot^(n - 1), exact data, a limit check.
    from predictor.liquids import power_law

    rate = np.logspace(-1, 3, 12)
    r = fitting.fit_flow_curve(rate, power_law(rate, 2.0, 0.45), "power-law")
    assert r.params["consistency_Pa_s"] == pytest.approx(2.0, rel=1e-6)
    assert r.params["flow_index"] == pytest.approx(0.45, rel=1e-6)


def test_flow_curve_fit_of_noisy_carreau_yasuda_covers_the_truth():
    from predictor.liquids import carreau_yasuda

    rate = np.logspace(-2, 3, 20)
    true = {"zero_shear_viscosity_Pa_s": 12.0, "infinite_shear_viscosity_Pa_s": 0.05,
            "time_constant_s": 2.0, "flow_index": 0.4, "yasuda_exponent": 2.0}
    y = carreau_yasuda(rate, **true) * np.exp(0.02 * np.random.default_rng(0).standard_normal(20))
    r = fitting.fit_flow_curve(rate, y, "carreau-yasuda")
    for k in ("zero_shear_viscosity_Pa_s", "flow_index", "time_constant_s"):
        assert r.intervals[k][0] <= true[k] <= r.intervals[k][1], k
    assert not r.notes


def test_flow_curve_refuses_one_shear_rate_and_wrong_kinds():
    with pytest.raises(FitError, match="shear rate"):
        fitting.fit_flow_curve([10.0] * 5, [1.0, 1.1, 0.9, 1.0, 1.05], "power-law")
    with pytest.raises(Exception, match="krieger-dougherty"):
        fitting.fit_flow_curve(np.logspace(0, 2, 5), np.ones(5), "krieger-dougherty")
