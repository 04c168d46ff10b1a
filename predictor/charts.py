"""Altair chart builders of the app and the report: DataFrames in, a Vega-Lite spec (dict)
out; no physics, no Streamlit. One module for both (the report renders the same specs to
SVG offline with `to_svg`); Altair is imported when the first chart is built.

Colours are the Okabe-Ito palette (distinguishable with the common colour-vision
deficiencies). Every axis carries a quantity and a unit. `big=True` is the presentation
layout: larger type and taller charts for a projector.
"""

from __future__ import annotations

import functools
import json
import math

import numpy as np
import pandas as pd

from ._lazy import LazyModule

OKABE_ITO = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000",
             "#F0E442"]
BLUE, VERMILLION, GREEN, PURPLE, ORANGE, SKY, BLACK, YELLOW = OKABE_ITO
GREY = "#7F7F7F"


def _height(big: bool, normal: int = 380) -> int:
    return int(normal * 1.45) if big else normal


def config(big: bool = False) -> dict:
    """Common type sizes and a plain frame; larger in the presentation layout."""
    k = 1.45 if big else 1.0
    return {
        "axis": {"labelFontSize": 12 * k, "titleFontSize": 13 * k, "grid": True,
                 "gridColor": "#E6E6E6", "titleFontWeight": "normal"},
        "legend": {"labelFontSize": 12 * k, "titleFontSize": 12 * k, "orient": "bottom",
                   "direction": "horizontal", "columns": 4, "symbolStrokeWidth": 3,
                   "titleLimit": 400, "labelLimit": 300},   # no "Which liquid is contin…"
        "title": {"fontSize": 15 * k, "anchor": "start", "fontWeight": "normal"},
        "view": {"strokeWidth": 0},
        "text": {"fontSize": 12 * k},
    }


def _quiet_schema_checks(altair) -> None:
    # Altair checks every object against the Vega-Lite schema as it is built; that costs
    # more than the rest of a page run. The finished specs are checked once, in the tests
    # (tests/app/test_charts.py validates every builder's output), so the eager check is off.
    from altair.utils import schemapi

    schemapi.disable_debug_mode()


alt = LazyModule("altair", on_import=_quiet_schema_checks)


class Figure:
    """Altair charts on named datasets, assembled into one Vega-Lite spec (a plain dict).

    Altair builds each mark and its encodings (cheap); layers and stacks are assembled here
    as plain dicts, because Altair's own `LayerChart` deep-copies every layer two or three
    times and that alone cost more than the rest of a page run. The frames stay out of the
    Altair objects until the end, and `to_dict(validate=False)` skips a second schema check;
    tests/app/test_charts.py validates every builder's finished spec once.
    """

    def __init__(self):
        self.frames: dict[str, pd.DataFrame] = {}

    def chart(self, frame: pd.DataFrame) -> alt.Chart:
        return alt.Chart(alt.NamedData(self.data(frame)["name"]))

    def data(self, frame: pd.DataFrame) -> dict:
        """A view's ``data`` reading `frame` (for views written as plain Vega-Lite)."""
        name = f"frame_{len(self.frames)}"
        self.frames[name] = frame
        return {"name": name}

    @staticmethod
    def part(chart) -> dict:
        """One chart (or an already assembled dict) as a nested Vega-Lite view."""
        if isinstance(chart, dict):
            return chart
        return chart.to_dict(validate=False, context={"top_level": False})

    def layer(self, *charts, resolve: dict | None = None, **properties) -> dict:
        """Charts drawn on top of each other (Vega-Lite "layer")."""
        spec = {"layer": [self.part(c) for c in charts], **properties}
        if resolve:
            spec["resolve"] = resolve
        return spec

    def vconcat(self, *charts, resolve: dict | None = None, **properties) -> dict:
        """Charts stacked vertically (Vega-Lite "vconcat")."""
        spec = {"vconcat": [self.part(c) for c in charts], **properties}
        if resolve:
            spec["resolve"] = resolve
        return spec

    def spec(self, chart, big: bool = False) -> dict:
        """The chart as a top-level spec, carrying only the datasets its views name (the
        panels of one figure share the figure's frames; each is sent on its own)."""
        spec = {"$schema": alt.SCHEMA_URL, **self.part(chart)}
        spec["config"] = config(big)
        used = _data_names(spec)
        spec["datasets"] = {name: frame for name, frame in self.frames.items() if name in used}
        return spec


def _data_names(spec) -> set[str]:
    """Names of the datasets a spec's views read (``"data": {"name": ...}``), at any depth."""
    if isinstance(spec, list):
        return set().union(*(_data_names(part) for part in spec))
    if not isinstance(spec, dict):
        return set()
    names = {spec["data"]["name"]} if isinstance(spec.get("data"), dict) and \
        "name" in spec["data"] else set()
    return names.union(*(_data_names(value) for key, value in spec.items()
                         if key in ("layer", "vconcat", "hconcat", "concat", "spec")))


def _palette(names: list[str]) -> alt.Scale:
    return alt.Scale(**_palette_dict(names))


def _palette_dict(names: list[str]) -> dict:
    return {"domain": names, "range": [OKABE_ITO[i % len(OKABE_ITO)]
                                       for i in range(len(names))]}


def decades(low: float, high: float) -> list[float]:
    """Powers of ten covering [low, high] (tick values of a log axis)."""
    lo, hi = decade_domain(low, high)
    return [10.0 ** k for k in range(round(math.log10(lo)), round(math.log10(hi)) + 1)]


def decade_domain(low: float, high: float) -> list[float]:
    low = max(low, 1e-300)
    high = max(high, low * 10)
    return [10.0 ** math.floor(math.log10(low)), 10.0 ** math.ceil(math.log10(high))]


def _top_axis_expr(ticks: list[tuple[float, float]]) -> str:
    """A Vega expression writing the wt% label at each phi tick."""
    expr = "''"
    for phi, wt in reversed(ticks):
        expr = f"abs(datum.value - {phi!r}) < 1e-9 ? '{wt:.0f}' : {expr}"
    return expr


