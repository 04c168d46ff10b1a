"""Words for people: parameter labels with units, and no bare inf on any table.

Outside reference: the registry's own metadata (each Param's description and pint unit) and
the trade's way of writing units (Pa·s, a consistency K in Pa·sⁿ; common practice, no source).
"""

import json
import math
import re

import pytest

import predictor as pr
from predictor import cli, labels
from predictor.report import build_report, liquid_table

from .test_demos import DEMO

ALL_PARAMS = [(spec.name, p) for spec in pr.models() for p in spec.params]


@pytest.mark.parametrize(("model", "param"), ALL_PARAMS,
                         ids=[f"{m}-{p.name}" for m, p in ALL_PARAMS])
def test_every_registry_parameter_gets_words_and_a_unit(model, param):
    label = labels.param_label(param)
    words, unit = re.fullmatch(r"(.+) \[(.+)\]", label).groups()
    assert "_" not in words, label           # words, not a code name
    assert unit.strip()                       # never an empty unit
    assert pr.units.ureg(param.unit.replace("-", "dimensionless"))  # the registry unit parses


def test_units_read_as_people_write_them():
    hb = pr.get_model("herschel-bulkley")
    by_name = {p.name: labels.param_label(p) for p in hb.params}
    assert by_name == {"yield_stress_Pa": "yield stress τy [Pa]",
                       "consistency_Pa_s": "consistency K [Pa·sⁿ]",
                       "flow_index": "flow index n [–]"}


def test_code_names_outside_the_registry_read_from_their_suffix():
    assert labels.name_label("thickening_onset_stress_Pa") == ("thickening onset stress", "Pa")
    assert labels.name_label("density_kg_per_m3") == ("density", "kg/m³")


@pytest.mark.parametrize(("value", "quantity", "words"), [
    (math.inf, "viscosity", "no flow (jammed)"),
    (math.inf, "breakup diameter", "no breakup in simple shear: viscosity ratio above 4"),
    (math.nan, "headroom", "no solids"),
    (math.inf, "something else", "unbounded"),
    (1.5, "viscosity", None),
])
def test_values_without_a_number_get_words(value, quantity, words):
    assert labels.value_words(value, quantity) == words


@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
def test_report_liquid_table_names_each_parameter_with_its_unit():
    form = pr.read_scenario(DEMO / "hand_cream.loadline.json")
    table = liquid_table(form, "Pa*s")
    params = table.iloc[-3:]                 # the Herschel-Bulkley parameters
    assert list(params["quantity"]) == ["yield stress τy", "consistency K", "flow index n"]
    assert list(params["unit"]) == ["Pa", "Pa·sⁿ", "–"]
    assert not table["quantity"].str.contains("_").any()


@pytest.fixture
def jammed(tmp_path):
    data = json.loads((DEMO / "ceramic_slip.loadline.json").read_text())
    data["ingredients"][0]["loading"]["value"] = 0.9      # above the packing limit
    path = tmp_path / "jammed.loadline.json"
    path.write_text(json.dumps(data))
    return path


@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
def test_cli_table_says_no_flow_instead_of_inf(jammed, capsys):
    assert cli.main(["predict", str(jammed), "--shear-rate", "1 1/s"]) == 0
    out = capsys.readouterr().out
    assert "no flow (jammed)" in out
    assert not re.search(r"\binf\b", out)


@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
def test_report_tables_never_show_a_bare_inf(jammed):
    from predictor.report import _html_table

    report = build_report(pr.read_scenario(jammed), "Pa*s")
    html = "".join(_html_table(t) for s in report.sections for _, t in s.tables)
    assert "no flow (jammed)" in html
    assert not re.search(r">\s*-?inf\s*<|∞<|>nan<", html)
