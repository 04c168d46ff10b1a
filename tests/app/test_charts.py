"""Chart builders: every axis titled with a unit; PNG and SVG export work offline."""

from __future__ import annotations

import json

import altair as alt
import numpy as np
import pandas as pd
import pytest

from predictor import charts


def _sweep():
    phi = np.linspace(0, 0.6, 50)
    return pd.DataFrame({"phi": phi, "viscosity": (1 - phi / 0.64) ** -1.6,
                         "relation": "krieger-dougherty"})


def _titles(spec) -> list[str]:
    found = []

    def walk(node):
        if isinstance(node, dict):
            for key, value in node.items():
                if key == "title" and isinstance(value, str):
                    found.append(value)
                walk(value)
        elif isinstance(node, list):
            for item in node:
                walk(item)
    walk(spec)
    return found


def test_loading_sweep_axes_carry_units_and_export():
    chart = charts.loading_sweep(_sweep(), y_title="Viscosity [mPa·s]", phi_max=0.64,
                                 phi_max_range=(0.6, 0.7), wt_ticks=[(0.0, 0.0), (0.1, 25.0)],
                                 current={"phi": 0.3, "viscosity": 2.75, "label": "now"})
    titles = _titles(chart)
    assert "Viscosity [mPa·s]" in titles
    assert "Effective solids volume fraction φ [–]" in titles
    assert "Solids in the formulation [wt%]" in titles
    assert charts.to_png(chart)[:8] == b"\x89PNG\r\n\x1a\n"
    svg = charts.to_svg(chart)
    assert "<svg" in svg and "Viscosity" in svg


def test_okabe_ito_palette_is_used_for_series():
    frame = pd.concat([_sweep(), _sweep().assign(relation="quemada")])
    spec = json.dumps(charts.loading_sweep(frame, y_title="Viscosity [Pa·s]"), default=str)
    assert charts.OKABE_ITO[0] in spec and charts.OKABE_ITO[1] in spec


def test_flow_curve_export_joins_the_panels():
    rates = np.logspace(-2, 3, 30)
    curve = pd.DataFrame({"rate": rates, "viscosity": 5 / (1 + rates) + 1,
                          "stress": rates * 2, "regime": "thinning"})
    windows = pd.DataFrame([("levelling", 0.01, 0.1), ("pumping", 1, 1000)],
                           columns=["name", "low", "high"])
    joined = charts.flow_curve(curve, windows=windows, x_title="Shear rate [1/s]",
                               y_title="Viscosity [mPa·s]", stress_title="Shear stress [Pa]",
                               joined=True)
    titles = _titles(joined)
    assert {"Shear rate [1/s]", "Viscosity [mPa·s]", "Shear stress [Pa]"} <= set(titles)
    assert charts.png_of(lambda: joined)[:4] == b"\x89PNG"


def _valid(spec: dict) -> None:
    """The spec as written to files is valid Vega-Lite (Altair's schema check)."""
    doc = json.loads(charts.export_json(spec))
    kind = next((k for k in ("layer", "vconcat", "hconcat") if k in doc), None)
    cls = {"layer": alt.LayerChart, "vconcat": alt.VConcatChart, "hconcat": alt.HConcatChart,
           None: alt.Chart}[kind]
    cls.from_dict(doc)          # raises on an invalid spec


def _frames():
    rates = np.logspace(-2, 3, 30)
    curve = pd.DataFrame({"rate": rates, "viscosity": 5 / (1 + rates) + 1,
                          "stress": rates * 2, "regime": ["plateau"] * 10 + ["thinning"] * 20})
    windows = pd.DataFrame([("levelling", 0.01, 0.1), ("pumping", 1, 1000)],
                           columns=["name", "low", "high"])
    phi = np.linspace(0, 0.9, 20)
    ratio = pd.DataFrame({"phi": np.tile(phi, 2), "branch": ["as designed"] * 20
                          + ["inverted"] * 20, "viscosity": np.tile(1 + 10 * phi, 2),
                          "yield_stress": np.tile(np.where(phi > 0.64, phi, 0.0), 2)})
    regimes = pd.DataFrame({"regime": ["dilute", "concentrated", "jammed"],
                            "low": [0, 0.03, 0.64], "high": [0.03, 0.64, 0.9]})
    return curve, windows, ratio, regimes


