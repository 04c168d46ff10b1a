"""The `loadline` command, called through its entry point `main([...])`."""

from __future__ import annotations

import csv
import io
import json
import pathlib

import pandas as pd
import pytest

from predictor import formulation as fm
from predictor.cli import CAUTIONS, main
from predictor.registry import models
from predictor.scenario import read_scenario

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"
SCENARIO = str(DEMO / "mineral_coating.loadline.json")
COMMANDS = ["predict", "sweep", "max-load", "screen", "pack", "fit", "report", "pipe", "models",
            "demo"]


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_models_table_and_json(capsys):
    code, out, _ = run(capsys, "models")
    assert code == 0 and "krieger-dougherty" in out and "Krieger" in out
    code, out, _ = run(capsys, "models", "--json")
    doc = json.loads(out)
    assert code == 0 and doc["count"] == len(models()) == len(doc["rows"])
    code, out, _ = run(capsys, "models", "--kind", "packing", "--csv")
    names = pd.read_csv(io.StringIO(out))["name"].tolist()
    assert names == [m.name for m in models("packing")]


def test_predict_json_equals_core(capsys):
    code, out, _ = run(capsys, "predict", SCENARIO, "--shear-rate", "0.1 1/s",
                       "--shear-rate", "100 1/s", "--json")
    assert code == 0
    doc = json.loads(out)
    core = fm.predict(read_scenario(SCENARIO), [0.1, 100.0])
    got = [r["viscosity [Pa*s]"] for r in doc["rows"]]
    assert got == pytest.approx(core["viscosity_Pa_s"].tolist(), rel=1e-12)


def test_predict_units_on_output(capsys):
    _, out_pa, _ = run(capsys, "predict", SCENARIO, "--shear-rate", "10 1/s", "--csv")
    _, out_mpa, _ = run(capsys, "predict", SCENARIO, "--shear-rate", "600 1/min", "--csv",
                        "--viscosity-unit", "mPa*s")
    pa = pd.read_csv(io.StringIO(out_pa))["viscosity [Pa*s]"].iloc[0]
    mpa = pd.read_csv(io.StringIO(out_mpa))["viscosity [mPa*s]"].iloc[0]
    assert mpa == pytest.approx(1000 * pa, rel=1e-5)   # CSV keeps 6 significant digits


def test_predict_default_table(capsys):
    code, out, _ = run(capsys, "predict", SCENARIO, "--points", "5")
    assert code == 0 and "shear rate [1/s]" in out and "phi_max" in out
    assert len([ln for ln in out.splitlines() if ln.strip()]) >= 5 + 3


@pytest.mark.parametrize("argv, words", [
    (["predict", "no_such_file.loadline.json"], ["no_such_file"]),
    (["predict", SCENARIO, "--shear-rate", "-5 1/s"], ["shear_rate", "-5"]),
    (["predict", SCENARIO, "--shear-rate", "fast"], ["--shear-rate", "fast"]),
    (["predict", SCENARIO, "--viscosity-unit", "furlong"], ["--viscosity-unit", "furlong"]),
    (["max-load", SCENARIO, "--limit", "2 m"], ["--limit"]),
    (["max-load", SCENARIO, "--limit", "1 Pa*s", "--limit", "2 Pa*s", "--shear-rate", "1 1/s",
      "--shear-rate", "2 1/s", "--shear-rate", "3 1/s"], ["--shear-rate", "3 times"]),
    (["sweep", SCENARIO, "--points", "1"], ["--points", "1"]),
    (["screen", "missing_table.csv"], ["missing_table.csv"]),
])
def test_bad_input_exit_1_with_named_field(capsys, argv, words):
    code, out, err = run(capsys, *argv)
    assert code == 1 and out == ""
    assert err.startswith("loadline: error:")
    for word in words:
        assert word in err


def test_bad_command_line_exit_2(capsys):
    code, _, err = run(capsys, "predict")
    assert code == 2 and "scenario" in err
    code, _, err = run(capsys, "no-such-command")
    assert code == 2 and "invalid choice" in err


def test_bad_scenario_file(capsys, tmp_path):
    path = tmp_path / "broken.loadline.json"
    path.write_text("{not json", encoding="utf-8")
    code, _, err = run(capsys, "predict", str(path))
    assert code == 1 and "not valid JSON" in err


