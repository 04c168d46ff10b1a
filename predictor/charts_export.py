"""Altair charts for files (the report), exported offline through vl-convert.

DataFrame in, chart out; no physics. The app keeps its own builders in `app/charts.py`
(the package `predictor` never imports the app). Colours are the Okabe-Ito palette.
"""

from __future__ import annotations

import altair as alt
import pandas as pd

BLUE, VERMILLION, GREEN, GREY = "#0072B2", "#D55E00", "#009E73", "#7F7F7F"
WIDTH, HEIGHT = 560, 300


def _style(chart):
    return (chart.configure_axis(labelFontSize=11, titleFontSize=12, grid=True,
                                 gridColor="#E6E6E6", titleFontWeight="normal")
            .configure_title(fontSize=14, anchor="start", fontWeight="normal")
            .configure_view(strokeWidth=0))


def flow_curve_chart(curve: pd.DataFrame, viscosity_unit: str):
    """Viscosity against shear rate, both log scales.

    `curve` has columns ``shear rate [1/s]`` and ``viscosity [unit]``, and optionally
    ``low`` / ``high`` (a band). Field names with brackets would read as nested fields in
    Vega-Lite, so the data are renamed to plain names inside the chart.
    """
    y = f"viscosity [{viscosity_unit}]"
    data = pd.DataFrame({"rate": curve["shear rate [1/s]"], "eta": curve[y]})
    if {"low", "high"} <= set(curve.columns):
        data["low"], data["high"] = curve["low"], curve["high"]
    base = alt.Chart(data).encode(
        x=alt.X("rate:Q", scale=alt.Scale(type="log"), title="shear rate [1/s]"))
    layers = []
    if "low" in data:
        layers.append(base.mark_area(color=BLUE, opacity=0.18).encode(
            y=alt.Y("low:Q", scale=alt.Scale(type="log")), y2="high:Q"))
    layers.append(base.mark_line(color=BLUE, strokeWidth=2.5).encode(
        y=alt.Y("eta:Q", scale=alt.Scale(type="log", zero=False), title=y)))
    chart = alt.layer(*layers).properties(width=WIDTH, height=HEIGHT, title="Flow curve")
    return _style(chart)


def loading_sweep_chart(sweep: pd.DataFrame, viscosity_unit: str, phi_current: float,
                        phi_max: float, packing_range: tuple[float, float] | None = None):
    """Viscosity against solids volume fraction, with the current loading, phi_max and the
    range of the packing estimators shaded.

    `sweep` has ``phi solids [-]``, ``viscosity [unit]`` and optionally ``low``/``high``.
    """
    y = f"viscosity [{viscosity_unit}]"
    data = pd.DataFrame({"phi": sweep["phi solids [-]"], "eta": sweep[y]})
    if {"low", "high"} <= set(sweep.columns):
        data["low"], data["high"] = sweep["low"], sweep["high"]
    base = alt.Chart(data).encode(x=alt.X("phi:Q", title="solids volume fraction phi [-]"))
    layers = []
    if packing_range is not None:
        shade = pd.DataFrame({"low": [packing_range[0]], "high": [packing_range[1]]})
        layers.append(alt.Chart(shade).mark_rect(color=GREY, opacity=0.15).encode(
            x="low:Q", x2="high:Q"))
    if "low" in data:
        layers.append(base.mark_area(color=BLUE, opacity=0.18).encode(
            y=alt.Y("low:Q", scale=alt.Scale(type="log")), y2="high:Q"))
    layers.append(base.mark_line(color=BLUE, strokeWidth=2.5).encode(
        y=alt.Y("eta:Q", scale=alt.Scale(type="log"), title=y)))
    marks = pd.DataFrame({"phi": [phi_current, phi_max],
                          "label": ["current loading", "phi_max (used)"]})
    layers.append(alt.Chart(marks).mark_rule(strokeDash=[5, 3], strokeWidth=1.5).encode(
        x="phi:Q", color=alt.Color("label:N", title=None, scale=alt.Scale(
            domain=["current loading", "phi_max (used)"], range=[VERMILLION, GREEN]))))
    title = "Loading sweep" + (" (grey: range of the packing estimators)"
                               if packing_range is not None else "")
    chart = alt.layer(*layers).properties(width=WIDTH, height=HEIGHT, title=title)
    return _style(chart)


