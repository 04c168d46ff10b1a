"""The `loadline` command, called through its entry point `main([...])`."""

from __future__ import annotations

import csv
import io
import json
import math
import pathlib

import pandas as pd
import pytest

import predictor
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


def test_models_json_matches_its_schema_and_the_registry(capsys):
    import jsonschema

    schema = json.loads((pathlib.Path(predictor.__file__).parent / "schemas"
                         / "models.schema.json").read_text())
    jsonschema.Draft202012Validator.check_schema(schema)
    code, out, _ = run(capsys, "models", "--json")
    doc = json.loads(out)
    assert code == 0
    jsonschema.validate(doc, schema, cls=jsonschema.Draft202012Validator)
    by_name = {r["name"]: r for r in doc["rows"]}
    for spec in models():
        params = by_name[spec.name]["parameters"]
        assert [p["name"] for p in params] == list(spec.param_names())
        for p, param in zip(params, spec.params, strict=True):
            assert p["unit"] == param.unit and p["description"] == param.description
            assert p["bounds"] == [b if math.isfinite(b) else None for b in param.bounds]
    # Krieger & Dougherty, Trans. Soc. Rheol. 3, 137 (1959): intrinsic viscosity 2.5 for
    # spheres (Einstein's value) is the default of the relation.
    kd = {p["name"]: p for p in by_name["krieger-dougherty"]["parameters"]}
    assert kd["intrinsic_viscosity"]["default"] == 2.5
    # A schema that can fail: a parameter given as a string (the old form) is rejected.
    bad = json.loads(out)
    bad["rows"][0]["parameters"] = ["intrinsic_viscosity=2.5 [-] (2.5..20)"]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(bad, schema, cls=jsonschema.Draft202012Validator)


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
    # The bar is rich's: label, bar, percentage, rows done of the total.
    assert code == 0 and err.startswith("screen ") and "100%" in err and "13/13 rows" in err
    code, _, err = run(capsys, "screen", str(DEMO / "candidates.csv"), "--no-progress",
                       "--show", "2")
    assert code == 0 and "13/13" not in err


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


# -- issue 20: hostile input through the commands ---------------------------------------------
CORPUS = pathlib.Path(__file__).resolve().parent / "corpus"


@pytest.mark.parametrize("command", [["predict"], ["sweep"], ["max-load", "--limit", "1 Pa*s"],
                                     ["report", "-o", "never.html"]])
def test_deeply_nested_scenario_is_refused_by_every_command(capsys, command, tmp_path,
                                                            monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, out, err = run(capsys, command[0], str(CORPUS / "scenario_deep_nesting.loadline.json"),
                         *command[1:])
    assert code == 1 and "levels deep" in err and "Recursion" not in err
    assert not (tmp_path / "never.html").exists()


def test_max_load_checks_its_viscosity_unit(capsys):
    code, _, err = run(capsys, "max-load", SCENARIO, "--limit", "1 Pa*s",
                       "--viscosity-unit", "furlongs")
    assert code == 1 and "--viscosity-unit = 'furlongs'" in err and "pint" not in err


def test_report_of_a_scenario_without_ingredients(capsys, tmp_path):
    out_file = tmp_path / "r.html"
    code, _, err = run(capsys, "report", str(CORPUS / "scenario_no_ingredients.loadline.json"),
                       "-o", str(out_file))
    assert code == 0, err
    assert "corpus: no ingredients" in out_file.read_text(encoding="utf-8")


def test_sweep_without_solids_refuses_like_max_load(capsys):
    path = str(CORPUS / "scenario_no_ingredients.loadline.json")
    code_sweep, _, err_sweep = run(capsys, "sweep", path)
    code_max, _, err_max = run(capsys, "max-load", path, "--limit", "1 Pa*s")
    assert code_sweep == code_max == 1
    assert "no solid" in err_sweep and err_sweep == err_max


def test_limit_below_the_liquid_says_even_the_liquid_fails(capsys):
    # The demo slip's liquid is water, 1.002 mPa*s at 25 degC (its scenario); 0.1 mPa*s
    # is below it, so no loading can meet the limit.
    code, out, err = run(capsys, "max-load", str(DEMO / "ceramic_slip.loadline.json"),
                         "--limit", "0.1 mPa*s", "--json")
    assert code == 0
    assert json.loads(out)["rows"][0]["max phi solids [-]"] == 0.0
    assert "even the liquid without solids" in err and "0.001002 Pa*s" in err


def test_tiny_shear_rate_gives_the_plateau_or_a_refusal_never_a_default(capsys):
    # Before: 1e-300 1/s returned exactly 1 Pa*s (a 1e-300 Pa stress floor divided by the
    # rate). Now the zero-shear plateau (the value at 1e-12 1/s), or a refusal naming the rate.
    path = str(DEMO / "ceramic_slip.loadline.json")
    _, plateau, _ = run(capsys, "predict", path, "--shear-rate", "1e-12 1/s", "--json")
    code, out, _ = run(capsys, "predict", path, "--shear-rate", "1e-300 1/s", "--json")
    assert code == 0
    assert json.loads(out)["rows"][0]["viscosity [Pa*s]"] == pytest.approx(
        json.loads(plateau)["rows"][0]["viscosity [Pa*s]"], rel=1e-6)
    code, _, err = run(capsys, "predict", path, "--shear-rate", "1e-306 1/s")
    assert code == 1 and "shear_rate_1_per_s = 1e-306" in err


def test_pack_simulation_says_when_it_cannot_represent_the_sizes(capsys, tmp_path):
    # Half the volume at 1 nm, half at 10 mm: a 10 mm sphere is 1e21 times the volume of a
    # 1 nm one, so 2000 spheres drawn in number are all 1 nm (by hand).
    path = tmp_path / "two.csv"
    path.write_text("size [um],amount [vol%]\n0.001,50\n10000,50\n", encoding="utf-8")
    code, out, _ = run(capsys, "pack", str(path), "--simulation", "--json")
    assert code == 0
    rows = {r["method"]: r for r in json.loads(out)["rows"]}
    assert rows["simulation"]["phi_max [-]"] is None
    assert "cannot represent this distribution" in rows["simulation"]["note"]


def test_pack_simulation_shows_its_elapsed_time(capsys, tmp_path, monkeypatch):
    # The jamming simulation reports no progress of its own; --progress redraws the elapsed
    # time on stderr while it runs (here a stand-in that takes 0.35 s).
    import time

    from predictor import cli, packing

    real = packing.packing_estimates

    def slow(*args, **kwargs):
        time.sleep(0.35)
        kwargs["include_simulation"] = False
        return real(*args, **kwargs)

    monkeypatch.setattr(packing, "packing_estimates", slow)
    monkeypatch.setattr(cli, "TICK_SECONDS", 0.1)
    code, _, err = run(capsys, "pack", str(DEMO / "sizes_filler_coarse.csv"), "--simulation",
                       "--progress")
    assert code == 0
    assert "pack: jamming simulation: 0 s" in err and "done in 0." in err
