"""AppTest of the Particle forces page: the verdict and yield stress are predictor's."""

from __future__ import annotations

import dataclasses
import re

import pytest

from app import widgets
from predictor import formulation as fm
from predictor import interactions
from tests.app.conftest import chart_specs, demo, messages, metric, page


def _expected(scenario: str, salt_mol_per_L: float, potential_V: float, layer_m: float,
              hamaker_J: float, name: str | None = None):
    """The verdict and yield stress predictor gives for the panel's values."""
    form = demo(scenario)
    ing = next(i for i in form.ingredients if i.kind == "solid" and (name is None
                                                                     or i.name == name))
    changed = dataclasses.replace(ing, surface_potential_V=potential_V, hamaker_J=hamaker_J,
                                  layer_thickness_m=layer_m)
    variant = dataclasses.replace(
        form, ingredients=tuple(changed if i is ing else i for i in form.ingredients),
        liquid=dataclasses.replace(form.liquid, ionic_strength_mol_per_L=salt_mol_per_L))
    state = next(s for s in fm.particle_interactions(variant) if s.ingredient == ing.name)
    return state.detail, fm.flocculation_yield_stress(variant)


def verdict_shown(at) -> str:
    """The verdict the page shows in its coloured call-out ("" if none)."""
    for element in (*at.success, *at.info, *at.warning):
        found = re.match(r"\*\*(.+?)\*\* — criterion", element.value)
        if found:
            return found.group(1).lower()
    return ""


def test_opens_with_predictors_verdict():
    at = page("particle_forces", scenario="ceramic_slip").run()
    assert not at.exception
    verdict, tau = _expected("ceramic_slip", 1e-3, 0.03, 0.0, 4.8e-20)
    assert verdict_shown(at) == verdict.verdict
    assert metric(at, "Barrier [kT]") == widgets.fmt(verdict.barrier_kT, 3)
    assert metric(at, "Yield stress now") == widgets.fmt(tau, 3)
    assert "Pair energy [kT]" in str(chart_specs(at)[0])


def test_salt_flocculates_and_a_yield_stress_appears():
    at = page("particle_forces", scenario="ceramic_slip").run()
    at.select_slider(key="pf_salt").set_value(1000.0).run()
    assert not at.exception
    verdict, tau = _expected("ceramic_slip", 1.0, 0.03, 0.0, 4.8e-20)
    assert verdict.verdict == "flocculated" == verdict_shown(at)
    assert tau > 0 and metric(at, "Yield stress now") == widgets.fmt(tau, 3)
    assert len(chart_specs(at)) == 2                  # energy curve and yield stress
    assert "Yield stress [Pa]" in str(chart_specs(at)[1])


def test_a_thick_dispersant_layer_keeps_the_particles_apart():
    at = page("particle_forces", scenario="ceramic_slip", pf_salt=1000.0, pf_potential=0.0,
              pf_layer=60.0).run()
    assert not at.exception
    verdict, tau = _expected("ceramic_slip", 1.0, 0.0, 60e-9, 4.8e-20)
    assert verdict_shown(at) == verdict.verdict == "stable"
    assert tau == 0.0 and "No network yield stress" in messages(at)


def test_apply_writes_the_panel_into_the_scenario():
    at = page("particle_forces", scenario="ceramic_slip", pf_salt=100.0,
              pf_potential=-20.0, pf_layer=3.0, pf_hamaker=3.7).run()
    at.button(key="pf_apply").click().run()
    assert not at.exception
    ss = at.session_state
    assert ss["ing0_interaction"] == "charged" and ss["ing0_potential"] == -20.0
    assert ss["ing0_hamaker"] == 3.7 and ss["liq_salt"] == 100.0
    assert ss["ing0_layer"] == pytest.approx(3.0)      # the demo's layer unit is nm


@pytest.mark.parametrize("key, value", [("pf_hamaker", 0.0), ("pf_potential", 300.0),
                                        ("pf_layer", 1000.0), ("pf_potential", -300.0)])
def test_extreme_values_never_give_a_traceback(key, value):
    at = page("particle_forces", scenario="ceramic_slip").run()
    at.number_input(key=key).set_value(value).run()
    assert not at.exception
    assert at.metric or at.error


def test_a_stale_salt_value_is_snapped_to_the_slider():
    at = page("particle_forces", scenario="ceramic_slip", pf_salt=3.3).run()
    assert not at.exception
    assert at.session_state["pf_salt"] in [float(f"{v:.3g}") for v in
                                           __import__("numpy").logspace(-4, 3, 29)]


def test_scenario_without_solids_says_so():
    at = page("particle_forces", scenario="hand_cream").run()
    assert not at.exception
    assert "no solid ingredient" in messages(at)


def test_hamaker_table_lists_the_module_table():
    at = page("particle_forces", scenario="ceramic_slip").run()
    table = at.dataframe[0].value
    assert list(table["Material"]) == list(interactions.HAMAKER_CONSTANTS)


def test_a_jammed_slip_is_said_in_words():
    # 95 wt% alumina is past the packing limit: no bare inf (tests/app/test_words.py rule)
    at = page("particle_forces", scenario="ceramic_slip", ing0_loading=95.0,
              pf_salt=1000.0).run()
    assert not at.exception
    shown = [str(m.value) for m in at.metric]
    assert not [c for c in shown if c.strip().lower() in ("inf", "nan", "∞", "-inf")], shown
    assert metric(at, "Yield stress now") == "no flow (jammed)"