def to_svg(chart) -> str:
    """SVG text of a chart (Altair, or a Vega-Lite dict), rendered offline by vl-convert
    (fonts bundled, no network)."""
    import json

    import vl_convert

    return vl_convert.vegalite_to_svg(json.dumps(chart) if isinstance(chart, dict)
                                      else chart.to_json())


# --- design-space maps (also drawn by the app: app/charts.py calls these builders) ---------

MAP_LINE_COLOURS = ["#D55E00", "#CC79A7", "#E69F00", "#56B4E9", "#0072B2", "#F0E442"]
PACKING_LINE = "packing limit"
FEASIBLE_LINE = "feasible region"
NO_FLOW = "#4D4D4D"


def boundary_segments(x, y, mask) -> pd.DataFrame:
    """Cell edges of a regular grid where a boolean field changes: x, y, x2, y2.

    `x`, `y` are the cell centres (any order, each pair once); the edges lie half a step
    from the centres, so the segments outline the region where `mask` is true.
    """
    import numpy as np

    x, y, mask = (np.asarray(v) for v in (x, y, mask))
    xs, ys = np.unique(x), np.unique(y)
    if xs.size < 2 or ys.size < 2:
        return pd.DataFrame(columns=["x", "y", "x2", "y2"])
    grid = np.zeros((ys.size, xs.size), dtype=bool)
    grid[np.searchsorted(ys, y), np.searchsorted(xs, x)] = mask.astype(bool)
    dx, dy = (xs[-1] - xs[0]) / (xs.size - 1), (ys[-1] - ys[0]) / (ys.size - 1)
    pad = np.pad(grid, 1)                              # outside the map counts as False
    rows = []
    vertical = pad[1:-1, 1:] != pad[1:-1, :-1]         # between column i-1 and i
    for j, i in zip(*np.nonzero(vertical), strict=True):
        edge = xs[0] + (i - 0.5) * dx
        if 0 < i < xs.size:                            # the map's own frame is not a limit
            rows.append((edge, ys[j] - dy / 2, edge, ys[j] + dy / 2))
    horizontal = pad[1:, 1:-1] != pad[:-1, 1:-1]
    for j, i in zip(*np.nonzero(horizontal), strict=True):
        edge = ys[0] + (j - 0.5) * dy
        if 0 < j < ys.size:
            rows.append((xs[i] - dx / 2, edge, xs[i] + dx / 2, edge))
    return pd.DataFrame(rows, columns=["x", "y", "x2", "y2"])


