"""`loadline map`: table, CSV, JSON (checked against its JSON Schema), PNG and bad input."""

from __future__ import annotations

import io
import json
import pathlib

import jsonschema
import numpy as np
import pandas as pd
import pytest

import predictor
from predictor import design
from predictor.cli import CAUTIONS, main
from predictor.scenario import read_scenario

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"
SCENARIO = str(DEMO / "mineral_coating.loadline.json")
SCHEMA = json.loads((pathlib.Path(predictor.__file__).parent / "schemas" / "map.schema.json")
                    .read_text(encoding="utf-8"))
BASE = ["map", SCENARIO, "--x", "1", "--y", "2", "--x-range", "20 45 wt%",
        "--y-range", "5 25 wt%", "--shear-rate", "100 1/s", "-n", "3"]
WINDOWS = ["--window", "pumping, 100 1/s, max 0.6 Pa*s", "--window",
           "sag, 0.1 1/s, min 3000 mPa*s"]


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_json_follows_the_schema_and_equals_the_core(capsys):
    code, out, _ = run(capsys, *BASE, *WINDOWS, "--json")
    assert code == 0
    doc = json.loads(out)
    jsonschema.validate(doc, SCHEMA, cls=jsonschema.Draft202012Validator)
    core = design.loading_map(read_scenario(SCENARIO), 0, 1, (0.2, 0.45), (0.05, 0.25), 100.0,
                              n=3, windows=[("pumping", 100.0, 0.6), ("sag", 0.1, None, 3.0)])
    assert [r["viscosity [Pa*s]"] for r in doc["rows"]] == pytest.approx(
        core["viscosity_Pa_s"].tolist(), rel=1e-12)
    assert [r["platy mineral filler [wt%]"] for r in doc["rows"]] == pytest.approx(
        (100 * core["x_loading"]).tolist(), rel=1e-12)
    feasible = [r["feasible"] == "yes" for r in doc["rows"]]
    assert feasible == core["feasible"].tolist()
    assert 0 < sum(feasible) < 9                                  # the windows cut the map
    assert doc["x_ingredient"] == "platy mineral filler" and doc["cautions"] == CAUTIONS


def test_triangle_json_follows_the_schema(capsys):
    code, out, _ = run(capsys, "map", SCENARIO, "--x", "1", "--y", "white pigment", "--z",
                       "liquid", "--shear-rate", "100 1/s", "-n", "6", "--json")
    assert code == 0
    doc = json.loads(out)
    jsonschema.validate(doc, SCHEMA, cls=jsonschema.Draft202012Validator)
    assert len(doc["rows"]) == 21 and doc["parts"][2] == "liquid"
    for regime in ("jammed", design.NO_LIQUID):       # no flow: null in JSON (no inf)
        rows = [r for r in doc["rows"] if r["regime"] == regime]
        assert rows and all(r["viscosity [Pa*s]"] is None for r in rows)


def test_schema_refuses_a_broken_document(capsys):
    _, out, _ = run(capsys, *BASE, "--json")
    doc = json.loads(out)
    doc["rows"][0]["platy mineral filler [wt%]"] = 150.0     # a loading beyond the whole
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, SCHEMA, cls=jsonschema.Draft202012Validator)


def test_table_csv_and_png(capsys, tmp_path):
    code, out, _ = run(capsys, *BASE, *WINDOWS, "--viscosity-unit", "mPa*s")
    assert code == 0 and "platy mineral filler [wt%]" in out and "Caution:" in out
    code, out, _ = run(capsys, *BASE, "--csv", "--png", str(tmp_path / "map.png"))
    assert code == 0
    frame = pd.read_csv(io.StringIO(out))
    assert len(frame) == 9
    np.testing.assert_allclose(sorted(set(frame["white pigment [wt%]"])), [5, 15, 25])
    assert (tmp_path / "map.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize(("argv", "needle"), [
    (["--x", "9"], "--x"),
    (["--x-range", "20 wt%"], "--x-range"),
    (["--x-range", "20 45 wt%", "--y-range", "5 25 vol%"], "same basis"),
    (["--window", "pumping, 100 1/s, most 2 Pa*s"], "max VISCOSITY"),
    (["--window", "pumping, 100 Pa, max 2 Pa*s"], "pumping"),
    (["--x-range", "45 20 wt%"], "x_range"),
    (["-n", "1"], "-n"),
])
def test_bad_input_is_named_with_exit_1(capsys, argv, needle):
    code, out, err = run(capsys, *BASE, *argv)
    assert code == 1 and not out
    assert needle in err


