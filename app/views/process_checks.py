"""Process checks: will it pump, restart, mix, and stay on the wall (predictor.process)."""

import functools
import math

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts, process

state.init()
ss = st.session_state
SYSTEM_POINTS = 60


def _metrics(items: list[tuple]) -> None:
    """Metrics three to a row, so their labels fit beside the input column."""
    for start in range(0, len(items), 3):
        widgets.metric_row(items[start:start + 3])


def _caution() -> None:
    st.warning(process.CAUTION, icon=":material/health_and_safety:")


def _number(label: str, key: str, fmt: str = "%.4g", step: float = 1.0, col=st) -> float:
    value = col.number_input(label, key=key, format=fmt, step=step)
    return float(value) if value is not None else float("nan")


def pipe_panel(scenario: str) -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        flow = _number("Flow rate [L/min]", "pc_flow")
        flow_max = _number("System curve up to [L/min]", "pc_flow_max", step=10.0)
        diameter = _number("Inner diameter [mm]", "pc_diameter")
        length = _number("Length [m]", "pc_length")
        roughness = _number("Wall roughness [mm] (0: smooth hose)", "pc_roughness",
                            fmt="%.3g", step=0.01)
    try:
        if not (math.isfinite(flow_max) and flow_max > 0):
            raise predictor.InputRangeError("system curve up to [L/min]", flow_max,
                                            "a flow rate above 0")
        flows = np.geomspace(flow_max / 100, flow_max, SYSTEM_POINTS)
        args = (diameter / 1e3, length, roughness / 1e3)
        at = compute.pipe_flow(scenario, flow / 6e4, *args)
        curve = compute.pipe_flow(scenario, tuple(flows / 6e4), *args)
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    one, system = at["value"], curve["value"]
    with right:
        _metrics([
            ("Pressure drop [bar]", widgets.fmt(one.pressure_drop_Pa / 1e5),
             "Frictional pressure drop over the length at the flow rate."),
            ("Regime", str(one.regime), "Laminar, transitional or turbulent, from the "
             "Reynolds number against its critical value."),
            ("Reynolds number", widgets.fmt(one.reynolds),
             f"Generalised (Metzner-Reed or Bingham) Reynolds number; critical value "
             f"{one.critical_reynolds:.4g}."),
            ("Wall shear rate [1/s]", widgets.fmt(one.wall_shear_rate_1_per_s), None),
            ("Wall stress [Pa]", widgets.fmt(one.wall_shear_stress_Pa), None),
            ("Restart pressure [bar]", widgets.fmt(one.startup_pressure_Pa / 1e5),
             "Pressure to restart the line standing full: 4 tau_y L / D."),
        ])
        _caution()
        frame = pd.DataFrame({"flow": flows, "pressure": system.pressure_drop_Pa / 1e5,
                              "regime": system.regime})
        build = functools.partial(
            charts.system_curve, frame, x_title="Flow rate [L/min]",
            y_title="Pressure drop [bar]",
            point={"flow": flow, "pressure": one.pressure_drop_Pa / 1e5},
            restart=one.startup_pressure_Pa / 1e5, big=ss["presentation"])
        data = pd.DataFrame(system.rows())
        widgets.chart_block(build(), data, "system-curve", "pc_system")
        restart = (" The dashed line is the restart pressure." if one.startup_pressure_Pa > 0
                   else "")
        st.caption(f"Correlation at the flow rate: {one.correlation}; plug radius "
                   f"{widgets.fmt(1e3 * one.plug_radius_m)} mm; density "
                   f"{widgets.fmt(one.density_kg_per_m3)} kg/m³.{restart} Lay the curve over "
                   "your pump's curve.")
        widgets.show_warnings(at["warnings"] + curve["warnings"])


def mixer_panel(scenario: str) -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        if ss["pc_impeller"] not in process.IMPELLERS:
            ss["pc_impeller"] = state.DEFAULTS["pc_impeller"]
        st.selectbox("Impeller", list(process.IMPELLERS), key="pc_impeller")
        speed = _number("Speed [rpm]", "pc_speed", step=10.0)
        d = _number("Impeller diameter [mm]", "pc_impeller_d", step=10.0)
        tank = _number("Tank diameter [mm]", "pc_tank_d", step=10.0)
    try:
        result = compute.stirred_tank(scenario, speed / 60, d / 1e3, tank / 1e3,
                                      ss["pc_impeller"])
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    mix = result["value"]
    ks, kp, po = process.IMPELLERS[mix.impeller]
    with right:
        _metrics([
            ("Shear rate the mixer sees [1/s]", widgets.fmt(mix.effective_shear_rate_1_per_s),
             f"Metzner-Otto k_s N with k_s = {ks:g} for this impeller (typical value)."),
            (f"Viscosity there [{state.label(ss['unit_viscosity'])}]",
             widgets.viscosity_value(mix.viscosity_Pa_s), None),
            ("Impeller Reynolds number", widgets.fmt(mix.reynolds), f"Regime: {mix.regime}."),
            ("Power number", widgets.fmt(mix.power_number),
             f"K_p/Re in laminar mixing (K_p = {kp:g}); {po:g} when turbulent."),
            ("Power [W]", widgets.fmt(mix.power_W), None),
            ("Cavern", "yes" if mix.cavern else "no",
             "Yes: with a yield stress the moving zone (Elson's cavern"
             + (f", {widgets.fmt(1e3 * mix.cavern_diameter_m)} mm"
                if math.isfinite(mix.cavern_diameter_m) else "")
             + ") does not reach the tank wall."),
        ])
        _caution()
        widgets.show_warnings(result["warnings"])


def coating_panel(scenario: str) -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        h = _number("Wet film thickness [µm]", "pc_thickness", step=10.0)
        wavelength = _number("Brush-mark spacing [mm]", "pc_wavelength", fmt="%.3g", step=0.1)
        sigma = _number("Surface tension [mN/m]", "pc_surface_tension", step=1.0)
    try:
        result = compute.coating(scenario, h / 1e6, wavelength / 1e3, sigma / 1e3)
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    film = result["value"]
    level = ("never" if not math.isfinite(film.levelling_time_s)
             else widgets.fmt(film.levelling_time_s))
    with right:
        _metrics([
            ("Stays on a vertical wall", "yes" if film.stands else "no",
             "Yes when the yield stress exceeds the film's weight stress rho g h."),
            ("Wall stress rho g h [Pa]", widgets.fmt(film.wall_shear_stress_Pa), None),
            ("Yield stress [Pa]", widgets.fmt(film.yield_stress_Pa), None),
            ("Sag velocity [mm/s]", widgets.fmt(1e3 * film.sag_velocity_m_per_s),
             "Speed of the film surface running down the wall, from the flow curve."),
            (f"Levelling time ({process.LEVELLING_FACTOR:g}× flatter) [s]", level,
             "Orchard's levelling with the viscosity at the momentary levelling stress."),
        ])
        if film.residual_amplitude_m > 0:
            st.info(f"The yield stress holds brush marks of about "
                    f"{widgets.fmt(1e6 * film.residual_amplitude_m)} µm.",
                    icon=":material/texture:")
        _caution()
        widgets.show_warnings(result["warnings"])


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    pipe, mixer, film = st.tabs(["Pipe or hose", "Mixer", "Coating"])
    with pipe:
        pipe_panel(scenario)
    with mixer:
        mixer_panel(scenario)
    with film:
        coating_panel(scenario)


widgets.page_header("Process checks", "Will it pump, restart, mix and stay on the wall")
body()
widgets.footer()
