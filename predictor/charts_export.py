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
    """SVG text of a chart, rendered offline by vl-convert (fonts bundled, no network)."""
    import vl_convert

    return vl_convert.vegalite_to_svg(chart.to_json())