@pytest.mark.parametrize("big", [False, True])
def test_every_builder_writes_valid_vega_lite(big):
    curve, windows, ratio, regimes = _frames()
    fit = pd.DataFrame({"phi": [0.0, 0.3], "central": [1.0, 3.0], "low": [1.0, 2.5],
                        "high": [1.0, 3.5]})
    data = pd.DataFrame({"phi": [0.1, 0.2], "measured": [1.3, 1.9], "fitted": [1.3, 2.0],
                         "residual": [0.0, -0.05]})
    sizes = pd.DataFrame({"diameter": [1.0, 2.0, 4.0] * 2, "amount": [20, 50, 30, 60, 30, 10],
                          "basis": ["volume"] * 3 + ["number"] * 3})
    marks = pd.DataFrame({"diameter": [1.0, 2.0, 4.0], "label": ["D10", "D50", "D90"]})
    blend2 = pd.DataFrame({"share_1": [0, 50, 100], "phi_max": [0.64, 0.7, 0.64],
                           "relative_viscosity": [5, 4, 5],
                           "relative_viscosity_farris": [5, 3, 5]})
    blend3 = pd.DataFrame({"share_1": [0, 50], "share_2": [50, 0], "share_3": [50, 50],
                           "phi_max": [0.7, 0.72]})
    specs = [
        charts.loading_sweep(_sweep(), y_title="Viscosity [mPa·s]", phi_max=0.64,
                             phi_max_range=(0.6, 0.7), wt_ticks=[(0.0, 0.0), (0.1, 25.0)],
                             current={"phi": 0.3, "viscosity": 2.7, "label": "now"},
                             limit={"viscosity": 10.0, "label": "limit"},
                             band=pd.DataFrame({"phi": [0.1, 0.2], "low": [1.1, 1.5],
                                                "high": [1.3, 1.9]}), big=big),
        charts.lines(_sweep(), x="phi", y="viscosity", series="relation", x_title="φ [–]",
                     y_title="Viscosity [Pa·s]", series_title="Relation", big=big),
        *charts.flow_curve(curve, windows=windows, x_title="Shear rate [1/s]",
                           y_title="Viscosity [mPa·s]", stress_title="Shear stress [Pa]",
                           selected="pumping",
                           markers=pd.DataFrame([{"rate": 1.0, "label": "Thinning onset"}]),
                           point={"rate": 10.0, "viscosity": 1.5, "stress": 15.0}, big=big),
        *charts.phase_ratio(ratio, y_title="Viscosity [mPa·s]", yield_title="Yield stress [Pa]",
                            regimes=regimes, caution=(0.6, 0.8),
                            current={"phi": 0.3, "viscosity": 4.0, "yield_stress": 0.0,
                                     "label": "now"}, big=big),
        charts.fit_chart(fit, data, model="krieger-dougherty", level="95 %", big=big),
        charts.residuals(data, big=big),
        charts.headroom_bars(pd.DataFrame({"candidate": ["a", "b"], "headroom": [0.3, 0.97],
                                           "verdict": ["passes every window",
                                                       "fails a window"]}), big=big),
        charts.size_classes(sizes, marks, x_title="Diameter [µm]", big=big),
        charts.estimator_bars(pd.DataFrame({"method": ["a", "b"], "phi_max": [0.64, 0.7]}),
                              big=big),
        charts.blend_curve(blend2, names=["coarse", "fine"], big=big),
        charts.blend_curve(blend3, names=["a", "b", "c"], big=big),
        charts.system_curve(pd.DataFrame({"flow": [1.0, 10.0, 100.0],
                                          "pressure": [0.1, 0.3, 2.0],
                                          "regime": ["laminar", "laminar", "turbulent"]}),
                            x_title="Flow rate [L/min]", y_title="Pressure drop [bar]",
                            point={"flow": 10.0, "pressure": 0.3}, restart=0.5, big=big),
    ]
    for spec in specs:
        _valid(spec)  # schema validation; raises on an invalid spec
        assert "vega-lite" in spec.get("$schema", "")


