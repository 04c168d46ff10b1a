"""Inverse questions: closed-form inversions, vectorised screens, answers with bands."""

from statistics import NormalDist

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy import optimize

import predictor  # noqa: F401  (registers every relation)
from predictor import design
from predictor.errors import InputRangeError
from predictor.registry import get_model

Z975 = NormalDist().inv_cdf(0.975)

# Parameters inside each relation's registry bounds, for the round trips.
PARAMS = {
    "einstein": {"intrinsic_viscosity": 3.0},
    "batchelor": {"huggins_coefficient": 6.2},
    "krieger-dougherty": {"phi_max": 0.61, "intrinsic_viscosity": 3.2},
    "quemada": {"phi_max": 0.63},
    "maron-pierce": {"phi_max": 0.58},
    "eilers": {"phi_max": 0.66},
    "chong": {"phi_max": 0.605},
    "mooney": {"crowding_factor": 1.43, "intrinsic_viscosity": 2.5},
    "frankel-acrivos": {"phi_max": 0.64},
    "thomas": {},
}


@pytest.mark.parametrize("model", sorted(PARAMS))
@settings(max_examples=50, deadline=None)
@given(u=st.floats(0.01, 0.97))
def test_inverse_round_trips_through_the_published_relation(model, u):
    # The forward relations are the published ones (suspension.py); solving them for phi
    # must give back the loading we started from (closed form, or bisection for thomas).
    spec = get_model(model)
    params = PARAMS[model]
    upper = float(design._upper(spec, params))
    phi = u * min(upper, 0.6)
    eta = spec.func(phi, **params)
    back = design.loading_for_relative_viscosity(model, eta, **params)
    assert back == pytest.approx(phi, rel=1e-7, abs=1e-9)


def test_every_closed_form_is_a_registered_relation():
    for name in design.CLOSED_FORM_INVERSES:
        assert get_model(name).name == name


def test_emulsion_relations_invert_by_bisection():
    # Taylor (1932) eta_r = 1 + phi (2.5 lam + 1)/(lam + 1) is linear: hand inversion.
    lam = 2.0
    phi = design.loading_for_relative_viscosity("taylor", 1.2, viscosity_ratio=lam)
    assert phi == pytest.approx(0.2 * (lam + 1) / (2.5 * lam + 1), rel=1e-9)


def test_closed_form_matches_a_per_row_root_finder():
    # Reference: scipy.optimize.brentq on the forward Krieger-Dougherty relation.
    from predictor.suspension import krieger_dougherty

    rng = np.random.default_rng(0)
    pm = rng.uniform(0.5, 0.72, 50)
    ei = rng.uniform(2.5, 5.0, 50)
    limit = rng.uniform(0.01, 10.0, 50)
    ours = design.max_loading_many("krieger-dougherty", limit, 1e-3, phi_max=pm,
                                   intrinsic_viscosity=ei)
    ref = [optimize.brentq(lambda x, a=a, b=b, t=t: krieger_dougherty(x, a, b) - t / 1e-3,
                           0.0, a * (1 - 1e-12), xtol=1e-14)
           for a, b, t in zip(pm, ei, limit, strict=True)]
    assert ours == pytest.approx(ref, rel=1e-9)


def test_many_rows_broadcast_and_edge_cases():
    n = 1000
    phi = design.max_loading_many("quemada", np.full(n, 0.5), np.linspace(1e-3, 1.0, n),
                                  phi_max=0.64)
    assert phi.shape == (n,)
    assert phi[-1] == 0.0                          # liquid (1 Pa*s) already above 0.5 Pa*s
    assert np.all(np.diff(phi) <= 0)               # thicker liquid, less room for solids
    assert isinstance(design.max_loading_many("quemada", 0.1, 1e-3), float)


def test_bad_inputs_raise_with_the_field_named():
    with pytest.raises(InputRangeError, match="viscosity_limit_Pa_s"):
        design.max_loading_many("quemada", -1.0, 1e-3)
    with pytest.raises(InputRangeError, match="liquid_viscosity_Pa_s"):
        design.max_loading_many("quemada", 1.0, np.array([1e-3, np.nan]))
    with pytest.raises(InputRangeError, match="phi_max"):
        design.max_loading_many("quemada", 1.0, 1e-3, phi_max=np.array([0.6, 1.3]))
    with pytest.raises(InputRangeError, match="relative_viscosity"):
        design.loading_for_relative_viscosity("quemada", 0.0)


MONOTONE = ["krieger-dougherty", "quemada", "eilers", "chong", "frankel-acrivos"]


@settings(max_examples=100, deadline=None)
@given(model=st.sampled_from(MONOTONE), pm=st.floats(0.3, 0.9), dpm=st.floats(0.0, 0.1),
       limit=st.floats(1.1e-3, 10.0), factor=st.floats(1.0, 100.0))
