"""`loadline pipe`: table, CSV and JSON (validated against its JSON Schema), errors."""

from __future__ import annotations

import io
import json
import pathlib

import jsonschema
import numpy as np
import pandas as pd
import pytest

from predictor import process
from predictor.cli import main
from predictor.scenario import read_scenario

ROOT = pathlib.Path(__file__).resolve().parents[1]
SCENARIO = str(ROOT / "data_demo" / "mineral_coating.loadline.json")
SCHEMA = json.loads((ROOT / "predictor" / "schemas" / "pipe.schema.json").read_text())
ARGS = ["pipe", SCENARIO, "--flow", "10 L/min", "--diameter", "25 mm", "--length", "10 m"]


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_table_shows_the_numbers_and_the_caution(capsys):
    code, out, _ = run(capsys, *ARGS)
    assert code == 0
    assert "Caution:" in out and "licensed engineering practice" in out
    assert "restart pressure" in out and "laminar" in out
    flow = process.pipe_flow_of(read_scenario(SCENARIO), 10e-3 / 60, 0.025, 10.0)
    assert f"{flow.pressure_drop_Pa / 1e5:.4g}" in out


def test_json_validates_and_equals_core(capsys):
    code, out, _ = run(capsys, *ARGS, "--flow", "200 L/min", "--json")
    assert code == 0
    doc = json.loads(out)
    jsonschema.validate(doc, SCHEMA)
    flow = process.pipe_flow_of(read_scenario(SCENARIO), np.array([10e-3, 0.2]) / 60,
                                0.025, 10.0)
    assert [r["regime"] for r in doc["rows"]] == list(flow.regime)
    np.testing.assert_allclose([r["pressure drop [bar]"] for r in doc["rows"]],
                               flow.pressure_drop_Pa / 1e5, rtol=1e-12)
    np.testing.assert_allclose([r["flow [L/min]"] for r in doc["rows"]], [10.0, 200.0],
                               rtol=1e-12)
    assert doc["startup_pressure_Pa"] == flow.startup_pressure_Pa
    assert doc["caution"] == process.CAUTION


def test_schema_rejects_a_broken_document(capsys):
    _, out, _ = run(capsys, *ARGS, "--json")
    doc = json.loads(out)
    doc["rows"][0]["regime"] = "sticky"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, SCHEMA)


def test_system_curve_csv(capsys):
    code, out, _ = run(capsys, "pipe", SCENARIO, "--flow", "1 L/min", "--flow-to",
                       "100 L/min", "--points", "5", "--diameter", "1 in", "--length", "30 m",
                       "--csv")
    frame = pd.read_csv(io.StringIO(out))
    assert code == 0 and len(frame) == 5
    np.testing.assert_allclose(frame["flow [L/min]"], np.geomspace(1, 100, 5), rtol=1e-5)
    assert frame["pressure drop [bar]"].is_monotonic_increasing


@pytest.mark.parametrize(("flow", "diameter", "length", "extra", "text"), [
    ("10 L/min", "0 mm", "10 m", [], "diameter_m"),
    ("-1 L/min", "25 mm", "10 m", [], "flow_rate_m3_per_s"),
    ("10 L/min", "25 mm", "10 kg", [], "--length"),
    ("10 L/min", "25 mm", "10 m", ["--flow-to", "1 L/min"], "--flow-to"),
    ("10 L/min", "25 mm", "10 m", ["--pressure-unit", "kg"], "--pressure-unit"),
])
def test_bad_input_exits_1_with_a_message(capsys, flow, diameter, length, extra, text):
    code, out, err = run(capsys, "pipe", SCENARIO, "--flow", flow, "--diameter", diameter,
                         "--length", length, *extra)
    assert code == 1 and text in err and out == ""


def test_missing_option_is_a_usage_error(capsys):
    code, _, err = run(capsys, "pipe", SCENARIO, "--flow", "10 L/min")
    assert code == 2 and "--diameter" in err
