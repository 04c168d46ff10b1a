"""AppTest of the Loading sweep page: it only passes values between widgets and predictor."""

from __future__ import annotations

import dataclasses
import json

from app import compute, widgets
from predictor import design
from predictor import formulation as fm
from predictor import scenario as sc
from predictor.units import from_si
from tests.app.conftest import DEMOS, chart_specs, demo, messages, metric, page


def _relative(form) -> float:
    mix = fm.mixture(form)
    return float(fm.relative_viscosity_at(form, mix.phi_solids_effective, mix))


def test_opens_on_the_demo_with_metrics_and_chart():
    at = page("loading_sweep").run()
    assert not at.exception
    form = demo()
    mix = fm.mixture(form)
    assert metric(at, "Relative viscosity") == widgets.fmt(_relative(form))
    assert metric(at, "Headroom") == f"{mix.headroom:.2f}"
    assert metric(at, "Packing limit") == f"{mix.phi_max:.3f}"
    eta = from_si(_relative(form) * mix.liquid_viscosity_Pa_s, "mPa*s", "viscosity")
    assert metric(at, "Viscosity now [mPa·s]") == widgets.fmt(eta)
    (spec,) = chart_specs(at)
    titles = str(spec)
    assert "Viscosity [mPa·s]" in titles and "Effective solids volume fraction" in titles
    assert "[wt%]" in titles            # the second (top) axis


def test_phi_max_set_by_hand_reaches_the_relation():
    at = page("loading_sweep").run()
    at.toggle(key="auto_phi_max").set_value(False).run()
    at.slider(key="param_phi_max").set_value(0.6).run()
    assert not at.exception
    form = dataclasses.replace(demo(), model_params={"phi_max": 0.6})
    assert metric(at, "Relative viscosity") == widgets.fmt(_relative(form))


def test_changing_the_relation_passes_through():
    at = page("loading_sweep").run()
    at.selectbox(key="model").set_value("quemada").run()
    assert not at.exception
    assert metric(at, "Relative viscosity") == widgets.fmt(
        _relative(dataclasses.replace(demo(), model="quemada")))


def test_overlaid_relations_appear_in_the_legend():
    at = page("loading_sweep").run()
    at.multiselect(key="compare_models").set_value(["maron-pierce", "quemada"]).run()
    assert not at.exception
    text = json.dumps(chart_specs(at)[0])
    assert all(f'"{name}"' in text for name in ("krieger-dougherty", "maron-pierce", "quemada"))


def test_highest_loading_under_the_limit_matches_predictor():
    at = page("loading_sweep", find_max=True).run()
    at.number_input(key="limit_viscosity").set_value(50.0).run()
    assert not at.exception
    answer = design.max_loading_with_band(demo(), 0.05, 10.0, packing_spread=True,
                                          n_samples=compute.BAND_SAMPLES)
    assert metric(at, "Max loading") == answer.text("mass").split(" (")[0]
    shown = [m for m in at.metric if m.label.startswith("Max loading")][0]
    assert answer.text("mass").split(" (")[1].rstrip(")") in shown.delta


def test_negative_limit_shows_a_message_not_an_exception():
    at = page("loading_sweep", find_max=True).run()
    at.number_input(key="limit_viscosity").set_value(-5.0).run()
    assert not at.exception
    assert "viscosity_limit_Pa_s" in messages(at)


def test_impossible_loading_is_explained():
    at = page("loading_sweep", ing0_loading=150.0).run()
    assert not at.exception
    assert "loading = 1.5 is not allowed" in messages(at)


def test_loading_above_the_packing_limit_is_explained():
    at = page("loading_sweep", auto_phi_max=False, param_phi_max=0.21).run()
    assert not at.exception
    assert "above the packing limit" in messages(at)
    assert metric(at, "Relative viscosity") == "no flow (jammed)"     # words, not a bare ∞


def test_scenario_without_solids_says_so():
    at = page("loading_sweep", scenario="hand_cream").run()
    assert not at.exception
    assert "no solid ingredient" in messages(at)


def test_saved_scenarios_are_overlaid_with_a_legend():
    at = page("loading_sweep").run()
    files = [(p.name, p.read_bytes(), "application/json")
             for p in (DEMOS["ceramic_slip"], DEMOS["mineral_coating"])]
    at.file_uploader(key="compare_upload").set_value(files).run()
    assert not at.exception
    assert len(at.session_state["compare_scenarios"]) == 2
    specs = chart_specs(at)
    assert len(specs) == 2
    text = json.dumps(specs[1], ensure_ascii=False)
    assert f"1. {sc.read_scenario(DEMOS['ceramic_slip']).name}" in text
    assert f"2. {demo().name}" in text


def test_bad_comparison_file_is_named():
    at = page("loading_sweep").run()
    at.file_uploader(key="compare_upload").set_value(
        [("broken.loadline.json", b"{not json", "application/json")]).run()
    assert not at.exception
    assert "broken.loadline.json" in messages(at) and "not valid JSON" in messages(at)
    assert at.session_state["compare_scenarios"] == []


def test_charged_solid_in_salt_shows_the_verdict():
    # alumina at 30 mV in 0.5 mol/L of salt: screened, its 1.5 nm layer too thin to hold
    # the particles out of the van der Waals well, so flocculated
    at = page("loading_sweep", scenario="ceramic_slip", ing0_interaction="charged",
              ing0_potential=30.0, ing0_hamaker=4.8, liq_salt=500.0).run()
    assert not at.exception
    form = demo("ceramic_slip")
    ing = dataclasses.replace(form.ingredients[0], surface_potential_V=0.03, hamaker_J=4.8e-20)
    form = dataclasses.replace(form, ingredients=(ing, *form.ingredients[1:]),
                               liquid=dataclasses.replace(form.liquid,
                                                          ionic_strength_mol_per_L=0.5))
    row = fm.interaction_rows(form)[0]
    assert row["verdict"] == "flocculated"
    text = " ".join(e.value for e in at.info)
    assert (f"calcined alumina**: flocculated (barrier {widgets.fmt(row['barrier_kT'], 3)} kT)"
            in text)
    assert f"Network yield stress {widgets.fmt(fm.flocculation_yield_stress(form), 3)} Pa" in text


# issue 20: the Compare uploader refuses deep nesting with a message and shows unknown keys.
def test_deep_or_odd_comparison_files_are_explained():
    doc = json.loads(sc.dumps(demo()))
    doc["supplier"] = "nobody"
    at = page("loading_sweep").run()
    at.file_uploader(key="compare_upload").set_value(
        [("deep.loadline.json", b"[" * 100_000 + b"]" * 100_000, "application/json"),
         ("extra.loadline.json", json.dumps(doc).encode(), "application/json")]).run()
    assert not at.exception
    assert "deep.loadline.json" in messages(at) and "levels deep" in messages(at)
    assert "supplier" in messages(at)
    assert len(at.session_state["compare_scenarios"]) == 1