def test_max_loading_increases_with_the_limit_and_with_phi_max(model, pm, dpm, limit, factor):
    assume(pm + dpm <= 1.0)
    base = design.max_loading_many(model, limit, 1e-3, phi_max=pm)
    floor = base * (1 - 1e-12)     # rounding of the closed forms
    assert design.max_loading_many(model, limit * factor, 1e-3, phi_max=pm) >= floor
    assert design.max_loading_many(model, limit, 1e-3, phi_max=pm + dpm) >= floor
    assert 0.0 <= base < pm


# --- answers about a formulation (integration with formulation.py) ------------------------

@pytest.fixture(scope="module")
def slurry():
    # Invented formulation: a 2700 kg/m3 mineral, 20 um (non-Brownian), at 40 wt% in water
    # at 25 C, with a calibrated-looking phi_max.
    from predictor.formulation import Formulation, Ingredient

    return Formulation(ingredients=(Ingredient("mineral (invented)", 2700.0, 0.40,
                                               basis="mass", diameter_m=20e-6),),
                       model_params={"phi_max": 0.60, "intrinsic_viscosity": 2.5})


def test_central_answer_matches_the_formulation_solver(slurry):
    from predictor import formulation as fm

    ans = design.max_loading_with_band(slurry, 0.1, 10.0)
    assert ans.phi_effective == pytest.approx(fm.max_loading(slurry, 0.1, 10.0), rel=1e-6)
    assert ans.phi_low == ans.phi == ans.phi_high and ans.sources == ()
    assert ans.limited_by == "viscosity"
    # The answer's viscosity, through predict, is the limit.
    eta = fm.predict(fm.with_solids_scaled(slurry, ans.phi_effective), 10.0)["viscosity_Pa_s"]
    assert float(eta.iloc[0]) == pytest.approx(0.1, rel=1e-6)


def test_phi_max_band_is_the_inverse_at_the_phi_max_quantiles(slurry):
    # Max loading rises monotonically with phi_max, so its band is the inversion at
    # phi_max -+ 1.96 sd (quantiles are preserved by monotone maps).
    from predictor import formulation as fm

    ans = design.max_loading_with_band(slurry, 0.1, 10.0, phi_max_sd=0.02, n_samples=20_000)
    eta_l = fm.mixture(slurry).liquid_viscosity_Pa_s
    expect = [design.max_loading_many("krieger-dougherty", 0.1, eta_l, phi_max=0.60 + s,
                                      intrinsic_viscosity=2.5) for s in (-Z975 * 0.02,
                                                                         Z975 * 0.02)]
    assert (ans.phi_low, ans.phi_high) == pytest.approx(expect, rel=0.01)
    assert ans.mass_fraction_low < ans.mass_fraction < ans.mass_fraction_high
    text = ans.text()
    assert text.startswith(f"{100 * ans.phi:.0f} vol% (") and "wt%" in str(ans)


def test_liquid_above_the_limit_means_no_loading(slurry):
    ans = design.max_loading_with_band(slurry, 1e-4, 10.0, phi_max_sd=0.02)
    assert (ans.phi, ans.phi_high, ans.limited_by) == (0.0, 0.0, "liquid")


def test_loading_for_target_round_trips_through_predict(slurry):
    from predictor import formulation as fm

    ans = design.loading_for_target(slurry, 0.02, 50.0)
    eta = fm.predict(fm.with_solids_scaled(slurry, ans.phi_effective), 50.0)["viscosity_Pa_s"]
    assert float(eta.iloc[0]) == pytest.approx(0.02, rel=1e-6)
    with pytest.raises(InputRangeError, match="target_viscosity_Pa_s"):
        design.loading_for_target(slurry, 1e-5, 50.0)


def test_windows_give_a_loading_range(slurry):
    windows = [("pumping", 100.0, 0.5), {"name": "sag", "shear_rate_1_per_s": 0.1,
                                          "min_viscosity_Pa_s": 0.01}]
    ans = design.max_loading_windows(slurry, windows)
    assert ans.feasible and 0 < ans.phi_low < ans.phi_high
    assert list(ans.table["bound"]) == ["max", "min"]
    bad = design.max_loading_windows(slurry, [("pumping", 100.0, 0.01),
                                              ("sag", 0.1, None, 0.5)])
    assert not bad.feasible
    with pytest.raises(InputRangeError, match="window"):
        design.max_loading_windows(slurry, [("pumping", 100.0, None)])


def test_sweep_band_contains_the_sweep_and_diverges_near_phi_max(slurry):
    frame = design.loading_sweep_with_band(slurry, np.linspace(0.0, 0.599, 200),
                                           phi_max_sd=0.02, n_samples=2000)
    eta = frame["viscosity_Pa_s"]
    assert (frame["viscosity_low_Pa_s"] <= eta).all()
    assert (eta <= frame["viscosity_high_Pa_s"]).all()
    assert frame["divergent_fraction"].iloc[0] == 0.0
    assert frame["divergent_fraction"].iloc[-1] > 0.3
    assert np.isinf(frame["viscosity_high_Pa_s"].iloc[-1])