def design_map_chart(cells: pd.DataFrame, *, x_title: str, y_title: str, colour_title: str,
                     windows=(), current: dict | None = None, width=WIDTH, height=HEIGHT,
                     selectable: bool = False, title: str | None = "Design map") -> dict:
    """Viscosity over two loadings: log-coloured cells, packing limit, window limits.

    `cells` has x, y (the loadings as shown), value (viscosity in the shown unit; NaN or inf
    where there is no flow), headroom (phi/phi_max), regime, and optionally x_loading,
    y_loading (what a click selects), feasible and one bool column per window. `windows`:
    (label, column) pairs. `current`: {"x", "y"} of the scenario's own recipe. Returns the
    Vega-Lite spec as a dict; with `selectable`, clicking a cell selects it (param "cell").
    """
    import numpy as np

    data = cells.replace([np.inf, -np.inf], np.nan).copy()
    xs, ys = np.unique(data["x"]), np.unique(data["y"])
    dx = (xs[-1] - xs[0]) / max(xs.size - 1, 1)
    dy = (ys[-1] - ys[0]) / max(ys.size - 1, 1)
    data["x0"], data["x1"] = data["x"] - dx / 2, data["x"] + dx / 2
    data["y0"], data["y1"] = data["y"] - dy / 2, data["y"] + dy / 2
    x_scale = alt.Scale(domain=[float(xs[0] - dx / 2), float(xs[-1] + dx / 2)], nice=False,
                        zero=False)
    y_scale = alt.Scale(domain=[float(ys[0] - dy / 2), float(ys[-1] + dy / 2)], nice=False,
                        zero=False)
    x_enc = alt.X("x0:Q", scale=x_scale, title=x_title)
    y_enc = alt.Y("y0:Q", scale=y_scale, title=y_title)
    tips = [alt.Tooltip("x:Q", format=".4g", title=x_title),
            alt.Tooltip("y:Q", format=".4g", title=y_title),
            alt.Tooltip("value:Q", format=".4g", title=colour_title),
            alt.Tooltip("headroom:Q", format=".3f", title="φ/φmax"),
            alt.Tooltip("regime:N", title="regime")]
    if "feasible" in data:
        tips.append(alt.Tooltip("feasible:N", title="inside every window"))
    flowing = data[data["value"].notna() & (data["value"] > 0)]
    layers = []
    heat = alt.Chart(flowing).mark_rect().encode(
        x=x_enc, x2="x1:Q", y=y_enc, y2="y1:Q", tooltip=tips,
        color=alt.Color("value:Q", title=colour_title,
                        scale=alt.Scale(type="log", scheme="viridis"),
                        legend=alt.Legend(orient="right", direction="vertical",
                                          format=",~g", gradientLength=220)))
    if selectable:
        heat = heat.add_params(alt.selection_point(name="cell", on="click", clear="dblclick",
                                                   fields=["x_loading", "y_loading"]))
    layers.append(heat)
    stopped = data[~(data["value"].notna() & (data["value"] > 0))]
    if len(stopped):
        layers.append(alt.Chart(stopped).mark_rect(color=NO_FLOW, opacity=0.85).encode(
            x=x_enc, x2="x1:Q", y=y_enc, y2="y1:Q", tooltip=tips))
    if "feasible" in data and data["feasible"].any():
        # Stippled, so the colours keep their meaning under the shading.
        layers.append(alt.Chart(data[data["feasible"].astype(bool)]).mark_point(
            shape="circle", filled=True, color="#FFFFFF", stroke=GREEN, strokeWidth=1,
            opacity=0.9, size=40).encode(x=alt.X("x:Q", scale=x_scale, title=x_title),
                                         y=alt.Y("y:Q", scale=y_scale, title=y_title),
                                         tooltip=tips))
    # Drawn in this order: the feasible outline (wide, underneath), the windows (dashed),
    # the packing limit on top; where limits coincide each stays visible.
    lines = []
    if "feasible" in data:
        lines.append((FEASIBLE_LINE, data["feasible"].astype(bool), GREEN, 6, [1, 0]))
    lines += [(label, data[column].astype(bool), colour, 2.5, [7, 4])
              for (label, column), colour in zip(windows, MAP_LINE_COLOURS, strict=False)]
    lines.append((PACKING_LINE, data["headroom"].fillna(np.inf) < 1.0, "#000000", 3, [1, 0]))
    drawn = [(label, colour, width, dash,
              boundary_segments(data["x"], data["y"], mask).assign(line=label))
             for label, mask, colour, width, dash in lines]
    drawn = [item for item in drawn if len(item[4])]   # only limits that cross the map
    scale = alt.Scale(domain=[d[0] for d in drawn], range=[d[1] for d in drawn])
    limits = [alt.Chart(segments).mark_rule(strokeWidth=width, strokeDash=dash).encode(
        x=alt.X("x:Q", scale=x_scale, title=x_title), x2="x2:Q",
        y=alt.Y("y:Q", scale=y_scale, title=y_title), y2="y2:Q",
        color=alt.Color("line:N", title="Limits", scale=scale,
                        legend=alt.Legend(orient="bottom", direction="horizontal",
                                          symbolStrokeWidth=3)))
        for _label, _colour, width, dash, segments in drawn]
    if limits:                  # one legend for all limits, apart from the colour bar
        layers.append(alt.layer(*limits))
    if current is not None:
        dot = pd.DataFrame([{"x": float(current["x"]), "y": float(current["y"]),
                             "label": "current recipe"}])
        base = alt.Chart(dot).encode(x=alt.X("x:Q", scale=x_scale, title=x_title),
                                     y=alt.Y("y:Q", scale=y_scale, title=y_title))
        layers.append(base.mark_point(shape="diamond", filled=True, color="#FFFFFF",
                                      stroke="#000000", strokeWidth=1.5, size=180))
        layers.append(base.mark_text(align="left", dx=10, dy=-10, color="#000000",
                                     fontWeight="bold").encode(text="label:N"))
    chart = alt.layer(*layers).resolve_scale(color="independent").properties(
        width=width, height=height)
    if title:
        chart = chart.properties(title=title)
    return _style(chart).to_dict(validate=False)


