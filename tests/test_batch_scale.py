"""Screening tables beyond one file format and one machine: Parquet in and out, and Dask.

The Dask path must give exactly the in-process result (same vectorised function per chunk,
`batch.screen`), including rows with bad input; Parquet must carry the same candidates as
the CSV they were written from. Consistency checks of our own (common practice, no source);
the numbers themselves are checked against published relations in tests/test_batch.py.
"""

from __future__ import annotations

import json
import pathlib

import numpy as np
import pandas as pd
import pytest

from predictor import batch
from predictor.cli import main
from predictor.errors import ScenarioError

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"
RESULT_COLUMNS = ["status", "phi solids [-]", "phi_max [-]", "headroom phi/phi_max [-]",
                  "window 1 viscosity [Pa*s]", "window 1 verdict", "settling"]


def test_parquet_table_screens_like_its_csv(tmp_path):
    # Typed columns (numbers as numbers, as a data pipeline writes them), not text.
    typed = pd.read_csv(DEMO / "candidates.csv")
    source = tmp_path / "candidates.parquet"
    typed.to_parquet(source, index=False)
    for sizes in DEMO.glob("sizes_*.csv"):      # size tables are read beside the table
        (tmp_path / sizes.name).write_bytes(sizes.read_bytes())
    _, from_csv = batch.screen_file(DEMO / "candidates.csv", keep=-1)
    out = tmp_path / "results.parquet"
    summary, from_parquet = batch.screen_file(source, out, keep=-1, chunk_rows=4)
    assert summary.rows == len(typed) and summary.errors == 0
    for col in RESULT_COLUMNS:
        a, b = from_csv[col].to_numpy(), from_parquet[col].to_numpy()
        if a.dtype.kind == "f":
            np.testing.assert_allclose(b, a, rtol=1e-12, equal_nan=True)
        else:
            assert list(b) == list(a), col
    written = pd.read_parquet(out)
    assert list(written.columns) == list(from_parquet.columns)
    # Parquet keeps full precision (CSV output rounds to 6 significant digits).
    col = "window 1 viscosity [Pa*s]"
    np.testing.assert_array_equal(written[col].to_numpy(), from_parquet[col].to_numpy())


def test_broken_or_empty_parquet_is_named(tmp_path):
    broken = tmp_path / "broken.parquet"
    broken.write_bytes(b"PAR1 not really")
    with pytest.raises(ScenarioError, match="broken.parquet is not a readable Parquet"):
        batch.screen_file(broken)
    empty = tmp_path / "empty.parquet"
    pd.read_csv(DEMO / "candidates.csv").head(0).to_parquet(empty, index=False)
    summary, shown = batch.screen_file(empty, keep=-1)
    assert summary.rows == 0 and shown.empty


@pytest.fixture(scope="module")
def dask_client():
    distributed = pytest.importorskip("distributed")
    # Threads, not processes: the same code path (tasks pickled to the scheduler) and a
    # start in about a second on a 2-core machine; processes=True was checked by hand too.
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False,
                                       dashboard_address=None)
    client = distributed.Client(cluster)
    yield client
    client.close()
    cluster.close()


@pytest.mark.slow
def test_dask_run_equals_the_in_process_run(dask_client, tmp_path):
    table = DEMO / "candidates_with_errors.csv"      # good rows and bad rows, 4 per chunk
    summary, local = batch.screen_file(table, keep=-1, chunk_rows=4)
    out = tmp_path / "results.csv"
    dask_summary, remote = batch.screen_file(table, out, keep=-1, chunk_rows=4,
                                             dask=dask_client)
    pd.testing.assert_frame_equal(remote, local)
    assert dask_summary == summary and summary.errors > 0 and summary.ok > 0
    assert pd.read_csv(out, dtype=str).shape[0] == summary.rows
    assert sum(dask_client.run(lambda: 1).values()) == 2        # two workers did the work


@pytest.mark.slow
def test_cli_dask_address_gives_the_same_json(dask_client, capsys):
    args = ["screen", str(DEMO / "candidates.csv"), "--json", "--chunk-rows", "5"]
    assert main(args) == 0
    local = json.loads(capsys.readouterr().out)
    assert main(args + ["--dask", dask_client.scheduler.address]) == 0
    remote = json.loads(capsys.readouterr().out)
    assert remote == local and remote["rows_total"] == 13


@pytest.mark.slow
def test_cli_dask_without_address_starts_and_stops_a_local_cluster(capsys, tmp_path):
    pytest.importorskip("distributed")
    args = ["screen", str(DEMO / "candidates_with_errors.csv"), "--chunk-rows", "4"]
    assert main(args + ["-o", str(tmp_path / "local.csv")]) == 3     # rows with bad input
    capsys.readouterr()
    assert main(args + ["-o", str(tmp_path / "dask.csv"), "--dask"]) == 3
    assert (tmp_path / "dask.csv").read_bytes() == (tmp_path / "local.csv").read_bytes()
