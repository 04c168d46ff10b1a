"""Design maps: a 41 x 41 map of the demo paint against a per-cell `predict` loop.

Goals (issue 14): the map >= 50x faster than calling `predict` once per cell, and under
300 ms for the demo paint (Carreau-Yasuda liquid, two solids). The map runs through
`design._evaluate_cells`, the one place to swap for the vectorised engine.
"""

import dataclasses
import pathlib
import time

import numpy as np

from predictor import design, scenario
from predictor import formulation as fm
from tests.benchmarks.common import row

DEMO = pathlib.Path(__file__).resolve().parents[2] / "data_demo" / "mineral_coating.loadline.json"
N = 41
N_LOOP = 120        # cells timed in the per-cell loop; its time is scaled to N * N cells
RANGES = ((0.2, 0.45), (0.05, 0.25))
RATE = 100.0


def _per_cell_loop(form, cells):
    out = []
    for x, y in cells:
        ings = (dataclasses.replace(form.ingredients[0], loading=x, basis="mass"),
                dataclasses.replace(form.ingredients[1], loading=y, basis="mass"))
        out.append(float(fm.predict(dataclasses.replace(form, ingredients=ings),
                                    RATE)["viscosity_Pa_s"][0]))
    return np.array(out)


def run():
    form = scenario.read_scenario(DEMO)
    start = time.perf_counter()
    grid = design.loading_map(form, 0, 1, *RANGES, RATE, n=N)
    ours = time.perf_counter() - start
    pick = np.linspace(0, N * N - 1, N_LOOP).round().astype(int)
    cells = list(zip(grid["x_loading"].to_numpy()[pick], grid["y_loading"].to_numpy()[pick],
                     strict=True))
    start = time.perf_counter()
    ref = _per_cell_loop(form, cells)
    loop = (time.perf_counter() - start) * N * N / N_LOOP
    err = float(np.max(np.abs(grid["viscosity_Pa_s"].to_numpy()[pick] / ref - 1)))
    return [row(f"loading_map {N} x {N} of the demo paint at {RATE:g} 1/s", ours, loop,
                f"per-cell predict loop (timed on {N_LOOP} cells, scaled)",
                goal="speed-up >= 50; ours < 300 ms",
                note=f"max relative difference {err:.1e}; cells evaluated by "
                     "design._evaluate_cells")]
