"""Batch screening (`predictor.batch`): rows against the single-formulation API (also when
every row is a different formulation), bad rows, rows with more cells than the header,
escaping, chunking, Excel input."""

from __future__ import annotations

import contextlib
import csv
import io
import pathlib
import warnings

import numpy as np
import pandas as pd
import pytest

from predictor import batch, sizes
from predictor import formulation as fm
from predictor.errors import InputRangeError, UnitError, ValidityWarning

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
    # Outside check: "paint base B1 (one size)" built by hand with the public dataclasses,
    # then formulation.predict and formulation.max_loading, compared with its batch row.
    _, frame = demo_result
    row = frame[frame["candidate"] == "paint base B1 (one size)"].iloc[0]
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


def test_window_limited_by_names_what_sets_the_highest_loading():
    # Hand calculations (outside checks). Row "mp": Maron-Pierce, eta_r = (1 - phi/0.6)**-2
    # on 100 mPa*s. Under 1.6 Pa*s the viscosity sets it (phi = 0.45, as in
    # test_hand_calculated_row); under 0.05 Pa*s the liquid alone (0.1 Pa*s) is already
    # above it, so 0 and "liquid". Row "ein": Einstein (1905), eta_r = 1 + 2.5 phi, is 2.5 at
    # phi_max = 0.6, i.e. 0.25 Pa*s < 1.6 Pa*s: the packing limit sets it (phi = 0.6).
    common = {"liquid": "newtonian", "liquid viscosity [mPa*s]": "100",
              "liquid density [kg/m3]": "1000", "ingredient 1": "beads",
              "ingredient 1 loading [vol%]": "30", "ingredient 1 density [g/cm3]": "2.5",
              "ingredient 1 d50 [um]": "20", "ingredient 1 phi_max [-]": "0.6",
              "window 1 shear rate [1/s]": "10", "window 1 max viscosity [Pa*s]": "1.6",
              "window 2 shear rate [1/s]": "10"}
    table = pd.DataFrame([
        {**common, "candidate": "mp", "relation": "maron-pierce",
         "window 2 max viscosity [Pa*s]": "0.05"},
        {**common, "candidate": "ein", "relation": "einstein",
         "window 2 max viscosity [Pa*s]": ""},
        {**common, "candidate": "bad", "relation": "maron-pierce",
         "ingredient 1 loading [vol%]": "-3", "window 2 max viscosity [Pa*s]": ""}])
    with _quiet():
        result = batch.screen(table).set_index("candidate")
    mp, ein = result.loc["mp"], result.loc["ein"]
    assert mp["window 1 limited by"] == "viscosity"
    assert mp["window 1 max solids [vol%]"] == pytest.approx(45.0, rel=1e-6)
    assert mp["window 2 limited by"] == "liquid"
    assert mp["window 2 max solids [vol%]"] == 0.0
    assert ein["window 1 limited by"] == "packing"
    assert ein["window 1 max solids [vol%]"] == pytest.approx(60.0, rel=1e-6)
    assert ein["window 2 limited by"] == ""            # no max viscosity: nothing solved
    assert result.loc["bad", "status"] == "error"
    assert result.loc["bad", "window 1 limited by"] == ""


@pytest.mark.parametrize("odd", [[], ["forty", "1,5", "inf", "nan", "0x10", " "]])
def test_cells_parse_as_pandas_to_numeric(odd):
    # Reference library: the vectorised cell parser (pyarrow kernels) gives the same doubles
    # as pandas.to_numeric(errors="coerce") on the stripped cells, bit for bit, with and
    # without cells that are not numbers (the fallback path).
    rng = np.random.default_rng(5)
    x = rng.uniform(0, 100, 3000) * 10.0 ** rng.integers(-30, 30, 3000)
    cells = ([repr(float(v)) for v in x] + [f" {v:.17g} " for v in x[:500]]
             + [str(round(float(v), 6)) for v in x[:500]]
             + ["1.", ".5", "+3", "-0", "1E-3", "007", "", "1e400"] + odd)
    series = pd.Series(cells, dtype=str)
    value, given = batch._parse_numbers(batch._strip(series))
    expected = pd.to_numeric(series.str.strip(), errors="coerce").to_numpy(dtype=float)
    assert np.array_equal(value, expected, equal_nan=True)
    assert np.array_equal(given, series.str.strip().to_numpy(dtype=object) != "")


