"""Particle interactions in a formulation: fields, scenario files, the flocculation yield
stress in the flow curve and the loading sweep, and the CLI.

The numbers are checked at the function layer (tests/test_interactions.py); here the wiring:
the right relation with the formulation's SI inputs, and the yield stress added as
Herschel-Bulkley-like tau_y + sigma(rate) (common practice, no source).
"""

from __future__ import annotations

import dataclasses
import json
import pathlib

import numpy as np
import pytest

import predictor as pr
from predictor import formulation as fm
from predictor import interactions
from predictor.cli import main
from predictor.errors import InputRangeError, ScenarioError
from predictor.scenario import dumps, loads, read_scenario, write_scenario

DEMO = pathlib.Path(__file__).resolve().parents[1] / "data_demo"


def slip(**changes) -> pr.Formulation:
    form = read_scenario(DEMO / "ceramic_slip.loadline.json")
    salt = changes.pop("salt", None)
    ing = dataclasses.replace(form.ingredients[0], **changes)
    liquid = form.liquid if salt is None else dataclasses.replace(
        form.liquid, ionic_strength_mol_per_L=salt)
    return dataclasses.replace(form, ingredients=(ing, *form.ingredients[1:]), liquid=liquid)


def test_plain_formulations_are_unchanged():
    form = slip()
    assert fm.particle_interactions(form) == ()
    assert fm.flocculation_yield_stress(form) == 0.0
    curve = fm.predict(form, [1.0])
    assert "flocculation_yield_stress_Pa" not in curve.attrs["markers"]
    assert fm.flow_curve_summary(form)["particle_interactions"] == []


def test_charged_solid_uses_the_liquids_salt(mocker):
    spy = mocker.spy(interactions, "stability_verdict")
    fm._verdict.cache_clear()
    form = slip(surface_potential_V=-0.04, hamaker_J=4.8e-20, salt=0.02)
    state = fm.particle_interactions(form)[0]
    ing = form.ingredients[0]
    args = spy.call_args.args
    assert args[0] == pytest.approx(ing.distribution().sauter_diameter_m)
    assert args[1:5] == (4.8e-20, -0.04, 0.02, ing.layer_thickness_m)
    assert args[5] == form.liquid.temperature_K
    assert state.detail == spy.spy_return and state.verdict == spy.spy_return.verdict
    assert state.diameter_m == pytest.approx(ing.distribution().d50_m)


def test_flocculated_solid_adds_a_yield_stress_to_the_flow_curve():
    plain, floc = slip(), slip(flocculated=True, hamaker_J=4.8e-20)
    rates = np.array([1e-3, 1.0, 1e3])
    tau = fm.flocculation_yield_stress(floc)
    mix = fm.mixture(floc)
    expected = interactions.yodel_yield_stress(
        mix.phi_solids_effective, interactions.YODEL_PERCOLATION, mix.phi_max,
        floc.ingredients[0].distribution().d50_m, 4.8e-20,
        max(2 * floc.ingredients[0].layer_thickness_m, interactions.CLOSEST_APPROACH_m),
        size_factor=interactions.yodel_size_factor(floc.ingredients[0].distribution().diameters_m,
                                                   floc.ingredients[0].distribution().fractions))
    assert tau == pytest.approx(expected) and tau > 0
    a, b = fm.predict(plain, rates), fm.predict(floc, rates)
    assert b["shear_stress_Pa"].to_numpy() == pytest.approx(a["shear_stress_Pa"] + tau)
    assert b["viscosity_Pa_s"].to_numpy() == pytest.approx((a["shear_stress_Pa"] + tau) / rates)
    assert b["regime"].iloc[0] == "yield"
    assert b.attrs["markers"]["apparent_yield_stress_Pa"] == pytest.approx(tau)


