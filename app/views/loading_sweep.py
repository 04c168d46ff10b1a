"""Loading sweep: viscosity against solids loading, the packing limit and the headroom."""

import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts, labels
from predictor import scenario as sc
from predictor.units import from_si, to_si

state.init()
ss = st.session_state


class _Skip(Exception):
    """The highest loading is not asked for."""


def _clear_calibration() -> None:
    ss["calibration_json"] = ""


def _auto_toggled(name: str) -> None:
    """Turning an estimate off starts the slider at the estimate (within the bounds)."""
    _clear_calibration()
    if ss[f"auto_{name}"]:
        return
    spec = compute.spec(ss["model"], "suspension")
    bounds = next((p.bounds for p in spec.params if p.name == name), (0.0, 1.0))
    try:
        estimate = compute.estimate_of(compute.scenario_json(state.document_text()), name)
    except predictor.LoadlineError:
        estimate = None
    if estimate is not None:
        ss[f"param_{name}"] = round(min(max(float(estimate), bounds[0]), bounds[1]), 4)


def relation_controls(summary: dict | None) -> None:
    """Relation picker and its parameters, built from the registry."""
    names = compute.relation_names("suspension")
    if ss["model"] not in names:
        st.warning(f"Relation {ss['model']!r} is not known; showing {names[0]!r}.")
        ss["model"] = names[0]
    sources = {s.name: s.source for s in predictor.models(kind="suspension")}
    st.selectbox("Relation for the solids", names, key="model", on_change=_clear_calibration)
    spec = compute.spec(ss["model"], "suspension")
    st.caption(f"{sources.get(spec.name, '')}. Valid for {spec.validity}.")
    for p in spec.params:
        key = f"param_{p.name}"
        if p.name in state.AUTO_PARAMS:
            st.toggle(f"{SHORT.get(p.name, p.name)} from sizes and shape", key=f"auto_{p.name}",
                      on_change=_auto_toggled, args=(p.name,))
            if ss[f"auto_{p.name}"]:
                if summary is not None:
                    st.caption(f"Estimate: {SHORT.get(p.name, p.name)} = {summary[p.name]:.4g}")
                continue
        low, high = p.bounds
        value = ss.get(key, spec.defaults().get(p.name, low))
        if value is None or not low <= float(value) <= high:
            st.warning(f"{labels.param_words(p).capitalize()} = {value} lies outside "
                       f"{low:g} to {high:g}; set to the nearest bound.")
            value = low if value is None or float(value) < low else high
        ss[key] = float(value)
        st.slider(labels.param_label(p), min_value=float(low), max_value=float(high),
                  step=_step(low, high), key=key, format="%.3f",
                  on_change=_clear_calibration)
    others = [n for n in names if n != ss["model"]]
    ss["compare_models"] = [n for n in ss["compare_models"] if n in others]
    st.multiselect("Overlay other relations", others, key="compare_models",
                   max_selections=5, placeholder="for comparison")


SHORT = {"phi_max": "φmax", "intrinsic_viscosity": "[η]"}


def _step(low: float, high: float) -> float:
    span = high - low
    return 0.005 if span <= 1.5 else 0.05 if span <= 30 else 1.0


def limit_controls() -> None:
    u = state.label(ss["unit_viscosity"])
    r = state.label(ss["unit_shear_rate"])
    st.toggle("Max loading under a limit", key="find_max",
              help="Solves the flow curve at the shear rate for the loading that meets the "
              "limit; takes a moment with a non-Newtonian liquid, so it runs when asked.")
    if not ss["find_max"]:
        return
    a, b = st.columns(2)
    a.number_input(f"Viscosity limit [{u}]", key="limit_viscosity", format="%.4g",
                   step=100.0)
    b.number_input(f"at shear rate [{r}]", key="limit_shear_rate", format="%.4g", step=1.0)


