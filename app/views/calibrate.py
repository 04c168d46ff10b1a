"""Calibrate: fit a relation to lab measurements, then use it on every page."""

import json

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, lab_panels, state, widgets
from predictor import charts

state.init()
ss = st.session_state


PARAM_LABELS = {"phi_max": "φmax", "intrinsic_viscosity": "[η]",
                "huggins_coefficient": "Huggins k", "crowding_factor": "crowding k"}


def _uploaded() -> None:
    upload = ss.get("cal_upload")
    if upload is None:
        return
    try:
        ss["cal_text"] = widgets.read_upload(upload, (".csv", ".txt"))
        ss["cal_source"] = upload.name
        ss["cal_message"] = ""
    except predictor.LoadlineError as err:
        ss["cal_message"] = str(err)


COMPARISON_HEADERS = {
    "model": "Relation", "n_params": "Fitted parameters", "aic": "AIC", "delta_aic": "ΔAIC",
    "akaike_weight": "Akaike weight", "aicc": "AICc", "bic": "BIC",
    "rmse_log": "rms error (ln)", "r2_log": "R² (ln)", "params": "Fitted values",
    "notes": "Notes"}


def _use(fit: dict) -> None:
    """Write the fitted relation into the scenario and mark it as calibrated."""
    ss["model"] = fit["model"]
    for name, value in {**fit["fixed"], **fit["params"]}.items():
        if f"param_{name}" in state.DEFAULTS:
            ss[f"param_{name}"] = float(value)
            if name in state.AUTO_PARAMS:
                ss[f"auto_{name}"] = False
    ss["calibration_json"] = json.dumps({
        "model": fit["model"], "params": fit["params"], "fixed": fit["fixed"] or None,
        "intervals": fit["intervals"], "source": ss["cal_source"],
        "phi": fit["phi"], "relative_viscosity": fit["relative_viscosity"]})
    widgets.request_full_run()          # the page header shows the calibration badge


def _stop() -> None:
    ss["calibration_json"] = ""
    widgets.request_full_run()
    for name in state.AUTO_PARAMS:
        ss[f"auto_{name}"] = True


def upload_box() -> None:
    st.file_uploader("Lab data (CSV, units in the headers)", type=["csv", "txt"],
                     key="cal_upload", on_change=_uploaded,
                     help="Columns such as 'solids [vol%]' or 'solids [wt%]', "
                     "'viscosity [mPa*s]' or 'relative viscosity [-]', optionally "
                     "'shear rate [1/s]'. Lines starting with # are comments.")
    st.button("Use the demo lab data", key="cal_demo", on_click=lab_panels.use_demo,
              icon=":material/science:", help="Invented lab files: a loading series, five "
              "flow curves, curves at three gaps and step tests.")
    if ss.get("cal_message"):
        st.error(ss["cal_message"], icon=":material/error:")
    if ss["cal_text"]:
        st.caption(f"Using **{ss['cal_source']}**.")


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    metrics = st.container()
    left, right = st.columns([1, 3], gap="large")
    with left:
        upload_box()
    if not ss["cal_text"]:
        with right:
            st.info("Upload measured viscosities at several loadings to calibrate the "
                    "relation; the fitted relation and its uncertainty then carry into every "
                    "page.", icon=":material/upload_file:")
        return
    try:
        lab = compute.lab_data(ss["cal_text"], ss["cal_source"], scenario)
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    table = lab["value"]["table"]
    rate = None
    with left:
        if "shear_rate_1_per_s" in table and table["shear_rate_1_per_s"].nunique() > 1:
            rates = sorted(float(r) for r in table["shear_rate_1_per_s"].unique())
            if ss["cal_rate"] not in rates:
                ss["cal_rate"] = rates[0]
            st.selectbox("Measurements at shear rate [1/s]", rates, key="cal_rate",
                         format_func=widgets.rate_text)
            rate = float(ss["cal_rate"])
        names = compute.relation_names("suspension") + compute.relation_names("emulsion")
        if ss["cal_model"] not in names:
            ss["cal_model"] = names[0]
        st.selectbox("Relation to fit", names, key="cal_model")
        st.toggle("Compare every relation (AIC)", key="cal_compare")
    try:
        result = compute.calibrate(ss["cal_text"], ss["cal_source"], scenario, ss["cal_model"],
                                   rate, bool(ss["cal_compare"]))
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
            st.dataframe(table, hide_index=True)
        return
    fit, messages = result["value"], list(result["warnings"]) + lab["warnings"]
    level = f"{100 * fit['confidence']:.0f} %"
    with metrics:
        items = [(PARAM_LABELS.get(name, name), widgets.fmt(value),
                  f"{name}, {level} interval: {fit['intervals'][name][0]:.4g} to "
                  f"{fit['intervals'][name][1]:.4g}",
                  f"{fit['intervals'][name][0]:.4g} – {fit['intervals'][name][1]:.4g}")
                 for name, value in fit["params"].items()]
        items += [("Points", str(fit["n_points"]), None),
                  ("R² (log)", f"{fit['r2']:.4f}", "In log viscosity."),
                  ("AIC", f"{fit['aic']:.2f}", "Lower is better, for the same data.")]
        widgets.metric_row(items)
    with right:
        calibrated = ss["calibration_json"] and json.loads(ss["calibration_json"]).get(
            "model") == fit["model"]
        row = st.container(horizontal=True)
        row.button("Use this calibration on every page", key="cal_use", type="primary",
                   on_click=_use, args=(fit,), icon=":material/check_circle:")
        if ss["calibration_json"]:
            row.button("Stop using the calibration", key="cal_stop", on_click=_stop,
                       icon=":material/undo:")
        if calibrated:
            st.success(f"Every page now uses {fit['model']} as fitted to "
                       f"{ss['cal_source']}.", icon=":material/verified:")
        curve = fit["curve"]
        data = pd.DataFrame({"phi": fit["phi"], "measured": fit["relative_viscosity"],
                             "fitted": fit["fitted"], "residual": fit["residuals"]})
        chart = charts.fit_chart(curve, data, model=fit["model"], level=level,
                                 big=ss["presentation"])
        widgets.chart_block(chart, curve.assign(model=fit["model"]), "calibration", "cal")
        resid = charts.residuals(data, big=ss["presentation"],
                                 x_max=float(curve["phi"].max()) if len(curve) else None)
        widgets.chart_block(resid, data, "calibration-residuals", "resid")
        for note in fit["notes"]:
            messages.append(note)
        widgets.show_warnings(messages)
    if fit["comparison"]:
        st.subheader("Relations compared on the same data", anchor=False)
        comp = widgets.table_words(pd.DataFrame(fit["comparison"]))
        st.dataframe(comp, hide_index=True, width="stretch", column_config={
            c: st.column_config.NumberColumn(COMPARISON_HEADERS.get(c, c), format="%.4g")
            if comp[c].dtype.kind == "f" else st.column_config.Column(
                COMPARISON_HEADERS.get(c, c)) for c in comp.columns})
        st.caption("ΔAIC below about 2: the data support both relations about equally.")
    with st.expander("The measurements as read (SI units)"):
        st.dataframe(table, hide_index=True, width="stretch")
        if np.any(lab["value"]["notes"]):
            for note in lab["value"]["notes"]:
                st.caption(note)


@widgets.page_body
def lab_body() -> None:
    lab_panels.body()


widgets.page_header("Calibrate", "Fit the relation to your own measurements")
body()
lab_body()
widgets.footer()
