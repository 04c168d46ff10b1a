"""Design map: viscosity over two (or three) ingredients' loadings, with process windows."""

import functools
import math

import numpy as np
import pandas as pd
import streamlit as st

import predictor
from app import compute, state, widgets
from predictor import charts
from predictor.units import from_si, to_si

state.init()
ss = st.session_state
LIQUID = -1               # the liquid as a corner of the triangle
MODES = {"plane": "Map of two", "triangle": "Triangle"}
WINDOW_COLUMNS = ["name", "shear rate [1/s]", "max viscosity", "min viscosity"]
CANDIDATE_FIELDS = ("cand_design", "cand_n", "cand_levels", "cand_seed")


def _names() -> list[str]:
    return [str(ss.get(state.ingredient_key(i, "name"), f"ingredient {i + 1}"))
            for i in range(int(ss["n_ing"]))]


def _part_name(k: int) -> str:
    return "the liquid" if k == LIQUID else _names()[k]


def _load_cell() -> None:
    """A click on a map cell puts that recipe's two loadings into the scenario."""
    event = ss.get("map_chart") or {}
    picked = (event.get("selection") or {}).get("cell") or []
    if not picked or not {"x_loading", "y_loading"} <= set(picked[0]):
        return
    basis = ss["map_basis"]
    state.set_loadings({ss["map_x"]: picked[0]["x_loading"], ss["map_y"]: picked[0]["y_loading"]},
                       basis)
    names = _names()
    ss["map_message"] = (f"Loaded {names[ss['map_x']]} {100 * picked[0]['x_loading']:.4g} and "
                         f"{names[ss['map_y']]} {100 * picked[0]['y_loading']:.4g} "
                         f"{state.BASIS_LABELS[basis]} into the scenario.")
    widgets.request_full_run()


def _windows(unit: str) -> tuple[tuple, ...]:
    """The window table as (name, rate, max, min) tuples in SI; rows without a name skipped."""
    shown = pd.DataFrame([{
        "name": w["name"], "shear rate [1/s]": w["shear_rate_1_per_s"],
        "max viscosity": None if w["max_viscosity_Pa_s"] is None else
        from_si(w["max_viscosity_Pa_s"], unit, "viscosity"),
        "min viscosity": None if w["min_viscosity_Pa_s"] is None else
        from_si(w["min_viscosity_Pa_s"], unit, "viscosity")} for w in ss["map_windows"]],
        columns=WINDOW_COLUMNS)
    label = state.label(unit)
    edited = st.data_editor(shown, num_rows="dynamic", hide_index=True, key="map_windows_editor",
                            width="stretch",
                            column_config={
                                "name": st.column_config.TextColumn("Window"),
                                "shear rate [1/s]": st.column_config.NumberColumn(
                                    "Shear rate [1/s]", format="%.4g"),
                                "max viscosity": st.column_config.NumberColumn(
                                    f"Max [{label}]", format="%.4g"),
                                "min viscosity": st.column_config.NumberColumn(
                                    f"Min [{label}]", format="%.4g")})
    out = []
    for row in edited.itertuples(index=False):
        name = "" if row[0] is None or (isinstance(row[0], float) and math.isnan(row[0])) \
            else str(row[0]).strip()
        if not name:
            continue

        def si(value, field):
            if value is None or (isinstance(value, float) and math.isnan(value)):
                return None
            return to_si(float(value), unit, "viscosity", field)
        rate = float("nan") if row[1] is None else float(row[1])
        out.append((name, rate, si(row[2], f"window {name!r} max viscosity"),
                    si(row[3], f"window {name!r} min viscosity")))
    return tuple(out)


def controls(names: list[str]) -> None:
    st.segmented_control("Map", list(MODES), key="map_mode", format_func=MODES.get)
    options = list(range(len(names)))
    if ss["map_mode"] == "triangle":
        if not all(p in options + [LIQUID] for p in ss["map_parts"]):
            ss["map_parts"] = (options[:3] + [LIQUID])[:3]
        st.multiselect("Three parts (corners)", options + [LIQUID], key="map_parts",
                       max_selections=3,
                       format_func=_part_name)
    else:
        for key, default in (("map_x", 0), ("map_y", 1)):
            if ss[key] not in options:
                ss[key] = default
        st.selectbox("Across (x)", options, key="map_x", format_func=names.__getitem__)
        st.selectbox("Up (y)", options, key="map_y", format_func=names.__getitem__)
        unit = state.BASIS_LABELS[ss["map_basis"]]
        a, b = st.columns(2)
        a.number_input(f"x from [{unit}]", 0.0, 100.0, key="map_x_low", step=5.0)
        b.number_input(f"x to [{unit}]", 0.0, 100.0, key="map_x_high", step=5.0)
        a.number_input(f"y from [{unit}]", 0.0, 100.0, key="map_y_low", step=5.0)
        b.number_input(f"y to [{unit}]", 0.0, 100.0, key="map_y_high", step=5.0)
    st.radio("Loadings as", list(state.BASIS_LABELS), key="map_basis", horizontal=True,
             format_func=state.BASIS_LABELS.get)
    st.number_input("Shear rate of the map [1/s]", key="map_rate", format="%.4g", step=10.0)
    st.slider("Grid points per side", 3, 81, key="map_n",
              help="Each point is one full prediction; all points are solved together in "
                   "one vectorised call, so even 81 x 81 takes well under a second.")