def loading_sweep(curves: pd.DataFrame, *, y_title: str, series: str = "relation",
                  series_title: str = "Relation", phi_max: float | None = None,
                  phi_max_range: tuple[float, float] | None = None,
                  current: dict | None = None, limit: dict | None = None,
                  band: pd.DataFrame | None = None, wt_ticks=None, big: bool = False,
                  x_title: str = "Effective solids volume fraction φ [–]") -> dict:
    """Viscosity against volume fraction on a log axis.

    `curves`: columns phi, viscosity, <series>. `band`: phi, low, high (shaded). `current`:
    {"phi", "viscosity", "label"}. `limit`: {"viscosity", "phi", "label"}. `wt_ticks`:
    [(phi, wt%)], drawn as a second x axis on top.

    Written as plain Vega-Lite, not through Altair: the Loading sweep page rebuilds it on
    every change, and Altair's objects cost more than the sweep behind it.
    """
    fig = Figure()
    data = curves[(curves["viscosity"] > 0) & curves["viscosity"].notna()
                  & (curves["viscosity"] < float("inf"))]
    names = list(dict.fromkeys(data[series]))
    x_max = max(float(data["phi"].max()) if len(data) else 0.0,
                phi_max_range[1] if phi_max_range else 0.0, phi_max or 0.0) * 1.04
    x_scale = {"domain": [0, round(min(max(x_max, 0.05), 1.0), 3)], "nice": False,
               "zero": True}
    y_low = float(data["viscosity"].min()) if len(data) else 1.0
    focus = max([y_low] + [float(d["viscosity"]) for d in (current, limit)
                           if d and d.get("viscosity")])
    y_high = min(float(data["viscosity"].max()) if len(data) else 10.0, 300.0 * focus)
    y_domain = decade_domain(y_low, y_high)
    y_scale = {"type": "log", "domain": y_domain, "nice": False}
    y_enc = {"field": "viscosity", "type": "quantitative", "scale": y_scale, "title": y_title}
    x_bare = {"field": "phi", "type": "quantitative", "scale": x_scale, "axis": None}
    layers = []
    if phi_max_range is not None and phi_max_range[1] > phi_max_range[0]:
        layers.append({"data": fig.data(pd.DataFrame([{
            "low": phi_max_range[0], "high": phi_max_range[1],
            "what": "packing-limit range of the estimators"}])),
            "mark": {"type": "rect", "color": ORANGE, "opacity": 0.18, "clip": True},
            "encoding": {"x": {**x_bare, "field": "low"}, "x2": {"field": "high"},
                         "tooltip": [{"field": "what", "type": "nominal", "title": " "},
                                     {"field": "low", "type": "quantitative", "format": ".3f",
                                      "title": "lowest φmax"},
                                     {"field": "high", "type": "quantitative",
                                      "format": ".3f", "title": "highest φmax"}]}})
    if band is not None and len(band):
        band = band.assign(high=band["high"].clip(upper=y_domain[1]),
                           low=band["low"].clip(lower=y_domain[0], upper=y_domain[1]))
        layers.append({"data": fig.data(band),
                       "mark": {"type": "area", "color": BLUE, "opacity": 0.18, "clip": True},
                       "encoding": {"x": x_bare, "y": {**y_enc, "field": "low"},
                                    "y2": {"field": "high"}}})
    layers.append({"data": fig.data(data),
                   "mark": {"type": "line", "strokeWidth": 3 if big else 2.4, "clip": True},
                   "encoding": {
                       "x": {"field": "phi", "type": "quantitative", "scale": x_scale,
                             "title": x_title, "axis": {"format": ".2f"}},
                       "y": {**y_enc, "axis": {"values": decades(y_low, y_high),
                                               "format": ",~g"}},
                       "color": {"field": series, "type": "nominal", "title": series_title,
                                 "scale": _palette_dict(names), "sort": names},
                       "strokeDash": {"field": series, "type": "nominal", "legend": None,
                                      "scale": {"domain": names or [""], "range": [[1, 0]] + [
                                          [6, 3]] * max(len(names) - 1, 0)}},
                       "tooltip": [{"field": series, "type": "nominal", "title": series_title},
                                   {"field": "phi", "type": "quantitative", "format": ".3f",
                                    "title": "φ"},
                                   {"field": "viscosity", "type": "quantitative",
                                    "format": ".4g", "title": y_title}]}})
    if phi_max is not None:
        rule = fig.data(pd.DataFrame([{"phi": phi_max,
                                       "text": f"packing limit φmax {phi_max:.3f}"}]))
        layers.append({"data": rule, "mark": {"type": "rule", "color": VERMILLION,
                                              "strokeDash": [8, 4], "strokeWidth": 2},
                       "encoding": {"x": x_bare}})
        # at the foot of the rule: the curve climbs out of the plot near phi_max at the top
        layers.append({"data": rule, "mark": {"type": "text", "color": VERMILLION,
                                              "align": "right", "dx": -6,
                                              "y": _height(big) - 8, "baseline": "bottom",
                                              "fontWeight": "bold"},
                       "encoding": {"x": x_bare, "text": {"field": "text", "type": "nominal"}}})
    if limit is not None and limit.get("viscosity"):
        lim = pd.DataFrame([limit])
        layers.append({"data": fig.data(lim),
                       "mark": {"type": "rule", "color": GREY, "strokeDash": [2, 3]},
                       "encoding": {"y": y_enc}})
        layers.append({"data": fig.data(lim),
                       "mark": {"type": "text", "color": GREY, "align": "left", "dx": 4,
                                "dy": -7, "x": 4},
                       "encoding": {"y": y_enc, "text": {"field": "label", "type": "nominal"}}})
    if current is not None and current.get("viscosity"):
        cur = pd.DataFrame([current])
        layers.append({"data": fig.data(cur),
                       "mark": {"type": "point", "shape": "diamond",
                                "size": 260 if big else 170, "filled": True, "color": BLACK},
                       "encoding": {"x": x_bare, "y": y_enc, "tooltip": [
                           {"field": "label", "type": "nominal", "title": "current loading"}]}})
        layers.append({"data": fig.data(cur),
                       "mark": {"type": "text", "align": "right", "dx": -12, "dy": -10,
                                "fontWeight": "bold", "color": BLACK},
                       "encoding": {"x": x_bare, "y": y_enc,
                                    "text": {"field": "label", "type": "nominal"}}})
    if wt_ticks:
        top = pd.DataFrame({"phi": [p for p, _ in wt_ticks]})
        layers.append({"data": fig.data(top), "mark": {"type": "tick", "opacity": 0},
                       "encoding": {"x": {
                           "field": "phi", "type": "quantitative", "scale": x_scale,
                           "title": "Solids in the formulation [wt%]",
                           "axis": {"orient": "top", "values": [p for p, _ in wt_ticks],
                                    "labelExpr": _top_axis_expr(wt_ticks), "grid": False}}}})
    chart = fig.layer(*layers, resolve={"axis": {"x": "independent"}},
                      height=_height(big), width="container")
    return fig.spec(chart, big)


def lines(data: pd.DataFrame, *, x: str, y: str, series: str, x_title: str, y_title: str,
          series_title: str, x_log: bool = False, y_log: bool = False,
          big: bool = False, points: bool = False) -> dict:
    """A plain multi-series line chart (scenario comparisons, fit curves...)."""
    fig = Figure()
    names = list(dict.fromkeys(data[series]))
    chart = fig.chart(data).mark_line(point=points, strokeWidth=2.4).encode(
        x=alt.X(f"{x}:Q", title=x_title, scale=alt.Scale(type="log" if x_log else "linear")),
        y=alt.Y(f"{y}:Q", title=y_title, scale=alt.Scale(type="log" if y_log else "linear")),
        color=alt.Color(f"{series}:N", title=series_title, scale=_palette(names), sort=names),
        tooltip=[alt.Tooltip(f"{series}:N", title=series_title),
                 alt.Tooltip(f"{x}:Q", format=".4g", title=x_title),
                 alt.Tooltip(f"{y}:Q", format=".4g", title=y_title)],
    ).properties(height=_height(big), width="container")
    return fig.spec(chart, big)


def system_curve(curve: pd.DataFrame, *, x_title: str, y_title: str,
                 point: dict | None = None, restart: float | None = None,
                 big: bool = False) -> dict:
    """Pressure drop against flow rate (columns flow, pressure, regime), the operating point
    and the restart pressure as a dashed rule; log-log, to lay over a pump curve."""
    fig = Figure()
    regimes = ["laminar", "transitional", "turbulent"]
    colour = alt.Color("regime:N", title="Regime", sort=regimes,
                       scale=alt.Scale(domain=regimes, range=["#1f77b4", "#ff7f0e", "#d62728"]))
    x = alt.X("flow:Q", title=x_title, scale=alt.Scale(type="log"))
    y = alt.Y("pressure:Q", title=y_title, scale=alt.Scale(type="log"))
    tips = [alt.Tooltip("flow:Q", format=".4g", title=x_title),
            alt.Tooltip("pressure:Q", format=".4g", title=y_title),
            alt.Tooltip("regime:N", title="Regime")]
    parts = [fig.chart(curve).mark_line(strokeWidth=2.4, color="#555").encode(x=x, y=y),
             fig.chart(curve).mark_circle(size=38).encode(x=x, y=y, color=colour,
                                                          tooltip=tips)]
    if restart is not None and restart > 0:
        parts.append(fig.chart(pd.DataFrame({"pressure": [restart]})).mark_rule(
            strokeDash=[6, 4], color="#7f7f7f").encode(
            y="pressure:Q", tooltip=[alt.Tooltip("pressure:Q", format=".4g",
                                                 title="Restart pressure")]))
    if point is not None:
        parts.append(fig.chart(pd.DataFrame([point])).mark_point(
            shape="diamond", size=180, filled=True, color="black").encode(
            x="flow:Q", y="pressure:Q", tooltip=tips[:2]))
    chart = fig.layer(*parts, height=_height(big), width="container")
    return fig.spec(chart, big)


#: Width in pixels of an exported chart (PNG/SVG) drawn at the page's container width.
EXPORT_WIDTH = 820