def _duration_by_hand(seconds: float) -> str:
    """Largest fitting unit (Julian year of 365.25 days), Python's "{:.3g}" formatting."""
    if not np.isfinite(seconds):
        return "never"
    for unit, scale in (("years", 365.25 * 86400), ("days", 86400), ("h", 3600), ("min", 60)):
        if seconds >= scale:
            return f"{seconds / scale:.3g} {unit}"
    return f"{seconds:.3g} s"


def test_duration_text_vectorised_equals_hand_formatting():
    # Each cell of the array form as the unit chosen one value at a time and formatted by
    # Python's str.format (common practice, no source).
    seconds = np.concatenate([10.0 ** np.random.default_rng(2).uniform(-6, 13, 2000),
                              [59.999, 60.0, 3600.0, 86400.0, 365.25 * 86400.0, np.inf]])
    texts = batch.duration_text(seconds)
    assert list(texts) == [_duration_by_hand(float(v)) for v in seconds]
    assert batch.duration_text(9000.0) == "2.5 h" and texts[-1] == "never"
    assert batch.duration_text(59.999) == "60 s" and batch.duration_text(60.0) == "1 min"


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


# -- every row a different formulation: the vectorised flow path against predict -------------


def _distinct_candidates(n: int, seed: int) -> pd.DataFrame:
    """n invented candidates, every one a different formulation: liquids, temperatures,
    sizes (Brownian and not), layers, relations, droplets and windows all vary by row."""
    rng = np.random.default_rng(seed)
    liquid = rng.choice(["water", "glycerol-water", "newtonian"], n)
    second = rng.choice(["solid", "droplet", ""], n, p=[0.4, 0.4, 0.2])

    def cells(values, digits=6):
        return np.round(values, digits).astype(str)

    table = pd.DataFrame({
        "candidate": [f"invented {i}" for i in range(n)],
        "liquid": liquid,
        "liquid viscosity [mPa*s]": np.where(liquid == "newtonian",
                                             cells(10 ** rng.uniform(0, 3, n)), ""),
        "temperature [degC]": cells(rng.uniform(5, 60, n), 4),
        "liquid density [kg/m3]": np.where(liquid == "water", "",
                                           cells(rng.uniform(990, 1250, n), 3)),
        "glycerol [wt%]": np.where(liquid == "glycerol-water", cells(rng.uniform(0, 80, n)), ""),
        "relation": rng.choice(["krieger-dougherty", "quemada", "maron-pierce"], n),
        "droplet relation": rng.choice(["phan-thien-pham", "pal"], n),
        "ingredient 1": "filler",
        "ingredient 1 loading [vol%]": cells(rng.uniform(5, 50, n), 5),
        "ingredient 1 density [kg/m3]": cells(rng.uniform(1500, 4000, n), 2),
        "ingredient 1 d50 [um]": cells(10 ** rng.uniform(-1, 1.3, n)),
        "ingredient 1 spread [-]": np.where(rng.random(n) < 0.5, "",
                                            cells(rng.uniform(1.1, 1.8, n), 4)),
        "ingredient 1 layer [nm]": np.where(rng.random(n) < 0.5, "",
                                            cells(rng.uniform(0, 20, n), 3)),
        "ingredient 2": np.where(second == "", "", "second"),
        "ingredient 2 kind": np.where(second == "", "solid", second),
        "ingredient 2 loading [wt%]": np.where(second == "", "", cells(rng.uniform(1, 20, n))),
        "ingredient 2 density [kg/m3]": cells(rng.uniform(850, 4000, n), 2),
        "ingredient 2 d50 [um]": cells(10 ** rng.uniform(-1, 1, n)),
        "ingredient 2 droplet viscosity [Pa*s]": np.where(rng.random(n) < 0.5, "",
                                                          cells(10 ** rng.uniform(-3, 1, n))),
        "window 1 shear rate [1/s]": cells(10 ** rng.uniform(-3, 3, n)),
        "window 1 max viscosity [Pa*s]": cells(10 ** rng.uniform(-2, 1.5, n)),
        "window 2 shear rate [1/s]": cells(10 ** rng.uniform(0, 5, n)),
        "window 2 max viscosity [Pa*s]": cells(10 ** rng.uniform(-2.5, 1, n)),
    })
    return table


