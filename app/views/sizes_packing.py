"""Sizes & packing: size distributions, D-values, packing limit by every estimator,
the jamming simulation on demand, and the blend optimiser."""

import json
import threading
import time

import numpy as np
import pandas as pd
import streamlit as st
from streamlit.runtime.scriptrunner import add_script_run_ctx, get_script_run_ctx

import predictor
from app import compute, state, widgets
from predictor import charts
from predictor.units import from_si, to_si

state.init()
ss = st.session_state
SOURCES = {"ingredient": "An ingredient of the scenario", "table": "A measured size table",
           "generated": "A generated distribution"}
KINDS = {"lognormal": "Lognormal (median, geometric std)",
         "rosin-rammler": "Rosin-Rammler (x63, uniformity)"}
THIS = "(the distribution above)"
DEMO_SIZES = "sizes_filler_coarse.csv"


def _use_demo_table() -> None:
    """The invented demo size table, as if uploaded."""
    path = state.DEMO_DIR / DEMO_SIZES
    ss["sz_table_bytes"], ss["sz_table_name"] = path.read_bytes(), path.name
    ss["sz_source"], ss["sz_message"] = "table", ""


def _uploaded() -> None:
    upload = ss.get("sz_upload")
    if upload is None:
        return
    try:
        if upload.size > state.MAX_UPLOAD_BYTES:
            raise predictor.ScenarioError(f"{upload.name} is larger than "
                                          f"{state.MAX_UPLOAD_BYTES / 1e6:.0f} MB.")
        if not upload.name.lower().endswith(".csv"):
            raise predictor.ScenarioError(f"{upload.name} has the wrong type; expected .csv.")
        compute.size_table(upload.getvalue(), upload.name)      # check it now
        ss["sz_table_bytes"], ss["sz_table_name"] = upload.getvalue(), upload.name
        ss["sz_source"], ss["sz_message"] = "table", ""
    except predictor.LoadlineError as err:
        ss["sz_message"] = str(err)


def _assign() -> None:
    """Give the distribution on screen to the chosen ingredient of the scenario."""
    names = {ss[state.ingredient_key(i, "name")]: i for i in range(int(ss["n_ing"]))}
    i = names.get(ss["sz_assign"])
    if i is not None and ss.get("sz_dist_json"):
        ss[state.ingredient_key(i, "size_json")] = ss["sz_dist_json"]
        widgets.request_full_run()      # the sidebar shows the ingredient's sizes


def distribution(solids: list[dict]) -> str | None:
    """The distribution chosen on the left, as JSON; None after showing why not."""
    st.radio("Size distribution from", list(SOURCES), key="sz_source",
             format_func=SOURCES.get)
    st.file_uploader("Size table (CSV: 'size [um]' and 'passing [vol%]' or 'amount [vol%]')",
                     type=["csv"], key="sz_upload", on_change=_uploaded)
    st.button("Use the demo size table (invented)", key="sz_demo", on_click=_use_demo_table,
              icon=":material/science:",
              help=f"{DEMO_SIZES}: an invented coarse filler, 7 size classes.")
    if ss.get("sz_message"):
        st.error(ss["sz_message"], icon=":material/error:")
    source = ss["sz_source"]
    if source == "ingredient":
        if not solids:
            st.info("The scenario has no solid ingredient.")
            return None
        names = [s["name"] for s in solids]
        if ss["sz_ingredient"] not in names:
            ss["sz_ingredient"] = names[0]
        st.selectbox("Ingredient", names, key="sz_ingredient")
        return next(s["dist_json"] for s in solids if s["name"] == ss["sz_ingredient"])
    if source == "table":
        if not ss.get("sz_table_bytes"):
            st.info("Upload a size table above, or use the demo size table.")
            return None
        st.caption(f"Table: **{ss['sz_table_name']}**")
        table = compute.size_table(ss["sz_table_bytes"], ss["sz_table_name"])
        widgets.show_warnings(table["notes"])       # e.g. a table rebinned to bound the work
        return json.dumps(table["dist"], sort_keys=True)
    st.selectbox("Shape", list(KINDS), key="sz_kind", format_func=KINDS.get)
    a, b = st.columns(2)
    a.number_input(f"Size [{state.label(ss['unit_size'])}]", key="sz_size", format="%.4g",
                   step=0.5)
    b.number_input("Spread [–]", key="sz_spread", format="%.3g", step=0.1,
                   help="Geometric standard deviation (lognormal, > 1) or uniformity "
                   "(Rosin-Rammler, > 0).")
    size_m = to_si(ss["sz_size"], ss["unit_size"], "length", "size")
    return json.dumps(compute.generated_sizes(ss["sz_kind"], size_m, float(ss["sz_spread"])),
                      sort_keys=True)