def to_png(spec: dict, width: int = EXPORT_WIDTH) -> bytes:
    """The chart as PNG bytes, rendered offline by vl-convert."""
    import vl_convert as vlc

    return vlc.vegalite_to_png(export_json(spec, width), scale=2)


def to_svg(spec: dict, width: int = EXPORT_WIDTH) -> str:
    """The chart as SVG text, rendered offline by vl-convert (fonts bundled, no network)."""
    import vl_convert as vlc

    return vlc.vegalite_to_svg(export_json(spec, width))


def export_json(spec: dict, width: int = EXPORT_WIDTH) -> str:
    """The spec as standalone Vega-Lite JSON: data inlined, `width` pixels instead of the
    page's container width."""
    out = {k: v for k, v in spec.items() if k != "datasets"}
    out["datasets"] = {name: _records(frame) for name, frame in spec.get("datasets", {}).items()}

    def fix(node):
        if isinstance(node, dict):
            if node.get("width") == "container":
                node["width"] = width
            for value in node.values():
                fix(value)
        elif isinstance(node, list):
            for item in node:
                fix(item)
    fix(out)
    return json.dumps(out)


def _records(frame) -> list[dict]:
    """Rows as plain dicts, NaN and inf as None (JSON null); column by column, as lists.

    The same records as ``frame.replace(inf, nan).astype(object).where(notna, None)
    .to_dict("records")``, about three times faster on a 41 x 41 map (numpy's `tolist`
    makes the Python numbers); columns of other kinds (dates...) take that slow path.
    """
    if not isinstance(frame, pd.DataFrame):
        return frame
    if not all(d.kind in "fbiuO" for d in frame.dtypes):
        clean = frame.replace([np.inf, -np.inf], np.nan)
        clean = clean.astype(object).where(clean.notna(), None)
        return clean.to_dict("records")
    names = list(frame.columns)
    columns = [_column_list(frame[name].to_numpy()) for name in names]
    return [dict(zip(names, row, strict=True)) for row in zip(*columns, strict=True)]


def _column_list(values: np.ndarray) -> list:
    """A column as Python values, None where missing (NaN, inf, None, NA)."""
    out = values.tolist()
    if values.dtype.kind == "f":
        for k in np.flatnonzero(~np.isfinite(values)).tolist():
            out[k] = None
    elif values.dtype.kind == "O":
        out = [None if v is None or v is pd.NA or (isinstance(v, float) and not math.isfinite(v))
               else v for v in out]
    return out


AXIS_EXTENT = 64   # px kept for every y axis so stacked panels line up


def flow_curve(curve: pd.DataFrame, *, windows: pd.DataFrame, x_title: str, y_title: str,
               stress_title: str | None, selected: str | None = None,
               markers: pd.DataFrame | None = None, point: dict | None = None,
               big: bool = False, width: int | str = "container", joined: bool = False):
    """Panels stacked on one shear-rate axis: process windows, viscosity, stress (log-log).

    `curve`: rate, viscosity, stress[, regime]. `windows`: name, low, high (same x unit).
    `markers`: rate, label (vertical rules, e.g. onsets). `point`: rate, viscosity, stress.
    Returns the styled panels (drawn one under the other), or with `joined` one chart of
    fixed width (for PNG/SVG export).

    Written as plain Vega-Lite, not through Altair: the Flow curve page rebuilds it on
    every change, and Altair's objects cost more than the prediction behind it.
    """
    fig = Figure()
    if joined and width == "container":
        width = EXPORT_WIDTH
    lo = float(curve["rate"].min())
    hi = float(curve["rate"].max())
    x_scale = {"type": "log", "domain": [lo, hi], "nice": False}
    x_axis = {"values": decades(lo, hi), "format": "~g"}
    shown = windows[(windows["high"] > lo) & (windows["low"] < hi)].copy()
    shown["low_c"] = shown["low"].clip(lower=lo)
    shown["high_c"] = shown["high"].clip(upper=hi)
    shown["chosen"] = shown["name"] == selected
    row = 28 if big else 21
    strip_y = {"field": "name", "type": "nominal", "sort": list(shown["name"]), "title": None,
               "axis": {"labels": False, "ticks": False, "domain": False,
                        "minExtent": AXIS_EXTENT, "maxExtent": AXIS_EXTENT},
               "scale": {"paddingInner": 0.1}}

    def chosen(colours):
        return {"field": "chosen", "type": "nominal", "legend": None,
                "scale": {"domain": [True, False], "range": colours}}
    # Each name beside its bar, on the side with room: right of bars in the lower half of
    # the (log) axis, left of bars in the upper half; never on top of another row's bar.
    middle = math.sqrt(lo * hi)
    shown["right"] = np.sqrt(shown["low_c"] * shown["high_c"]) < middle
    labels = [{"data": fig.data(shown[shown["right"] == right]),
               "mark": {"type": "text", "align": "left" if right else "right",
                        "baseline": "middle", "dx": 5 if right else -5},
               "encoding": {"x": {"field": "high_c" if right else "low_c",
                                  "type": "quantitative", "scale": x_scale, "axis": None},
                            "y": strip_y, "text": {"field": "name", "type": "nominal"},
                            "color": chosen([VERMILLION, "#333333"])}}
              for right in (True, False) if (shown["right"] == right).any()]
    bars = {"data": fig.data(shown),
            "mark": {"type": "bar", "height": 7 if not big else 9, "cornerRadius": 2},
            "encoding": {"x": {"field": "low_c", "type": "quantitative", "scale": x_scale,
                               "axis": None},
                         "x2": {"field": "high_c"}, "y": strip_y,
                         "color": chosen([VERMILLION, SKY]),
                         "tooltip": [{"field": "name", "type": "nominal", "title": "process"},
                                     {"field": "low", "type": "quantitative", "format": "~g",
                                      "title": "from"},
                                     {"field": "high", "type": "quantitative", "format": "~g",
                                      "title": "to"}]}}
    strip = fig.layer(bars, *labels, resolve={"scale": {"color": "independent"}},
                      height=row * max(len(shown), 1), width=width,
                      title=f"Typical process shear rates [{x_title.split('[')[-1].rstrip(']')}]")

    panel_height = _height(big, 280)

    def panel(field: str, title: str, with_regime: bool) -> dict:
        data = curve[(curve[field] > 0) & (curve[field] < float("inf"))]
        vlo = float(data[field].min()) if len(data) else 1e-3
        vhi = float(data[field].max()) if len(data) else 1.0
        y_enc = {"field": field, "type": "quantitative", "title": title,
                 "scale": {"type": "log", "domain": decade_domain(vlo, vhi), "nice": False},
                 "axis": {"values": decades(vlo, vhi), "format": ",~g",
                          "minExtent": AXIS_EXTENT, "maxExtent": AXIS_EXTENT}}
        x_enc = {"field": "rate", "type": "quantitative", "scale": x_scale, "title": x_title,
                 "axis": x_axis}
        layers = []
        if selected is not None and bool(shown["chosen"].any()):
            layers.append({"data": fig.data(shown[shown["chosen"]]),
                           "mark": {"type": "rect", "color": VERMILLION, "opacity": 0.10},
                           "encoding": {"x": {**x_enc, "field": "low_c"},
                                        "x2": {"field": "high_c"}}})
        layers.append({"data": fig.data(data),
                       "mark": {"type": "line", "color": BLUE,
                                "strokeWidth": 3 if big else 2.4},
                       "encoding": {"x": x_enc, "y": y_enc, "tooltip": [
                           {"field": "rate", "type": "quantitative", "format": ".3g",
                            "title": x_title},
                           {"field": field, "type": "quantitative", "format": ".4g",
                            "title": title}]}})
        if with_regime and "regime" in data and len(data):
            regimes = list(dict.fromkeys(data["regime"]))
            layers.append({"data": fig.data(_regime_runs(data)),
                           "mark": {"type": "rect", "y": panel_height - 9, "y2": panel_height},
                           # No stroke channel on the same field: Vega-Lite merges the two
                           # legends, and a stroke without a legend hides the colour legend.
                           "encoding": {"x": x_enc, "x2": {"field": "rate_next"}, "color": {
                               "field": "regime", "type": "nominal",
                               "title": "Regime (strip along the shear-rate axis)",
                               "scale": {"domain": regimes,
                                         "range": [REGIME_COLOURS.get(r, GREY)
                                                   for r in regimes]}},
                               "tooltip": [{"field": "regime", "type": "nominal",
                                            "title": "regime"}]}})
        if markers is not None and len(markers):
            layers.append({"data": fig.data(markers),
                           "mark": {"type": "rule", "color": BLACK, "strokeDash": [6, 3]},
                           "encoding": {"x": x_enc}})
            layers.append({"data": fig.data(markers),
                           "mark": {"type": "text", "align": "left", "dx": 4, "y": 10,
                                    "color": BLACK, "fontWeight": "bold"},
                           "encoding": {"x": x_enc, "text": {"field": "label",
                                                             "type": "nominal"}}})
        if point is not None and point.get(field, 0) > 0:
            layers.append({"data": fig.data(pd.DataFrame([point])),
                           "mark": {"type": "point", "shape": "diamond", "filled": True,
                                    "color": BLACK, "size": 260 if big else 170},
                           "encoding": {"x": x_enc, "y": y_enc}})
        return fig.layer(*layers, height=panel_height, width=width)

    panels = [strip, panel("viscosity", y_title, True)]
    if stress_title:
        panels.append(panel("stress", stress_title, False))
    if joined:
        joined_chart = fig.vconcat(*panels, spacing=12,
                                   resolve={"scale": {"color": "independent"}})
        return fig.spec(joined_chart, big)
    return [fig.spec(p, big) for p in panels]


