"""Reusable input blocks and page furniture: scenario sidebar, metrics, chart block, messages.

Every widget has a key declared in app/state.py and takes its value from session state
(no `value=` argument), so a loaded scenario or a page switch never fights the widget.
"""

from __future__ import annotations

import functools
import json
import re

import pandas as pd
import streamlit as st

import predictor
from app import compute, state
from predictor import charts, labels, sizes
from predictor import scenario as sc
from predictor.units import from_si, to_si

LIQUID_PRESETS = {"water": "Water", "glycerol-water": "Glycerol–water",
                  "": "Other liquid (flow law)"}
KIND_LABELS = {"solid": "Solid particles", "droplet": "Droplets"}


# --- messages --------------------------------------------------------------------------------


def show_error(err: Exception) -> None:
    """A LoadlineError as a plain message (never a traceback)."""
    st.error(str(err), icon=":material/error:")


def show_warnings(messages) -> None:
    """Warnings from the core, inline; messages differing only in their numbers shown once."""
    seen = set()
    for text in dict.fromkeys(messages or []):
        shape = re.sub(r"[-+]?\d[\d.eE+-]*", "#", text)
        if shape in seen:
            continue
        seen.add(shape)
        st.warning(text, icon=":material/warning:")


def caution_text() -> str:
    return state.CAUTION


def footer() -> None:
    st.divider()
    st.caption(f":material/info: {state.CAUTION}")


def presentation_style() -> None:
    """Large type for a projector when the presentation layout is on."""
    if st.session_state.get("presentation"):
        st.html("""<style>
        html { font-size: 19px; }
        [data-testid="stMetricValue"] { font-size: 2.6rem; }
        [data-testid="stMetricLabel"] p { font-size: 1.05rem; }
        h1 { font-size: 2.4rem !important; }
        </style>""")
    st.html("""<style>
    [data-testid="stMainBlockContainer"] { padding-top: 2.2rem; }
    </style>""")


def page_header(title: str, purpose: str) -> None:
    st.title(title, anchor=False)
    name = st.session_state.get("sc_name") or "Unnamed scenario"
    st.caption(f"{purpose}  ·  Scenario: **{name}**")
    calibration_badge()


def calibration_badge() -> None:
    text = st.session_state.get("calibration_json")
    if not text:
        return
    cal = json.loads(text)
    params = ", ".join(
        f"{labels.name_label(k, ('suspension', 'emulsion'), cal.get('model'))[0]} = {v:.4g}"
        for k, v in cal.get("params", {}).items())
    st.info(f"Calibrated relation in use: **{cal.get('model')}** ({params}), fitted to "
            f"{cal.get('source', 'lab data')}. Reset on the Calibrate page.",
            icon=":material/verified:")


# --- the current scenario --------------------------------------------------------------------


def current_scenario() -> str | None:
    """Canonical JSON of the scenario in the sidebar, or None after showing what is wrong."""
    try:
        text = compute.scenario_json(state.document_text())
    except predictor.LoadlineError as err:
        st.error(f"The scenario in the sidebar cannot be used yet: {err}",
                 icon=":material/error:")
        return None
    st.session_state["scenario_json_current"] = text
    state.save_box()["text"] = text
    return text


def page_body(func):
    """Run a page's body as a fragment: its own widgets rerun only the body, not the sidebar.

    A callback that changes what the sidebar or the page header shows calls
    `request_full_run`; the next body run then reruns the whole app instead.
    """
    @st.fragment
    @functools.wraps(func)
    def body():
        if st.session_state.pop(FULL_RUN_KEY, False):
            st.rerun()
        func()
    return body


FULL_RUN_KEY = "_full_run_requested"


def request_full_run() -> None:
    st.session_state[FULL_RUN_KEY] = True