def simulation(dist_json: str) -> None:
    st.subheader("Jamming simulation", anchor=False)
    a, b, c = st.columns([1, 1, 2])
    a.selectbox("Particles", [400, 1000, 2000, 4000], key="sz_particles")
    b.selectbox("Packings (seeds)", [1, 2, 3], key="sz_seeds")
    c.caption("Packs spheres drawn from the distribution until they jam. Takes seconds to "
              "minutes; runs only when asked.")
    if c.button("Run the simulation", key="sz_run", icon=":material/play_arrow:"):
        from predictor import packing

        bar = st.progress(0.0, text="Starting…")
        n_seeds = int(ss["sz_seeds"])
        started = time.perf_counter()
        context = get_script_run_ctx()

        def progress(p: dict) -> None:
            # the simulation calls back from its worker thread: give it this page's context
            add_script_run_ctx(threading.current_thread(), context)
            done = (p["seed_index"] + 0.5) / n_seeds
            bar.progress(min(done, 0.99), text=f"Packing {p['seed_index'] + 1} of {n_seeds}: "
                         f"φ ≈ {p['phi']:.4f}, {time.perf_counter() - started:.0f} s")

        try:
            dist = predictor.sizes.SizeDistribution.from_dict(json.loads(dist_json))
            result = packing.simulate_jamming(dist, n_particles=int(ss["sz_particles"]),
                                              n_seeds=n_seeds, callback=progress)
            ss["sz_sim"] = {"dist": dist_json, "phi": result.phi, "error": result.phi_error,
                            "n": result.n_particles, "seeds": len(result.phi_per_seed),
                            "elapsed_s": result.elapsed_s, "interrupted": result.interrupted,
                            "not_represented": result.volume_not_represented}
        except predictor.LoadlineError as err:
            widgets.show_error(err)
        bar.empty()
    sim = ss.get("sz_sim")
    if sim and sim.get("dist") == dist_json:
        error = "" if not np.isfinite(sim["error"]) else f" ± {sim['error']:.4f}"
        st.success(f"Simulated φmax = {sim['phi']:.4f}{error} ({sim['seeds']} packings of "
                   f"{sim['n']} spheres, {sim['elapsed_s']:.0f} s).", icon=":material/check:")
        if sim["not_represented"] > 0.01:
            st.warning(f"{100 * sim['not_represented']:.1f} % of the volume lies in sizes no "
                       "simulated sphere has; use more particles.", icon=":material/warning:")