def _regime_runs(data: pd.DataFrame) -> pd.DataFrame:
    """One rectangle per run of equal regimes along the rate (no hairline gaps between
    points): rate, rate_next (the next run's first rate; the last rate at the end), regime."""
    rate = data["rate"].to_numpy(dtype=float)
    regime = data["regime"].to_numpy()
    start = np.flatnonzero(np.r_[True, regime[1:] != regime[:-1]])
    end = np.r_[start[1:], rate.size]                  # first point of the next run
    return pd.DataFrame({"rate": rate[start],
                         "rate_next": rate[np.minimum(end, rate.size - 1)],
                         "regime": regime[start]})


REGIME_COLOURS = {"plateau": GREEN, "thinning": SKY, "thickening": ORANGE, "yield": PURPLE,
                  "discontinuous-thickening": VERMILLION, "jammed": BLACK}


def png_of(build) -> bytes:
    """PNG of the chart that `build()` returns (built only when the download is asked)."""
    return to_png(build())


def svg_of(build) -> str:
    return to_svg(build())


REGIME_SHADES = {"dilute": "#F2F2F2", "concentrated": "#FFFFFF", "jammed": "#E8E1EE"}


def phase_ratio(frame: pd.DataFrame, *, y_title: str, yield_title: str,
                regimes: pd.DataFrame, caution: tuple[float, float] | None = None,
                current: dict | None = None, target: dict | None = None,
                x_title: str = "Droplet-liquid fraction φ [–]", big: bool = False,
                joined: bool = False):
    """Viscosity (and yield stress) against the droplet-liquid fraction, both branches.

    `frame`: phi, branch, viscosity, yield_stress. `regimes`: regime, low, high (direct
    branch, shaded). `caution`: (low, high) phase-inversion band. `current`/`target`:
    {"phi", "viscosity", "label"}.
    """
    fig = Figure()
    width = 820 if joined else "container"
    names = list(dict.fromkeys(frame["branch"]))
    x_scale = alt.Scale(domain=[0, 1], nice=False)
    x_axis = alt.Axis(format=".1f")
    colour = alt.Color("branch:N", title="Which liquid is continuous",
                       scale=alt.Scale(domain=names, range=[BLUE, VERMILLION][:len(names)]))

    def backdrop():
        layers = [fig.chart(regimes).mark_rect(opacity=0.9).encode(
            x=alt.X("low:Q", scale=x_scale, title=x_title, axis=x_axis), x2=alt.X2("high:Q"),
            color=alt.Color("regime:N", title="Regime (as designed)", scale=alt.Scale(
                domain=list(regimes["regime"]),
                range=[REGIME_SHADES.get(r, "#FFFFFF") for r in regimes["regime"]]),
                legend=alt.Legend(symbolStrokeColor=GREY, symbolStrokeWidth=1)))]
        if caution is not None:
            band = pd.DataFrame([{"low": caution[0], "high": caution[1],
                                  "text": "phase inversion often seen"}])
            layers.append(fig.chart(band).mark_rect(color=ORANGE, opacity=0.15).encode(
                x=alt.X("low:Q", scale=x_scale, title=x_title, axis=x_axis), x2=alt.X2("high:Q")))
            layers.append(fig.chart(band).mark_text(color="#8A5A00", y=10, dx=4,
                                                    align="left").encode(
                x=alt.X("low:Q", scale=x_scale, title=x_title, axis=x_axis),
                text=alt.Text("text:N")))
        return layers

    def panel(field: str, title: str) -> dict:
        data = frame[(frame[field] > 0) & (frame[field] < float("inf"))]
        lo = float(data[field].min()) if len(data) else 1e-3
        hi = float(data[field].max()) if len(data) else 1.0
        y_scale = alt.Scale(type="log", domain=decade_domain(lo, hi), nice=False)
        y_enc = alt.Y(f"{field}:Q", scale=y_scale, title=title,
                      axis=alt.Axis(values=decades(lo, hi), format=",~g",
                                    minExtent=AXIS_EXTENT, maxExtent=AXIS_EXTENT))
        layers = backdrop()
        layers.append(fig.chart(data).mark_line(strokeWidth=3 if big else 2.4, clip=True)
                      .encode(x=alt.X("phi:Q", scale=x_scale, title=x_title, axis=x_axis),
                              y=y_enc, color=colour,
                              strokeDash=alt.StrokeDash("branch:N", legend=None, scale=alt.Scale(
                                  domain=names, range=[[1, 0], [6, 3]][:len(names)])),
                              tooltip=[alt.Tooltip("branch:N", title="continuous"),
                                       alt.Tooltip("phi:Q", format=".2f", title="φ"),
                                       alt.Tooltip(f"{field}:Q", format=".4g", title=title)]))
        for mark, shape in ((current, "diamond"), (target, "triangle-up")):
            if mark is not None and mark.get(field, 0) and mark[field] > 0:
                dot = pd.DataFrame([mark])
                layers.append(fig.chart(dot).mark_point(shape=shape, filled=True, color=BLACK,
                                                        size=240 if big else 160).encode(
                    x=alt.X("phi:Q", scale=x_scale, title=x_title, axis=x_axis), y=y_enc))
                layers.append(fig.chart(dot).mark_text(align="left", dx=10, dy=-10,
                                                       fontWeight="bold").encode(
                    x=alt.X("phi:Q", scale=x_scale, title=x_title, axis=x_axis), y=y_enc,
                    text=alt.Text("label:N")))
        return fig.layer(*layers, resolve={"scale": {"color": "independent"}},
                         height=_height(big, 320), width=width)

    panels = [panel("viscosity", y_title)]
    if (frame["yield_stress"] > 0).any():
        panels.append(panel("yield_stress", yield_title))
    if joined:
        return fig.spec(fig.vconcat(*panels, spacing=12), big)
    return [fig.spec(p, big) for p in panels]