@contextlib.contextmanager
def _quiet():
    """Validity warnings are expected for invented rows; keep them out of the test output."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        yield


def _formulations(table: pd.DataFrame, base_dir=".") -> list:
    """`batch.candidate_formulation` of every row, from the batch's own reading of the table."""
    ctx = batch._Context(batch.parse_header(table.columns), pathlib.Path(base_dir))
    resolved = batch._resolve(table.astype(str), ctx)
    return [batch.candidate_formulation(resolved, i, ctx) for i in range(len(table))]


def test_every_row_distinct_equals_predict_and_max_loading():
    # Outside check: each row against formulation.predict (the flow-curve solve) and
    # formulation.max_loading for the same inputs; no two rows share a formulation, so no
    # grouping can hide a difference.
    table = _distinct_candidates(30, seed=7)
    with _quiet():
        result = batch.screen(table)
    assert (result["status"] == "ok").all(), result.loc[result["status"] != "ok", "error"]
    regimes = set()
    for i, form in enumerate(_formulations(table)):
        row = result.iloc[i]
        rates = [float(row[f"window {j} shear rate [1/s]"]) for j in (1, 2)]
        with _quiet():
            curve = fm.predict(form, rates)
        for j in (1, 2):
            eta = curve["viscosity_Pa_s"].iloc[j - 1]
            assert row[f"window {j} viscosity [Pa*s]"] == pytest.approx(eta, rel=1e-9)
            # The labels may differ only where flow_curve's grid-secant slope and the exact
            # slope straddle +-PLATEAU_SLOPE (see test_shear); none of these rows is there.
            assert row[f"window {j} regime"] == curve["regime"].iloc[j - 1]
            regimes.add(row[f"window {j} regime"])
            limit = float(row[f"window {j} max viscosity [Pa*s]"])
            with _quiet():
                phi = fm.max_loading(form, limit, rates[j - 1])
            assert row[f"window {j} max solids [vol%]"] == pytest.approx(100 * phi, abs=1e-7)
            mass = fm.solid_mass_fraction(form, phi)[0]
            assert row[f"window {j} max solids [wt%]"] == pytest.approx(100 * mass, abs=1e-6)
        for note in curve.attrs["warnings"]:      # the notes predict gives, word for word
            assert note in row["warnings"]
    assert {"plateau", "thinning"} <= regimes   # both branches of the closed form were used