def blend_section(dist_json: str | None, solids: list[dict]) -> None:
    st.subheader("Blend optimiser", anchor=False)
    options = [s["name"] for s in solids] + ([THIS] if dist_json else [])
    ss["bl_powders"] = [p for p in ss["bl_powders"] if p in options]
    if not ss["bl_powders"] and len(options) >= 2:
        ss["bl_powders"] = options[:2]
    st.multiselect("Powders to blend (two or three)", options, key="bl_powders",
                   max_selections=3)
    st.toggle("At the scenario's solids loading (adds the viscosity of each blend)",
              key="bl_at_loading")
    chosen = ss["bl_powders"]
    if len(chosen) < 2:
        st.caption("Pick two or three powders.")
        return
    by_name = {s["name"]: s for s in solids}
    dists = tuple(dist_json if n == THIS else by_name[n]["dist_json"] for n in chosen)
    densities = tuple(by_name[n]["density"] if n in by_name else 2500.0 for n in chosen)
    phi_total = sum(s["phi"] for s in solids) if ss["bl_at_loading"] and solids else None
    try:
        result = compute.blend(dists, densities, phi_total)
    except predictor.LoadlineError as err:
        widgets.show_error(err)
        return
    res = result["value"]
    best = res["best_packing_shares"]
    items = [("Densest blend φmax", f"{res['best_phi_max']:.3f}", None)]
    items += [(f"{name} [vol%]", f"{100 * share:.0f}", "Share of the solids volume.")
              for name, share in zip(chosen, best, strict=True)]
    widgets.metric_row(items)
    shares = np.asarray(res["shares"])
    frame = pd.DataFrame(shares * 100, columns=[f"share_{k + 1}" for k in range(len(chosen))])
    frame["phi_max"] = res["phi_max"]
    if res["relative_viscosity"] is not None:
        frame["relative_viscosity"] = res["relative_viscosity"]
        frame["relative_viscosity_farris"] = res["relative_viscosity_farris"]
    chart = charts.blend_curve(frame, names=chosen, big=ss["presentation"])
    widgets.chart_block(chart, frame, "blend", "blend")
    if res["best_farris_shares"] is not None:
        farris = ", ".join(f"{n} {100 * s:.0f} %" for n, s in
                           zip(chosen, res["best_farris_shares"], strict=True))
        eta_r = widgets.number_text(res["best_relative_viscosity_farris"], "relative viscosity")
        st.caption(f"Lowest viscosity in the multimodal (Farris) view: {farris}, relative "
                   f"viscosity {eta_r}.")
    widgets.show_warnings(result["warnings"])


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    try:
        solids = compute.solid_distributions(scenario)
    except predictor.LoadlineError as err:
        widgets.show_error(err)
        return
    metrics = st.container()
    left, right = st.columns([1, 3], gap="large")
    with left:
        try:
            dist_json = distribution(solids)
        except predictor.LoadlineError as err:
            widgets.show_error(err)
            dist_json = None
    ss["sz_dist_json"] = dist_json or ""
    if dist_json:
        try:
            summary = compute.size_summary(dist_json)
        except predictor.LoadlineError as err:
            with right:
                widgets.show_error(err)
            return
        s, unit = summary["value"], ss["unit_size"]
        u = state.label(unit)

        def size(x):
            return widgets.fmt(from_si(x, unit, "length"), 3)

        with metrics:
            widgets.metric_row([(f"D10 [{u}]", size(s["d10_m"]), None),
                                (f"D50 [{u}]", size(s["d50_m"]), None),
                                (f"D90 [{u}]", size(s["d90_m"]), None),
                                ("Span [–]", f"{s['span']:.2f}", "(D90 − D10) / D50"),
                                (f"Sauter D32 [{u}]", size(s["sauter_diameter_m"]), None),
                                ("φmax", f"{s['default']:.3f}",
                                 "Default estimator; the others are shown beside.",
                                 f"range {s['low']:.3f}–{s['high']:.3f}")])
        with right:
            classes = s["classes"]
            long = pd.concat([
                pd.DataFrame({"diameter": from_si(classes["diameter_m"].to_numpy(), unit,
                                                  "length"),
                              "amount": 100 * classes[b].to_numpy(), "basis": name})
                for b, name in (("volume", "volume"), ("number", "number"))])
            marks = pd.DataFrame({"diameter": [from_si(s[k], unit, "length")
                                               for k in ("d10_m", "d50_m", "d90_m")],
                                  "label": ["D10", "D50", "D90"]})
            chart = charts.size_classes(long, marks, x_title=f"Diameter [{u}]",
                                        big=ss["presentation"])
            widgets.chart_block(chart, long, "size-distribution", "sizes")
            est = pd.DataFrame({"method": list(s["estimates"]),
                                "phi_max": list(s["estimates"].values())})
            sim = ss.get("sz_sim")
            if sim and sim.get("dist") == dist_json:
                est = pd.concat([est, pd.DataFrame([{"method": "simulation (run here)",
                                                     "phi_max": sim["phi"]}])])
            widgets.chart_block(charts.estimator_bars(est, big=ss["presentation"]), est,
                                "packing-estimates", "estimates")
            if s["skipped"]:
                st.caption("Left out: " + "; ".join(f"{k}: {v}" for k, v in
                                                    s["skipped"].items()))
            widgets.show_warnings(summary["warnings"])
            names = [ss[state.ingredient_key(i, "name")] for i in range(int(ss["n_ing"]))
                     if ss[state.ingredient_key(i, "kind")] == "solid"]
            if names:
                row = st.container(horizontal=True, vertical_alignment="bottom")
                if ss["sz_assign"] not in names:
                    ss["sz_assign"] = names[0]
                row.selectbox("Give this distribution to", names, key="sz_assign")
                row.button("Use it in the scenario", key="sz_use", on_click=_assign,
                           icon=":material/input:")
            simulation(dist_json)
    with right:
        blend_section(dist_json, solids)


widgets.page_header("Sizes & packing", "Size distributions and how densely they can pack")
body()
widgets.footer()