def fit_chart(curve: pd.DataFrame, data: pd.DataFrame, *, model: str, level: str,
              big: bool = False) -> dict:
    """Measured relative viscosity, the fitted relation and its band, against phi."""
    fig = Figure()
    x = alt.X("phi:Q", title="Volume fraction φ [–]")
    values = np.concatenate([curve["central"].to_numpy(), data["measured"].to_numpy()])
    values = values[np.isfinite(values) & (values > 0)]
    lo, hi = (float(values.min()), float(values.max())) if values.size else (1.0, 10.0)
    y_scale = alt.Scale(type="log", domain=decade_domain(lo, hi), nice=False)
    y_axis = alt.Axis(values=decades(lo, hi), format=",~g")
    band = fig.chart(curve[np.isfinite(curve["high"])]).mark_area(
        color=BLUE, opacity=0.18, clip=True).encode(
        x=x, y=alt.Y("low:Q", scale=y_scale, title="Relative viscosity [–]", axis=y_axis),
        y2=alt.Y2("high:Q"))
    line = fig.chart(curve.assign(what=f"{model}, fitted")).mark_line(
        color=BLUE, strokeWidth=2.6).encode(
        x=x, y=alt.Y("central:Q", scale=y_scale, title="Relative viscosity [–]", axis=y_axis),
        tooltip=[alt.Tooltip("phi:Q", format=".3f"), alt.Tooltip("central:Q", format=".4g")])
    points = fig.chart(data).mark_point(filled=True, color=VERMILLION, size=90 if not big
                                        else 140, shape="circle").encode(
        x=x, y=alt.Y("measured:Q", scale=y_scale),
        tooltip=[alt.Tooltip("phi:Q", format=".3f"), alt.Tooltip("measured:Q", format=".4g")])
    chart = fig.layer(
        band, line, points, height=_height(big, 340), width="container",
        title=f"Measured (points), fitted {model} (line), {level} band (shaded)")
    return fig.spec(chart, big)


def residuals(data: pd.DataFrame, big: bool = False, x_max: float | None = None) -> dict:
    """ln(measured) - ln(fitted) against phi, with the zero line, on a symmetric axis.

    `x_max`: right end of the phi axis, to line up with the fit chart above it.
    """
    fig = Figure()
    spread = float(np.nanmax(np.abs(data["residual"]))) if len(data) else 0.0
    top = float(np.ceil(max(spread, 1e-3) * 1.25 * 1000) / 1000)
    y = alt.Y("residual:Q", title="ln(measured / fitted) [–]",
              scale=alt.Scale(domain=[-top, top], nice=False),
              axis=alt.Axis(values=[-top, -top / 2, 0.0, top / 2, top], format=".3~f"))
    x_end = x_max if x_max is not None else float(data["phi"].max()) if len(data) else 1.0
    x = alt.X("phi:Q", title="Volume fraction φ [–]",
              scale=alt.Scale(domain=[0.0, round(x_end, 3)], nice=False))
    zero = fig.chart(pd.DataFrame({"residual": [0.0]})).mark_rule(color=GREY).encode(y=y)
    pts = fig.chart(data).mark_point(filled=True, color=VERMILLION, size=80).encode(
        x=x, y=y,
        tooltip=[alt.Tooltip("phi:Q", format=".3f"), alt.Tooltip("residual:Q", format=".3g")])
    chart = fig.layer(zero, pts, height=_height(big, 200), width="container",
                      title="Residuals (points above the line: measured thicker than fitted)")
    return fig.spec(chart, big)


VERDICT_COLOURS = {"passes every window": GREEN, "fails a window": VERMILLION,
                   "no window given": SKY, "input error": GREY}


def headroom_bars(data: pd.DataFrame, big: bool = False, limit: float = 0.95) -> dict:
    """Jamming headroom per candidate, coloured by the window verdict, with a 'close' line."""
    fig = Figure()
    names = [v for v in VERDICT_COLOURS if v in set(data["verdict"])]
    bars = fig.chart(data).mark_bar(cornerRadiusEnd=3).encode(
        y=alt.Y("candidate:N", sort=None, title=None, axis=alt.Axis(labelLimit=220)),
        x=alt.X("headroom:Q", title="Headroom φ/φmax [–] (1 = jammed)",
                scale=alt.Scale(domain=[0, max(1.0, float(data["headroom"].max()))])),
        color=alt.Color("verdict:N", title="Target windows", scale=alt.Scale(
            domain=names, range=[VERDICT_COLOURS[n] for n in names])),
        tooltip=[alt.Tooltip("candidate:N"), alt.Tooltip("headroom:Q", format=".3f"),
                 alt.Tooltip("verdict:N")])
    rule = fig.chart(pd.DataFrame({"x": [limit]})).mark_rule(
        color=BLACK, strokeDash=[6, 3]).encode(x=alt.X("x:Q"))
    chart = fig.layer(bars, rule, height=(28 if big else 22) * len(data) + 70,
                      width="container")
    return fig.spec(chart, big)


def size_classes(data: pd.DataFrame, marks: pd.DataFrame, *, x_title: str,
                 big: bool = False) -> dict:
    """Amount per size class on the volume and number bases, with D10/D50/D90 marked."""
    fig = Figure()
    lo, hi = float(data["diameter"].min()), float(data["diameter"].max())
    x_scale = alt.Scale(type="log", domain=decade_domain(lo, hi), nice=False)
    lines = fig.chart(data).mark_line(strokeWidth=2.4, interpolate="monotone",
                                      point=len(data) < 60).encode(
        x=alt.X("diameter:Q", scale=x_scale, title=x_title,
                axis=alt.Axis(values=decades(lo, hi), format="~g")),
        y=alt.Y("amount:Q", title="Amount per size class [%]"),
        color=alt.Color("basis:N", title="Basis", scale=alt.Scale(
            domain=["volume", "number"], range=[BLUE, PURPLE])),
        tooltip=[alt.Tooltip("diameter:Q", format=".3g"), alt.Tooltip("amount:Q", format=".3g"),
                 alt.Tooltip("basis:N")])
    rules = fig.chart(marks).mark_rule(color=GREY, strokeDash=[4, 3]).encode(
        x=alt.X("diameter:Q", scale=x_scale))
    height = _height(big, 280)
    # Labels along the bottom: the curves are high around D10-D90, where the labels sit.
    text = fig.chart(marks).mark_text(y=height - 6, dx=3, align="left", baseline="bottom",
                                      color=BLACK).encode(
        x=alt.X("diameter:Q", scale=x_scale), text=alt.Text("label:N"))
    chart = fig.layer(lines, rules, text, height=height, width="container")
    return fig.spec(chart, big)


def estimator_bars(data: pd.DataFrame, big: bool = False) -> dict:
    """phi_max by each packing estimator, side by side (dots on a common axis)."""
    fig = Figure()
    lo = max(0.0, float(data["phi_max"].min()) - 0.03)
    hi = min(1.0, float(data["phi_max"].max()) + 0.03)
    x = alt.X("phi_max:Q", title="Packing limit φmax [–]",
              scale=alt.Scale(domain=[round(lo, 2), round(hi + 0.005, 2)], nice=False))
    y = alt.Y("method:N", sort=None, title=None, axis=alt.Axis(labelLimit=240))
    dots = fig.chart(data).mark_point(filled=True, size=160 if big else 110, color=ORANGE,
                                      opacity=1, clip=True).encode(
        x=x, y=y, tooltip=[alt.Tooltip("method:N"), alt.Tooltip("phi_max:Q", format=".4f")])
    text = fig.chart(data).mark_text(align="left", dx=10, clip=True).encode(
        x=x, y=y, text=alt.Text("phi_max:Q", format=".3f"))
    # the page fits axes and title inside the height: leave room for them
    chart = fig.layer(dots, text, height=(34 if big else 28) * len(data) + 90,
                      width="container", title="Packing limit by each estimator")
    return fig.spec(chart, big)


