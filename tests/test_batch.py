"""Batch screening (`predictor.batch`): rows against the single-formulation API, bad rows,
escaping, chunking, Excel input."""

from __future__ import annotations

import csv
import io
import pathlib

import numpy as np
import pandas as pd
import pytest

from predictor import batch, sizes
from predictor import formulation as fm
from predictor.errors import InputRangeError, UnitError

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"


@pytest.fixture(scope="module")
def demo_result():
    summary, frame = batch.screen_file(DEMO / "candidates.csv", keep=-1)
    return summary, frame


@pytest.fixture(scope="module")
def error_result(tmp_path_factory):
    out = tmp_path_factory.mktemp("screen") / "errors_out.csv"
    summary, frame = batch.screen_file(DEMO / "candidates_with_errors.csv", out, keep=-1)
    return summary, frame, out


def test_demo_table_every_row_predicted(demo_result):
    summary, frame = demo_result
    assert summary.rows == len(pd.read_csv(DEMO / "candidates.csv")) == len(frame)
    assert summary.errors == 0 and (frame["status"] == "ok").all()
    assert np.isfinite(frame["window 2 viscosity [Pa*s]"]).all()
    assert set(frame["window 1 verdict"]) <= {"pass", "fail"}


def test_row_equals_single_formulation_built_by_hand(demo_result):
    # Outside check: "paint B1 (one size)" built by hand with the public dataclasses,
    # then formulation.predict and formulation.max_loading, compared with its batch row.
    _, frame = demo_result
    row = frame[frame["candidate"] == "paint B1 (one size)"].iloc[0]
    form = fm.Formulation(
        liquid=fm.Liquid(name="water", preset="water", temperature_K=298.15,
                         density_kg_per_m3=997.0),
        ingredients=(
            fm.Ingredient("mineral filler", 2710.0, 0.40, "mass", size=sizes.SizeDistribution
                          .single(5e-6), diameter_m=5e-6),
            fm.Ingredient("white pigment", 4100.0, 0.18, "mass", layer_thickness_m=2e-9,
                          size=sizes.SizeDistribution.single(0.3e-6), diameter_m=0.3e-6)))
    curve = fm.predict(form, [0.1, 100.0])
    assert row["window 1 viscosity [Pa*s]"] == pytest.approx(curve["viscosity_Pa_s"].iloc[0],
                                                             rel=1e-12)
    assert row["window 2 viscosity [Pa*s]"] == pytest.approx(curve["viscosity_Pa_s"].iloc[1],
                                                             rel=1e-12)
    assert row["window 2 max solids [vol%]"] == pytest.approx(
        100 * fm.max_loading(form, 0.5, 100.0), rel=1e-9)
    assert row["phi_max [-]"] == pytest.approx(fm.mixture(form).phi_max, rel=1e-12)


def test_hand_calculated_row():
    # Hand calculation (outside check): Maron-Pierce eta_r = (1 - phi/phi_max)**-2 with a
    # given phi_max 0.6 at phi = 0.3: (1 - 0.5)**-2 = 4, times 100 mPa*s = 0.4 Pa*s.
    # 20 um particles are too coarse for Brownian thinning, so no shear dependence.
    # Highest loading under 1.6 Pa*s: eta_r = 16 -> 1 - phi/0.6 = 1/4 -> phi = 0.45.
    table = pd.DataFrame({
        "candidate": ["hand"], "liquid": ["newtonian"], "liquid viscosity [mPa*s]": ["100"],
        "liquid density [kg/m3]": ["1000"], "relation": ["maron-pierce"],
        "ingredient 1": ["beads"], "ingredient 1 loading [vol%]": ["30"],
        "ingredient 1 density [g/cm3]": ["2.5"], "ingredient 1 d50 [um]": ["20"],
        "ingredient 1 phi_max [-]": ["0.6"],
        "window 1 shear rate [1/s]": ["10"], "window 1 max viscosity [Pa*s]": ["1.6"]})
    row = batch.screen(table).iloc[0]
    assert row["status"] == "ok", row["error"]
    assert row["window 1 viscosity [Pa*s]"] == pytest.approx(0.4, rel=1e-9)
    assert row["window 1 max solids [vol%]"] == pytest.approx(45.0, rel=1e-6)
    assert row["headroom phi/phi_max [-]"] == pytest.approx(0.5, rel=1e-12)
    assert row["window 1 verdict"] == "pass"