def test_mixed_good_and_bad_rows_report_each_bad_row_and_keep_the_good_ones():
    # The checks predict makes, made for every row at once: each bad row gets the message
    # predict would raise for it (field, value, allowed range), and the good rows -- also
    # those sharing a powder blend with a bad row -- equal predict.
    base = {"liquid": "newtonian", "liquid viscosity [mPa*s]": "100",
            "liquid density [kg/m3]": "1000", "temperature [degC]": "25",
            "ingredient 1": "beads", "ingredient 1 loading [vol%]": "30",
            "ingredient 1 density [g/cm3]": "2.5", "ingredient 1 d50 [um]": "0.4",
            "ingredient 1 phi_max [-]": "", "ingredient 2": "", "ingredient 2 kind": "droplet",
            "ingredient 2 loading [vol%]": "", "ingredient 2 density [kg/m3]": "900",
            "ingredient 2 droplet viscosity [Pa*s]": "",
            "window 1 shear rate [1/s]": "10", "window 1 max viscosity [Pa*s]": "2"}
    rows = {
        "cold": {"temperature [degC]": "-130"},                    # below Formulation's 150 K
        "good 1": {},
        "thick liquid": {"liquid viscosity [mPa*s]": "2e9"},       # 2e6 Pa*s
        "low phi_max": {"ingredient 1 phi_max [-]": "0.1"},        # below the relation's 0.2
        "tiny beads": {"ingredient 1 d50 [um]": "0.0005"},         # 0.5 nm
        "stiff drops": {"liquid viscosity [mPa*s]": "0.001", "ingredient 2": "oil",
                        "ingredient 2 loading [vol%]": "10",
                        "ingredient 2 droplet viscosity [Pa*s]": "1e7"},   # ratio 1e13
        "good 2": {"ingredient 2": "oil", "ingredient 2 loading [vol%]": "10"},
    }
    table = pd.DataFrame([{"candidate": name, **base, **change} for name, change in
                          rows.items()])
    with _quiet():
        result = batch.screen(table).set_index("candidate")
    expected = {
        "cold": ["liquid.temperature_K = 143.15", "150 to 700"],
        "thick liquid": ["viscosity_Pa_s = 2e+06", "1e-06 to 1e+06 [Pa*s] for newtonian"],
        "low phi_max": ["phi_max = 0.1", "0.2 to 1 [-] for krieger-dougherty"],
        "tiny beads": ["ingredients[0].diameter_m = 5e-10", "1e-09 to 0.01"],
        "stiff drops": ["viscosity_ratio = 1e+13", "for phan-thien-pham"],
    }
    for name, words in expected.items():
        assert result.loc[name, "status"] == "error"
        for word in words:
            assert word in result.loc[name, "error"], (name, result.loc[name, "error"])
    good = table[table["candidate"].str.startswith("good")]
    for (_, row), form in zip(good.iterrows(), _formulations(good), strict=True):
        got = result.loc[row["candidate"]]
        assert got["status"] == "ok", got["error"]
        with _quiet():
            eta = fm.predict(form, [10.0])["viscosity_Pa_s"].iloc[0]
            phi = fm.max_loading(form, 2.0, 10.0)
        assert got["window 1 viscosity [Pa*s]"] == pytest.approx(eta, rel=1e-9)
        assert got["window 1 max solids [vol%]"] == pytest.approx(100 * phi, abs=1e-7)
    # predict itself refuses these rows with the same messages
    with pytest.raises(InputRangeError, match=r"liquid\.temperature_K = 143\.15"):
        _formulations(table[table["candidate"] == "cold"])
    (low,) = _formulations(table[table["candidate"] == "low phi_max"])
    with pytest.raises(InputRangeError, match=r"phi_max = 0\.1 is not allowed"):
        fm.predict(low, [10.0])


# -- rows with more cells than the header ------------------------------------------------------

CORPUS = pathlib.Path(__file__).resolve().parent / "corpus"


def test_row_with_more_cells_than_the_header_is_an_error_of_that_row(tmp_path):
    # tests/corpus/cand_extra_cells.csv (invented): rows A and D hold an unquoted comma in
    # their note, so they have 7 and 8 cells under a 6-column header; row C ends in empty
    # cells (not counted); row E has one cell fewer (its shear rate is empty). Before, pandas
    # shifted row A into the index silently and row D stopped the whole run.
    path = tmp_path / "cand_extra_cells.csv"
    path.write_bytes((CORPUS / path.name).read_bytes())
    summary, frame = batch.screen_file(path, keep=-1)
    assert summary.rows == 5 and summary.errors == 2
    assert list(frame["candidate"]) == ["A", "B", "C", "D", "E"]
    assert list(frame["status"]) == ["error", "ok", "ok", "error", "ok"]
    assert frame["error"].iloc[0].startswith("row 2 has 7 cells, the header has 6")
    assert frame["error"].iloc[3].startswith("row 5 has 8 cells, the header has 6")
    # 30 wt% of 2500 kg/m3 in water of 997 kg/m3 (hand calculation, as in test_corpus)
    phi = 0.00012 / (0.00012 + 0.70 / 997.0)
    np.testing.assert_allclose(frame["phi solids [-]"].iloc[[1, 2, 4]], phi, rtol=1e-9)
    assert frame["window 1 verdict"].iloc[4] == "error: shear rate missing or <= 0"
    assert batch.ROW_ERROR not in frame.columns


