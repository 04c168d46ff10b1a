"""Particle forces: salt, potential (pH) and dispersant layer -> energy curve, verdict,
yield stress against loading."""

import functools

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts, interactions
from predictor.units import from_si, to_si

state.init()
ss = st.session_state
SALTS = [float(f"{v:.3g}") for v in np.logspace(-4, 3, 29)]   # mmol/L, 4 steps a decade
VERDICT_STYLE = {"stable": st.success, "weakly flocculated": st.info,
                 "flocculated": st.warning}


def _ingredient_index(name: str) -> int | None:
    for i in range(int(ss["n_ing"])):
        if ss.get(state.ingredient_key(i, "name")) == name:
            return i
    return None


def take_from_ingredient() -> None:
    """Copy the chosen solid's potential, Hamaker constant, layer and the liquid's salt."""
    i = _ingredient_index(ss["pf_ingredient"])
    if i is None:
        return
    k = functools.partial(state.ingredient_key, i)
    ss["pf_potential"] = float(ss.get(k("potential")) or 0.0)
    ss["pf_hamaker"] = float(ss.get(k("hamaker")) or state.INGREDIENT_DEFAULTS["hamaker"])
    layer_m = to_si(float(ss.get(k("layer")) or 0.0), ss["unit_layer"], "length", "layer")
    ss["pf_layer"] = state._clean(layer_m * 1e9)
    ss["pf_salt"] = min(SALTS, key=lambda v: abs(np.log(v / max(ss["liq_salt"] or 1.0, 1e-9))))


def apply_to_scenario() -> None:
    """Write the panel's values into the chosen solid (as charged) and the liquid's salt."""
    i = _ingredient_index(ss["pf_ingredient"])
    if i is None:
        return
    k = functools.partial(state.ingredient_key, i)
    ss[k("interaction")] = "charged"
    ss[k("potential")] = ss["pf_potential"]
    ss[k("hamaker")] = ss["pf_hamaker"]
    ss[k("layer")] = state._clean(from_si(float(ss["pf_layer"] or 0.0) * 1e-9,
                                          ss["unit_layer"], "length"))
    ss["liq_salt"] = ss["pf_salt"]
    widgets.request_full_run()


