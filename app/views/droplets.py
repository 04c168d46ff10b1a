"""Droplets: phase-ratio explorer, both continuous-phase branches, target, breakup size."""

import functools

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts, labels
from predictor.units import from_si, to_si

state.init()
ss = st.session_state
JAMMED = {"mason": "Mason et al.", "princen-kiss": "Princen & Kiss"}
BRANCH_NAMES = {"direct": "as designed", "inverted": "inverted"}
CREAM_DEMO = "hand_cream.loadline.json"


def _open_cream() -> None:
    widgets.open_demo_file(state.DEMO_DIR / CREAM_DEMO)
    widgets.request_full_run()          # the sidebar shows the new scenario


def controls(drops: list[dict]) -> None:
    names = [d["name"] for d in drops]
    if ss["drop_name"] not in names:
        ss["drop_name"] = names[0]
    st.selectbox("Droplet ingredient", names, key="drop_name")
    relations = compute.relation_names("emulsion")
    if ss["droplet_model"] not in relations:
        ss["droplet_model"] = relations[0]
    st.selectbox("Relation for the droplets", relations, key="droplet_model")
    r = state.label(ss["unit_shear_rate"])
    st.number_input(f"Process shear rate [{r}]", key="process_shear_rate", format="%.4g",
                    step=10.0)
    st.slider("Droplet packing limit φmax [–]", min_value=0.5, max_value=0.9, step=0.01,
              key="drop_phi_max", help="Where the emulsion jams into a soft solid.")
    st.toggle("Rigid interface", key="drop_rigid",
              help="Droplets whose interface is immobilised by surfactant behave as rigid "
              "spheres.")
    st.toggle("Thinning", key="drop_thinning",
              help="Below the packing limit, deformed droplets lower the viscosity at the "
              "process shear rate (Llewellin, Mader & Wilson's form for bubbles, generalised "
              "to any viscosity ratio; see the README). Off: the zero-shear value.")
    st.selectbox("Yield stress when jammed", list(JAMMED), key="drop_jammed",
                 format_func=JAMMED.get)
    v = state.label(ss["unit_viscosity"])
    # one under the other: side by side, the branch picker was too narrow to read
    st.number_input(f"Target viscosity [{v}] (empty: none)", key="drop_target", format="%.4g")
    st.selectbox("Target on the branch", list(BRANCH_NAMES), key="drop_branch",
                 format_func=BRANCH_NAMES.get)


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    try:
        drops = compute.droplet_inputs(scenario)
    except predictor.LoadlineError as err:
        widgets.show_error(err)
        return
    if not drops:
        st.info("This scenario has no droplet ingredient. Add one in the sidebar (kind: "
                "Droplets) to explore phase ratios, or open the hand-cream demo.",
                icon=":material/info:")
        st.button("Open the hand-cream demo (invented)", key="drop_open_cream",
                  on_click=_open_cream, icon=":material/science:")
        return
    metrics = st.container()
    left, right = st.columns([1, 3], gap="large")
    with left:
        controls(drops)
    drop = next(d for d in drops if d["name"] == ss["drop_name"])
    if drop["interfacial_tension_N_per_m"] is None:
        with right:
            st.warning(f"Set the interfacial tension of {drop['name']} in the sidebar: the "
                       "capillary number, breakup size and jammed yield stress need it.",
                       icon=":material/warning:")
        return
    v_unit = ss["unit_viscosity"]
    try:
        rate = to_si(ss["process_shear_rate"], ss["unit_shear_rate"], "shear_rate",
                     "process shear rate")
        target = None if ss["drop_target"] is None else to_si(
            ss["drop_target"], v_unit, "viscosity", "target viscosity")
        # A thickened (non-Newtonian) continuous phase counts at the process shear rate.
        eta_c = compute.liquid_viscosity_at(scenario, rate)
        result = compute.phase_ratio(
            (eta_c, drop["droplet_viscosity_Pa_s"],
             drop["interfacial_tension_N_per_m"], drop["sauter_diameter_m"]),
            ss["droplet_model"], rate, float(ss["drop_phi_max"]), bool(ss["drop_rigid"]),
            ss["drop_jammed"], target, ss["drop_branch"], bool(ss["drop_thinning"]))
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value, messages = result["value"], list(result["warnings"])
    sweep = value["sweep"]
    direct = sweep[sweep["branch"] == "direct"].reset_index(drop=True)
    here = None if drop["solids_present"] else int(np.argmin(np.abs(direct["phi"]
                                                                     - drop["phi"])))
    s_unit = ss["unit_size"]
    breakup = value["breakup_diameter_m"]
    with metrics:
        row = direct.iloc[here] if here is not None else None
        widgets.metric_row([
            (f"Viscosity now [{state.label(v_unit)}]",
             "–" if row is None else widgets.viscosity_value(row["viscosity_Pa_s"]),
             "At the droplet fraction of the scenario and the process shear rate.",
             None if row is None else f"regime: {row['regime']}"),
            ("Thinner when continuous", "–" if row is None else
             ("designed" if bool(row["lower_viscosity"]) else "inverted"),
             "Which liquid as the continuous phase gives the thinner emulsion here: the one "
             "designed to be continuous, or the other (inverted)."),
            (f"Largest stable droplet [{state.label(s_unit)}]",
             "no breakup" if not np.isfinite(breakup)
             else widgets.fmt(from_si(breakup, s_unit, "length"), 3),
             "In simple shear at the process shear rate; larger droplets break. "
             + labels.value_words(float("inf"), "breakup diameter").capitalize() + ": "
             "simple shear cannot break droplets that viscous, whatever their size.",
             f"now D32 {widgets.fmt(from_si(drop['sauter_diameter_m'], s_unit, 'length'), 3)}"
             if np.isfinite(breakup) else "viscosity ratio above 4 (simple shear)"),
            ("Deformation thinning", "–" if row is None or row["regime"] == "jammed"
             else f"× {row['thinning_factor']:.3g}",
             "Viscosity with the droplets deformed at the process shear rate over the "
             "zero-shear value (1: no thinning, e.g. rigid droplets or the toggle off).",
             None if row is None else f"Ca {row['capillary_number']:.3g}"),
            ("Fraction for the target", "–" if value["target"] is None
             else f"φ {value['target']:.3f}", "Lowest droplet-liquid fraction that reaches "
             "the target viscosity on the chosen branch."),
        ])
    if drop["solids_present"]:
        messages.append("The scenario also holds solids: the current point is not marked, "
                        "because the phase ratio here counts only the two liquids.")
    frame = pd.DataFrame({
        "phi": sweep["phi"], "branch": sweep["branch"].map(BRANCH_NAMES).fillna(
            sweep["branch"]),
        "viscosity": from_si(sweep["viscosity_Pa_s"].to_numpy(), v_unit, "viscosity"),
        "yield_stress": sweep["yield_stress_Pa"].to_numpy()})
    regimes = (direct.groupby("regime", sort=False)["phi"].agg(["min", "max"]).reset_index()
               .rename(columns={"min": "low", "max": "high"}))
    current = None if row is None else {
        "phi": float(row["phi"]), "viscosity": float(from_si(row["viscosity_Pa_s"], v_unit,
                                                            "viscosity")),
        "yield_stress": float(row["yield_stress_Pa"]), "label": "now"}
    target_mark = None
    if value["target"] is not None and target is not None:
        target_mark = {"phi": value["target"], "viscosity": ss["drop_target"],
                       "label": "target"}
    with right:
        build = functools.partial(
            charts.phase_ratio, frame, y_title=f"Viscosity at the process rate "
            f"[{state.label(v_unit)}]", yield_title="Yield stress [Pa]", regimes=regimes,
            caution=value["caution_band"], current=current, target=target_mark,
            big=ss["presentation"])
        widgets.chart_block(build(), sweep, "phase-ratio", "drops",
                            export=functools.partial(build, joined=True))
        st.caption("Solid line: the droplet liquid dispersed, as designed. Dashed: the other "
                   "way round. Which one forms depends on the emulsifier, the process and the "
                   "order of addition; it is not predicted here.")
        widgets.show_warnings(messages)


widgets.page_header("Droplets", "Phase ratio, which liquid should be continuous, and the "
                    "droplet size a process can make")
body()
widgets.footer()