def slug(name: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-") or "scenario"


# --- sidebar ---------------------------------------------------------------------------------


def _open_uploaded() -> None:
    upload = st.session_state.get("open_file")
    if upload is None:
        return
    try:
        text = read_upload(upload, (".json",))
        state.apply_text(text, source=upload.name)
    except predictor.LoadlineError as err:
        st.session_state["scenario_message"] = f"{upload.name}: {err}"


def _open_demo() -> None:
    path = state.demo_files().get(st.session_state.get("demo_choice"))
    if path is None:
        return
    open_demo_file(path)


def open_demo_file(path) -> None:
    """Open a demo scenario file as the whole scenario (a callback: sidebar and pages)."""
    try:
        form, notes = state.with_notes(sc.read_scenario, path)
        state.apply_formulation(form, source=path.name)
        st.session_state["scenario_warning"] = " ".join(notes)
    except predictor.LoadlineError as err:
        st.session_state["scenario_message"] = str(err)


def read_upload(upload, suffixes: tuple[str, ...], max_bytes: int = state.MAX_UPLOAD_BYTES
                ) -> str:
    """Text of an uploaded file, after checking its size, type and encoding."""
    name = upload.name
    if not name.lower().endswith(suffixes):
        raise predictor.ScenarioError(
            f"{name} has the wrong type; expected a file ending in {' or '.join(suffixes)}.")
    if upload.size > max_bytes:
        raise predictor.ScenarioError(
            f"{name} is {upload.size / 1e6:.1f} MB; the limit is {max_bytes / 1e6:.0f} MB.")
    try:
        return upload.getvalue().decode("utf-8-sig")
    except UnicodeDecodeError:
        raise predictor.ScenarioError(f"{name} is not UTF-8 text.") from None


SECTION_PREFIX = "sb_open_"     # session-state key of a section's open state


def section(label: str, name: str, icon: str):
    """An expander (on the sidebar or a page) whose fields are drawn only while it is open.

    Streamlit reads the whole session state for each widget it draws, so every field drawn
    costs time on every run; a closed section draws none (its values are kept by
    `state.keep_widget_values`). Opening or closing it reruns the app. The open state is
    remembered apart from the widget (key ``"_" + key``), so a label that changes (an
    ingredient's title shows its loading) keeps the section open.
    """
    key = SECTION_PREFIX + name
    return st.expander(label, expanded=bool(st.session_state.get("_" + key, False)), key=key,
                       icon=icon, on_change=_remember_open, args=(key,))


def _remember_open(key: str) -> None:
    st.session_state["_" + key] = bool(st.session_state[key])


def scenario_box() -> None:
    """Open (file or demo) and save the whole scenario."""
    st.subheader("Scenario", anchor=False, divider="gray")
    name = st.session_state.get("sc_name") or "Unnamed scenario"
    st.markdown(f"**{name}**")
    if st.session_state.get("sc_description"):
        st.caption(st.session_state["sc_description"])
    message = st.session_state.get("scenario_message")
    if message:
        st.error(message, icon=":material/error:")
    if st.session_state.get("scenario_warning"):
        st.warning(st.session_state["scenario_warning"], icon=":material/warning:")
    files = section("Open, save, demos", "files", ":material/folder_open:")
    if not files.open:
        return
    with files:
        st.file_uploader("Open a saved scenario (*.loadline.json)", type=["json"],
                         key="open_file", on_change=_open_uploaded,
                         max_upload_size=state.MAX_UPLOAD_BYTES // 1_000_000)
        demos = state.demo_files()
        if "demo_choice" not in st.session_state or \
                st.session_state["demo_choice"] not in demos:
            st.session_state["demo_choice"] = next(iter(demos), None)
        st.selectbox("Demo scenarios (invented)", list(demos), key="demo_choice")
        st.button("Open this demo", key="open_demo", on_click=_open_demo,
                  icon=":material/play_arrow:")
        try:
            text = compute.scenario_json(state.document_text())
        except predictor.LoadlineError:
            text = None
        box = state.save_box()
        box["text"] = text or ""
        # The file is written when the button is pressed, from the box that every page run
        # refreshes (`current_scenario`): a page changed after this sidebar run saves as shown.
        st.download_button(
            "Save scenario", data=functools.partial(box.get, "text", ""),
            disabled=text is None, on_click="ignore",
            file_name=slug(st.session_state.get("sc_name", "")) + sc.SUFFIX,
            mime="application/json", key="save_scenario", icon=":material/download:",
            help="The whole scenario as a .loadline.json file; open it again above.")
        st.text_input("Scenario name", key="sc_name")


def set_value(key: str, value) -> None:
    """Callback: put `value` under `key` (a named function: session state must pickle)."""
    st.session_state[key] = value


def _unit_changed(unit_key: str) -> None:
    ss = st.session_state
    old = ss.get(f"_prev_{unit_key}", state.DEFAULTS[unit_key])
    state.convert_units(unit_key, old, ss[unit_key])
    ss[f"_prev_{unit_key}"] = ss[unit_key]


def units_box() -> None:
    box = section("Units", "units", ":material/straighten:")
    if not box.open:
        return
    with box:
        names = {"unit_viscosity": "Viscosity", "unit_size": "Particle and droplet size",
                 "unit_layer": "Adsorbed layer", "unit_temperature": "Temperature",
                 "unit_density": "Density", "unit_tension": "Interfacial tension",
                 "unit_shear_rate": "Shear rate"}
        for key, (_, choices) in state.UNIT_CHOICES.items():
            st.session_state.setdefault(f"_prev_{key}", st.session_state[key])
            st.selectbox(names[key], choices, key=key, format_func=state.label,
                         on_change=_unit_changed, args=(key,))


def _u(key: str) -> str:
    return state.label(st.session_state[key])


def _law_param_changed(name: str, unit: str, dimension: str | None) -> None:
    ss = st.session_state
    params = json.loads(ss["liq_params_json"] or "{}")
    value = ss[f"liqp_{name}"]
    params[name] = to_si(value, unit, dimension, name) if dimension else float(value)
    ss["liq_params_json"] = json.dumps(params, sort_keys=True)


def liquid_box() -> None:
    ss = st.session_state
    box = section(f"Liquid: {ss['liq_name'] or 'unnamed'}", "liquid", ":material/water_drop:")
    if not box.open:
        return
    with box:
        st.text_input("Name", key="liq_name")
        st.selectbox("Liquid", list(LIQUID_PRESETS), key="liq_preset",
                     format_func=LIQUID_PRESETS.get)
        st.number_input(f"Temperature [{_u('unit_temperature')}]", key="liq_temperature",
                        step=1.0, format="%.2f")
        if ss["liq_preset"] == "glycerol-water":
            st.number_input("Glycerol in the liquid [wt%]", key="liq_glycerol",
                            step=5.0, format="%.1f")
        if ss["liq_preset"] == "":
            law_inputs()
        st.number_input(f"Density [{_u('unit_density')}]", key="liq_density", step=10.0,
                        format="%.4g")
        if any(ss.get(state.ingredient_key(i, "interaction")) == "charged"
               for i in range(int(ss["n_ing"]))):
            st.number_input(f"Salt: ionic strength [{state.SALT_UNIT}]", key="liq_salt",
                            format="%.4g", step=1.0,
                            help="Sets the Debye length that screens charged particles.")
            st.number_input("Relative permittivity (empty: water) [–]",
                            key="liq_permittivity", format="%.3g", step=1.0)


def law_inputs() -> None:
    """Flow law of the liquid and its parameters, built from the registry (kind 'liquid')."""
    ss = st.session_state
    laws = compute.relation_names("liquid")
    if not laws:
        st.caption("Flow laws are not available yet; a Newtonian viscosity is used.")
        laws = ["newtonian"]
    if ss["liq_law"] not in laws:
        st.warning(f"Flow law {ss['liq_law']!r} is not known here; showing {laws[0]!r}.")
        ss["liq_law"] = laws[0]
    st.selectbox("Flow law", laws, key="liq_law")
    spec = compute.spec(ss["liq_law"], "liquid")
    params = json.loads(ss["liq_params_json"] or "{}")
    plist = spec.params if spec else (predictor.Param(
        "viscosity_Pa_s", "Pa*s", (0.0, float("inf")), "viscosity"),)
    defaults = spec.defaults() if spec else {"viscosity_Pa_s": 1e-3}
    for p in plist:
        if p.name in ("shear_rate_1_per_s",):
            continue
        dimension = state.LAW_UNIT_DIMENSIONS.get(p.unit)
        unit = ss["unit_viscosity"] if dimension == "viscosity" else p.unit
        si = float(params.get(p.name, defaults.get(p.name, 0.0)))
        ss[f"liqp_{p.name}"] = state._clean(from_si(si, unit, dimension) if dimension
                                            and dimension != "time" else si)
        shown_unit = state.label(unit) + ("ⁿ" if "Pa*s**n" in p.description else "")
        st.number_input(f"{labels.param_words(p)} [{shown_unit}]", key=f"liqp_{p.name}",
                        format="%.6g", on_change=_law_param_changed,
                        args=(p.name, unit, dimension if dimension != "time" else None),
                        help=f"{p.description[:1].upper()}{p.description[1:]}. Allowed "
                        f"{p.bounds[0]:g} to {p.bounds[1]:g} {labels.param_unit(p)}.")
    st.number_input("Reference temperature of these values "
                    f"[{_u('unit_temperature')}]", key="liq_ref_temperature", format="%.2f")
    st.number_input("Activation temperature E/R [K] (empty: no temperature shift)",
                    key="liq_activation_temperature", format="%.0f")


def _basis_changed(i: int) -> None:
    """Re-express the loading of ingredient i on its new basis (same formulation)."""
    ss = st.session_state
    key = state.ingredient_key(i, "basis")
    new = ss[key]
    old = "volume" if new == "mass" else "mass"
    ss[key] = old
    try:
        summary = compute.summary(compute.scenario_json(state.document_text()))["value"]
        value = summary["mass_fraction" if new == "mass" else "phi"][i]
        ss[state.ingredient_key(i, "loading")] = state._clean(round(100.0 * value, 6))
    except predictor.LoadlineError:
        pass  # keep the number; the page explains what is wrong with the scenario
    ss[key] = new


def _size_stats(size_json: str) -> str:
    try:
        dist = sizes.SizeDistribution.from_dict(json.loads(size_json))
        unit = st.session_state["unit_size"]
        return (f"D50 {from_si(dist.d50_m, unit, 'length'):.3g} {state.label(unit)}, "
                f"{len(dist.diameters_m)} size classes")
    except (predictor.LoadlineError, AttributeError, KeyError, ValueError, TypeError):
        return "a size distribution"


def ingredient_box(i: int) -> None:
    ss = st.session_state
    k = functools.partial(state.ingredient_key, i)
    kind = ss[k("kind")]
    title = (f"{i + 1} · {ss[k('name')]} — {ss[k('loading')]:g} "
             f"{state.BASIS_LABELS.get(ss[k('basis')], '')}")
    box = section(title, f"ing{i}", ":material/grain:" if kind == "solid"
                  else ":material/bubble_chart:")
    if not box.open:
        return
    with box:
        st.text_input("Name", key=k("name"))
        st.radio("Kind", state.KINDS, key=k("kind"), format_func=KIND_LABELS.get,
                 horizontal=True)
        left, right = st.columns([3, 2])
        left.number_input("Loading", key=k("loading"), step=1.0, format="%.4g")
        right.selectbox("Basis", state.BASES, key=k("basis"), format_func=state.BASIS_LABELS.get,
                        on_change=_basis_changed, args=(i,))
        st.number_input(f"Density [{_u('unit_density')}]", key=k("density"), step=10.0,
                        format="%.4g")
        if ss[k("size_json")]:
            st.caption(f"Size: {_size_stats(ss[k('size_json')])} (from Sizes & packing "
                       "or the file).")
            st.button("Use one size instead", key=f"ing{i}_drop_size",
                      on_click=set_value, args=(k("size_json"), ""))
        else:
            st.number_input(f"Diameter [{_u('unit_size')}]", key=k("diameter"),
                            format="%.4g", step=0.1)
        if ss[k("kind")] == "solid":
            st.number_input("Aspect ratio (1 = sphere) [–]", key=k("aspect_ratio"),
                            format="%.3g", step=0.5)
            st.number_input(f"Adsorbed layer thickness [{_u('unit_layer')}]", key=k("layer"),
                            format="%.4g", step=1.0)
            st.number_input("Own packing limit φmax (empty: from sizes) [–]",
                            key=k("phi_max"), format="%.3f", step=0.01)
            interaction_inputs(i)
        else:
            st.number_input(f"Droplet viscosity [{_u('unit_viscosity')}] "
                            "(empty: same as liquid)", key=k("droplet_viscosity"),
                            format="%.4g")
            st.number_input(f"Interfacial tension [{_u('unit_tension')}]", key=k("tension"),
                            format="%.4g")
        st.button("Remove this ingredient", key=f"ing{i}_remove", icon=":material/delete:",
                  on_click=state.remove_ingredient, args=(i,))


def interaction_inputs(i: int) -> None:
    """Particle interactions of solid i: dispersed, charged (potential) or flocculated."""
    ss = st.session_state
    k = functools.partial(state.ingredient_key, i)
    st.selectbox("Particle interactions", state.INTERACTIONS, key=k("interaction"),
                 format_func=state.INTERACTION_LABELS.get)
    if ss[k("interaction")] == "none":
        return
    if ss[k("interaction")] == "charged":
        st.number_input(f"Surface (zeta) potential [{state.POTENTIAL_UNIT}]",
                        key=k("potential"), format="%.3g", step=5.0,
                        help="pH sets it: near the isoelectric point it is close to 0.")
    st.number_input("Hamaker constant across the liquid [×10⁻²⁰ J]", key=k("hamaker"),
                    format="%.3g", step=0.5,
                    help="Typical values: the table on the Particle forces page.")


def interaction_summary(scenario: str) -> None:
    """One line per solid with interactions: its verdict, and the network yield stress."""
    try:
        result = compute.particle_verdicts(scenario)["value"]
    except predictor.LoadlineError as err:
        show_error(err)
        return
    if not result["rows"]:
        return
    parts = []
    for row in result["rows"]:
        how = ("stated" if row["basis"] == "stated"
               else f"barrier {fmt(row['barrier_kT'], 3)} kT")
        parts.append(f"**{row['ingredient']}**: {row['verdict']} ({how})")
    tau = result["yield_stress_Pa"]
    text = "; ".join(parts) + (
        f". Network yield stress {number_text(tau, 'shear stress', 3)} Pa (YODEL), added to "
        "the flow curve."
        if tau > 0 else ". No network yield stress at this loading.")
    st.info(f"Particle forces: {text} Details on the Particle forces page.",
            icon=":material/join_inner:")


def sidebar() -> None:
    """The whole shared sidebar: scenario, units, liquid, ingredients, layout, cautions."""
    with st.sidebar:
        scenario_box()
        units_box()
        liquid_box()
        st.markdown("**Ingredients**")
        for i in range(int(st.session_state["n_ing"])):
            ingredient_box(i)
        st.button("Add ingredient", key="add_ingredient", on_click=state.add_ingredient,
                  icon=":material/add:")
        st.divider()
        st.toggle("Presentation layout (large type)", key="presentation")
        st.warning(state.CAUTION, icon=":material/health_and_safety:")


# --- page furniture --------------------------------------------------------------------------


def metric_row(items: list[tuple]) -> None:
    """Key numbers side by side: (label, value, help[, note under the value]).

    The presentation layout puts at most three in a row, so large type still fits.
    """
    per_row = 3 if st.session_state.get("presentation") else 6
    columns = min(len(items), per_row)
    for start in range(0, len(items), per_row):
        chunk = items[start:start + per_row]
        for col, (label, value, help_text, *note) in zip(st.columns(columns), chunk,
                                                         strict=False):
            col.metric(label, value, help=help_text, border=True,
                       delta=note[0] if note and note[0] else None, delta_color="off",
                       delta_arrow="off")


def chart_block(chart, data: pd.DataFrame, stem: str, key: str, export=None,
                on_select=None) -> None:
    """The chart (a Vega-Lite spec from predictor/charts.py), then downloads of its data (CSV)
    and of the chart itself (PNG, SVG).

    `chart` may be a list of panels sharing an x axis, drawn one under the other; then
    `export` is a zero-argument callable building the joined chart for PNG/SVG.
    `on_select` (a callback) makes a single chart's selections rerun the page; the event
    is in session state under ``f"{key}_chart"``.
    """
    if isinstance(chart, list):
        for k, panel in enumerate(chart):
            st.vega_lite_chart(spec=panel, width="stretch", key=f"{key}_chart{k}")
    elif on_select is not None:
        st.vega_lite_chart(spec=chart, width="stretch", key=f"{key}_chart", on_select=on_select,
                           selection_mode="cell")
    else:
        st.vega_lite_chart(spec=chart, width="stretch", key=f"{key}_chart")
    if export is None:
        export = functools.partial(_same, chart)
    row = st.container(horizontal=True, gap="small")
    row.download_button("Data (CSV)", data=functools.partial(csv_bytes, data),
                        file_name=f"{stem}.csv", mime="text/csv", key=f"{key}_csv",
                        on_click="ignore", icon=":material/table:")
    row.download_button("Chart (PNG)", data=functools.partial(charts.png_of, export),
                        file_name=f"{stem}.png", mime="image/png", key=f"{key}_png",
                        on_click="ignore", icon=":material/image:")
    row.download_button("Chart (SVG)", data=functools.partial(charts.svg_of, export),
                        file_name=f"{stem}.svg", mime="image/svg+xml", key=f"{key}_svg",
                        on_click="ignore", icon=":material/draw:")


def _same(chart):
    return chart


def csv_bytes(frame: pd.DataFrame) -> bytes:
    return frame.to_csv(index=False).encode("utf-8")


def rate_text(value: float) -> str:
    """A shear rate of a pick list (1e-06 -> 1e-06, 100.0 -> 100)."""
    return f"{value:g}"


def fmt(value: float, digits: int = 4) -> str:
    """The one number format of metrics (tests compare against it)."""
    return f"{value:.{digits}g}"


def number_text(value, quantity: str = "", digits: int = 4, spec: str | None = None) -> str:
    """`fmt` (or format `spec`), or words where there is no number (never a bare inf, ∞ or
    nan on screen)."""
    words = labels.value_words(value, quantity)
    if words is not None:
        return words
    return format(float(value), spec) if spec else fmt(float(value), digits)


def table_words(frame: pd.DataFrame) -> pd.DataFrame:
    """`frame` for display: float columns holding an infinite value become text, the numbers
    to 4 significant digits and the infinite ones in words (by the quantity the column
    names); NaN stays an empty cell."""
    out = frame.copy()
    for col in out.columns:
        values = out[col]
        if values.dtype.kind != "f" or not values.abs().eq(float("inf")).any():
            continue
        quantity = labels.quantity_of(str(col))
        out[col] = [("" if v != v else number_text(v, quantity)) for v in values]
    return out


def viscosity_value(value_Pa_s: float) -> str:
    """A viscosity in the chosen unit, without the unit (the label carries it)."""
    if value_Pa_s == float("inf"):
        return "no flow"
    return fmt(from_si(value_Pa_s, st.session_state["unit_viscosity"], "viscosity"))


def viscosity_text(value_Pa_s: float) -> str:
    unit = st.session_state["unit_viscosity"]
    if value_Pa_s == float("inf"):
        return "no flow (jammed)"
    return f"{fmt(from_si(value_Pa_s, unit, 'viscosity'))} {state.label(unit)}"