def test_sweep_band_from_the_packing_spread_reports_the_estimates_it_used(slurry):
    # The app reads the estimators' range from the band instead of asking for it again.
    frame = design.loading_sweep_with_band(slurry, np.linspace(0.0, 0.5, 20),
                                           packing_spread=True, n_samples=200)
    spread = design.packing_estimator_spread(slurry)
    assert len(spread["estimates"]) >= 2
    assert frame.attrs["packing_estimates"] == spread["estimates"]
    assert "spread of packing estimators" in frame.attrs["sources"]
    plain = design.loading_sweep_with_band(slurry, np.linspace(0.0, 0.5, 20),
                                           phi_max_sd=0.02, n_samples=200)
    assert "packing_estimates" not in plain.attrs


def test_calibration_feeds_the_answer(slurry):
    from predictor import fitting
    from predictor.suspension import krieger_dougherty

    phi = np.linspace(0.05, 0.5, 10)
    y = krieger_dougherty(phi, 0.58, 3.0) * np.exp(
        0.03 * np.random.default_rng(0).standard_normal(10))
    fit = fitting.fit(phi, y)
    ans = design.max_loading_with_band(slurry, 0.1, 10.0, fit=fit)
    assert ans.phi_max == pytest.approx(fit.params["phi_max"])
    assert ans.phi_low < ans.phi < ans.phi_high
    assert ans.sources and "calibration" in ans.sources[0]


@settings(max_examples=15, deadline=None)
@given(limit=st.floats(3e-3, 5.0), factor=st.floats(1.01, 10.0))
def test_formulation_max_loading_increases_with_the_limit(slurry, limit, factor):
    a = design.max_loading_with_band(slurry, limit, 10.0)
    b = design.max_loading_with_band(slurry, limit * factor, 10.0)
    assert b.phi >= a.phi and b.mass_fraction >= a.mass_fraction


def test_storage_check_gives_a_verdict_per_ingredient(slurry):
    table = design.storage_check(slurry)
    assert list(table["ingredient"]) == ["mineral (invented)"]
    assert table["reason"][0] in {"settles", "slow"} and table["message"][0]


def test_two_powders_and_the_spread_of_packing_estimators():
    # Invented blend of a coarse and a fine lognormal powder. The spread is the sample
    # standard deviation over the estimators kept (formula check), and it feeds a band.
    from predictor import sizes
    from predictor.formulation import Formulation, Ingredient

    blend = Formulation(ingredients=(
        Ingredient("coarse (invented)", 2700.0, 0.3,
                   size=sizes.SizeDistribution.lognormal(20e-6, 1.6)),
        Ingredient("fine (invented)", 2700.0, 0.15,
                   size=sizes.SizeDistribution.lognormal(2e-6, 1.5))))
    spread = design.packing_estimator_spread(blend)
    values = np.array(list(spread["estimates"].values()))
    assert values.size >= 2 and np.all((values > 0) & (values < 1))
    assert spread["relative_sd"] == pytest.approx(np.std(values, ddof=1) / values.mean())
    ans = design.max_loading_with_band(blend, 1.0, 100.0, packing_spread=True, n_samples=500)
    assert ans.phi_low < ans.phi < ans.phi_high
    assert "spread of packing estimators" in ans.sources


def test_phase_ratio_question_is_delegated(mocker):
    # Wiring only: the emulsion answer comes from predictor.phase_ratio, unchanged.
    from predictor import phase_ratio

    spy = mocker.spy(phase_ratio, "phase_ratio_for_target")
    got = design.phase_ratio_for_target(2e-3, 50e-3, 5e-3, 5e-6, 10.0,
                                        target_viscosity_Pa_s=10e-3)
    assert spy.call_count == 1 and got == spy.spy_return


def test_best_blend_is_delegated(mocker):
    # Wiring only: the blend answer comes from predictor.blend.optimise_blend, unchanged.
    from predictor import blend
    from predictor.sizes import SizeDistribution

    spy = mocker.spy(blend, "optimise_blend")
    got = design.best_blend([SizeDistribution.single(20e-6), SizeDistribution.single(2e-6)],
                            phi_total=0.55, n_points=11)
    assert spy.call_count == 1 and got is spy.spy_return


@pytest.mark.parametrize("name", ["mineral_coating", "ceramic_slip"])
@pytest.mark.parametrize("phi", [0.0, 0.1, 0.35, 0.55])
@pytest.mark.parametrize("rate", [0.01, 100.0])
def test_trial_viscosity_equals_predict_of_the_rescaled_formulation(name, phi, rate):
    # The solvers scale the mixture in place; that must be the very flow curve of the
    # formulation rewritten at the trial loading (our own consistency, no outside source).
    import pathlib
    import warnings

    from predictor import formulation as fm
    from predictor import scenario
    from predictor.errors import ValidityWarning

    form = scenario.read_scenario(pathlib.Path(__file__).parents[1] / "data_demo"
                                  / f"{name}.loadline.json")
    ctx = design._Context(form)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        want = fm.predict(fm.with_solids_scaled(ctx.formulation, phi) if phi > 0 else
                          fm.with_solids_scaled(ctx.formulation, 1e-12), rate)
    got = ctx.viscosity(phi if phi > 0 else 1e-12, rate)
    assert got == pytest.approx(float(want["viscosity_Pa_s"].iloc[0]), rel=1e-9)
