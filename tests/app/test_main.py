"""AppTest of the entry file: opening scenario, sidebar editor, units, save and re-open."""

from __future__ import annotations

import dataclasses

import pytest
from streamlit.testing.v1 import AppTest

from app import state, widgets
from predictor import formulation as fm
from predictor import scenario as sc
from predictor.units import from_si
from tests.app.conftest import DEMOS, REPO, TIMEOUT, demo, messages, metric, open_sections

PAGES = ["loading_sweep", "flow_curve", "sizes_packing", "droplets", "calibrate",
         "design_map", "batch_screen", "process_checks",
         "particle_forces"]


def _app() -> AppTest:
    """The whole app with every sidebar section open (so its fields are on screen)."""
    return open_sections(AppTest.from_file(str(REPO / "app" / "main.py"),
                                           default_timeout=TIMEOUT))


def _viscosity_mPa_s(form) -> float:
    mix = fm.mixture(form)
    eta_r = float(fm.relative_viscosity_at(form, mix.phi_solids_effective, mix))
    return from_si(eta_r * mix.liquid_viscosity_Pa_s, "mPa*s", "viscosity")


def _widget_values(at: AppTest) -> dict:
    """Every scenario widget's value (the sidebar and the relation controls)."""
    keys = [k for k in state.all_keys(dict(n_ing=at.session_state["n_ing"]))
            if k.startswith(("sc_name", "model", "param_", "auto_", "liq_", "ing", "n_ing"))]
    return {k: at.session_state[k] for k in keys if k in at.session_state}


def test_opens_on_the_default_demo(monkeypatch):
    monkeypatch.delenv(state.SCENARIO_ENV, raising=False)
    at = _app().run()
    assert not at.exception
    assert at.session_state["sc_name"] == demo().name
    assert "invented" in at.session_state["sc_description"].lower()
    assert metric(at, "Viscosity now") == widgets.fmt(_viscosity_mPa_s(demo()))
    assert any(state.CAUTION in w.value for w in at.sidebar.warning)


def test_opens_on_the_scenario_named_by_the_environment(monkeypatch):
    monkeypatch.setenv(state.SCENARIO_ENV, "data_demo/ceramic_slip.loadline.json")
    at = _app().run()
    assert not at.exception
    assert at.session_state["sc_name"] == sc.read_scenario(DEMOS["ceramic_slip"]).name


def test_a_missing_opening_scenario_is_reported(monkeypatch):
    monkeypatch.setenv(state.SCENARIO_ENV, "data_demo/no_such_file.loadline.json")
    at = _app().run()
    assert not at.exception
    assert "no_such_file.loadline.json" in messages(at)


def test_sidebar_loading_change_reaches_the_metric():
    at = _app().run()
    at.number_input(key="ing0_loading").set_value(42.0).run()
    assert not at.exception
    form = demo()
    changed = dataclasses.replace(form, ingredients=(
        dataclasses.replace(form.ingredients[0], loading=0.42), *form.ingredients[1:]))
    assert metric(at, "Viscosity now") == widgets.fmt(_viscosity_mPa_s(changed))


def test_unit_change_converts_values_and_metrics():
    at = _app().run()
    before = at.session_state["ing0_diameter"]
    at.selectbox(key="unit_size").set_value("nm").run()
    at.selectbox(key="unit_viscosity").set_value("Pa*s").run()
    assert not at.exception
    assert at.session_state["ing0_diameter"] == pytest.approx(1000 * before)
    assert metric(at, "Viscosity now [Pa·s]") == widgets.fmt(_viscosity_mPa_s(demo()) / 1000)


def test_basis_switch_keeps_the_formulation():
    at = _app().run()
    phi = fm.mixture(demo()).phi[0]
    at.selectbox(key="ing0_basis").set_value("volume").run()
    assert not at.exception
    assert at.session_state["ing0_loading"] == pytest.approx(100 * phi, rel=1e-6)
    assert metric(at, "Viscosity now") == widgets.fmt(_viscosity_mPa_s(demo()))


def test_save_then_open_restores_every_widget():
    at = _app().run()
    at.toggle(key="auto_phi_max").set_value(False).run()
    at.slider(key="param_phi_max").set_value(0.7).run()
    at.number_input(key="ing1_layer").set_value(3.0).run()
    saved_values = _widget_values(at)
    saved = at.session_state["scenario_json_current"]
    # change things, then re-open the saved file
    at.number_input(key="ing0_loading").set_value(12.0).run()
    at.number_input(key="liq_temperature").set_value(60.0).run()
    at.toggle(key="auto_phi_max").set_value(True).run()
    at.button(key="ing1_remove").click().run()
    assert at.session_state["n_ing"] == 1
    at.file_uploader(key="open_file").set_value(
        ("meeting.loadline.json", saved.encode(), "application/json")).run()
    assert not at.exception
    assert _widget_values(at) == saved_values
    assert at.session_state["scenario_json_current"] == saved


