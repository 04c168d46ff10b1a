"""`loadline fit EXPORT --model <liquid law>`: every series of a rheometer export."""

import json
import pathlib

import jsonschema
import pytest

from predictor import cli, labdata

REPO = pathlib.Path(__file__).resolve().parents[1]
DEMO = REPO / "data_demo" / "lab_emulsion_series.csv"
SCHEMA = REPO / "predictor" / "schemas" / "fit-curves.schema.json"


def test_table_names_every_series_and_the_trend(capsys):
    assert cli.main(["fit", str(DEMO), "--model", "herschel-bulkley"]) == 0
    out = capsys.readouterr().out
    assert "5 series" in out and "cream base, phi 0.80" in out
    assert "yield stress against phi, mason: " in out and "critical fraction φc = " in out
    assert "yield stress τy [Pa]" in out and "flow index n, 95 % low [–]" in out


def test_json_matches_predictor_and_its_schema(capsys):
    assert cli.main(["fit", str(DEMO), "--model", "herschel-bulkley", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    schema = json.loads(SCHEMA.read_text())
    jsonschema.Draft202012Validator.check_schema(schema)
    jsonschema.validate(doc, schema)
    fits = labdata.fit_flow_curves(labdata.read_flow_curves(DEMO), "herschel-bulkley")
    by_series = {row["series"]: row for row in doc["rows"]}
    for series, fit in fits.fits.items():
        assert by_series[series]["yield_stress_Pa"] == pytest.approx(
            fit.params["yield_stress_Pa"], rel=1e-12)
    assert "error" in doc["trends"]["princen-kiss"]
    # a changed shape is refused by the schema
    del doc["trends"]
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, schema)


def test_down_branch_and_bad_export(tmp_path, capsys):
    assert cli.main(["fit", str(DEMO), "--model", "power-law", "--branch", "down",
                     "--csv"]) == 0
    assert capsys.readouterr().out.startswith('"series","phi","points"')
    bad = tmp_path / "bad.csv"
    bad.write_text("shear rate [1/s],shear stress [Pa]\n1,2\n2,x\n")
    assert cli.main(["fit", str(bad), "--model", "herschel-bulkley"]) == 1
    err = capsys.readouterr().err
    assert "bad.csv, line 3, column 'shear stress [Pa]'" in err
    assert cli.main(["fit", str(DEMO), "--model", "herschel-bulkley", "--branch",
                     "sideways"]) == 2
