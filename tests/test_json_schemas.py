"""Every `--json` output of the CLI has a documented, stable shape: a JSON Schema per command.

Outside reference: the JSON Schema specification, draft 2020-12, through the `jsonschema`
package's validator (which also checks each schema file against the draft's metaschema).
`models` has its own schema and test (its parameter objects).
"""

import json
import pathlib

import jsonschema
import pytest

from predictor import cli

from .test_demos import DEMO

SCHEMAS = pathlib.Path(cli.__file__).parent / "schemas"
SLIP = str(DEMO / "ceramic_slip.loadline.json")
RUNS = {
    "predict": [["predict", SLIP, "--shear-rate", "1 1/s", "--shear-rate", "100 1/s"],
                ["predict", str(DEMO / "hand_cream.loadline.json"), "--points", "5",
                 "--viscosity-unit", "mPa*s"]],
    "sweep": [["sweep", SLIP, "--points", "5"],
              ["sweep", SLIP, "--points", "4", "--shear-rate", "100 1/s"]],
    "max-load": [["max-load", SLIP, "--limit", "0.5 Pa*s", "--limit", "2 Pa*s",
                  "--shear-rate", "100 1/s"]],
    "pack": [["pack", str(DEMO / "sizes_filler_coarse.csv")]],
    "fit": [["fit", str(DEMO / "lab_loading_series.csv"), "--particle-density",
             "2700 kg/m**3", "--liquid-density", "997 kg/m**3", "--liquid-viscosity",
             "0.89 mPa*s"]],
    "map": [["map", str(DEMO / "mineral_coating.loadline.json"), "--x", "1", "--y", "2",
             "--x-range", "20 45 wt%", "--y-range", "5 25 wt%", "--shear-rate", "100 1/s",
             "-n", "3", "--window", "pumping, 100 1/s, max 1 Pa*s"],
            ["map", str(DEMO / "mineral_coating.loadline.json"), "--x", "1", "--y", "2",
             "--z", "liquid", "--shear-rate", "100 1/s", "-n", "4"]],
    "pipe": [["pipe", SLIP, "--flow", "10 L/min", "--flow", "300 L/min", "--diameter",
              "25 mm", "--length", "10 m"],
             ["pipe", str(DEMO / "mineral_coating.loadline.json"), "--flow", "1 L/min",
              "--flow-to", "1 m**3/h", "--points", "4", "--diameter", "1 in", "--length",
              "30 m", "--flow-unit", "m**3/h", "--pressure-unit", "kPa"]],
    "screen": [["screen", str(DEMO / "candidates.csv")],
               ["screen", str(DEMO / "candidates_with_errors.csv")]],
}


def schema(command: str) -> dict:
    return json.loads((SCHEMAS / f"{command}.schema.json").read_text(encoding="utf-8"))


def test_one_schema_per_command_with_json_output():
    with_json = {name for name, p in cli.build_parser()._subparsers._group_actions[0]
                 .choices.items() if any("--json" in a.option_strings for a in p._actions)}
    assert with_json - {"models"} == set(RUNS)
    assert {p.name.removesuffix(".schema.json") for p in SCHEMAS.glob("*.schema.json")} >= set(RUNS)


@pytest.mark.parametrize("command", sorted(RUNS))
def test_schema_file_is_valid_draft_2020_12(command):
    doc = schema(command)
    assert doc["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(doc)


@pytest.mark.filterwarnings("ignore")
@pytest.mark.parametrize(("command", "run"), [(c, r) for c, runs in RUNS.items() for r in runs],
                         ids=lambda v: v if isinstance(v, str) else None)
def test_json_output_validates_against_its_schema(command, run, capsys):
    code = cli.main([*run, "--json"])
    assert code in (0, 3)                     # 3: a screen with rows in error still answers
    out = json.loads(capsys.readouterr().out)
    jsonschema.Draft202012Validator(schema(command)).validate(out)
    assert out["rows"]


@pytest.mark.filterwarnings("ignore")
def test_a_jammed_scenario_gives_nulls_that_validate(tmp_path, capsys):
    data = json.loads((DEMO / "ceramic_slip.loadline.json").read_text())
    data["ingredients"][0]["loading"]["value"] = 0.9
    path = tmp_path / "jammed.loadline.json"
    path.write_text(json.dumps(data))
    assert cli.main(["predict", str(path), "--shear-rate", "1 1/s", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    jsonschema.Draft202012Validator(schema("predict")).validate(out)
    assert out["rows"][0]["viscosity [Pa*s]"] is None and out["rows"][0]["regime"] == "jammed"


def test_schema_rejects_a_changed_shape():
    # The check can fail: a row without its regime, or a viscosity given as text, is refused.
    doc = schema("predict")
    good = {"scenario": "x", "markers": {}, "warnings": [], "rows": [
        {"shear rate [1/s]": 1.0, "shear stress [Pa]": 1.0, "relative viscosity [-]": 2.0,
         "viscosity [Pa*s]": 1.0, "regime": "plateau"}]}
    jsonschema.Draft202012Validator(doc).validate(good)
    for bad_row in ({k: v for k, v in good["rows"][0].items() if k != "regime"},
                    {**good["rows"][0], "viscosity [Pa*s]": "inf"}):
        with pytest.raises(jsonschema.ValidationError):
            jsonschema.Draft202012Validator(doc).validate({**good, "rows": [bad_row]})