@widgets.page_body
def body() -> None:
    scenario = widgets.current_scenario()
    if scenario is None:
        return
    names = _names()
    if len(names) < 2:
        st.info("A design map needs at least two ingredients; add one on the sidebar.",
                icon=":material/add_circle:")
        return
    if ss.get("map_message"):
        st.success(ss["map_message"], icon=":material/check_circle:")
        ss["map_message"] = ""
    metrics = st.container()
    left, right = st.columns([1, 3], gap="large")
    unit = ss["unit_viscosity"]
    with left:
        controls(names)
    with right:
        chart_area = st.container()          # drawn above the window table, filled after it
        st.caption(f"Process windows (viscosity limits in {state.label(unit)}), each checked "
                   "at its own shear rate; add or delete rows as needed.")
        try:
            windows = _windows(unit)
        except predictor.LoadlineError as err:
            widgets.show_error(err)
            return
    try:
        if ss["map_mode"] == "triangle":
            parts = tuple("liquid" if k == LIQUID else int(k) for k in ss["map_parts"])
            result = compute.loading_ternary(scenario, parts, float(ss["map_rate"]),
                                             int(ss["map_n"]), ss["map_basis"], windows)
        else:
            result = compute.loading_map(
                scenario, int(ss["map_x"]), int(ss["map_y"]),
                (ss["map_x_low"] / 100.0, ss["map_x_high"] / 100.0),
                (ss["map_y_low"] / 100.0, ss["map_y_high"] / 100.0), float(ss["map_rate"]),
                int(ss["map_n"]), ss["map_basis"], windows)
    except (predictor.LoadlineError, TypeError) as err:
        with chart_area:
            widgets.show_error(err)
        return
    grid = result["value"]
    eta = grid["viscosity_Pa_s"].to_numpy(dtype=float)
    with metrics:
        items = [("Cells", str(len(grid)), "Each cell is one full prediction of the recipe."),
                 ("Flowing", str(int(np.isfinite(eta).sum())),
                  "Below the packing limit, with room for the liquid."),
                 ("Jammed", str(int((grid["regime"] == "jammed").sum())),
                  "At or beyond the packing limit: no flow.")]
        if "feasible" in grid:
            items.append(("Inside every window", str(int(grid["feasible"].sum())),
                          "Cells whose viscosity passes every window at its shear rate."))
        widgets.metric_row(items)
    with chart_area:
        if ss["map_mode"] == "triangle":
            build = functools.partial(charts.design_triangle, grid, unit, ss["presentation"])
            widgets.chart_block(build(), _table(grid, unit), "design-triangle", "map",
                                export=functools.partial(build, joined=True))
        else:
            build = functools.partial(charts.design_map, grid, unit, ss["presentation"])
            # Frames, not records: Streamlit sends them as Arrow directly (the export, PNG
            # and SVG, is built as plain JSON).
            widgets.chart_block(build(frames=True), _table(grid, unit), "design-map", "map",
                                export=functools.partial(build, joined=True),
                                on_select=_load_cell)
            st.caption("Hover a cell for its values; click a cell to load that recipe into "
                       "the scenario. Grey: no flow (packing limit) or no liquid left.")
        widgets.show_warnings(result["warnings"])
    candidates_box(scenario, names, windows)


# Candidate factors as shown: label -> (factor name for predictor, dimension, unit).
def _factor_choices(names: list[str]) -> dict[str, tuple[str, str, str]]:
    basis = {i: ss.get(state.ingredient_key(i, "basis"), "mass") for i in range(len(names))}
    out = {}
    for i, name in enumerate(names):
        out[f"{name}: loading [{state.BASIS_LABELS[basis[i]]}]"] = (
            f"ingredient {i + 1} loading", "percent", "%")
        out[f"{name}: D50 [µm]"] = (f"ingredient {i + 1} d50", "length", "um")
    out["liquid temperature [°C]"] = ("temperature", "temperature", "degC")
    out["liquid viscosity [mPa·s]"] = ("liquid viscosity", "viscosity", "mPa*s")
    out["glycerol [wt%]"] = ("glycerol", "percent", "%")
    return out


