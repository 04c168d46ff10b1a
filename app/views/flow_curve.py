"""Flow curve: viscosity and stress against shear rate, process windows, onsets, regimes."""

import functools

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts
from predictor.units import from_si, to_si

state.init()
ss = st.session_state
DECADES = [10.0 ** k for k in range(-6, 7)]
CUSTOM = "(my own shear rate)"


def _pick_process() -> None:
    """Choosing a process step moves the process shear rate into its window."""
    windows = {w[0]: w for w in compute.process_windows()}
    name = ss["flow_process"]
    if name in windows:
        _, low, high = windows[name]
        rate = float(np.sqrt(low * high))          # a representative rate inside the window
        ss["process_shear_rate"] = state._clean(
            from_si(rate, ss["unit_shear_rate"], "shear_rate"))


def controls() -> None:
    r = state.label(ss["unit_shear_rate"])
    names = [CUSTOM] + [w[0] for w in compute.process_windows()]
    if ss["flow_process"] not in names:
        ss["flow_process"] = CUSTOM
    st.selectbox("Process step", names, key="flow_process", on_change=_pick_process)
    st.number_input(f"Process shear rate [{r}]", key="process_shear_rate", format="%.4g",
                    step=10.0)
    a, b = st.columns(2)
    for col, key, text in ((a, "flow_low", "Shear rate from"), (b, "flow_high", "to")):
        if ss[key] not in DECADES:
            ss[key] = state.DEFAULTS[key]
        col.selectbox(f"{text} [1/s]", DECADES, key=key, format_func=widgets.rate_text)
    st.toggle("Show the stress panel", key="flow_show_stress")
    with st.expander("Frictional shear thickening", icon=":material/trending_up:",
                     expanded=ss["thick_onset"] is not None):
        st.number_input("Onset stress [Pa] (empty: no thickening)", key="thick_onset",
                        format="%.4g", step=10.0)
        st.number_input("Frictional jamming point φμ [–] (empty: from φmax)",
                        key="phi_max_frictional", format="%.3f", step=0.01)


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    metrics = st.container()
    widgets.interaction_summary(scenario)
    left, right = st.columns([1, 3], gap="large")
    with left:
        controls()
    low, high = sorted((float(ss["flow_low"]), float(ss["flow_high"])))
    if high <= low:
        high = low * 100
    try:
        rate = to_si(ss["process_shear_rate"], ss["unit_shear_rate"], "shear_rate",
                     "process shear rate")
        result = compute.flow_curve(scenario, low, high, rate)
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value = result["value"]
    messages = result["warnings"] + value["messages"]
    curve, point = value["curve"], value["point"]
    v_unit = ss["unit_viscosity"]
    r_unit = ss["unit_shear_rate"]

    def vis(x):
        return from_si(np.asarray(x, float), v_unit, "viscosity")

    regime = point.get("regime")
    onsets = {k: v for k, v in value["markers"].items()
              if k.endswith("_1_per_s") and np.isfinite(v)}
    with metrics:
        items = [
            (f"Viscosity [{state.label(v_unit)}]",
             widgets.viscosity_value(point["viscosity_Pa_s"]), "At the process shear rate.",
             f"at {widgets.fmt(ss['process_shear_rate'])} {state.label(r_unit)}"),
            ("Shear stress there [Pa]",
             widgets.number_text(point["shear_stress_Pa"], "shear stress"), None),
            ("Regime there", str(regime) if regime is not None else "–",
             "Plateau, thinning, thickening, yield or jammed, from the flow curve."),
            ("Headroom φ/φmax",
             widgets.number_text(curve.attrs.get("headroom"), "headroom", spec=".2f"),
             "Effective solids volume fraction over the packing limit; 1 = jammed."),
        ]
        for key, rate_si in list(onsets.items())[:2]:
            items.append((_marker_label(key) + f" [{state.label(r_unit)}]",
                          widgets.fmt(from_si(rate_si, r_unit, "shear_rate")), None))
        widgets.metric_row(items)
    rates = from_si(curve["shear_rate_1_per_s"].to_numpy(), r_unit, "shear_rate")
    frame = pd.DataFrame({"rate": rates, "viscosity": vis(curve["viscosity_Pa_s"]),
                          "stress": curve["shear_stress_Pa"].to_numpy()})
    if "regime" in curve:
        frame["regime"] = curve["regime"].astype(str).to_numpy()
    windows = pd.DataFrame(compute.process_windows(), columns=["name", "low", "high"])
    windows["low"] = from_si(windows["low"].to_numpy(), r_unit, "shear_rate")
    windows["high"] = from_si(windows["high"].to_numpy(), r_unit, "shear_rate")
    markers = pd.DataFrame([{"rate": from_si(v, r_unit, "shear_rate"),
                             "label": _marker_label(k)} for k, v in onsets.items()])
    drawable = np.isfinite(frame["viscosity"]) & (frame["viscosity"] > 0)
    if not drawable.any():
        headroom = widgets.number_text(curve.attrs.get("headroom"), "headroom", spec=".2f")
        with right:
            st.warning(f"No flow at any shear rate from {widgets.rate_text(low)} to "
                       f"{widgets.rate_text(high)} 1/s: the solids are at or above the packing "
                       f"limit (headroom φ/φmax = {headroom}), so there is no flow curve to "
                       "draw. Lower the loading on the sidebar.",
                       icon=":material/block:")
            widgets.show_warnings(messages)
        process_table()
        return
    with right:
        build = functools.partial(
            charts.flow_curve, frame, windows=windows,
            x_title=f"Shear rate [{state.label(r_unit)}]",
            y_title=f"Viscosity [{state.label(v_unit)}]",
            stress_title="Shear stress [Pa]" if ss["flow_show_stress"] else None,
            selected=ss["flow_process"], markers=markers,
            point={"rate": from_si(point["shear_rate_1_per_s"], r_unit, "shear_rate"),
                   "viscosity": float(vis(point["viscosity_Pa_s"])),
                   "stress": point["shear_stress_Pa"]},
            big=ss["presentation"])
        data = curve.assign(**{f"viscosity_{state.label(v_unit)}": frame["viscosity"]})
        widgets.chart_block(build(), data, "flow-curve", "flow",
                            export=functools.partial(build, joined=True))
        widgets.show_warnings(messages)
    process_table()