@pytest.mark.parametrize("big", [False, True])
def test_points_and_lines_writes_valid_vega_lite(big):
    points = pd.DataFrame({"series": ["a", "a", "b"], "x": [0.1, 1.0, 10.0],
                           "y": [1.0, 2.0, -1.0]})          # a non-positive y is left out
    lines = pd.DataFrame({"series": ["a", "a"], "x": [0.1, 10.0], "y": [1.0, 3.0]})
    for line_frame in (lines, lines.iloc[:0]):
        spec = charts.points_and_lines(points, line_frame, x="x", y="y", series="series",
                                       x_title="Shear rate [1/s]", y_title="Shear stress [Pa]",
                                       series_title="Series", title="t", big=big)
        _valid(spec)
        frames = list(spec["datasets"].values())
        assert all((np.asarray(f["y"]) > 0).all() for f in frames)
        assert {"Shear rate [1/s]", "Shear stress [Pa]"} <= set(_titles(spec))


def test_energy_curve_axes_rule_and_export():
    from predictor import interactions

    curve = interactions.energy_curve(1e-6, 4.8e-20, 0.03, 1e-3)
    frame = pd.concat([pd.DataFrame({"separation_nm": curve.separation_m * 1e9,
                                     "energy_kT": values, "term": term})
                       for term, values in (("total", curve.total_kT),
                                            ("van der Waals", curve.van_der_waals_kT))])
    chart = charts.energy_curve(frame, threshold_kT=15.0)
    titles = _titles(chart)
    assert "Pair energy [kT]" in titles and "Surface separation [nm]" in titles
    text = json.dumps(chart, default=str)
    assert "barrier rule of thumb 15 kT" in text
    # the y range holds the barrier and clips the deep van der Waals well
    domain = chart["layer"][0]["encoding"]["y"]["scale"]["domain"]
    assert domain[1] > curve.total_kT.max() and domain[0] > curve.van_der_waals_kT.min()
    _valid(chart)
    assert charts.to_png(chart)[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize("columns", [None, ["a", "b", "c", "e", "f", "g", "h"]])
def test_chart_records_are_pandas_records_with_null_for_missing(columns):
    """The fast column-wise `_records` gives pandas' own records (reference library:
    pandas `DataFrame.to_dict("records")` after NaN/inf -> None), value and Python type."""
    frame = pd.DataFrame({
        "a": [1.0, np.inf, np.nan, -np.inf], "h": np.array([0.5, 1.0, 2.0, 3.0], "float32"),
        "b": pd.array([True, None, False, True], dtype="boolean"),
        "c": pd.Categorical(["x", "y", None, "x"]),
        "d": pd.to_datetime(["2020-01-01", None, "2020-01-02", "2020-01-03"]),
        "e": [1, 2, 3, 4], "f": pd.array([1.5, None, 2.0, 3.0], dtype="Float64"),
        "g": pd.array(["s", None, "u", "t"], dtype="string")})
    frame = frame if columns is None else frame[columns]
    clean = frame.replace([np.inf, -np.inf], np.nan)
    expected = clean.astype(object).where(clean.notna(), None).to_dict("records")
    got = charts._records(frame)
    assert got == expected
    assert [type(v) for row in got for v in row.values()] == \
        [type(v) for row in expected for v in row.values()]
    assert got[1]["a"] is None and got[2]["a"] is None and got[0]["a"] == 1.0