def test_row_far_wider_than_the_header_is_counted_and_the_run_goes_on(tmp_path):
    # Wider than the extra cells the fast reader keeps: the rest of the file is read with
    # Python's csv module, row numbers and cell counts still exact, across chunks.
    header = ("candidate,note,ingredient 1 loading [wt%],ingredient 1 density [kg/m3],"
              "ingredient 1 d50 [um],window 1 shear rate [1/s]\n")
    good = "G,invented,30,2500,5,10\n"
    wide = "W,invented" + ",x" * (batch.EXTRA_CELLS + 20) + "\n"
    path = tmp_path / "wide.csv"
    path.write_text(header + good * 3 + wide + good * 2 + '"Q,uoted",invented,30,2500,5,10\n')
    summary, frame = batch.screen_file(path, keep=-1, chunk_rows=2)
    assert summary.rows == 7 and summary.errors == 1
    assert list(frame["status"]) == ["ok"] * 3 + ["error"] + ["ok"] * 3
    assert frame["error"].iloc[3].startswith(
        f"row 5 has {2 + batch.EXTRA_CELLS + 20} cells, the header has 6")
    assert frame["candidate"].iloc[6] == "Q,uoted"


# -- non-Newtonian liquids inline, thickening, droplets: one engine for rows and predict -----

LAW_CELLS = {   # invented parameter values, inside the registry bounds
    "power-law": {"liquid consistency [Pa*s]": "0.4", "liquid flow index [-]": "0.6"},
    "carreau-yasuda": {"liquid zero shear viscosity [Pa*s]": "0.8",
                       "liquid infinite shear viscosity [mPa*s]": "4",
                       "liquid time constant [s]": "0.5", "liquid flow index [-]": "0.35",
                       "liquid yasuda exponent [-]": "2"},
    "cross": {"liquid zero shear viscosity [Pa*s]": "1.5",
              "liquid infinite shear viscosity [mPa*s]": "10",
              "liquid time constant [s]": "0.2", "liquid cross exponent [-]": "0.8"},
    "bingham": {"liquid yield stress [Pa]": "3", "liquid plastic viscosity [Pa*s]": "0.05"},
    "herschel-bulkley": {"liquid yield stress [Pa]": "5", "liquid consistency [Pa*s]": "0.7",
                         "liquid flow index [-]": "0.5"},
    "casson": {"liquid yield stress [Pa]": "2", "liquid casson viscosity [Pa*s]": "0.03"},
    "newtonian": {"liquid viscosity [mPa*s]": "50"},
}


def _law_candidates(n: int, seed: int) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    laws = list(LAW_CELLS) + ["water", "glycerol-water"]
    rows = []
    for i in range(n):
        law = laws[i % len(laws)]
        row = {"candidate": f"invented {i}", "liquid law": "" if law in ("water", "glycerol-water")
               else law, "liquid": law if law in ("water", "glycerol-water") else "",
               "liquid density [kg/m3]": "1010", "glycerol [wt%]": "40",
               "temperature [degC]": f"{rng.uniform(10, 50):.3f}",
               "liquid activation temperature [K]": "" if i % 3 else "2500",
               "thickening onset [Pa]": f"{10 ** rng.uniform(0, 2):.4g}" if i % 2 else "",
               "ingredient 1": "filler", "ingredient 1 loading [vol%]":
                   f"{rng.uniform(20, 58):.4f}" if i % 2 else f"{rng.uniform(5, 45):.4f}",
               "ingredient 1 density [kg/m3]": "2600",
               "ingredient 1 d50 [um]": f"{10 ** rng.uniform(-0.7, 1):.4g}",
               "ingredient 1 spread [-]": "1.4",
               "ingredient 2": "oil" if i % 4 == 1 else "",
               "ingredient 2 kind": "droplet",
               "ingredient 2 loading [vol%]": "8" if i % 4 == 1 else "",
               "ingredient 2 density [kg/m3]": "900", "ingredient 2 d50 [um]": "3",
               "window 1 shear rate [1/s]": f"{10 ** rng.uniform(-2, 1):.4g}",
               "window 1 max viscosity [Pa*s]": f"{10 ** rng.uniform(0, 1.5):.4g}",
               "window 2 shear rate [1/s]": f"{10 ** rng.uniform(1, 4):.4g}",
               "window 2 max viscosity [Pa*s]": f"{10 ** rng.uniform(-1, 0.5):.4g}"}
        for name in set().union(*LAW_CELLS.values()):
            row[name] = LAW_CELLS.get(law, {}).get(name, "")
        rows.append(row)
    return pd.DataFrame(rows)