def test_the_yield_stress_adds_to_the_liquids_own():
    base = slip(flocculated=True, hamaker_J=4.8e-20)
    liquid = dataclasses.replace(base.liquid, preset="", law="bingham",
                                 params={"yield_stress_Pa": 2.0, "plastic_viscosity_Pa_s": 0.01})
    with_liquid = dataclasses.replace(base, liquid=liquid)
    without = dataclasses.replace(with_liquid, ingredients=(
        dataclasses.replace(base.ingredients[0], flocculated=False, hamaker_J=None),))
    tau = fm.flocculation_yield_stress(with_liquid)
    marker = fm.predict(with_liquid, [1.0]).attrs["markers"]["apparent_yield_stress_Pa"]
    own = fm.predict(without, [1.0]).attrs["markers"]["apparent_yield_stress_Pa"]
    assert own > 0 and marker == pytest.approx(own + tau)


def test_loading_sweep_carries_the_yield_stress_against_loading():
    floc = slip(flocculated=True, hamaker_J=4.8e-20)
    sweep = fm.loading_sweep(floc, phi=[0.1, 0.3, 0.5, 0.6])
    tau = sweep["yield_stress_Pa"].to_numpy()
    assert tau[0] == 0.0 and np.all(np.diff(tau) > 0)
    assert fm.loading_sweep(slip(), phi=[0.5])["yield_stress_Pa"].iloc[0] == 0.0
    at_rate = fm.loading_sweep(floc, phi=[0.5], shear_rate_1_per_s=1.0)
    plain = fm.loading_sweep(slip(), phi=[0.5], shear_rate_1_per_s=1.0)
    assert at_rate["viscosity_Pa_s"].iloc[0] == pytest.approx(
        plain["viscosity_Pa_s"].iloc[0] + at_rate["yield_stress_Pa"].iloc[0])


def test_salt_turns_a_stable_slip_into_a_paste():
    # DLVO: the same powder at the same loading, fluid at low salt, a paste at high salt
    low = slip(surface_potential_V=0.05, hamaker_J=4.8e-20, layer_thickness_m=0.0, salt=1e-4)
    high = dataclasses.replace(low, liquid=dataclasses.replace(low.liquid,
                                                               ionic_strength_mol_per_L=0.5))
    assert fm.particle_interactions(low)[0].verdict == "stable"
    assert fm.particle_interactions(high)[0].verdict == "flocculated"
    assert fm.flocculation_yield_stress(low) == 0.0 < fm.flocculation_yield_stress(high)


@pytest.mark.parametrize("changes, field", [
    ({"flocculated": True}, "hamaker_J"),
    ({"surface_potential_V": 0.03}, "hamaker_J"),
    ({"surface_potential_V": 0.03, "hamaker_J": -1e-20}, "hamaker_J"),
    ({"surface_potential_V": 0.5, "hamaker_J": 1e-20}, "surface_potential_V"),
    ({"flocculated": "yes", "hamaker_J": 1e-20}, "flocculated"),
])
def test_bad_interaction_fields_are_named(changes, field):
    with pytest.raises(InputRangeError, match=field):
        slip(**changes)


def test_negative_hamaker_says_why():
    with pytest.raises(InputRangeError, match="different materials"):
        slip(flocculated=True, hamaker_J=-1e-20)


def test_droplets_cannot_carry_particle_interactions():
    drop = pr.Ingredient("oil", 900.0, 0.2, kind="droplet", flocculated=True, hamaker_J=1e-20)
    with pytest.raises(InputRangeError, match="kind"):
        pr.Formulation(ingredients=(drop,))


def test_liquid_salt_range():
    with pytest.raises(InputRangeError, match="ionic_strength_mol_per_L"):
        pr.Formulation(liquid=pr.Liquid(ionic_strength_mol_per_L=0.0))


def test_scenario_round_trip_with_interactions():
    form = slip(surface_potential_V=-0.025, hamaker_J=3.1e-20, salt=0.004)
    form = dataclasses.replace(form, liquid=dataclasses.replace(form.liquid,
                                                                relative_permittivity=70.0))
    assert loads(dumps(form)) == form
    floc = slip(flocculated=True, hamaker_J=2e-20)
    assert loads(dumps(floc)) == floc
    assert '"flocculated": true' in dumps(floc) and '"flocculated"' not in dumps(slip())


