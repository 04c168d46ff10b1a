"""Particle interactions: the yield stress against loading (vectorised over loadings, one
verdict per set of inputs) and the cost the flocculation hook adds to a flow curve.

The slip is the invented alumina casting slip of data_demo, its alumina given 30 mV and the
liquid 0.5 mol/L of salt (flocculated). Baselines: the same yield stress asked loading by
loading (a scalar loop), and the plain slip's flow curve (no interactions).
"""

import dataclasses
import pathlib

import numpy as np

from predictor import formulation as fm
from predictor.scenario import read_scenario
from tests.benchmarks.common import median_time, row

DEMO = pathlib.Path(__file__).resolve().parents[2] / "data_demo" / "ceramic_slip.loadline.json"


def _slips():
    plain = read_scenario(DEMO)
    ing = dataclasses.replace(plain.ingredients[0], surface_potential_V=0.03, hamaker_J=4.8e-20)
    floc = dataclasses.replace(plain, ingredients=(ing, *plain.ingredients[1:]),
                               liquid=dataclasses.replace(plain.liquid,
                                                          ionic_strength_mol_per_L=0.5))
    return plain, floc


def run():
    plain, floc = _slips()
    mix = fm.mixture(floc)
    grid = np.linspace(0.0, 0.99 * mix.phi_max, 200)

    def vectorised():
        return fm.flocculation_yield_stress(floc, mix, grid)

    def loop():
        return [fm.flocculation_yield_stress(floc, fm._at_loading(mix, x)) for x in grid]

    assert np.allclose(vectorised(), loop(), rtol=1e-12, equal_nan=True)
    rates = np.logspace(-3, 5, 61)
    fm._verdict.cache_clear()
    first = median_time(lambda: (fm._verdict.cache_clear(), fm.particle_interactions(floc)),
                        repeat=5)
    return [
        row("yield stress against loading, 200 loadings", median_time(vectorised, 7),
            median_time(loop, 3), "the same, loading by loading", "faster than the loop"),
        row("flow curve of the flocculated slip, 61 rates", median_time(
            lambda: fm.predict(floc, rates), 7), median_time(lambda: fm.predict(plain, rates), 7),
            "the plain slip (no interactions)", "near 1 (the hook is cheap)",
            note=f"verdict computed once per input set: {first * 1e3:.2g} ms uncached"),
    ]