def controls(solids: list[str]) -> None:
    if ss["pf_ingredient"] not in solids:
        ss["pf_ingredient"] = solids[0]
    st.selectbox("Solid ingredient", solids, key="pf_ingredient")
    if ss["pf_salt"] not in SALTS:
        ss["pf_salt"] = min(SALTS, key=lambda v: abs(np.log(v / max(ss["pf_salt"] or 1, 1e-9))))
    st.select_slider("Salt: ionic strength [mmol/L]", SALTS, key="pf_salt",
                     help="Sets the Debye length: 9.6 nm at 1 mmol/L of a 1:1 salt in water.")
    st.number_input("Surface (zeta) potential [mV]", key="pf_potential", format="%.3g",
                    step=5.0, min_value=-300.0, max_value=300.0,
                    help="The pH sets it: close to 0 near the isoelectric point, typically "
                    "30-60 mV a few pH units away. Measure the zeta potential where you can.")
    st.number_input("Dispersant layer thickness [nm]", key="pf_layer", format="%.3g",
                    step=1.0, min_value=0.0, max_value=1000.0)
    st.number_input("Hamaker constant across the liquid [×10⁻²⁰ J]", key="pf_hamaker",
                    format="%.3g", step=0.5, min_value=0.0, max_value=100.0)
    st.button("Take the ingredient's values", key="pf_take", on_click=take_from_ingredient,
              icon=":material/download:", width="stretch",
              help="Take the sidebar's values for this solid.")
    st.button("Apply to the scenario", key="pf_apply", on_click=apply_to_scenario,
              icon=":material/upload:", width="stretch",
              help="Set this solid to 'charged' with these values, and the liquid's salt.")


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    solids = [ss[state.ingredient_key(i, "name")] for i in range(int(ss["n_ing"]))
              if ss.get(state.ingredient_key(i, "kind")) == "solid"]
    if not solids:
        st.info("This scenario has no solid ingredient. Add one in the sidebar to see the "
                "forces between its particles.", icon=":material/info:")
        return
    metrics = st.container()
    left, right = st.columns([1, 3], gap="large")
    with left:
        controls(solids)
    try:
        result = compute.particle_forces(
            scenario, ss["pf_ingredient"], float(ss["pf_salt"]) * 1e-3,
            float(ss["pf_potential"] or 0.0) * 1e-3, float(ss["pf_layer"] or 0.0) * 1e-9,
            float(ss["pf_hamaker"] or 0.0) * state.HAMAKER_SCALE)
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value = result["value"]
    verdict = value["verdict"]
    with metrics:
        VERDICT_STYLE[verdict["verdict"]](
            f"**{verdict['verdict'].capitalize()}** — criterion: {verdict['criterion']}.",
            icon=":material/join_inner:")
        widgets.metric_row([
            ("Barrier [kT]", widgets.fmt(verdict["barrier_kT"], 3),
             "Highest point of the pair energy between the particles and contact."),
            ("Secondary minimum [kT]", widgets.fmt(verdict["secondary_minimum_kT"], 3),
             "Deepest point beyond the barrier."),
            ("Deepest reachable well [kT]", widgets.fmt(verdict["reachable_well_kT"], 3),
             "Where the particles end up: the primary minimum (contact) when the barrier "
             "does not hold them off."),
            ("Debye length [nm]", widgets.fmt(verdict["debye_length_m"] * 1e9, 3),
             f"κa = {verdict['kappa_a']:.3g}"),
            ("Yield stress now [Pa]", widgets.number_text(value["yield_stress_Pa"],
                                                          "shear stress", 3),
             "YODEL (Flatt & Bowen 2006) at the scenario's loading; 0 when stable or below "
             "percolation.", f"at φ = {value['phi']:.3f}"),
        ])
    with right:
        build = functools.partial(charts.energy_curve, value["energy"],
                                  threshold_kT=interactions.BARRIER_RULE_kT,
                                  big=ss["presentation"])
        st.markdown(f"**Pair energy of two particles of {widgets.fmt(value['diameter_m'] * 1e6, 3)}"
                    " µm (Sauter diameter)**")
        widgets.chart_block(build(), value["energy"], "pair-energy", "pf_energy")
        widgets.show_warnings(result["warnings"] + list(verdict["notes"]))
        loading = value["loading"]
        tau = loading["yield_stress_Pa"]
        shown = loading[(tau > 0) & (tau >= 1e-4 * tau[np.isfinite(tau)].max())]
        if shown.empty:
            st.info("No network yield stress at any loading: the particles stay apart "
                    "(or the loading never reaches percolation).", icon=":material/info:")
        else:
            frame = pd.DataFrame({"phi": shown["phi"], "yield_stress_Pa":
                                  shown["yield_stress_Pa"], "curve": "yield stress (YODEL)"})
            chart = charts.lines(frame, x="phi", y="yield_stress_Pa", series="curve",
                                 x_title="Solids volume fraction φ [–]",
                                 y_title="Yield stress [Pa]", series_title="",
                                 y_log=True, big=ss["presentation"])
            st.markdown("**Yield stress against loading**")
            widgets.chart_block(chart, loading, "yield-stress", "pf_yield")
    with st.expander("Typical Hamaker constants", icon=":material/table:"):
        st.dataframe(compute.hamaker_table(), hide_index=True, width="stretch")
        st.caption("Values from memory of the sources named, not checked against them; the "
                   "oil column is an estimate by the combining relation. Two particles of one "
                   "material always attract (A ≥ 0).")


widgets.page_header("Particle forces", "Dispersed or flocculated: salt, pH and dispersant "
                    "decide, and a flocculated powder builds a yield stress")
body()
widgets.footer()