def test_scenario_reads_units_for_the_new_fields():
    doc = json.loads(dumps(slip()))
    doc["liquid"]["ionic_strength"] = "10 mmol/L"
    doc["ingredients"][0].update(surface_potential="-35 mV", hamaker_constant="4.8e-20 J")
    form = loads(json.dumps(doc))
    assert form.liquid.ionic_strength_mol_per_L == pytest.approx(0.01)
    assert form.ingredients[0].surface_potential_V == pytest.approx(-0.035)
    doc["ingredients"][0]["flocculated"] = "yes"
    with pytest.raises(ScenarioError, match="flocculated"):
        loads(json.dumps(doc))
    doc["ingredients"][0]["flocculated"] = False
    doc["ingredients"][0]["surface_potential"] = "3 kg"
    with pytest.raises(pr.LoadlineError, match="surface_potential"):
        loads(json.dumps(doc))


def test_older_files_without_the_fields_still_read():
    doc = json.loads(dumps(slip()))
    del doc["liquid"]["ionic_strength"], doc["liquid"]["relative_permittivity"]
    for ing in doc["ingredients"]:
        del ing["surface_potential"], ing["hamaker_constant"]
    form = loads(json.dumps(doc))
    assert form == slip()


def test_cli_predict_shows_verdict_and_yield_stress(tmp_path, capsys):
    path = write_scenario(slip(surface_potential_V=0.03, hamaker_J=4.8e-20, salt=0.5),
                          tmp_path / "slip.loadline.json")
    assert main(["predict", str(path), "--shear-rate", "1 1/s"]) == 0
    out = capsys.readouterr().out
    form = read_scenario(path)
    tau = fm.flocculation_yield_stress(form)
    assert "particles: calcined alumina flocculated" in out and "rule of thumb" in out
    assert f"network yield stress (YODEL, Flatt & Bowen 2006) = {tau:.4g} Pa" in out
    assert main(["predict", str(path), "--shear-rate", "1 1/s", "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["yield_stress_Pa"] == pytest.approx(tau)
    assert doc["particle_interactions"][0]["verdict"] == "flocculated"
    assert doc["rows"][0]["shear stress [Pa]"] == pytest.approx(
        fm.predict(form, [1.0])["shear_stress_Pa"].iloc[0])


def test_cli_predict_without_interactions_says_nothing_of_them(capsys):
    assert main(["predict", str(DEMO / "ceramic_slip.loadline.json"), "--points", "3"]) == 0
    assert "particles:" not in capsys.readouterr().out


def test_cli_sweep_adds_the_yield_stress_column_only_with_flocs(capsys):
    demo = str(DEMO / "alumina_slip_near_iep.loadline.json")
    assert main(["sweep", demo, "--points", "5", "--json"]) == 0
    rows = json.loads(capsys.readouterr().out)["rows"]
    expected = fm.loading_sweep(read_scenario(demo), n=5)["yield_stress_Pa"].to_numpy()
    got = [r["yield stress of flocs [Pa]"] for r in rows]
    assert got == pytest.approx(expected.tolist()) and max(got) > 0
    assert main(["sweep", str(DEMO / "ceramic_slip.loadline.json"), "--points", "5",
                 "--json"]) == 0
    assert "yield stress of flocs [Pa]" not in json.loads(capsys.readouterr().out)["rows"][0]


@pytest.mark.parametrize("argv, command", [
    (["predict", "--shear-rate", "1 1/s"], "predict"), (["sweep", "--points", "5"], "sweep")])
def test_json_with_interactions_validates_against_the_schema(argv, command, capsys):
    import jsonschema

    demo = str(DEMO / "alumina_slip_near_iep.loadline.json")
    assert main([argv[0], demo, *argv[1:], "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    schema = json.loads((pathlib.Path(pr.__file__).parent / "schemas" /
                         f"{command}.schema.json").read_text())
    jsonschema.Draft202012Validator(schema).validate(out)
    if command == "predict":
        assert out["particle_interactions"][0]["verdict"] == "flocculated"
        bad = dict(out, particle_interactions=[{**out["particle_interactions"][0],
                                                "verdict": "sticky"}])
        with pytest.raises(jsonschema.ValidationError):
            jsonschema.Draft202012Validator(schema).validate(bad)