def test_bad_scenario_upload_names_the_problem():
    at = _app().run()
    at.file_uploader(key="open_file").set_value(
        ("broken.json", b'{"format": "something else"}', "application/json")).run()
    assert not at.exception
    assert "broken.json" in messages(at) and "not a Loadline scenario" in messages(at)
    assert at.session_state["sc_name"] == demo().name      # the scenario is kept


def test_add_and_remove_ingredients():
    at = _app().run()
    at.button(key="add_ingredient").click().run()
    assert at.session_state["n_ing"] == 3
    at.radio(key="ing2_kind").set_value("droplet").run()
    assert not at.exception
    at.button(key="ing0_remove").click().run()
    assert not at.exception
    assert at.session_state["n_ing"] == 2
    assert at.session_state["ing0_name"] == demo().ingredients[1].name


@pytest.mark.parametrize("view", PAGES)
def test_every_page_opens_from_the_router(view):
    at = _app().run()
    at.switch_page(f"views/{view}.py").run()
    assert not at.exception
    assert not [e for e in at.error if "unexpected problem" in e.value]


def test_flow_law_parameter_reaches_the_metric():
    at = _app().run()
    at.number_input(key="liqp_zero_shear_viscosity_Pa_s").set_value(400.0).run()
    assert not at.exception
    form = demo()
    liquid = dataclasses.replace(form.liquid, params={**form.liquid.params,
                                                      "zero_shear_viscosity_Pa_s": 0.4})
    assert metric(at, "Viscosity now") == widgets.fmt(
        _viscosity_mPa_s(dataclasses.replace(form, liquid=liquid)))


def test_sidebar_particle_interactions_reach_the_scenario():
    at = _app().run()
    at.selectbox(key="ing1_interaction").set_value("charged").run()
    assert not at.exception
    at.number_input(key="ing1_potential").set_value(-40.0).run()
    at.number_input(key="ing1_hamaker").set_value(5.0).run()
    at.number_input(key="liq_salt").set_value(20.0).run()
    assert not at.exception
    values = {k: at.session_state[k] for k in state.all_keys(
        {"n_ing": at.session_state["n_ing"]}) if k in at.session_state}
    form = sc.scenario_from_dict(state.document(values))
    pigment = form.ingredients[1]
    assert pigment.surface_potential_V == pytest.approx(-0.04)
    assert pigment.hamaker_J == pytest.approx(5e-20)
    assert form.liquid.ionic_strength_mol_per_L == pytest.approx(0.02)
    # and back: a loaded scenario shows the same values
    shown = state.values_from_formulation(form, values)
    assert shown["ing1_interaction"] == "charged" and shown["ing1_potential"] == -40.0
    assert shown["liq_salt"] == 20.0


# issue 20: hostile uploads in the Open box. Deep nesting once raised a RecursionError (a red
# exception box); unknown keys once warned only in the server log.
def test_deeply_nested_upload_is_refused_with_a_message():
    at = _app().run()
    deep = b"[" * 100_000 + b"]" * 100_000
    at.file_uploader(key="open_file").set_value(
        ("deep.loadline.json", deep, "application/json")).run()
    assert not at.exception
    assert "deep.loadline.json" in messages(at) and "levels deep" in messages(at)
    assert at.session_state["sc_name"] == demo().name      # the scenario is kept


def test_unknown_keys_of_an_upload_reach_the_user():
    import json

    at = _app().run()
    doc = json.loads(sc.dumps(demo()))
    doc["colour"] = "blue"
    doc["relations"]["parameters"]["phi_maxx"] = 0.6
    at.file_uploader(key="open_file").set_value(
        ("extra.loadline.json", json.dumps(doc).encode(), "application/json")).run()
    assert not at.exception
    shown = " ".join(w.value for w in at.warning)
    assert "colour" in shown and "relations.parameters.phi_maxx" in shown


def test_closed_sidebar_sections_draw_no_fields_and_open_ones_stay_open():
    """A closed section draws none of its fields (fewer widgets per run) and its values
    still reach the page; an open ingredient stays open when its title (the loading)
    changes."""
    at = AppTest.from_file(str(REPO / "app" / "main.py"), default_timeout=TIMEOUT).run()
    keys = {w.key for w in at.number_input}
    assert "liq_temperature" not in keys and "ing0_loading" not in keys
    assert len(at.sidebar.expander) >= 4
    key = widgets.SECTION_PREFIX + "ing0"
    at.session_state[key] = at.session_state["_" + key] = True
    at.run()
    assert "ing0_loading" in {w.key for w in at.number_input}
    at.number_input(key="ing0_loading").set_value(12.0).run()
    assert not at.exception
    assert at.number_input(key="ing0_loading").value == 12.0
    assert "liq_temperature" not in {w.key for w in at.number_input}