def test_sweep_csv(capsys):
    code, out, _ = run(capsys, "sweep", SCENARIO, "--points", "7", "--csv")
    frame = pd.read_csv(io.StringIO(out))
    assert code == 0 and len(frame) == 7
    assert frame["phi solids [-]"].is_monotonic_increasing
    assert frame["viscosity [Pa*s]"].is_monotonic_increasing


def test_max_load_equals_core(capsys):
    code, out, _ = run(capsys, "max-load", SCENARIO, "--limit", "2 Pa*s", "--shear-rate",
                       "100 1/s", "--json")
    assert code == 0
    row = json.loads(out)["rows"][0]
    expected = fm.max_loading(read_scenario(SCENARIO), 2.0, 100.0)
    assert row["max phi solids [-]"] == pytest.approx(expected, rel=1e-12)


def test_screen_demo_table(capsys, tmp_path):
    out_path = tmp_path / "results.csv"
    code, out, err = run(capsys, "screen", str(DEMO / "candidates.csv"), "-o", str(out_path))
    assert code == 0 and err == ""
    assert "screened 13 candidates: 13 predicted, 0 with input errors" in out
    assert len(pd.read_csv(out_path)) == 13


def test_screen_bad_rows_exit_3_and_escaped_csv(capsys):
    code, out, err = run(capsys, "screen", str(DEMO / "candidates_with_errors.csv"), "--csv")
    assert code == 3
    assert "line 3 (not a number): column 'ingredient 1 loading [wt%]' = 'forty'" in err
    assert err.count("loadline: line") == 8
    rows = list(csv.DictReader(io.StringIO(out)))
    assert len(rows) == 11
    assert rows[9]["candidate"].startswith("'=HYPERLINK")
    assert [r["status"] for r in rows].count("ok") == 3


def test_screen_progress_bar_on_stderr(capsys):
    code, _, err = run(capsys, "screen", str(DEMO / "candidates.csv"), "--progress",
                       "--show", "2")
    assert code == 0 and "screen [" in err and "100.0 %" in err and "13/13 rows" in err


def test_pack_size_table(capsys):
    code, out, _ = run(capsys, "pack", str(DEMO / "sizes_filler_coarse.csv"), "--json")
    doc = json.loads(out)
    assert code == 0
    assert doc["phi_max_low"] <= doc["phi_max_default"] <= doc["phi_max_high"]
    assert doc["d50_um"] == pytest.approx(6.56, rel=0.01)   # regression pin, not a source
    code, _, err = run(capsys, "pack", str(DEMO / "candidates.csv"))
    assert code == 1 and "size [um]" in err


def test_fit_lab_csv(capsys):
    code, out, _ = run(capsys, "fit", str(DEMO / "lab_loading_series.csv"),
                       "--particle-density", "2700 kg/m3", "--liquid-density", "997 kg/m3",
                       "--liquid-viscosity", "0.89 mPa*s", "--json")
    assert code == 0
    doc = json.loads(out)
    params = {r["parameter"]: r for r in doc["rows"]}
    assert 0.4 < params["phi_max"]["value"] < 0.8
    assert params["phi_max"]["95 % low"] < params["phi_max"]["value"] < \
        params["phi_max"]["95 % high"]
    code, _, err = run(capsys, "fit", str(DEMO / "lab_loading_series.csv"))
    assert code == 1 and err.startswith("loadline: error:")


def test_report_writes_html_and_pdf(capsys, tmp_path):
    html_path, pdf_path = tmp_path / "r.html", tmp_path / "r.pdf"
    code, out, _ = run(capsys, "report", str(DEMO / "ceramic_slip.loadline.json"), "-o",
                       str(html_path), "--pdf", str(pdf_path))
    assert code == 0 and f"wrote {html_path}" in out and CAUTIONS in out
    assert "<svg" in html_path.read_text(encoding="utf-8")
    assert pdf_path.read_bytes().startswith(b"%PDF")


def test_demo(capsys):
    code, out, _ = run(capsys, "demo")
    assert code == 0
    for words in ("Flow curve", "Loading sweep", "Highest solids loading", "phi_max",
                  "Caution: " + CAUTIONS):
        assert words in out


@pytest.mark.parametrize("command", COMMANDS)
def test_help_has_examples_and_cautions(capsys, command):
    code, out, _ = run(capsys, command, "--help")
    assert code == 0 and "examples:" in out and f"loadline {command}" in out
    assert "screening estimates" in out and "safety data sheets" in out


def test_top_level_help(capsys):
    code, out, _ = run(capsys, "--help")
    assert code == 0 and all(c in out for c in COMMANDS) and "Caution" in out
