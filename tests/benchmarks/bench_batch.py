"""Batch screening of 10**6 mixed candidate rows against a naive per-row pandas apply.

Goals: at least 100x faster than the per-row apply (measured on a sample, scaled to 10**6
rows); peak memory of the 10**6-row run under 1 GiB (measured in a subprocess with
resource.getrusage). The table is design-of-experiments-like: the bundled candidates at 5
temperatures and 4 loading levels, so 260 distinct formulations repeat over the rows. A
third row reports the throughput when every row is a different formulation (`DISTINCT_ROWS`
rows, each with a loading drawn at random, so no two rows are the same formulation). The
rows are mixed: the bundled candidates (water, glycerol-water and Newtonian liquids,
droplets) and the bundled variants of the demo paint (a Carreau-Yasuda liquid through the
`base scenario` column, one with thickening).
"""

from __future__ import annotations

import json
import pathlib
import shutil
import subprocess
import sys
import tempfile
import time

import numpy as np
import pandas as pd

from tests.benchmarks.common import row

ROOT = pathlib.Path(__file__).resolve().parents[2]
DEMO = ROOT / "data_demo"
N_ROWS = 1_000_000
SAMPLE = 100
DISTINCT_ROWS = 2_000

_CHILD = """
import json, resource, sys, time
from predictor import batch
start = time.perf_counter()
summary, _ = batch.screen_file(sys.argv[1], sys.argv[2], chunk_rows=50_000)
elapsed = time.perf_counter() - start
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
print(json.dumps({"seconds": elapsed, "peak_bytes": peak, "rows": summary.rows,
                  "errors": summary.errors}))
"""


def make_table(n: int, seed: int = 0, distinct: bool = False,
               paint: bool = True) -> pd.DataFrame:
    """n rows drawn from the bundled (invented) candidates, with varied conditions; with
    `paint`, from the variants of the demo paint as well."""
    rng = np.random.default_rng(seed)
    names = ("candidates.csv", "paint_variants.csv") if paint else ("candidates.csv",)
    base = pd.concat([pd.read_csv(DEMO / name, dtype=str, keep_default_na=False)
                      for name in names], ignore_index=True).fillna("")
    table = base.iloc[rng.integers(0, len(base), n)].reset_index(drop=True)
    table["candidate"] = [f"run {i}" for i in range(n)]
    table["note"] = "invented benchmark data"
    table["temperature [degC]"] = rng.choice(["15", "20", "25", "30", "40"], n)
    # the paint rows that keep the scenario's loading get it written out (35 wt%)
    load = pd.to_numeric(table["ingredient 1 loading [wt%]"].replace("", "35"))
    factor = rng.uniform(0.8, 1.1, n) if distinct else rng.choice([0.8, 0.9, 1.0, 1.1], n)
    table["ingredient 1 loading [wt%]"] = (load * factor).round(10).astype(str)
    return table


def run():
    folder = pathlib.Path(tempfile.mkdtemp(prefix="loadline_bench_"))
    try:
        for name in ("sizes_filler_coarse.csv", "sizes_pigment_fine.csv",
                     "mineral_coating.loadline.json"):
            shutil.copy(DEMO / name, folder / name)
        big = folder / "candidates_1e6.csv"
        make_table(N_ROWS).to_csv(big, index=False)
        child = subprocess.run([sys.executable, "-c", _CHILD, str(big), str(folder / "out.csv")],
                               capture_output=True, text=True, check=True, cwd=ROOT)
        result = json.loads(child.stdout.strip().splitlines()[-1])
        ours = result["seconds"]

        from predictor import batch

        sample = make_table(SAMPLE, seed=1)
        start = time.perf_counter()
        sample.apply(lambda r: batch.screen(pd.DataFrame([r]), base_dir=folder).iloc[0],
                     axis=1)
        naive = (time.perf_counter() - start) / SAMPLE * N_ROWS

        distinct = make_table(DISTINCT_ROWS, seed=2, distinct=True)
        start = time.perf_counter()
        screened = batch.screen(distinct, base_dir=folder)
        per_row = (time.perf_counter() - start) / len(distinct)
        distinct_errors = int((screened["status"] != "ok").sum())
        print(f"every row a different formulation: {len(distinct)} rows, "
              f"{distinct_errors} errors, {1 / per_row:,.0f} rows/s", flush=True)
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    peak_mib = result["peak_bytes"] / 2**20
    return [
        row("screen 1e6 rows (260 distinct formulations)", ours, naive,
            f"per-row pandas apply, {SAMPLE}-row sample scaled to 1e6",
            goal="speed-up >= 100",
            note=f"{result['rows']} rows, {result['errors']} errors, "
                 f"{N_ROWS / ours:,.0f} rows/s"),
        row("peak memory of the 1e6-row screen", ours, goal="peak RSS < 1 GiB",
            note=f"peak RSS {peak_mib:,.0f} MiB (getrusage in a subprocess)"),
        row("screen, every row a different formulation", per_row * 1000,
            goal="(information)",
            note=f"{DISTINCT_ROWS} distinct rows, {distinct_errors} errors, "
                 f"{1 / per_row:,.0f} rows/s; ours_ms is per 1000 rows"),
    ]


if __name__ == "__main__":
    for line in run():
        print(line)
