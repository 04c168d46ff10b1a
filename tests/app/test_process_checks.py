"""AppTest of the Process checks page: the numbers shown are predictor.process's, passed
through; bad input shows an error, never a traceback."""

from __future__ import annotations

import json

from app import widgets
from predictor import process
from tests.app.conftest import chart_specs, demo, metric, page


def _errors(at):
    return [e.value for e in at.error]


def test_opens_with_the_pipe_numbers_of_the_core():
    at = page("process_checks").run()
    assert not at.exception and not _errors(at)
    flow = process.pipe_flow_of(demo(), 10.0 / 6e4, 0.025, 10.0)
    assert metric(at, "Pressure drop [bar]") == widgets.fmt(flow.pressure_drop_Pa / 1e5)
    assert metric(at, "Regime") == flow.regime
    assert metric(at, "Restart pressure [bar]") == widgets.fmt(flow.startup_pressure_Pa / 1e5)
    assert any(process.CAUTION in w.value for w in at.warning)
    spec = json.dumps(chart_specs(at)[0])
    assert "Pressure drop [bar]" in spec and "Flow rate [L/min]" in spec


def test_changing_the_flow_and_diameter_passes_through():
    at = page("process_checks").run()
    at.number_input(key="pc_flow").set_value(200.0).run()
    at.number_input(key="pc_diameter").set_value(50.0).run()
    assert not at.exception
    flow = process.pipe_flow_of(demo(), 200.0 / 6e4, 0.05, 10.0)
    assert metric(at, "Pressure drop [bar]") == widgets.fmt(flow.pressure_drop_Pa / 1e5)
    assert metric(at, "Reynolds number") == widgets.fmt(flow.reynolds)


def test_mixer_and_coating_numbers_are_the_core():
    at = page("process_checks").run()
    at.number_input(key="pc_speed").set_value(60.0).run()
    assert not at.exception
    tank = process.stirred_tank_of(demo(), 1.0, 0.1, 0.3, "disc turbine")
    assert metric(at, "Power [W]") == widgets.fmt(tank.power_W)
    assert metric(at, "Impeller Reynolds number") == widgets.fmt(tank.reynolds)
    film = process.coating_of(demo(), 100e-6, 1e-3, surface_tension_N_per_m=0.035)
    assert metric(at, "Sag velocity [mm/s]") == widgets.fmt(1e3 * film.sag_velocity_m_per_s)


def test_hostile_values_show_errors_not_tracebacks():
    at = page("process_checks").run()
    for key, value, field in (("pc_diameter", 0.0, "diameter_m"),
                              ("pc_flow", -5.0, "flow_rate_m3_per_s"),
                              ("pc_length", 1e300, "length_m"),
                              ("pc_flow_max", 0.0, "system curve"),
                              ("pc_impeller_d", 400.0, "impeller_diameter_m"),
                              ("pc_speed", -1.0, "rotational_speed_1_per_s"),
                              ("pc_thickness", 0.0, "thickness_m"),
                              ("pc_surface_tension", 1e12, "surface_tension_N_per_m")):
        before = at.session_state[key]
        at.number_input(key=key).set_value(value).run()
        assert not at.exception, key
        assert any(field in e for e in _errors(at)), (key, _errors(at))
        at.number_input(key=key).set_value(before).run()
    assert not _errors(at)