def test_bad_rows_reported_and_good_rows_kept(error_result):
    summary, frame, out = error_result
    assert summary.rows == 11 and summary.ok == 3 and summary.errors == 8
    by_name = frame.set_index("candidate")
    assert "'forty'" in by_name.loc["not a number", "error"]
    assert "ingredient 1 loading [wt%]" in by_name.loc["not a number", "error"]
    assert "-5" in by_name.loc["negative loading", "error"]
    assert "0 to 100 %" in by_name.loc["negative loading", "error"]
    assert "density" in by_name.loc["missing density", "error"]
    assert "no-such-relation" in by_name.loc["unknown relation", "error"]
    assert "honey" in by_name.loc["unknown liquid", "error"]
    assert "sizes_does_not_exist.csv" in by_name.loc["missing size table", "error"]
    assert "phi_max = 0.1" in by_name.loc["packing limit too low", "error"]
    assert "-300" in by_name.loc["frozen liquid", "error"]
    good = frame[frame["status"] == "ok"]
    assert list(good["candidate"].str.slice(0, 4)) == ["good", "=HYP", "good"]
    assert np.isfinite(good["window 1 viscosity [Pa*s]"]).all()
    assert (frame.loc[frame["status"] == "error", "window 1 verdict"] == "error").all()
    # every input row is in the written file, in order
    written = pd.read_csv(out, dtype=str, keep_default_na=False)
    assert len(written) == 11 and written["status"].tolist() == frame["status"].tolist()


@pytest.mark.parametrize("table_cell", ["../outside.csv", "/etc/hostname"])
def test_size_tables_outside_the_candidate_folder_are_refused(tmp_path, table_cell):
    # No path taken from user input may read outside the chosen folder (reliability issue).
    (tmp_path / "outside.csv").write_text("size [um],volume [%]\n1,50\n2,50\n")
    folder = tmp_path / "candidates"
    folder.mkdir()
    table = pd.DataFrame({
        "candidate": ["escape"], "liquid": ["water"], "relation": ["krieger-dougherty"],
        "ingredient 1": ["powder"], "ingredient 1 loading [wt%]": ["30"],
        "ingredient 1 density [g/cm3]": ["2.5"], "ingredient 1 size table": [table_cell],
        "window 1 shear rate [1/s]": ["10"], "window 1 max viscosity [Pa*s]": ["1"]})
    row = batch.screen(table, base_dir=folder).iloc[0]
    assert row["status"] == "error"
    assert "own folder" in row["error"]


def test_formula_cells_escaped_in_csv(error_result):
    _, _, out = error_result
    rows = list(csv.reader(io.StringIO(out.read_text(encoding="utf-8"))))
    names = [r[0] for r in rows[1:]]
    assert "'=HYPERLINK(\"http://example.invalid\")" in names
    assert not any(n.startswith(("=", "+", "@")) for n in names)
    assert "-300" in [r[3] for r in rows[1:]]   # a plain negative number stays a number


@pytest.mark.parametrize("cell, expected", [
    ("=1+2", "'=1+2"), ("+cmd", "'+cmd"), ("-2+3+cmd|' /C calc'!A0", "'-2+3+cmd|' /C calc'!A0"),
    ("@SUM(A1)", "'@SUM(A1)"), ("\tx", "'\tx"), ("-2.5", "-2.5"), ("1e-3", "1e-3"),
    ("paint", "paint")])
def test_spreadsheet_safe(cell, expected):
    assert batch.spreadsheet_safe(cell) == expected
    assert batch.safe_frame(pd.DataFrame({"a": [cell]}))["a"].iloc[0] == expected