def _legend_text(result: dict) -> str:
    parts = ["Dashed red: the packing limit used by the relation. Diamond: the current "
             "loading. Dotted grey (when asked): the viscosity limit."]
    estimates = result.get("phi_max_estimates")
    if estimates and not ss["auto_phi_max"]:
        parts.append("φmax is set by hand or by a calibration, so the estimators' range is "
                     "not drawn.")
    elif estimates:
        listed = ", ".join(f"{k} {v:.3f}" for k, v in estimates.items())
        parts.append(f"Orange band: φmax by each packing estimator ({listed}).")
    if result["band"] is not None:
        level = 100 * result.get("band_level", 0.95)
        parts.append(f"Blue band: {level:.0f} % range of the prediction from "
                     f"{'; '.join(result['band_sources']) or 'the parameters'}.")
    return " ".join(parts)


def _in_unit(frame: pd.DataFrame, column: str = "viscosity_Pa_s") -> pd.Series:
    return pd.Series(from_si(frame[column].to_numpy(), ss["unit_viscosity"], "viscosity"),
                     index=frame.index)


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    try:
        summary = compute.summary(scenario)
    except predictor.LoadlineError as err:
        widgets.show_error(err)
        return
    s, messages = summary["value"], list(summary["warnings"])
    if not s["has_solids"]:
        st.info("This scenario has no solid ingredient, so there is no solids loading to "
                "sweep. Add a solid in the sidebar, or explore droplet phase ratios on the "
                "Droplets page.", icon=":material/info:")
        return
    metrics = st.container()
    widgets.interaction_summary(scenario)
    controls, main = st.columns([1, 3], gap="large")
    with controls:
        relation_controls(s)
        limit_controls()
        st.toggle("Show the uncertainty band", key="show_band")
    unit = ss["unit_viscosity"]
    best = None
    try:
        if not ss["find_max"]:
            raise _Skip
        limit_si = to_si(ss["limit_viscosity"], unit, "viscosity", "viscosity limit")
        rate_si = to_si(ss["limit_shear_rate"], ss["unit_shear_rate"], "shear_rate",
                        "shear rate")
        best = compute.max_loading(scenario, limit_si, rate_si, ss["show_band"],
                                   ss["calibration_json"])
        messages += best["warnings"]
        best = best["value"]
    except _Skip:
        pass
    except predictor.LoadlineError as err:
        with controls:
            widgets.show_error(err)
    jammed = s["phi_solids_effective"] >= s["phi_max"]
    with metrics:
        widgets.metric_row([*[
            (f"Viscosity now [{state.label(unit)}]", widgets.viscosity_value(s["viscosity_Pa_s"]),
             "At the current loading, Newtonian (low-shear) view."),
            ("Relative viscosity", widgets.number_text(
                float("inf") if jammed else s["relative_viscosity"], "relative viscosity"),
             "Viscosity of the formulation over that of the liquid."),
            ("Headroom φ/φmax", f"{s['headroom']:.2f}",
             "Effective solids volume fraction over the packing limit; 1 = jammed."),
            ("Packing limit φmax", f"{s['phi_max']:.3f}", "Used by the relation; from the "
             "sizes and shapes unless set by hand."),
            ("Max loading",
             "–" if best is None else best["text_mass"].split(" (")[0],
             "Solids at which the viscosity reaches the limit set beside the chart; as "
             "volume: " + ("–" if best is None else best["text_volume"]),
             None if best is None or "(" not in best["text_mass"]
             else "band " + best["text_mass"].split(" (")[1].rstrip(")") + " wt%"),
        ][: 5 if ss["find_max"] else 4]])
    with main:
        if jammed:
            st.error(
                f"The solids (φ = {s['phi_solids_effective']:.3f}, adsorbed layers included) "
                f"are above the packing limit φmax = {s['phi_max']:.3f}: this would be a damp "
                "powder or a paste, not a flowing suspension. Lower the loading, widen the "
                "size distribution, or set φmax by hand if it was measured.",
                icon=":material/block:")
        try:
            sweep = compute.loading_sweep(scenario, tuple(ss["compare_models"]),
                                          ss["show_band"], ss["calibration_json"])
        except predictor.LoadlineError as err:
            widgets.show_error(err)
            return
        messages += sweep["warnings"]
        curves = sweep["value"]["curves"].copy()
        curves["viscosity"] = _in_unit(curves)
        current = None if jammed else {
            "phi": s["phi_solids_effective"],
            "viscosity": from_si(s["viscosity_Pa_s"], unit, "viscosity"),
            "label": f"now: {widgets.viscosity_text(s['viscosity_Pa_s'])}"}
        limit = None if not ss["find_max"] else {
            "viscosity": ss["limit_viscosity"],
            "label": f"limit {widgets.fmt(ss['limit_viscosity'])} {state.label(unit)}"}
        result = sweep["value"]
        band = None
        if result["band"] is not None:
            band = pd.DataFrame({"phi": result["band"]["phi"],
                                 "low": _in_unit(result["band"], "viscosity_low_Pa_s"),
                                 "high": _in_unit(result["band"], "viscosity_high_Pa_s")})
        chart = charts.loading_sweep(
            curves, y_title=f"Viscosity [{state.label(unit)}]", phi_max=s["phi_max"],
            phi_max_range=result["phi_max_range"] if ss["auto_phi_max"] else None,
            current=current, limit=limit, band=band,
            wt_ticks=result["wt_ticks"], big=ss["presentation"])
        data = curves.rename(columns={"viscosity": f"viscosity_{state.label(unit)}"})
        if band is not None:
            data = data.merge(band.rename(columns={
                "low": f"band_low_{state.label(unit)}", "high": f"band_high_{state.label(unit)}"}),
                on="phi", how="left")
        widgets.chart_block(chart, data, "loading-sweep", "sweep")
        st.caption(_legend_text(result))
        widgets.show_warnings(messages)
    compare_section(unit)