def blend_curve(frame: pd.DataFrame, *, names: list[str], big: bool = False):
    """phi_max (and relative viscosity) of every blend: a curve for two powders, a map for
    three."""
    fig = Figure()
    if len(names) == 2:
        x = alt.X("share_1:Q", title=f"{names[0]} in the solids [vol%] (rest: {names[1]})")
        layers = [fig.chart(frame).mark_line(color=ORANGE, strokeWidth=2.6).encode(
            x=x, y=alt.Y("phi_max:Q", title="Packing limit φmax [–]",
                         scale=alt.Scale(zero=False)),
            tooltip=[alt.Tooltip("share_1:Q", format=".0f"),
                     alt.Tooltip("phi_max:Q", format=".4f")])]
        top = fig.layer(*layers, height=_height(big, 240), width="container")
        if "relative_viscosity" not in frame:
            return fig.spec(top, big)
        long = pd.concat([
            pd.DataFrame({"share_1": frame["share_1"], "value": frame[c], "view": v})
            for c, v in (("relative_viscosity", "one suspension of the blended sizes"),
                         ("relative_viscosity_farris", "multimodal (Farris)"))])
        long = long[np.isfinite(long["value"]) & (long["value"] > 0)]
        bottom = fig.chart(long).mark_line(strokeWidth=2.4).encode(
            x=x, y=alt.Y("value:Q", title="Relative viscosity [–]",
                         scale=alt.Scale(type="log")),
            color=alt.Color("view:N", title="View", scale=alt.Scale(range=[BLUE, GREEN])),
            tooltip=[alt.Tooltip("view:N"), alt.Tooltip("share_1:Q", format=".0f"),
                     alt.Tooltip("value:Q", format=".4g")]
        ).properties(height=_height(big, 220), width="container")
        return fig.spec(fig.vconcat(top, bottom), big)
    chart = fig.chart(frame).mark_circle(size=60 if not big else 90).encode(
        x=alt.X("share_1:Q", title=f"{names[0]} [vol% of solids]"),
        y=alt.Y("share_2:Q", title=f"{names[1]} [vol% of solids]"),
        color=alt.Color("phi_max:Q", title="φmax [–]", scale=alt.Scale(scheme="cividis")),
        tooltip=[alt.Tooltip("share_1:Q", format=".0f"), alt.Tooltip("share_2:Q", format=".0f"),
                 alt.Tooltip("share_3:Q", format=".0f"), alt.Tooltip("phi_max:Q", format=".4f")]
    ).properties(height=_height(big, 320), width="container",
                 title=f"Rest of the solids: {names[2]}")
    return fig.spec(chart, big)


def energy_curve(frame: pd.DataFrame, *, threshold_kT: float, big: bool = False) -> dict:
    """Pair energy in kT against separation (log x): total and its terms, the zero line and
    the barrier rule of thumb. `frame`: separation_nm, energy_kT, term. The y range is
    clipped to the region that decides the verdict (deep wells run off the bottom)."""
    fig = Figure()
    total = frame.loc[frame["term"] == "total", "energy_kT"]
    top = max(float(np.nanmax(total.clip(upper=1e4))) * 1.25 if len(total) else 0.0,
              1.6 * threshold_kT)
    bottom = max(min(float(np.nanmin(total)) * 1.25 if len(total) else 0.0, -10.0), -top)
    names = list(dict.fromkeys(frame["term"]))
    y = alt.Y("energy_kT:Q", title="Pair energy [kT]",
              scale=alt.Scale(domain=[bottom, top], clamp=True))
    curves = fig.chart(frame).mark_line(strokeWidth=2.4, clip=True).encode(
        x=alt.X("separation_nm:Q", title="Surface separation [nm]",
                scale=alt.Scale(type="log", nice=False,
                                domain=[float(frame["separation_nm"].min()),
                                        float(frame["separation_nm"].max())]),
                axis=alt.Axis(format="~g", values=decades(float(frame["separation_nm"].min()),
                                                          float(frame["separation_nm"].max())))),
        y=y,
        color=alt.Color("term:N", title="Term", scale=_palette(names), sort=names),
        strokeDash=alt.condition(alt.datum.term == "total", alt.value([1, 0]), alt.value([5, 3])),
        tooltip=[alt.Tooltip("term:N", title="Term"),
                 alt.Tooltip("separation_nm:Q", format=".3g", title="Separation [nm]"),
                 alt.Tooltip("energy_kT:Q", format=".3g", title="Energy [kT]")])
    rules = pd.DataFrame({"energy_kT": [0.0, threshold_kT],
                          "label": ["0", f"barrier rule of thumb {threshold_kT:g} kT"]})
    lines = fig.chart(rules).mark_rule(color=GREY, strokeDash=[2, 2]).encode(
        y=alt.Y("energy_kT:Q", scale=alt.Scale(domain=[bottom, top], clamp=True)),
        tooltip=[alt.Tooltip("label:N", title="Line")])
    chart = fig.layer(curves, lines, height=_height(big), width="container")
    return fig.spec(chart, big)


# --- design-space maps (the app page, the report and `loadline map --png`) ---------------

MAP_LINE_COLOURS = [VERMILLION, PURPLE, ORANGE, SKY, BLUE, YELLOW]
MAP_WIDTH, MAP_HEIGHT = 560, 440   # px; the triangle's marks are sized from them
PACKING_LINE = "packing limit"
FEASIBLE_LINE = "feasible region"
NO_FLOW = "#4D4D4D"


def boundary_segments(x, y, mask) -> pd.DataFrame:
    """Cell edges of a regular grid where a boolean field changes: x, y, x2, y2.

    `x`, `y` are the cell centres (any order, each pair once); the edges lie half a step
    from the centres, so the segments outline the region where `mask` is true.
    """
    x, y, mask = (np.asarray(v) for v in (x, y, mask))
    xs, ys = np.unique(x), np.unique(y)
    if xs.size < 2 or ys.size < 2:
        return pd.DataFrame(columns=["x", "y", "x2", "y2"])
    grid = np.zeros((ys.size, xs.size), dtype=bool)
    grid[np.searchsorted(ys, y), np.searchsorted(xs, x)] = mask.astype(bool)
    dx, dy = (xs[-1] - xs[0]) / (xs.size - 1), (ys[-1] - ys[0]) / (ys.size - 1)
    # Edges between neighbouring cells only: the map's own frame is not a limit.
    j, i = np.nonzero(grid[:, 1:] != grid[:, :-1])         # between columns i and i + 1
    edge = xs[0] + (i + 0.5) * dx
    vertical = np.column_stack([edge, ys[j] - dy / 2, edge, ys[j] + dy / 2])
    j, i = np.nonzero(grid[1:, :] != grid[:-1, :])         # between rows j and j + 1
    edge = ys[0] + (j + 0.5) * dy
    horizontal = np.column_stack([xs[i] - dx / 2, edge, xs[i] + dx / 2, edge])
    return pd.DataFrame(np.vstack([vertical, horizontal]), columns=["x", "y", "x2", "y2"])