def ternary_chart(cells: pd.DataFrame, *, parts: list[str], colour_title: str,
                  current: dict | None = None, width=WIDTH, height=HEIGHT,
                  title: str | None = "Design triangle") -> dict:
    """Viscosity over a triangle of three parts' shares (share_1..3 sum to 1).

    `cells` has share_1, share_2, share_3, value (viscosity as shown; NaN or inf where there
    is no flow), headroom, regime and optionally feasible. Part 1 sits at the lower left
    corner, part 2 at the lower right, part 3 at the top. Returns the Vega-Lite spec.
    """
    import numpy as np

    data = cells.replace([np.inf, -np.inf], np.nan).copy()
    data["tx"] = data["share_2"] + data["share_3"] / 2
    data["ty"] = data["share_3"] * np.sqrt(3) / 2
    n = int(round(1.0 / data["share_1"][data["share_1"] > 0].min())) + 1 if (
        data["share_1"] > 0).any() else 2
    size = (0.8 * min(width if isinstance(width, int | float) else WIDTH, height) / n) ** 2
    axis = alt.Axis(labels=False, ticks=False, grid=False, domain=False, title=None)
    scale = alt.Scale(domain=[-0.08, 1.08], nice=False)
    x_enc = alt.X("tx:Q", scale=scale, axis=axis)
    y_enc = alt.Y("ty:Q", scale=alt.Scale(domain=[-0.08, 0.95], nice=False), axis=axis)
    tips = [alt.Tooltip(f"share_{k}:Q", format=".0%", title=parts[k - 1]) for k in (1, 2, 3)]
    tips += [alt.Tooltip("value:Q", format=".4g", title=colour_title),
             alt.Tooltip("headroom:Q", format=".3f", title="φ/φmax"),
             alt.Tooltip("regime:N", title="regime")]
    if "feasible" in data:
        tips.append(alt.Tooltip("feasible:N", title="inside every window"))
    flowing = data["value"].notna() & (data["value"] > 0)
    layers = [alt.Chart(data[flowing]).mark_point(shape="triangle-up", filled=True, opacity=1,
                                                  size=size).encode(
        x=x_enc, y=y_enc, tooltip=tips,
        color=alt.Color("value:Q", title=colour_title,
                        scale=alt.Scale(type="log", scheme="viridis"),
                        legend=alt.Legend(orient="right", direction="vertical",
                                          format=",~g")))]
    if (~flowing).any():
        layers.append(alt.Chart(data[~flowing]).mark_point(
            shape="triangle-up", filled=True, opacity=0.85, color=NO_FLOW, size=size).encode(
            x=x_enc, y=y_enc, tooltip=tips))
    if "feasible" in data and data["feasible"].any():     # stippled, as on the map
        layers.append(alt.Chart(data[data["feasible"].astype(bool)]).mark_point(
            shape="circle", filled=True, color="#FFFFFF", stroke=GREEN, strokeWidth=1,
            opacity=0.9, size=40).encode(x=x_enc, y=y_enc, tooltip=tips))
    h = np.sqrt(3) / 2
    frame = pd.DataFrame({"tx": [0.0, 1.0, 0.5, 0.0], "ty": [0.0, 0.0, h, 0.0],
                          "order": [0, 1, 2, 3]})
    layers.append(alt.Chart(frame).mark_line(color="#000000", strokeWidth=1.2).encode(
        x=x_enc, y=y_enc, order="order:Q"))
    corners = pd.DataFrame({"tx": [0.0, 1.0, 0.5], "ty": [-0.05, -0.05, h + 0.04],
                            "label": parts})
    layers.append(alt.Chart(corners).mark_text(fontWeight="bold").encode(
        x=x_enc, y=y_enc, text="label:N"))
    if current is not None and all(np.isfinite(current.get(f"share_{k}", np.nan))
                                   for k in (1, 2, 3)):
        dot = pd.DataFrame([{"tx": current["share_2"] + current["share_3"] / 2,
                             "ty": current["share_3"] * h, "label": "current recipe"}])
        layers.append(alt.Chart(dot).mark_point(shape="diamond", filled=True, color="#FFFFFF",
                                                stroke="#000000", strokeWidth=1.5,
                                                size=180).encode(x=x_enc, y=y_enc))
        layers.append(alt.Chart(dot).mark_text(align="left", dx=10, dy=-10,
                                                fontWeight="bold").encode(
            x=x_enc, y=y_enc, text="label:N"))
    chart = alt.layer(*layers).resolve_scale(color="independent").properties(
        width=width, height=height)
    if title:
        note = "grey: no flow (packing limit) or no liquid"
        if "feasible" in data:
            note += "; white dots: inside every window"
        chart = chart.properties(title=alt.TitleParams(title, subtitle=note))
    return _style(chart).to_dict(validate=False)