def test_rows_with_every_liquid_law_thickening_and_droplets_equal_predict_and_max_loading():
    # Outside check as above: each row against formulation.predict and max_loading of the
    # same formulation, now with inline non-Newtonian liquids (Arrhenius-shifted in some
    # rows), frictional thickening and droplets.
    table = _law_candidates(36, seed=11)
    with _quiet():
        result = batch.screen(table)
    assert (result["status"] == "ok").all(), result.loc[result["status"] != "ok", "error"]
    laws = set()
    for i, form in enumerate(_formulations(table)):
        row = result.iloc[i]
        laws.add(form.liquid.law if not form.liquid.preset else form.liquid.preset)
        rates = [float(row[f"window {j} shear rate [1/s]"]) for j in (1, 2)]
        with _quiet():
            curve = fm.predict(form, rates)
        for j in (1, 2):
            eta = curve["viscosity_Pa_s"].iloc[j - 1]
            assert row[f"window {j} viscosity [Pa*s]"] == pytest.approx(eta, rel=1e-9), i
            assert row[f"window {j} regime"] == curve["regime"].iloc[j - 1]
            limit = float(row[f"window {j} max viscosity [Pa*s]"])
            with _quiet():
                phi = fm.max_loading(form, limit, rates[j - 1])
            assert row[f"window {j} max solids [vol%]"] == pytest.approx(100 * phi, abs=1e-7)
    assert laws == set(LAW_CELLS) | {"water", "glycerol-water"}
    assert any(f.thickening_onset_stress_Pa for f in _formulations(table))


def test_a_bad_liquid_parameter_is_an_error_of_its_row_only():
    table = _law_candidates(9, seed=3)
    table.loc[0, "liquid flow index [-]"] = "7"        # power law: outside its bounds
    with _quiet():
        result = batch.screen(table)
    assert result["status"].tolist().count("error") == 1
    assert "flow_index" in result.loc[0, "error"] and "7" in result.loc[0, "error"]


# -- the base scenario column ------------------------------------------------------------------


def _paint_folder(tmp_path):
    """The demo paint scenario (invented; Carreau-Yasuda liquid) copied beside a table."""
    import shutil

    shutil.copy(DEMO / "mineral_coating.loadline.json", tmp_path / "paint.loadline.json")
    return tmp_path


def test_base_scenario_rows_equal_predict_of_the_scenario_with_the_overrides(tmp_path):
    # Outside check: each row is the saved scenario (read by predictor.scenario) with the
    # row's cells applied by hand (dataclasses.replace), predicted by formulation.predict.
    import dataclasses

    from predictor.scenario import read_scenario

    folder = _paint_folder(tmp_path)
    base = read_scenario(folder / "paint.loadline.json")
    table = pd.DataFrame({
        "candidate": ["as saved", "more filler", "warm, coarse pigment", "thickening"],
        "base scenario": ["paint.loadline.json"] * 4,
        "ingredient 1 loading [wt%]": ["", "40", "", ""],
        "ingredient 2 d50 [um]": ["", "", "0.6", ""],
        "temperature [degC]": ["", "", "35", ""],
        "thickening onset [Pa]": ["", "", "", "20"],
        "window 1 shear rate [1/s]": ["0.1", "1", "100", "1000"],
        "window 1 max viscosity [Pa*s]": ["20", "5", "1", "0.5"],
    })
    with _quiet():
        result = batch.screen(table, base_dir=folder)
    assert (result["status"] == "ok").all(), result["error"].tolist()
    ings = base.ingredients
    pigment = dataclasses.replace(ings[1], size=sizes.SizeDistribution.single(0.6e-6))
    forms = [
        base,
        dataclasses.replace(base, ingredients=(dataclasses.replace(ings[0], loading=0.40),
                                               ings[1])),
        dataclasses.replace(base, ingredients=(ings[0], pigment),
                            liquid=dataclasses.replace(base.liquid, temperature_K=308.15)),
        dataclasses.replace(base, thickening_onset_stress_Pa=20.0),
    ]
    for i, form in enumerate(forms):
        rate = float(table["window 1 shear rate [1/s]"][i])
        with _quiet():
            eta = fm.predict(form, [rate])["viscosity_Pa_s"].iloc[0]
            phi = fm.max_loading(form, float(table["window 1 max viscosity [Pa*s]"][i]), rate)
        assert result["window 1 viscosity [Pa*s]"].iloc[i] == pytest.approx(eta, rel=1e-9), i
        assert result["window 1 max solids [vol%]"].iloc[i] == pytest.approx(100 * phi,
                                                                             abs=1e-7), i
    # Columns the base filled in are not added to the output.
    assert not any(str(c).startswith("\x00") for c in result.columns)


