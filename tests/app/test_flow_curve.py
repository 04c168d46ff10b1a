"""AppTest of the Flow curve page: metrics and table are predictor's numbers, passed through."""

from __future__ import annotations

import math

import numpy as np
import pytest

from app import widgets
from predictor import formulation as fm
from predictor import scenario as sc
from predictor import shear
from predictor.units import from_si
from tests.app.conftest import chart_specs, delta, demo, messages, metric, page


def _at_rate(form, rate: float) -> dict:
    return fm.predict(form, [rate]).iloc[0].to_dict()


def test_opens_with_the_viscosity_at_the_process_rate():
    at = page("flow_curve").run()
    assert not at.exception
    row = _at_rate(demo(), 100.0)
    assert metric(at, "Viscosity [mPa·s]") == widgets.fmt(
        from_si(row["viscosity_Pa_s"], "mPa*s", "viscosity"))
    assert metric(at, "Regime there") == row["regime"]
    assert len(chart_specs(at)) == 3          # windows strip, viscosity, stress
    assert "Shear rate [1/s]" in str(chart_specs(at)[1])


def test_changing_the_process_rate_passes_through():
    at = page("flow_curve").run()
    at.number_input(key="process_shear_rate").set_value(0.05).run()
    assert not at.exception
    row = _at_rate(demo(), 0.05)
    assert delta(at, "Viscosity [mPa·s]") == "at 0.05 1/s"
    assert metric(at, "Viscosity [mPa·s]") == widgets.fmt(
        from_si(row["viscosity_Pa_s"], "mPa*s", "viscosity"))
    assert metric(at, "Shear stress there") == widgets.fmt(row["shear_stress_Pa"])


@pytest.mark.parametrize("scenario", ["mineral_coating", "ceramic_slip", "hand_cream"])
@pytest.mark.parametrize("rate", [0.05, 100.0, 3e5])        # the last outside the curve
def test_the_process_point_solved_with_the_curve_equals_a_prediction_alone(scenario, rate):
    # Folding the process rate into the curve's one call changes no number: each rate's
    # stress is solved on its own, and the markers depend only on the curve's range.
    from app import compute

    text = sc.dumps(demo(scenario))
    value = compute.flow_curve(text, 1e-3, 1e5, rate)["value"]
    alone = _at_rate(demo(scenario), rate)
    for name in ("viscosity_Pa_s", "shear_stress_Pa", "liquid_viscosity_Pa_s"):
        assert value["point"][name] == pytest.approx(alone[name], rel=1e-9), name
    assert value["point"]["regime"] == alone["regime"]
    curve = fm.predict(demo(scenario), np.logspace(-3, 5, 121))
    assert len(value["curve"]) == 121
    np.testing.assert_allclose(value["curve"]["viscosity_Pa_s"], curve["viscosity_Pa_s"],
                               rtol=1e-9)
    assert value["curve"].attrs["markers"] == pytest.approx(curve.attrs["markers"], rel=1e-9,
                                                            nan_ok=True)


def test_choosing_a_process_moves_the_rate_into_its_window():
    at = page("flow_curve").run()
    name, low, high = shear.PROCESS_SHEAR_RATES[1]
    at.selectbox(key="flow_process").set_value(name).run()
    assert not at.exception
    assert low <= at.session_state["process_shear_rate"] <= high


def test_onsets_are_shown_where_predictor_finds_them():
    at = page("flow_curve", scenario="ceramic_slip").run()
    assert not at.exception
    markers = fm.predict(demo("ceramic_slip"), [1.0]).attrs["markers"]
    onset = markers["thinning_onset_1_per_s"]
    if math.isfinite(onset):
        assert metric(at, "Thinning onset") == widgets.fmt(onset)
    else:
        assert not [m for m in at.metric if m.label.startswith("Thinning onset")]


def test_process_window_table_matches_predictor():
    at = page("flow_curve").run()
    assert not at.exception
    table = at.dataframe[0].value
    expected = fm.process_viscosities(demo())
    assert list(table["Process"]) == list(expected["process"])
    shown = table["Viscosity at the high end [mPa·s]"].to_numpy()
    assert shown == pytest.approx(1000 * expected["viscosity_high_Pa_s"].to_numpy())


def test_negative_shear_rate_gives_a_message():
    at = page("flow_curve").run()
    at.number_input(key="process_shear_rate").set_value(-3.0).run()
    assert not at.exception
    assert "shear_rate" in messages(at) or "shear rate" in messages(at)


def test_shear_rate_unit_follows_the_selector():
    at = page("flow_curve", unit_shear_rate="1/min", process_shear_rate=600.0).run()
    assert not at.exception
    row = _at_rate(demo(), 10.0)
    assert delta(at, "Viscosity [mPa·s]") == "at 600 1/min"
    assert metric(at, "Viscosity [mPa·s]") == widgets.fmt(
        from_si(row["viscosity_Pa_s"], "mPa*s", "viscosity"))


def test_flocculated_solid_shows_its_verdict_and_yield_stress():
    # the ceramic slip with its alumina stated flocculated (A = 4.8e-20 J)
    at = page("flow_curve", scenario="ceramic_slip", ing0_interaction="flocculated",
              ing0_hamaker=4.8).run()
    assert not at.exception
    import dataclasses

    form = demo("ceramic_slip")
    ing = dataclasses.replace(form.ingredients[0], flocculated=True, hamaker_J=4.8e-20)
    form = dataclasses.replace(form, ingredients=(ing, *form.ingredients[1:]))
    tau = fm.flocculation_yield_stress(form)
    assert tau > 0
    assert f"Network yield stress {widgets.fmt(tau, 3)} Pa" in messages(at)
    assert "calcined alumina**: flocculated (stated)" in messages(at)
    row = _at_rate(form, 100.0)
    assert metric(at, "Viscosity [mPa·s]") == widgets.fmt(
        from_si(row["viscosity_Pa_s"], "mPa*s", "viscosity"))