def design_map_chart(cells: pd.DataFrame, *, x_title: str, y_title: str, colour_title: str,
                     windows=(), current: dict | None = None, width=MAP_WIDTH,
                     height=MAP_HEIGHT, selectable: bool = False,
                     title: str | None = "Design map", frames: bool = False) -> dict:
    """Viscosity over two loadings: log-coloured cells, packing limit, window limits.

    `cells` has x, y (the loadings as shown), value (viscosity in the shown unit; NaN or inf
    where there is no flow), headroom (phi/phi_max), regime, and optionally x_loading,
    y_loading (what a click selects), feasible and one bool column per window. `windows`:
    (label, column) pairs. `current`: {"x", "y"} of the scenario's own recipe. Returns the
    Vega-Lite spec as a dict; with `selectable`, clicking a cell selects it (param "cell").
    With `frames` the datasets stay DataFrames (NaN where there is no value) for Streamlit,
    which sends a frame as Arrow directly; otherwise they are plain JSON records.

    Written as plain Vega-Lite, not through Altair: the page rebuilds this chart on every
    change of the map, and Altair's objects cost more than the map's own solve. Three
    datasets (cells, limit segments, the recipe); the layers pick their rows with filters,
    so no cell is sent twice.
    """
    columns = {name: cells[name].to_numpy() for name in cells.columns}
    for name, column in columns.items():            # no inf in a chart's data
        if column.dtype.kind == "f":
            columns[name] = np.where(np.isinf(column), np.nan, column)
    x, y = columns["x"].astype(float), columns["y"].astype(float)
    xs, ys = np.unique(x), np.unique(y)
    dx = (xs[-1] - xs[0]) / max(xs.size - 1, 1)
    dy = (ys[-1] - ys[0]) / max(ys.size - 1, 1)
    data = pd.DataFrame({**columns, "x0": x - dx / 2, "x1": x + dx / 2, "y0": y - dy / 2,
                         "y1": y + dy / 2})

    def axis(field, title_, lo, hi):
        return {"field": field, "type": "quantitative", "title": title_,
                "scale": {"domain": [float(lo), float(hi)], "nice": False, "zero": False}}
    x_at = functools.partial(axis, title_=x_title, lo=xs[0] - dx / 2, hi=xs[-1] + dx / 2)
    y_at = functools.partial(axis, title_=y_title, lo=ys[0] - dy / 2, hi=ys[-1] + dy / 2)
    rects = {"x": x_at("x0"), "x2": {"field": "x1"}, "y": y_at("y0"), "y2": {"field": "y1"}}
    centres = {"x": x_at("x"), "y": y_at("y")}
    tips = [{"field": "x", "type": "quantitative", "format": ".4g", "title": x_title},
            {"field": "y", "type": "quantitative", "format": ".4g", "title": y_title},
            {"field": "value", "type": "quantitative", "format": ".4g", "title": colour_title},
            {"field": "headroom", "type": "quantitative", "format": ".3f", "title": "φ/φmax"},
            {"field": "regime", "type": "nominal", "title": "regime"}]
    if "feasible" in data:
        tips.append({"field": "feasible", "type": "nominal", "title": "inside every window"})
    flowing = {"and": [{"field": "value", "valid": True}, {"field": "value", "gt": 0}]}
    layers = [{"name": "view_0", "data": {"name": "cells"}, "transform": [{"filter": flowing}],
               "mark": {"type": "rect"},
               "encoding": {**rects, "tooltip": tips, "color": {
                   "field": "value", "type": "quantitative", "title": colour_title,
                   "scale": {"type": "log", "scheme": "viridis"},
                   "legend": {"orient": "right", "direction": "vertical", "format": ",~g",
                              "gradientLength": 220}}}}]
    value = data["value"].to_numpy(dtype=float)
    if not (value > 0).all():                              # NaN compares False
        layers.append({"data": {"name": "cells"}, "transform": [{"filter": {"not": flowing}}],
                       "mark": {"type": "rect", "color": NO_FLOW, "opacity": 0.85},
                       "encoding": {**rects, "tooltip": tips}})
    if "feasible" in data and data["feasible"].any():
        # Stippled, so the colours keep their meaning under the shading.
        layers.append({"data": {"name": "cells"},
                       "transform": [{"filter": {"field": "feasible", "equal": True}}],
                       "mark": {"type": "point", "shape": "circle", "filled": True,
                                "color": "#FFFFFF", "stroke": GREEN, "strokeWidth": 1,
                                "opacity": 0.9, "size": 40},
                       "encoding": {**centres, "tooltip": tips}})
    # Drawn in this order: the feasible outline (wide, underneath), the windows (dashed),
    # the packing limit on top; where limits coincide each stays visible.
    lines = []
    if "feasible" in data:
        lines.append((FEASIBLE_LINE, data["feasible"].astype(bool), GREEN, 6, [1, 0]))
    lines += [(label, data[column].astype(bool), colour, 2.5, [7, 4])
              for (label, column), colour in zip(windows, MAP_LINE_COLOURS, strict=False)]
    lines.append((PACKING_LINE, data["headroom"].fillna(np.inf) < 1.0, "#000000", 3, [1, 0]))
    drawn = [(label, colour, width_, dash,
              boundary_segments(data["x"], data["y"], mask).assign(line=label))
             for label, mask, colour, width_, dash in lines]
    drawn = [item for item in drawn if len(item[4])]   # only limits that cross the map
    limit_colour = {"field": "line", "type": "nominal", "title": "Limits",
                    "scale": {"domain": [d[0] for d in drawn], "range": [d[1] for d in drawn]},
                    "legend": {"orient": "bottom", "direction": "horizontal",
                               "symbolStrokeWidth": 3}}
    if drawn:                   # one legend for all limits, apart from the colour bar
        layers.append({"layer": [
            {"data": {"name": "limits"},
             "transform": [{"filter": {"field": "line", "equal": label}}],
             "mark": {"type": "rule", "strokeWidth": width_, "strokeDash": dash},
             "encoding": {**centres, "x2": {"field": "x2"}, "y2": {"field": "y2"},
                          "color": limit_colour}}
            for label, _colour, width_, dash, _segments in drawn]})
    datasets = {"cells": data,
                "limits": pd.concat([d[4] for d in drawn], ignore_index=True) if drawn else
                pd.DataFrame(columns=["x", "y", "x2", "y2", "line"])}
    if current is not None:
        datasets["recipe"] = pd.DataFrame([{"x": float(current["x"]), "y": float(current["y"]),
                                            "label": "current recipe"}])
        base = {"data": {"name": "recipe"}, "encoding": centres}
        layers.append({**base, "mark": {"type": "point", "shape": "diamond", "filled": True,
                                        "color": "#FFFFFF", "stroke": "#000000",
                                        "strokeWidth": 1.5, "size": 180}})
        layers.append({**base, "mark": {"type": "text", "align": "left", "dx": 10, "dy": -10,
                                        "color": "#000000", "fontWeight": "bold"},
                       "encoding": {**centres, "text": {"field": "label", "type": "nominal"}}})
    spec = {"$schema": alt.SCHEMA_URL, "layer": layers,
            "resolve": {"scale": {"color": "independent"}}, "width": width, "height": height,
            **({"title": title} if title else {})}
    if selectable:
        spec["params"] = [{"name": "cell", "views": ["view_0"],
                           "select": {"type": "point", "on": "click", "clear": "dblclick",
                                      "fields": ["x_loading", "y_loading"]}}]
    spec["datasets"] = datasets if frames else {name: _records(frame)
                                                for name, frame in datasets.items()}
    return spec


def _plain_spec(fig: Figure, chart: dict) -> dict:
    """A `Figure` spec as plain JSON: datasets as records (NaN and inf as null), no config
    (the caller adds it)."""
    spec = fig.spec(chart)
    del spec["config"]
    spec["datasets"] = {name: _records(frame) for name, frame in spec["datasets"].items()}
    return spec


def ternary_chart(cells: pd.DataFrame, *, parts: list[str], colour_title: str,
                  current: dict | None = None, width=MAP_WIDTH, height=MAP_HEIGHT,
                  title: str | None = "Design triangle") -> dict:
    """Viscosity over a triangle of three parts' shares (share_1..3 sum to 1).

    `cells` has share_1, share_2, share_3, value (viscosity as shown; NaN or inf where there
    is no flow), headroom, regime and optionally feasible. Part 1 sits at the lower left
    corner, part 2 at the lower right, part 3 at the top. Returns the Vega-Lite spec.
    """
    data = cells.replace([np.inf, -np.inf], np.nan).copy()
    data["tx"] = data["share_2"] + data["share_3"] / 2
    data["ty"] = data["share_3"] * np.sqrt(3) / 2
    n = int(round(1.0 / data["share_1"][data["share_1"] > 0].min())) + 1 if (
        data["share_1"] > 0).any() else 2
    size = (0.8 * min(width if isinstance(width, int | float) else MAP_WIDTH, height) / n) ** 2
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
    fig = Figure()
    layers = [fig.chart(data[flowing]).mark_point(shape="triangle-up", filled=True, opacity=1,
                                                  size=size).encode(
        x=x_enc, y=y_enc, tooltip=tips,
        color=alt.Color("value:Q", title=colour_title,
                        scale=alt.Scale(type="log", scheme="viridis"),
                        legend=alt.Legend(orient="right", direction="vertical",
                                          format=",~g")))]
    if (~flowing).any():
        layers.append(fig.chart(data[~flowing]).mark_point(
            shape="triangle-up", filled=True, opacity=0.85, color=NO_FLOW, size=size).encode(
            x=x_enc, y=y_enc, tooltip=tips))
    if "feasible" in data and data["feasible"].any():     # stippled, as on the map
        layers.append(fig.chart(data[data["feasible"].astype(bool)]).mark_point(
            shape="circle", filled=True, color="#FFFFFF", stroke=GREEN, strokeWidth=1,
            opacity=0.9, size=40).encode(x=x_enc, y=y_enc, tooltip=tips))
    h = np.sqrt(3) / 2
    frame = pd.DataFrame({"tx": [0.0, 1.0, 0.5, 0.0], "ty": [0.0, 0.0, h, 0.0],
                          "order": [0, 1, 2, 3]})
    layers.append(fig.chart(frame).mark_line(color="#000000", strokeWidth=1.2).encode(
        x=x_enc, y=y_enc, order=alt.Order("order:Q")))
    corners = pd.DataFrame({"tx": [0.0, 1.0, 0.5], "ty": [-0.05, -0.05, h + 0.04],
                            "label": parts})
    layers.append(fig.chart(corners).mark_text(fontWeight="bold").encode(
        x=x_enc, y=y_enc, text=alt.Text("label:N")))
    if current is not None and all(np.isfinite(current.get(f"share_{k}", np.nan))
                                   for k in (1, 2, 3)):
        dot = pd.DataFrame([{"tx": current["share_2"] + current["share_3"] / 2,
                             "ty": current["share_3"] * h, "label": "current recipe"}])
        layers.append(fig.chart(dot).mark_point(shape="diamond", filled=True, color="#FFFFFF",
                                                stroke="#000000", strokeWidth=1.5,
                                                size=180).encode(x=x_enc, y=y_enc))
        layers.append(fig.chart(dot).mark_text(align="left", dx=10, dy=-10,
                                               fontWeight="bold").encode(
            x=x_enc, y=y_enc, text=alt.Text("label:N")))
    heading = {}
    if title:
        note = "grey: no flow (packing limit) or no liquid"
        if "feasible" in data:
            note += "; white dots: inside every window"
        heading["title"] = {"text": title, "subtitle": note}
    chart = fig.layer(*layers, resolve={"scale": {"color": "independent"}}, width=width,
                      height=height, **heading)
    return _plain_spec(fig, chart)