def test_missing_or_malformed_base_scenario_is_named_with_its_row(tmp_path):
    folder = _paint_folder(tmp_path)
    (folder / "broken.loadline.json").write_text("{not json", encoding="utf-8")
    table = pd.DataFrame({
        "candidate": ["good", "missing", "broken", "outside", "no base"],
        "base scenario": ["paint.loadline.json", "nowhere.loadline.json",
                          "broken.loadline.json", "../paint.loadline.json", ""],
        "ingredient 1 loading [wt%]": ["", "", "", "", "20"],
        "ingredient 1 density [kg/m3]": ["", "", "", "", "2600"],
        "ingredient 1 d50 [um]": ["", "", "", "", "2"],
        "window 1 shear rate [1/s]": ["10"] * 5,
    })
    path = folder / "table.csv"
    table.to_csv(path, index=False)
    with _quiet():
        summary, result = batch.screen_file(path, keep=-1)
    assert result["status"].tolist() == ["ok", "error", "error", "error", "ok"]
    assert "nowhere.loadline.json" in result["error"].iloc[1]
    assert "broken.loadline.json" in result["error"].iloc[2]
    assert "../paint.loadline.json" in result["error"].iloc[3]
    assert [line for line, _, _ in summary.first_errors] == [3, 4, 5]


def test_demo_paint_variants_table_equals_predict_and_storage_check():
    # The bundled (invented) variants of the demo paint: every row against predict of the
    # formulation the batch read, and the first row's settling against design.storage_check.
    from predictor import design

    with _quiet():
        summary, result = batch.screen_file(DEMO / "paint_variants.csv", keep=-1)
    assert summary.errors == 0
    table = pd.read_csv(DEMO / "paint_variants.csv", dtype=str, keep_default_na=False)
    ctx = batch._Context(batch.parse_header(table.columns), DEMO)
    work, ctx, errors = batch._with_base(table, ctx, None)
    resolved = batch._resolve(work, ctx, errors)
    for i in range(len(table)):
        form = batch.candidate_formulation(resolved, i, ctx)
        rates = [float(table[f"window {j} shear rate [1/s]"][i]) for j in (1, 2)]
        with _quiet():
            eta = fm.predict(form, rates)["viscosity_Pa_s"].to_numpy()
        for j in (1, 2):
            assert result[f"window {j} viscosity [Pa*s]"].iloc[i] == pytest.approx(
                eta[j - 1], rel=1e-9)
    with _quiet():
        check = design.storage_check(fm.Formulation(**{
            **{f: getattr(form, f) for f in ("liquid", "model", "droplet_model")},
            "ingredients": batch.candidate_formulation(resolved, 0, ctx).ingredients,
            "liquid": batch.candidate_formulation(resolved, 0, ctx).liquid}))
    hours = check["clear_layer_time_s"].iloc[0] / 3600
    assert f"1 mm layer in {hours:.3g} h" in result["settling"].iloc[0]