def test_chunks_give_the_same_rows(tmp_path, demo_result):
    _, whole = demo_result
    out = tmp_path / "chunked.csv"
    summary, small = batch.screen_file(DEMO / "candidates.csv", out, chunk_rows=4, keep=-1)
    assert summary.rows == len(whole)
    pd.testing.assert_series_equal(small["window 1 viscosity [Pa*s]"],
                                   whole["window 1 viscosity [Pa*s]"])
    assert len(pd.read_csv(out)) == len(whole)


def test_excel_input_and_output(tmp_path, demo_result):
    _, whole = demo_result
    xlsx = tmp_path / "candidates.xlsx"
    pd.read_csv(DEMO / "candidates.csv", dtype=str, keep_default_na=False).to_excel(
        xlsx, index=False)
    for name in ("sizes_filler_coarse.csv", "sizes_pigment_fine.csv"):
        (tmp_path / name).write_bytes((DEMO / name).read_bytes())
    out = tmp_path / "result.xlsx"
    summary, frame = batch.screen_file(xlsx, out, keep=-1)
    assert summary.errors == 0
    np.testing.assert_allclose(frame["window 2 viscosity [Pa*s]"].to_numpy(float),
                               whole["window 2 viscosity [Pa*s]"].to_numpy(float), rtol=1e-12)
    assert len(pd.read_excel(out)) == len(whole)


def test_many_rows_small_version(tmp_path):
    # The 10**6-row run is the benchmark; here 20 000 rows of repeated candidates, in chunks.
    base = pd.read_csv(DEMO / "candidates.csv", dtype=str, keep_default_na=False)
    big = pd.concat([base] * 1539, ignore_index=True).head(20_000)
    path = tmp_path / "big.csv"
    big.to_csv(path, index=False)
    for name in ("sizes_filler_coarse.csv", "sizes_pigment_fine.csv"):
        (tmp_path / name).write_bytes((DEMO / name).read_bytes())
    summary, shown = batch.screen_file(path, tmp_path / "big_out.csv", chunk_rows=5_000,
                                       keep=10)
    assert summary.rows == 20_000 and summary.errors == 0 and len(shown) == 10
    assert sum(1 for _ in (tmp_path / "big_out.csv").open()) == 20_001


def test_header_errors_name_the_column():
    with pytest.raises(UnitError, match="ingredient 1 density"):
        batch.parse_header(["ingredient 1 loading [wt%]", "ingredient 1 density"])
    with pytest.raises(UnitError, match=r"wt%\], \[vol%\]"):
        batch.parse_header(["ingredient 1 loading [%]", "ingredient 1 density [kg/m3]"])
    with pytest.raises(UnitError, match="temperature"):
        batch.parse_header(["temperature [kg]", "ingredient 1 loading [wt%]",
                            "ingredient 1 density [kg/m3]"])
    with pytest.raises(InputRangeError, match="ingredient 2 density"):
        batch.parse_header(["ingredient 1 loading [wt%]", "ingredient 1 density [kg/m3]",
                            "ingredient 2 loading [wt%]"])
    layout = batch.parse_header(["ingredient 1 loading [wt%]", "ingredient 1 density [kg/m3]",
                                 "ingredient 1 loding [wt%]", "my own note"])
    assert layout.unrecognised == ("ingredient 1 loding [wt%]",)


def test_units_in_headers_are_converted():
    table = pd.DataFrame({
        "liquid": ["newtonian"], "liquid viscosity [cP]": ["100"],
        "liquid density [g/cm3]": ["1.0"], "relation": ["maron-pierce"],
        "ingredient 1 loading [vol fraction]": ["0.3"], "ingredient 1 density [kg/m3]": ["2500"],
        "ingredient 1 d50 [mm]": ["0.02"], "ingredient 1 phi_max [-]": ["0.6"],
        "window 1 shear rate [1/min]": ["600"]})
    row = batch.screen(table, viscosity_unit="mPa*s").iloc[0]
    assert row["window 1 viscosity [mPa*s]"] == pytest.approx(400.0, rel=1e-9)
