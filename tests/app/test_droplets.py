"""AppTest of the Droplets page: phase-ratio numbers are predictor's, passed through."""

from __future__ import annotations

import numpy as np
import pytest

from app import widgets
from predictor import emulsion, formulation, liquids, phase_ratio
from predictor.units import from_si
from tests.app.conftest import chart_specs, delta, demo, messages, metric, page

# The expected values are computed here too; their validity warnings are the page's to show.
pytestmark = pytest.mark.filterwarnings("ignore::predictor.ValidityWarning")


def _inputs(form, rate=100.0):
    """The page's inputs: the continuous phase counts at the process shear rate (the cream's
    water phase is a thickened, shear-thinning gel)."""
    ing = form.ingredients[0]
    law, params = formulation.liquid_law_of(form.liquid)
    eta_c = float(liquids.liquid_viscosity(rate, law, **params))
    return (eta_c, ing.droplet_viscosity_Pa_s, ing.interfacial_tension_N_per_m,
            ing.distribution().sauter_diameter_m)


def test_opens_on_the_cream_with_both_branches():
    at = page("droplets", scenario="hand_cream").run()
    assert not at.exception
    eta_c, eta_d, gamma, d32 = _inputs(demo("hand_cream"))
    sweep = phase_ratio.phase_ratio_sweep(eta_c, eta_d, gamma, d32, 100.0,
                                          model="phan-thien-pham")
    row = sweep[(sweep["branch"] == "direct") & np.isclose(sweep["phi"], 0.30)].iloc[0]
    assert metric(at, "Viscosity now") == widgets.fmt(
        from_si(row["viscosity_Pa_s"], "mPa*s", "viscosity"))
    assert delta(at, "Viscosity now") == f"regime: {row['regime']}"
    text = str(chart_specs(at)[0])
    assert "as designed" in text and "inverted" in text


def test_process_rate_changes_the_breakup_size():
    at = page("droplets", scenario="hand_cream", droplet_model="taylor").run()
    at.number_input(key="process_shear_rate").set_value(5000.0).run()
    assert not at.exception
    eta_c, eta_d, gamma, _ = _inputs(demo("hand_cream"), 5000.0)
    d = emulsion.max_stable_droplet_diameter(eta_c, 5000.0, gamma, eta_d / eta_c)
    shown = metric(at, "Largest stable droplet")
    assert np.isfinite(d) and shown == widgets.fmt(d * 1e6, 3)


def test_droplets_too_viscous_to_break_are_said_in_words():
    # de Bruijn's fit: simple shear cannot break droplets above a viscosity ratio of about 4
    # (Grace's curve, from memory); the page says so instead of a bare infinity.
    at = page("droplets", scenario="hand_cream", ing0_droplet_viscosity=1e6).run()
    assert not at.exception
    assert metric(at, "Largest stable droplet") == "no breakup"
    assert delta(at, "Largest stable droplet") == "viscosity ratio above 4 (simple shear)"
    shown = " ".join(str(m.value) for m in at.metric)
    assert "∞" not in shown and "inf" not in shown


def test_target_viscosity_gives_the_fraction():
    at = page("droplets", scenario="hand_cream").run()
    at.number_input(key="drop_target").set_value(1000.0).run()
    assert not at.exception
    eta_c, eta_d, gamma, d32 = _inputs(demo("hand_cream"))
    phi = phase_ratio.phase_ratio_for_target(eta_c, eta_d, gamma, d32, 100.0,
                                             target_viscosity_Pa_s=1.0,
                                             model="phan-thien-pham")
    assert metric(at, "Fraction for the target") == f"φ {phi:.3f}"


def test_unreachable_target_is_explained():
    at = page("droplets", scenario="hand_cream").run()
    at.number_input(key="drop_target").set_value(1e12).run()
    assert not at.exception
    assert "target" in messages(at).lower()


def test_scenario_without_droplets_says_so():
    at = page("droplets", scenario="ceramic_slip").run()
    assert not at.exception
    assert "no droplet ingredient" in messages(at)


def test_scenario_without_droplets_opens_the_cream_demo_in_one_click():
    at = page("droplets", scenario="ceramic_slip").run()
    at.button(key="drop_open_cream").click().run()
    assert not at.exception
    assert at.session_state["sc_name"] == demo("hand_cream").name
    assert metric(at, "Viscosity now")          # the explorer is shown, on the cream
    assert "no droplet ingredient" not in messages(at)


def test_missing_interfacial_tension_is_named():
    at = page("droplets", scenario="hand_cream", ing0_tension=None).run()
    assert not at.exception
    assert "interfacial tension" in messages(at)


def test_deformation_thinning_is_shown_and_can_be_switched_off():
    at = page("droplets", scenario="hand_cream").run()
    at.number_input(key="process_shear_rate").set_value(3e4).run()
    assert not at.exception
    eta_c, eta_d, gamma, d32 = _inputs(demo("hand_cream"), 3e4)
    on, off = (phase_ratio.phase_ratio_sweep(eta_c, eta_d, gamma, d32, 3e4,
                                             model="phan-thien-pham", deformation_thinning=t)
               for t in (True, False))
    pick = (on["branch"] == "direct") & np.isclose(on["phi"], 0.30)
    factor = float(on[pick]["thinning_factor"].iloc[0])
    assert factor < 1.0      # Ca is not small here: the droplets thin the cream
    assert metric(at, "Deformation thinning") == f"× {factor:.3g}"
    assert metric(at, "Viscosity now") == widgets.fmt(
        from_si(float(on[pick]["viscosity_Pa_s"].iloc[0]), "mPa*s", "viscosity"))
    at.toggle(key="drop_thinning").set_value(False).run()
    assert metric(at, "Deformation thinning") == "× 1"
    assert metric(at, "Viscosity now") == widgets.fmt(
        from_si(float(off[pick]["viscosity_Pa_s"].iloc[0]), "mPa*s", "viscosity"))