def _shown_cells(grid: pd.DataFrame, viscosity_unit: str) -> pd.DataFrame:
    from .units import from_si

    cells = pd.DataFrame({
        "value": from_si(grid["viscosity_Pa_s"].to_numpy(dtype=float), viscosity_unit,
                         "viscosity"),
        "headroom": grid["phi_over_phi_max"].to_numpy(dtype=float),
        "regime": grid["regime"].astype(str).to_numpy()})
    for w in grid.attrs.get("windows", []):
        cells[w["column"]] = grid[f"{w['column']}_pass"].to_numpy()
    if "feasible" in grid:
        cells["feasible"] = grid["feasible"].to_numpy()
    return cells


def loading_map_chart(grid: pd.DataFrame, viscosity_unit: str = "Pa*s", *, width=WIDTH,
                      height=HEIGHT, selectable: bool = False, title: str | None = None) -> dict:
    """The chart of a `design.loading_map` result: loadings in wt% or vol%, viscosity in
    `viscosity_unit`, each window's limit as a line, the current recipe marked."""
    unit = "wt%" if grid.attrs.get("basis", "mass") == "mass" else "vol%"
    cells = _shown_cells(grid, viscosity_unit)
    cells["x"] = 100 * grid["x_loading"].to_numpy(dtype=float)
    cells["y"] = 100 * grid["y_loading"].to_numpy(dtype=float)
    cells["x_loading"], cells["y_loading"] = grid["x_loading"], grid["y_loading"]
    now = grid.attrs.get("current")
    current = None if now is None else {"x": 100 * now["x_loading"], "y": 100 * now["y_loading"]}
    rate = grid.attrs.get("shear_rate_1_per_s")
    windows = [(f"{w['name']} limit", w["column"]) for w in grid.attrs.get("windows", [])]
    return design_map_chart(
        cells, x_title=f"{grid.attrs.get('x_ingredient', 'x')} [{unit}]",
        y_title=f"{grid.attrs.get('y_ingredient', 'y')} [{unit}]",
        colour_title=f"viscosity at {rate:g} 1/s [{viscosity_unit}]" if rate else
        f"viscosity [{viscosity_unit}]", windows=windows, current=current, width=width,
        height=height, selectable=selectable, title=title)


def loading_ternary_chart(tri: pd.DataFrame, viscosity_unit: str = "Pa*s", *, width=WIDTH,
                          height=HEIGHT, title: str | None = None) -> dict:
    """The chart of a `design.loading_ternary` result (shares of the triangle's total)."""
    cells = _shown_cells(tri, viscosity_unit)
    for k in (1, 2, 3):
        cells[f"share_{k}"] = tri[f"share_{k}"].to_numpy(dtype=float)
    unit = "wt%" if tri.attrs.get("basis", "mass") == "mass" else "vol%"
    total = tri.attrs.get("total", float("nan"))
    parts = list(tri.attrs.get("parts", ["1", "2", "3"]))
    rate = tri.attrs.get("shear_rate_1_per_s")
    return ternary_chart(
        cells, parts=parts, colour_title=f"viscosity at {rate:g} 1/s [{viscosity_unit}]"
        if rate else f"viscosity [{viscosity_unit}]", current=tri.attrs.get("current"),
        width=width, height=height,
        title=title or f"Shares of {100 * total:.3g} {unit} in total")