def _shown_cells(grid: pd.DataFrame, viscosity_unit: str, **scaled) -> pd.DataFrame:
    """The cells as charted: value (viscosity in the shown unit), headroom, regime, a pass
    column per window, feasible, and each ``name=(grid column, factor)`` of `scaled`.
    Built in one go from an attrs-free view (each column read from `grid` itself would
    deep-copy its attrs)."""
    from .units import from_si

    plain = grid.copy(deep=False)
    plain.attrs = {}
    cells = {"value": from_si(plain["viscosity_Pa_s"].to_numpy(dtype=float), viscosity_unit,
                              "viscosity"),
             "headroom": plain["phi_over_phi_max"].to_numpy(dtype=float),
             "regime": plain["regime"].astype(str).to_numpy()}
    for w in grid.attrs.get("windows", []):
        cells[w["column"]] = plain[f"{w['column']}_pass"].to_numpy()
    if "feasible" in plain:
        cells["feasible"] = plain["feasible"].to_numpy()
    for name, (column, factor) in scaled.items():
        cells[name] = factor * plain[column].to_numpy(dtype=float)
    return pd.DataFrame(cells)


def loading_map_chart(grid: pd.DataFrame, viscosity_unit: str = "Pa*s", *, width=MAP_WIDTH,
                      height=MAP_HEIGHT, selectable: bool = False,
                      title: str | None = None, frames: bool = False) -> dict:
    """The chart of a `design.loading_map` result: loadings in wt% or vol%, viscosity in
    `viscosity_unit`, each window's limit as a line, the current recipe marked."""
    unit = "wt%" if grid.attrs.get("basis", "mass") == "mass" else "vol%"
    cells = _shown_cells(grid, viscosity_unit, x=("x_loading", 100.0), y=("y_loading", 100.0),
                         x_loading=("x_loading", 1.0), y_loading=("y_loading", 1.0))
    now = grid.attrs.get("current")
    current = None if now is None else {"x": 100 * now["x_loading"], "y": 100 * now["y_loading"]}
    rate = grid.attrs.get("shear_rate_1_per_s")
    windows = [(f"{w['name']} limit", w["column"]) for w in grid.attrs.get("windows", [])]
    return design_map_chart(
        cells, x_title=f"{grid.attrs.get('x_ingredient', 'x')} [{unit}]",
        y_title=f"{grid.attrs.get('y_ingredient', 'y')} [{unit}]",
        colour_title=f"viscosity at {rate:g} 1/s [{viscosity_unit}]" if rate else
        f"viscosity [{viscosity_unit}]", windows=windows, current=current, width=width,
        height=height, selectable=selectable, title=title, frames=frames)


def loading_ternary_chart(tri: pd.DataFrame, viscosity_unit: str = "Pa*s", *,
                          width=MAP_WIDTH, height=MAP_HEIGHT,
                          title: str | None = None) -> dict:
    """The chart of a `design.loading_ternary` result (shares of the triangle's total)."""
    cells = _shown_cells(tri, viscosity_unit,
                         **{f"share_{k}": (f"share_{k}", 1.0) for k in (1, 2, 3)})
    unit = "wt%" if tri.attrs.get("basis", "mass") == "mass" else "vol%"
    total = tri.attrs.get("total", float("nan"))
    parts = list(tri.attrs.get("parts", ["1", "2", "3"]))
    rate = tri.attrs.get("shear_rate_1_per_s")
    return ternary_chart(
        cells, parts=parts, colour_title=f"viscosity at {rate:g} 1/s [{viscosity_unit}]"
        if rate else f"viscosity [{viscosity_unit}]", current=tri.attrs.get("current"),
        width=width, height=height,
        title=title or f"Shares of {100 * total:.3g} {unit} in total")


def design_map(grid: pd.DataFrame, viscosity_unit: str, big: bool = False,
               joined: bool = False, frames: bool = False) -> dict:
    """The chart of `design.loading_map` for the app, the report and the CLI; on the page
    (`joined` False: container width) clicking a cell selects it (selection "cell").
    `frames`: datasets as DataFrames, for Streamlit only (not JSON; see `design_map_chart`)."""
    spec = loading_map_chart(grid, viscosity_unit, width=EXPORT_WIDTH if joined else "container",
                             height=_height(big, MAP_HEIGHT), selectable=not joined,
                             frames=frames)
    spec["config"] = config(big)
    return spec


def design_triangle(tri: pd.DataFrame, viscosity_unit: str, big: bool = False,
                    joined: bool = False) -> dict:
    """The chart of `design.loading_ternary` for the app, the report and the CLI."""
    spec = loading_ternary_chart(tri, viscosity_unit,
                                 width=EXPORT_WIDTH if joined else "container",
                                 height=_height(big, MAP_HEIGHT))
    spec["config"] = config(big)
    return spec


def points_and_lines(points: pd.DataFrame, lines_: pd.DataFrame, *, x: str, y: str,
                     series: str, x_title: str, y_title: str, series_title: str,
                     x_log: bool = True, y_log: bool = True, title: str = "",
                     big: bool = False) -> dict:
    """Measured points and fitted lines, one colour per series (flow curves, step tests,
    slip at several gaps, a parameter against loading)."""
    fig = Figure()
    names = list(dict.fromkeys([*points[series], *(lines_[series] if len(lines_) else [])]))
    colour = alt.Color(f"{series}:N", title=series_title, scale=_palette(names), sort=names)
    xs = alt.X(f"{x}:Q", title=x_title, scale=alt.Scale(type="log" if x_log else "linear"))
    ys = alt.Y(f"{y}:Q", title=y_title, scale=alt.Scale(type="log" if y_log else "linear"))
    tips = [alt.Tooltip(f"{series}:N", title=series_title),
            alt.Tooltip(f"{x}:Q", format=".4g", title=x_title),
            alt.Tooltip(f"{y}:Q", format=".4g", title=y_title)]
    keep = np.isfinite(points[x]) & np.isfinite(points[y])
    if x_log:
        keep &= points[x] > 0
    if y_log:
        keep &= points[y] > 0
    dots = fig.chart(points[keep]).mark_point(filled=True, size=55 if not big else 90,
                                              opacity=0.85).encode(
        x=xs, y=ys, color=colour, tooltip=tips)
    parts = [dots]
    if len(lines_):
        parts.append(fig.chart(lines_).mark_line(strokeWidth=2.2).encode(
            x=xs, y=ys, color=colour, tooltip=tips))
    chart = fig.layer(*parts, height=_height(big, 340), width="container",
                      **({"title": title} if title else {}))
    return fig.spec(chart, big)