def _si(value: float, dimension: str, unit: str, field: str) -> float:
    if dimension == "percent":
        return float(value) / 100.0
    return to_si(float(value), unit, dimension, field)


def _send(table: dict) -> None:
    """Put the generated candidate table (and its size tables) into the Batch screen."""
    ss["batch_files"] = dict(table)
    ss["batch_table_name"] = next(iter(table))
    ss["batch_message"] = ""
    ss["batch_result"] = None
    ss["map_message"] = (f"The candidate table {next(iter(table))} is ready on the Batch "
                         "screen page: open it and press Screen the candidates.")


def candidates_box(scenario: str, names: list[str], windows: tuple) -> None:
    """Candidates from the scenario: a design over chosen factors, for the batch screen.
    Built only while its section is open: the map's own reruns do not pay for it."""
    box = widgets.section("Candidates for the batch screen", "candidates",
                          ":material/table_view:")
    if not box.open:
        state.keep_widget_values(ss, CANDIDATE_FIELDS)
        return
    with box:
        choices = _factor_choices(names)
        by_factor = {name: label for label, (name, _, _) in choices.items()}
        pair = [ss["map_x"], ss["map_y"]] if ss["map_x"] != ss["map_y"] else [0, 1]
        # Start from the map's two loadings over the map's ranges; edit or add factors.
        rows = pd.DataFrame({"factor": [by_factor[f"ingredient {k + 1} loading"] for k in pair],
                             "low": [ss["map_x_low"], ss["map_y_low"]],
                             "high": [ss["map_x_high"], ss["map_y_high"]]})
        edited = st.data_editor(rows, num_rows="dynamic", hide_index=True, key="cand_factors",
                                column_config={"factor": st.column_config.SelectboxColumn(
                                    "Factor", options=list(choices), required=True),
                                    "low": st.column_config.NumberColumn("From"),
                                    "high": st.column_config.NumberColumn("To")})
        a, b, c, d = st.columns(4)
        a.selectbox("Design", ["full-factorial", "latin-hypercube", "sobol", "halton"],
                    key="cand_design")
        b.number_input("Rows (space-filling)", 1, 10_000, key="cand_n")
        c.number_input("Levels (factorial)", 2, 50, key="cand_levels")
        d.number_input("Seed", 0, 2**31 - 1, key="cand_seed")
        try:
            factors = []
            for row in edited.itertuples(index=False):
                if row.factor not in choices:
                    continue
                name, dimension, unit = choices[row.factor]
                low, high = (float("nan") if v is None else v for v in (row.low, row.high))
                factors.append((name, _si(low, dimension, unit, f"{name} from"),
                                _si(high, dimension, unit, f"{name} to")))
            made = compute.candidates(scenario, tuple(factors), ss["cand_design"],
                                      int(ss["cand_n"]), int(ss["cand_levels"]),
                                      int(ss["cand_seed"]), windows)
        except predictor.LoadlineError as err:
            widgets.show_error(err)
            return
        table = made["value"]
        count = table[next(iter(table))].count(b"\n") - 1
        st.caption(f"{count} candidates, every other field as in the scenario (written beside "
                   "the table as its base scenario); the map's windows become the table's "
                   "windows.")
        row = st.container(horizontal=True, gap="small")
        row.button("Send to the Batch screen", key="cand_send", on_click=_send, args=(table,),
                   icon=":material/send:", type="primary")
        row.download_button("Candidate table (CSV)", data=table[next(iter(table))],
                            file_name=next(iter(table)), mime="text/csv", key="cand_csv",
                            on_click="ignore", icon=":material/download:")
        base = [name for name in table if name.endswith(".loadline.json")]
        if base:
            row.download_button("Its base scenario (JSON)", data=table[base[0]],
                                file_name=base[0], mime="application/json", key="cand_base",
                                on_click="ignore", icon=":material/download:")


def _table(grid: pd.DataFrame, unit: str) -> pd.DataFrame:
    """The map as a table for the CSV download: SI columns plus the viscosity as shown."""
    return grid.assign(**{f"viscosity_{state.label(unit)}": from_si(
        grid["viscosity_Pa_s"].to_numpy(dtype=float), unit, "viscosity")})


widgets.page_header("Design map", "How far the recipe can move before it fails pumping or "
                    "sags: viscosity over two ingredients' loadings, with the process limits")
body()
widgets.footer()