def _marker_label(key: str) -> str:
    return key.removesuffix("_1_per_s").replace("_", " ").capitalize()


def process_table() -> None:
    st.subheader("Viscosity in each process window", anchor=False)
    try:
        table = compute.process_table(ss["scenario_json_current"])
    except predictor.LoadlineError as err:
        widgets.show_error(err)
        return
    raw = table["value"]
    v_unit, r_unit = ss["unit_viscosity"], ss["unit_shear_rate"]
    v, r = state.label(v_unit), state.label(r_unit)
    frame = pd.DataFrame({
        "Process": raw["process"],
        f"From [{r}]": from_si(raw["low_1_per_s"].to_numpy(), r_unit, "shear_rate"),
        f"To [{r}]": from_si(raw["high_1_per_s"].to_numpy(), r_unit, "shear_rate"),
        f"Viscosity at the low end [{v}]": from_si(raw["viscosity_low_Pa_s"].to_numpy(),
                                                   v_unit, "viscosity"),
        f"Viscosity at the high end [{v}]": from_si(raw["viscosity_high_Pa_s"].to_numpy(),
                                                    v_unit, "viscosity"),
        "Regime (low → high)": [a if a == b else f"{a} → {b}"
                                for a, b in zip(raw["regime_low"], raw["regime_high"],
                                                strict=True)],
    })
    frame = widgets.table_words(frame)
    st.dataframe(frame, hide_index=True, width="stretch",
                 column_config={c: st.column_config.NumberColumn(format="%.4g")
                                for c in frame.columns[1:5] if frame[c].dtype.kind == "f"})
    st.download_button("Table (CSV)", data=functools.partial(widgets.csv_bytes, raw),
                       file_name="process-windows.csv", mime="text/csv", key="process_csv",
                       on_click="ignore", icon=":material/table:")
    widgets.show_warnings(table["warnings"])


widgets.page_header("Flow curve", "How the viscosity changes with shear, from storage to "
                    "spraying")
body()
widgets.footer()
