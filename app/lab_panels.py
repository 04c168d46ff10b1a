"""The Calibrate page's panels for lab data as it comes: several flow curves in one export,
wall slip from curves at two or more gaps, and thixotropy from step tests.

Layout only: the numbers come from `app/compute.py` (which calls `predictor.labdata` and
`predictor.thixotropy`) and the charts from `predictor/charts.py`.
"""

from __future__ import annotations

import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts

ss = st.session_state

#: Demo files loaded by "Use the demo lab data" (invented; each file says so).
DEMO_FILES = {"cal": "lab_loading_series_relative.csv", "lab_curves": "lab_emulsion_series.csv",
              "lab_slip": "lab_slip_gaps.csv", "lab_step": "lab_step_test.csv"}
LAWS = ("herschel-bulkley", "power-law", "bingham", "casson")
HEADERS = {"yield_stress_Pa": "yield stress [Pa]", "consistency_Pa_s": "consistency K [Pa·sⁿ]",
           "flow_index": "flow index n [–]", "plastic_viscosity_Pa_s": "plastic viscosity [Pa·s]",
           "casson_viscosity_Pa_s": "Casson viscosity [Pa·s]", "phi": "φ [–]",
           "rmse_ln": "rms error (ln)", "points": "points", "series": "series", "note": "note"}


def use_demo() -> None:
    """Load every invented demo lab file into the Calibrate page."""
    for prefix, name in DEMO_FILES.items():
        path = state.DEMO_DIR / name
        ss[f"{prefix}_text"] = path.read_text(encoding="utf-8")
        ss[f"{prefix}_source"] = name
    ss["cal_message"] = ss["lab_message"] = ""
    widgets.request_full_run()          # the loading-series part is another fragment


def _uploaded(prefix: str) -> None:
    upload = ss.get(f"{prefix}_upload")
    if upload is None:
        return
    try:
        ss[f"{prefix}_text"] = widgets.read_upload(upload, (".csv", ".txt"))
        ss[f"{prefix}_source"] = upload.name
        ss["lab_message"] = ""
    except predictor.LoadlineError as err:
        ss["lab_message"] = str(err)


def _upload(prefix: str, label: str, help_text: str) -> bool:
    st.file_uploader(label, type=["csv", "txt"], key=f"{prefix}_upload",
                     on_change=_uploaded, args=(prefix,), help=help_text)
    if ss[f"{prefix}_text"]:
        st.caption(f"Using **{ss[f'{prefix}_source']}**.")
    return bool(ss[f"{prefix}_text"])


def _headers(frame: pd.DataFrame) -> dict:
    config = {}
    for column in frame.columns:
        base, _, end = column.rpartition(" ")
        if end in ("low", "high") and base in HEADERS:
            label = f"{HEADERS[base].split(' [')[0]}, 95 % {end}"
        else:
            label = HEADERS.get(column, column)
        config[column] = (st.column_config.NumberColumn(label, format="%.4g")
                          if frame[column].dtype.kind == "f" else
                          st.column_config.Column(label))
    return config


def flow_curves_panel() -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        have = _upload("lab_curves", "Rheometer export (CSV)",
                       "One or several flow curves: a sample column, or blocks one after "
                       "another (a 'Sample: ...' line, then a header). Units in the headers: "
                       "'shear rate [1/s]', 'shear stress [Pa]' or 'viscosity [mPa*s]'.")
        st.selectbox("Law fitted to each series", LAWS, key="lab_model")
        st.segmented_control("Branch", ["up", "down"], key="lab_branch",
                             help="Ascending or descending sweep of each series.")
    if not have:
        with right:
            st.info("Upload an export with several flow curves, or use the demo lab data.",
                    icon=":material/upload_file:")
        return
    try:
        result = compute.flow_curve_fits(ss["lab_curves_text"], ss["lab_curves_source"],
                                         ss["lab_model"], ss["lab_branch"] or "up")
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value = result["value"]
    with right:
        items = [("Series fitted", f"{value['n_fitted']} of {value['n_series']}", None)]
        if value["trend"]:
            lo, hi = value["trend"]["intervals"]["phi_c"]
            items.append(("φc of the yield stress", widgets.fmt(value["trend"]["params"]["phi_c"]),
                          "Mason et al.'s relation tau_y = 0.51 (Γ/R)(φ − φc)², fitted to the "
                          "yield stresses against φ (95 % interval).", f"{lo:.3f} – {hi:.3f}"))
        widgets.metric_row(items)
        points = value["points"][value["points"]["branch"] == (ss["lab_branch"] or "up")]
        chart = charts.points_and_lines(
            points, value["lines"], x="shear_rate_1_per_s", y="shear_stress_Pa",
            series="series", x_title="Shear rate [1/s]", y_title="Shear stress [Pa]",
            series_title="Series", title=f"Measured (points) and fitted {ss['lab_model']} "
            "(lines)", big=ss["presentation"])
        widgets.chart_block(chart, points, "flow-curves", "labfc")
        st.dataframe(value["table"], hide_index=True, width="stretch",
                     column_config=_headers(value["table"]))
        if value["trend"]:
            trend = charts.points_and_lines(
                value["trend_points"], value["trend_line"], x="phi", y="yield_stress_Pa",
                series="series", x_title="Volume fraction φ [–]", y_title="Yield stress [Pa]",
                series_title="", x_log=False, y_log=False, big=ss["presentation"],
                title="Yield stress against loading")
            widgets.chart_block(trend, value["trend_points"], "yield-stress-trend", "labtr")
        for line in value["candidates"]:
            st.caption(f"Yield stress against φ, {line}")
        widgets.show_warnings(list(value["slip_warnings"].values()) + result["warnings"])