def _add_compare_files() -> None:
    files = ss.get("compare_upload") or []
    kept = list(ss["compare_scenarios"])
    problems = []
    for upload in files:
        try:
            text = widgets.read_upload(upload, (".json",))
            form, notes = state.with_notes(sc.loads, text, upload.name)
            kept.append(sc.dumps(form))
            problems.extend(notes)
        except predictor.LoadlineError as err:
            problems.append(f"{upload.name}: {err}")
    if len(kept) > state.MAX_COMPARE:
        problems.append(f"At most {state.MAX_COMPARE} scenarios are compared; the first "
                        f"{state.MAX_COMPARE} are kept.")
    ss["compare_scenarios"] = kept[: state.MAX_COMPARE]
    ss["compare_message"] = " ".join(problems)


def _add_current() -> None:
    text = ss.get("scenario_json_current")
    if text and len(ss["compare_scenarios"]) < state.MAX_COMPARE:
        ss["compare_scenarios"] = [*ss["compare_scenarios"], text]
    elif text:
        ss["compare_message"] = f"At most {state.MAX_COMPARE} scenarios are compared."


def compare_section(unit: str) -> None:
    with st.expander(f"Compare saved scenarios (up to {state.MAX_COMPARE})",
                     icon=":material/stacked_line_chart:",
                     expanded=bool(ss["compare_scenarios"])):
        a, b, c = st.columns([3, 1, 1])
        a.file_uploader("Add saved scenarios (*.loadline.json)", type=["json"],
                        accept_multiple_files=True, key="compare_upload",
                        on_change=_add_compare_files)
        b.button("Add the current scenario", key="compare_add_current", on_click=_add_current,
                 icon=":material/add:")
        c.button("Clear the comparison", key="compare_clear",
                 on_click=widgets.set_value, args=("compare_scenarios", []),
                 icon=":material/clear_all:")
        if ss.get("compare_message"):
            st.warning(ss["compare_message"])
        if not ss["compare_scenarios"]:
            st.caption("Each scenario is drawn with its own relation and packing limit.")
            return
        try:
            result = compute.compare_sweeps(tuple(ss["compare_scenarios"]))
        except predictor.LoadlineError as err:
            widgets.show_error(err)
            return
        frame = result["value"].copy()
        frame["viscosity"] = _in_unit(frame)
        chart = charts.lines(frame, x="phi", y="viscosity", series="scenario",
                             x_title="Effective solids volume fraction φ [–]",
                             y_title=f"Viscosity [{state.label(unit)}]",
                             series_title="Scenario", y_log=True, big=ss["presentation"])
        widgets.chart_block(chart, frame, "scenario-comparison", "compare")
        widgets.show_warnings(result["warnings"])


widgets.page_header("Loading sweep", "How thick it gets as the solids go up, and how close "
                    "the packing limit is")
body()
widgets.footer()
