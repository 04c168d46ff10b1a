"""Inverse questions and bands: 1e5-row max loading, Monte Carlo band of a 200-point sweep.

Goals (issue 6): max_loading_many on 1e5 candidates at least 100x faster than a per-row
scipy root-finding loop; a 2000-sample Monte Carlo band of a 200-point sweep under 100 ms.
"""

import math
import time

import numpy as np
from scipy import optimize

import predictor  # noqa: F401
from predictor import design, uncertainty
from predictor.suspension import krieger_dougherty
from tests.benchmarks.common import median_time, row

N_ROWS = 100_000
N_LOOP = 2_000      # rows timed in the per-row loop; its time is scaled to N_ROWS


def _candidates(n, seed=0):
    rng = np.random.default_rng(seed)
    return (rng.uniform(0.50, 0.72, n), rng.uniform(2.5, 5.0, n), rng.uniform(0.5e-3, 2e-3, n),
            rng.uniform(0.01, 10.0, n))


def _per_row_loop(pm, ei, eta_l, limit):
    out = np.empty(pm.size)
    for i in range(pm.size):
        a, k, t = pm[i], ei[i] * pm[i], limit[i] / eta_l[i]
        out[i] = optimize.brentq(lambda x, a=a, k=k, t=t: (1.0 - x / a) ** (-k) - t,
                                 0.0, a * (1 - 1e-12), xtol=1e-12)
    return out


def run():
    pm, ei, eta_l, limit = _candidates(N_ROWS)
    ours = median_time(lambda: design.max_loading_many(
        "krieger-dougherty", limit, eta_l, phi_max=pm, intrinsic_viscosity=ei), repeat=5)
    start = time.perf_counter()
    ref = _per_row_loop(pm[:N_LOOP], ei[:N_LOOP], eta_l[:N_LOOP], limit[:N_LOOP])
    loop = (time.perf_counter() - start) * N_ROWS / N_LOOP
    got = design.max_loading_many("krieger-dougherty", limit[:N_LOOP], eta_l[:N_LOOP],
                                  phi_max=pm[:N_LOOP], intrinsic_viscosity=ei[:N_LOOP])
    err = float(np.max(np.abs(got - ref)))
    rows = [row("max_loading_many KD closed form, 1e5 rows", ours, loop,
                f"per-row brentq loop (timed on {N_LOOP} rows, scaled)",
                goal="speed-up >= 100", note=f"max |difference| {err:.1e}")]

    bis = median_time(lambda: design.max_loading_many("thomas", limit, eta_l), repeat=3)
    start = time.perf_counter()
    for i in range(N_LOOP):
        t = limit[i] / eta_l[i]
        optimize.brentq(lambda x, t=t: 1 + 2.5 * x + 10.05 * x * x
                        + 0.00273 * math.exp(16.6 * x) - t, 0.0, 1.0, xtol=1e-12)
    loop_thomas = (time.perf_counter() - start) * N_ROWS / N_LOOP
    rows.append(row("max_loading_many thomas (vectorised bisection), 1e5 rows", bis,
                    loop_thomas, f"per-row brentq loop (timed on {N_LOOP} rows, scaled)",
                    note="no closed form: 46 vectorised halvings"))

    phi = np.linspace(0.0, 0.6, 200)
    samples = uncertainty.sample_independent({"phi_max": 0.62}, {"phi_max": 0.02}, 2000, 0)
    band = median_time(lambda: uncertainty.monte_carlo_band(
        krieger_dougherty, phi, samples, fixed={"intrinsic_viscosity": 2.5}), repeat=7)
    rows.append(row("Monte Carlo band, 200 points x 2000 samples (relation)", band,
                    goal="< 100 ms"))
    try:
        from predictor.formulation import Formulation, Ingredient

        slurry = Formulation(ingredients=(Ingredient("mineral (invented)", 2700.0, 0.4,
                                                     diameter_m=5e-6),))
        sweep = median_time(lambda: design.loading_sweep_with_band(
            slurry, n=200, phi_max_sd=0.02, n_samples=2000), repeat=5)
        rows.append(row("loading_sweep_with_band, 200 points x 2000 samples (formulation)",
                        sweep, goal="< 100 ms", note="includes mixture() and loading_sweep"))
    except Exception as err:  # the formulation layer may not be complete yet
        rows.append(row("loading_sweep_with_band (formulation)", math.nan,
                        note=f"not run: {type(err).__name__}: {err}"))
    return rows