def slip_panel() -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        have = _upload("lab_slip", "Flow curves at two or more gaps (CSV)",
                       "Parallel plates: columns 'shear stress [Pa]', 'shear rate [1/s]' "
                       "(the apparent rim rate) and 'gap [mm]'.")
    if not have:
        with right:
            st.info("Upload the same sample measured at two or more plate gaps to correct "
                    "for wall slip (Yoshimura & Prud'homme).", icon=":material/upload_file:")
        return
    try:
        result = compute.slip_corrected(ss["lab_slip_text"], ss["lab_slip_source"])
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value = result["value"]
    corrected = value["corrected"]
    with right:
        slipping = corrected[corrected["slip_only"]]
        widgets.metric_row([
            ("Gaps", ", ".join(f"{g:g}" for g in value["gaps_mm"]) + " mm", None),
            ("Slip-corrected points", str(int((~corrected["slip_only"]).sum())),
             "Stresses where the sample flows after the slip is taken out."),
            ("Slip only below", widgets.fmt(float(slipping["shear_stress_Pa"].max()))
             + " Pa" if len(slipping) else "–",
             "Up to this stress the apparent flow is all wall slip: the sample slides as a "
             "plug (an apparent yield stress).")])
        chart = charts.points_and_lines(
            value["apparent"], value["line"], x="shear_rate_1_per_s", y="shear_stress_Pa",
            series="series", x_title="Shear rate [1/s]", y_title="Shear stress [Pa]",
            series_title="", title="Apparent curves at each gap (points) and the "
            "slip-corrected curve (line)", big=ss["presentation"])
        widgets.chart_block(chart, corrected, "slip-correction", "labslip")
        widgets.show_warnings(result["warnings"])


def thixotropy_panel() -> None:
    left, right = st.columns([1, 3], gap="large")
    with left:
        have = _upload("lab_step", "Step tests or loops (CSV)",
                       "Step-down tests after a pre-shear: columns 'test', 'pre-shear rate "
                       "[1/s]', 'time [s]', 'shear rate [1/s]', 'shear stress [Pa]'; two or "
                       "more final rates are needed. A test with empty pre-shear cells is a "
                       "rate history from a rested sample, such as a hysteresis loop.")
        st.number_input("Structure to regain [%]", 1.0, 99.9, key="lab_fraction", step=5.0)
        st.number_input("Process shear rate [1/s]", 0.0, 1e7, key="lab_process_rate",
                        help="Pumping, brushing or mixing before the rest.")
        st.number_input("Shear rate after the step [1/s]", 0.0, 1e7, key="lab_view_rate",
                        help="The viscosity against time is shown at this rate.")
    if not have:
        with right:
            st.info("Upload step-down tests (and hysteresis loops) to fit Moore's structure "
                    "kinetics and see how long the product takes to rebuild after a process "
                    "step.",
                    icon=":material/upload_file:")
        return
    try:
        result = compute.thixotropy_fit(ss["lab_step_text"], ss["lab_step_source"],
                                        float(ss["lab_fraction"]) / 100.0,
                                        float(ss["lab_process_rate"]),
                                        float(ss["lab_view_rate"]))
    except predictor.LoadlineError as err:
        with right:
            widgets.show_error(err)
        return
    value = result["value"]
    p, iv = value["params"], value["intervals"]
    with right:
        widgets.metric_row([
            (f"Recovery to {ss['lab_fraction']:g} %", widgets.fmt(value["recovery_s"]) + " s",
             "Time at rest after a long process step at the chosen rate until the structure "
             "is back to the chosen fraction (Moore's model)."),
            ("Build-up rate a", widgets.fmt(p["build_up_rate_1_per_s"]) + " 1/s", None,
             "{:.3g} – {:.3g}".format(*iv["build_up_rate_1_per_s"])),
            ("Structure viscosity c", widgets.fmt(p["structure_viscosity_Pa_s"]) + " Pa·s",
             None, "{:.3g} – {:.3g}".format(*iv["structure_viscosity_Pa_s"]))])
        chart = charts.points_and_lines(
            value["points"], value["lines"], x="time_s", y="shear_stress_Pa", series="series",
            x_title="Time since the step [s]", y_title="Shear stress [Pa]",
            series_title="Test", x_log=False, title="Step tests and loops (points) and "
            "Moore's model fitted to all of them (lines)", big=ss["presentation"])
        widgets.chart_block(chart, value["points"], "step-tests", "labstep")
        history = charts.points_and_lines(
            value["history"].iloc[:0], value["history"], x="time_s", y="viscosity_Pa_s",
            series="series", x_title="Time after the process step [s]",
            y_title="Viscosity [Pa·s]", series_title="", x_log=False,
            title="Viscosity against time after the process step", big=ss["presentation"])
        widgets.chart_block(history, value["history"], "viscosity-recovery", "labhist")
        table = pd.DataFrame([{"constant": compute.param_words(k, "thixotropy", "moore"),
                               "value": v, "95 % low": iv[k][0], "95 % high": iv[k][1]}
                              for k, v in p.items()])
        st.dataframe(table, hide_index=True, width="stretch")
        widgets.show_warnings(result["warnings"])


def body() -> None:
    st.subheader("Lab data as it comes", anchor=False)
    if ss["lab_message"]:
        st.error(ss["lab_message"], icon=":material/error:")
    curves, slip, thixotropy = st.tabs(["Several flow curves", "Wall slip (two or more gaps)",
                                        "Thixotropy (step tests)"])
    with curves:
        flow_curves_panel()
    with slip:
        slip_panel()
    with thixotropy:
        thixotropy_panel()