def test_help_names_the_command(capsys):
    code, out, _ = run(capsys, "map", "--help")
    assert code == 0 and "--x-range" in out and "Caution" in out


# --- loadline candidates ---------------------------------------------------------------------

@pytest.fixture
def slurry(tmp_path):
    from predictor.scenario import write_scenario
    from tests.test_design_map import two_powders_in_water

    path = tmp_path / "slurry.loadline.json"
    write_scenario(two_powders_in_water(), path)
    return str(path)


def test_candidates_command_writes_a_table_that_screens(capsys, tmp_path, slurry):
    out = tmp_path / "cand" / "cand.csv"
    code, text, _ = run(capsys, "candidates", slurry, "--factor",
                        "ingredient 1 loading: 20 40 wt%", "--factor",
                        "ingredient 2 d50: 0.3 1.2 um", "--factor", "temperature: 15 45 degC",
                        "--design", "sobol", "-n", "8", "--window",
                        "pumping, 100 1/s, max 1 Pa*s", "-o", str(out))
    assert code == 0 and "wrote 8 candidates" in text
    table = pd.read_csv(out)
    assert table["ingredient 1 loading [wt fraction]"].between(0.2, 0.4).all()
    assert table["temperature [K]"].between(288.15, 318.15).all()
    code, text, _ = run(capsys, "screen", str(out), "--json")
    doc = json.loads(text)
    assert code == 0 and doc["rows_ok"] == 8 and doc["rows_error"] == 0


@pytest.mark.parametrize(("argv", "needle"), [
    (["--factor", "ingredient 1 loading: 20 40 vol%"], "own basis"),
    (["--factor", "colour: 1 2 um"], "factor"),
    (["--factor", "ingredient 1 loading 20 40 wt%"], "could not be read"),
    (["--factor", "temperature: 15 45 Pa"], "temperature"),
    (["--factor", "ingredient 1 loading: 20 40 wt%", "--design", "sobol", "-n", "10"], "n"),
])
def test_candidates_bad_input_exit_1(capsys, tmp_path, slurry, argv, needle):
    code, out, err = run(capsys, "candidates", slurry, *argv, "-o", str(tmp_path / "c.csv"))
    assert code == 1 and not out and needle in err
    assert not (tmp_path / "c.csv").exists()


def test_candidates_of_the_thickened_paint_screen_to_predict(capsys, tmp_path):
    # The demo paint's Carreau-Yasuda liquid reaches the screen through the base scenario
    # written beside the table; each screened row equals `predict` of the same recipe.
    import dataclasses

    out = tmp_path / "paint.csv"
    code, text, _ = run(capsys, "candidates", SCENARIO, "--factor",
                        "ingredient 1 loading: 20 40 wt%", "--levels", "3", "--window",
                        "stirring, 100 1/s, max 3 Pa*s", "-o", str(out))
    assert code == 0 and "paint.base.loadline.json" in text
    assert (tmp_path / "paint.base.loadline.json").exists()
    code, _, _ = run(capsys, "screen", str(out), "-o", str(tmp_path / "screened.csv"))
    screened = pd.read_csv(tmp_path / "screened.csv")
    assert code == 0 and (screened["status"] == "ok").all()
    form = read_scenario(SCENARIO)
    for x, eta in zip([0.2, 0.3, 0.4], screened["window 1 viscosity [Pa*s]"], strict=True):
        recipe = dataclasses.replace(form, ingredients=(
            dataclasses.replace(form.ingredients[0], loading=x), *form.ingredients[1:]))
        # the screen writes 6 significant digits (batch.write_csv)
        assert eta == pytest.approx(predictor.predict(recipe, 100.0)["viscosity_Pa_s"][0],
                                    rel=1e-5)
