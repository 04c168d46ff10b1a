"""The one engine: all-distinct rows against a per-row `predict` loop, side by side.

Goals (issue 13): all-distinct rows on the demo paint's liquid (Carreau-Yasuda) screened at
>= 100x a per-row `predict` loop; at least 50 000 rows/s for Newtonian rows. Every row is a
different formulation (loadings drawn at random), so no grouping can help. The paint rows
use the `base scenario` column with the invented demo paint
(data_demo/mineral_coating.loadline.json); the per-row loop predicts the same
formulations (scenario with the row's loadings) at the same two shear rates. Both sides
are timed after a warm-up screen of a few rows of each table (imports, registry look-ups and
the process's first calls), so one-time costs count for neither side.
"""

from __future__ import annotations

import dataclasses
import pathlib
import shutil
import tempfile
import time
import warnings

import numpy as np
import pandas as pd

from tests.benchmarks.common import row

ROOT = pathlib.Path(__file__).resolve().parents[2]
DEMO = ROOT / "data_demo"
PAINT = "mineral_coating.loadline.json"
RATES = (1.0, 100.0)
PAINT_ROWS = 4_000
NEWTONIAN_ROWS = 50_000
SAMPLE = 40


def paint_table(n: int, seed: int = 0, limits: bool = False) -> pd.DataFrame:
    """n invented variants of the demo paint, each with its own two loadings."""
    rng = np.random.default_rng(seed)
    table = pd.DataFrame({
        "candidate": [f"paint variant {i}" for i in range(n)],
        "note": "invented benchmark data",
        "base scenario": PAINT,
        "ingredient 1 loading [wt%]": np.round(rng.uniform(20, 40, n), 8).astype(str),
        "ingredient 2 loading [wt%]": np.round(rng.uniform(5, 20, n), 8).astype(str),
        "window 1 shear rate [1/s]": str(RATES[0]),
        "window 2 shear rate [1/s]": str(RATES[1]),
    })
    if limits:
        table["window 1 max viscosity [Pa*s]"] = "20"
        table["window 2 max viscosity [Pa*s]"] = "1"
    return table


def _per_row(table: pd.DataFrame, folder: pathlib.Path, limits: bool) -> float:
    """Seconds per row of a loop of `predict` (and `max_loading`) over formulations."""
    from predictor import formulation as fm
    from predictor.scenario import read_scenario

    base = read_scenario(folder / PAINT)
    start = time.perf_counter()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for _, r in table.iterrows():
            ings = base.ingredients
            form = dataclasses.replace(base, ingredients=(
                dataclasses.replace(ings[0], loading=float(r["ingredient 1 loading [wt%]"]) / 100),
                dataclasses.replace(ings[1], loading=float(r["ingredient 2 loading [wt%]"]) / 100)))
            fm.predict(form, list(RATES))
            if limits:
                fm.max_loading(form, 20.0, RATES[0])
                fm.max_loading(form, 1.0, RATES[1])
    return (time.perf_counter() - start) / len(table)


def _screen(table: pd.DataFrame, folder: pathlib.Path) -> tuple[float, int]:
    from predictor import batch

    start = time.perf_counter()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        out = batch.screen(table, base_dir=folder)
    return (time.perf_counter() - start) / len(table), int((out["status"] != "ok").sum())


def run():
    from tests.benchmarks.bench_batch import make_table

    folder = pathlib.Path(tempfile.mkdtemp(prefix="loadline_engine_"))
    rows = []
    try:
        for name in (PAINT, "sizes_filler_coarse.csv", "sizes_pigment_fine.csv"):
            shutil.copy(DEMO / name, folder / name)
        _screen(paint_table(20, 9, limits=True), folder)                 # warm-up
        _screen(make_table(20, seed=9, distinct=True, paint=False), folder)
        for limits in (False, True):
            what = "viscosity at 2 rates" + (" + highest loading per window" if limits else "")
            ours, errors = _screen(paint_table(PAINT_ROWS, 1, limits), folder)
            base = _per_row(paint_table(SAMPLE, 2, limits), folder, limits)
            rows.append(row(f"screen all-distinct paint rows (Carreau-Yasuda), {what}",
                            ours * 1000, base * 1000,
                            "per-row predict" + (" + max_loading" if limits else "")
                            + f" loop ({SAMPLE}-row sample)",
                            goal="speed-up >= 100" if not limits else "(information)",
                            note=f"{PAINT_ROWS} rows, {errors} errors, {1 / ours:,.0f} rows/s; "
                                 "ms are per 1000 rows"))
        newtonian = make_table(NEWTONIAN_ROWS, seed=3, distinct=True, paint=False)
        plain = newtonian[[c for c in newtonian.columns if "max viscosity" not in c]]
        ours, errors = _screen(plain, folder)
        rows.append(row("screen all-distinct Newtonian rows, viscosity at 2 rates",
                        ours * 1000, goal=">= 50 000 rows/s",
                        note=f"{NEWTONIAN_ROWS} rows, {errors} errors, {1 / ours:,.0f} rows/s; "
                             "ms are per 1000 rows"))
        ours, errors = _screen(newtonian.head(10_000), folder)
        rows.append(row("screen all-distinct Newtonian rows, + highest loading per window",
                        ours * 1000, goal="(information)",
                        note=f"10000 rows, {errors} errors, {1 / ours:,.0f} rows/s; "
                             "ms are per 1000 rows"))
        rows.append(_engine_only())
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    return rows


def _engine_only():
    """`engine.evaluate` alone: 10 000 paint rows x 2 rates against the per-row predict."""
    from predictor import engine
    from predictor import formulation as fm
    from predictor.scenario import read_scenario

    base = read_scenario(DEMO / PAINT)
    fs = engine.vary(base, loadings={0: np.linspace(0.2, 0.4, 200)}, basis="mass")
    fs = fs.take(np.arange(10_000) % 200).at_loading(np.linspace(0.05, 0.45, 10_000))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        start = time.perf_counter()
        engine.evaluate(fs, list(RATES))
        ours = (time.perf_counter() - start) / len(fs)
        start = time.perf_counter()
        for x in np.linspace(0.2, 0.4, SAMPLE):
            fm.predict(fm.with_solids_scaled(base, float(x)), list(RATES))
        per_row = (time.perf_counter() - start) / SAMPLE
    return row("engine.evaluate, 10 000 distinct paint rows x 2 rates", ours * 1000,
               per_row * 1000, f"per-row predict ({SAMPLE}-row sample)",
               goal="(information)",
               note=f"{1 / ours:,.0f} rows/s; ms are per 1000 rows")


if __name__ == "__main__":
    for line in run():
        print(line)
