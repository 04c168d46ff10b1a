"""Moore's thixotropy model: limits, exact solutions, fits to step tests and loops."""

import numpy as np
import pytest

from predictor import thixotropy as th
from predictor.errors import FitError, InputRangeError

TRUE = {"infinite_shear_viscosity_Pa_s": 0.2, "structure_viscosity_Pa_s": 8.0,
        "build_up_rate_1_per_s": 0.02, "breakdown_coefficient": 0.01}


def test_published_limits_of_the_equilibrium_curve():
    # Moore (1959) kinetics, limits as restated by Barnes, J. Non-Newtonian Fluid Mech. 70
    # (1997) 1: eta -> eta_inf + c at rest, eta -> eta_inf at high rates; both follow from the
    # kinetic equation (hand calculation).
    args = [TRUE[k] for k in th.PARAMS]
    assert th.moore(0.0, *args) == pytest.approx(8.2)
    assert th.moore(1e9, *args) == pytest.approx(0.2, rel=1e-6)
    rates = np.logspace(-3, 4, 30)
    assert np.all(np.diff(th.moore(rates, *args)) < 0)   # thinning, monotone


def test_recovery_at_rest_is_exponential_with_time_constant_one_over_a():
    # The kinetic equation at zero rate: d lambda/dt = a (1 - lambda) (Moore 1959; form checked
    # against a secondary restatement, see predictor/thixotropy.py).
    a = TRUE["build_up_rate_1_per_s"]
    assert th.structure(1 / a, 0.0, 0.0, a, 0.01) == pytest.approx(1 - np.exp(-1))
    # the structure never exceeds 1 nor falls below its equilibrium under shear
    lam = th.structure(np.linspace(0, 500, 50), 100.0, 1.0, a, 0.01)
    assert np.all(lam <= 1) and np.all(lam >= a / (a + 0.01 * 100.0) - 1e-12)


def test_recovery_time_matches_the_closed_form_and_the_simulated_history():
    t90 = th.recovery_time(0.9, TRUE, 200.0)
    lam_p = th.equilibrium_structure(200.0, 0.02, 0.01)
    # at rest from lam_p: after t90 the structure is 0.9 (exact solution, by construction)
    assert th.structure(t90, 0.0, lam_p, 0.02, 0.01) == pytest.approx(0.9)
    assert th.recovery_time(0.9, TRUE, 0.0) == 0.0          # never broken down
    short = th.recovery_time(0.9, TRUE, 200.0, process_time_s=1.0)
    assert 0 < short < t90                                  # a short step breaks less


def test_stress_history_chains_the_exact_solution():
    t = np.linspace(0, 300, 61)
    s = th.stress_history(t, np.full(t.size, 5.0), TRUE, initial_structure=1.0)
    expected = th.viscosity_history(t, 5.0, TRUE, initial_structure=1.0) * 5.0
    assert s == pytest.approx(expected, rel=1e-12)


def _steps(params, rng, noise, finals=(0.5, 5.0, 50.0), before=500.0):
    t = np.linspace(0.0, 400.0, 41)
    out = []
    for r in finals:
        s = th.stress_history(np.r_[-1e9, t], np.r_[before, np.full(t.size, r)], params)[1:]
        out.append((t, r, s * np.exp(rng.normal(0, noise, t.size)), before))
    return out


def test_step_test_intervals_cover_the_truth():
    # Coverage of the 95 % intervals over 40 noisy synthetic step-down tests (2 % noise):
    # about 95 % expected; we require at least 85 % for each constant (binomial spread for
    # 40 trials is about +-3.5 %).
    hits = np.zeros(4)
    n = 40
    for seed in range(n):
        fit = th.fit_moore(_steps(TRUE, np.random.default_rng(seed), 0.02))
        for i, k in enumerate(th.PARAMS):
            low, high = fit.intervals[k]
            hits[i] += low <= TRUE[k] <= high
    assert np.all(hits / n >= 0.85), dict(zip(th.PARAMS, hits / n, strict=True))


def test_hysteresis_loop_fit_recovers_the_constants():
    t = np.linspace(0, 600, 121)
    rate = np.r_[np.linspace(0, 100, 61), np.linspace(100, 0, 61)[1:]]
    stress = th.stress_history(t, rate, TRUE, initial_structure=1.0)
    keep = rate > 0
    fit = th.fit_moore(loops=[(t[keep], rate[keep], stress[keep], 1.0)])
    for k in th.PARAMS:
        assert fit.params[k] == pytest.approx(TRUE[k], rel=1e-3)


def test_one_step_test_alone_cannot_separate_the_constants():
    with pytest.raises(FitError, match="do not separate"):
        th.fit_moore(_steps(TRUE, np.random.default_rng(0), 0.0, finals=(5.0,)))


@pytest.mark.parametrize("call", [
    lambda: th.recovery_time(1.2, TRUE, 10.0),
    lambda: th.structure(1.0, -1.0, 0.5, 0.1, 0.1),
    lambda: th.moore(1.0, 0.1, 1.0, 0.0, 0.1),
    lambda: th.stress_history([0, 2, 1], [1, 1, 1], TRUE),
    lambda: th.viscosity_history(1.0, 1.0, {"build_up_rate_1_per_s": 1.0}),
])
def test_bad_input_is_refused(call):
    with pytest.raises(InputRangeError):
        call()
