"""AppTest of the Design map page: the cells shown are design.loading_map's, passed through."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from app import state
from predictor import charts, design
from predictor import formulation as fm
from predictor import scenario as sc
from tests.app.conftest import chart_specs, demo, messages, metric, opened, page, seed_values

WINDOWS = [("pumping", 100.0, 2.0, None), ("sag resistance", 0.1, None, 10.0)]


def _reference(n: int = 5):
    return design.loading_map(demo(), 0, 1, (0.2, 0.6), (0.0, 0.4), 100.0, n=n,
                              windows=WINDOWS)


def test_opens_with_the_map_of_the_first_two_ingredients():
    at = page("design_map", map_n=5).run()
    assert not at.exception
    grid = _reference()
    assert metric(at, "Cells") == "25"
    assert metric(at, "Jammed") == str(int((grid["regime"] == "jammed").sum()))
    assert metric(at, "Inside every window") == str(int(grid["feasible"].sum()))
    (spec,) = chart_specs(at)
    assert "platy mineral filler [wt%]" in str(spec)
    assert spec["layer"][0]["encoding"]["color"]["scale"]["type"] == "log"
    assert [p["name"] for p in spec["params"]] == ["cell"]      # click selects a cell


def test_opens_at_a_41_by_41_grid_equal_to_the_core_map():
    # The engine solves all cells in one call (engine.vary), so the page opens at 41 x 41.
    at = page("design_map").run()
    assert not at.exception
    grid = _reference(41)
    assert metric(at, "Cells") == str(41 * 41) == str(len(grid))
    assert metric(at, "Jammed") == str(int((grid["regime"] == "jammed").sum()))


def test_a_clicked_cell_loads_that_recipe():
    # The click callback hands the cell's loadings to state.set_loadings; the scenario the
    # app then builds predicts exactly the cell's viscosity.
    grid = _reference()
    cell = grid.iloc[7]
    values = seed_values()
    state.set_loadings({0: cell["x_loading"], 1: cell["y_loading"]}, "mass", values)
    form = sc.loads(sc.dumps(sc.scenario_from_dict(state.document(values))))
    eta = float(fm.predict(form, 100.0)["viscosity_Pa_s"][0])
    assert eta == pytest.approx(cell["viscosity_Pa_s"], rel=1e-9)


def test_triangle_and_bad_ranges_show_messages_not_tracebacks():
    at = page("design_map", map_n=4, map_mode="triangle", map_parts=[0, 1, -1]).run()
    assert not at.exception
    assert metric(at, "Cells") == "10"
    tri = design.loading_ternary(demo(), (0, 1, "liquid"), 100.0, n=4, windows=WINDOWS)
    assert metric(at, "Jammed") == str(int((tri["regime"] == "jammed").sum()))
    at = page("design_map", map_n=3, map_x_low=50.0, map_x_high=10.0).run()
    assert not at.exception
    assert "x_range" in messages(at)
    at = page("design_map", map_n=3, map_rate=-5.0).run()
    assert not at.exception
    assert "shear_rate_1_per_s" in messages(at)


def _two_powders_values() -> dict:
    from tests.test_design_map import two_powders_in_water

    values = seed_values()
    for key in [k for k in values if k.startswith("ing")]:
        del values[key]
    values.update(state.values_from_formulation(two_powders_in_water(), values))
    return values


def test_candidates_box_is_built_only_while_open_and_keeps_its_settings():
    # Closed, the map's reruns draw none of its widgets (each widget costs time on every run).
    at = page("design_map", map_n=3).run()
    assert not at.exception
    assert "cand_send" not in _keys(at) and "cand_n" not in _keys(at)
    _set(at, opened("candidates")).run()
    assert "cand_send" in _keys(at)
    at.number_input(key="cand_n").set_value(7).run()
    _set(at, dict.fromkeys(opened("candidates"), False))
    at.number_input(key="map_x_high").set_value(55.0).run()       # a rerun while closed
    assert "cand_n" not in _keys(at)
    _set(at, opened("candidates")).run()
    assert at.number_input(key="cand_n").value == 7


def _set(at, values: dict):
    for key, value in values.items():
        at.session_state[key] = value
    return at


def _keys(at) -> set:
    return {getattr(w, "key", None) for w in at.main}


def test_candidates_go_to_the_batch_screen(tmp_path):
    values = _two_powders_values() | {"map_n": 3, "map_x_low": 20.0, "map_x_high": 40.0,
                                      "map_y_low": 5.0, "map_y_high": 15.0}
    at = page("design_map", **values, **opened("candidates")).run()
    assert not at.exception, at.exception
    at.button(key="cand_send").click().run()
    assert not at.exception
    files = at.session_state["batch_files"]
    name = at.session_state["batch_table_name"]
    assert name == "candidates_from_design_map.csv"
    table = files[name].decode().splitlines()
    assert len(table) == 1 + 9                         # 3 x 3 levels of the two loadings
    header = table[0].split(",")
    assert "ingredient 1 loading [wt fraction]" in header and "base scenario" in header
    column = header.index("ingredient 2 loading [wt fraction]")   # the map's y ingredient
    levels = sorted({float(line.split(",")[column]) for line in table[1:]})
    assert levels == pytest.approx([0.05, 0.10, 0.15])            # over the map's y range
    assert any(n.endswith(".loadline.json") for n in files)  # the scenario beside it
    for file_name, data in files.items():                # what the Batch screen page reads
        (tmp_path / file_name).write_bytes(data)
    from predictor import batch

    summary, result = batch.screen_file(tmp_path / name, keep=-1)
    assert summary.rows == 9 and summary.ok == 9, summary.first_errors


def test_candidates_of_the_demo_paint_screen(tmp_path):
    at = page("design_map", map_n=3, **opened("candidates")).run()   # demo paint: Carreau-Yasuda
    assert not at.exception
    assert "liquid law" not in messages(at)
    at.button(key="cand_send").click().run()
    assert not at.exception
    files = at.session_state["batch_files"]
    for file_name, data in files.items():                  # what the Batch screen page reads
        (tmp_path / file_name).write_bytes(data)
    from predictor import batch

    summary, _ = batch.screen_file(tmp_path / at.session_state["batch_table_name"], keep=-1)
    assert summary.rows == 9 and summary.ok == 9, summary.first_errors


@pytest.mark.parametrize("big", [False, True])
def test_map_and_triangle_charts_are_valid_vega_lite_and_export(big):
    from predictor import charts
    from tests.app.test_charts import _valid
    from tests.test_design_map import newtonian_pair

    windows = [("pumping", 100.0, 0.4), ("sag", 0.1, None, 0.1)]
    grid = design.loading_map(newtonian_pair(), 0, 1, (0.0, 0.8), (0.0, 0.8), 10.0, n=9,
                              basis="volume", windows=windows)
    assert {"jammed", design.NO_LIQUID} <= set(grid["regime"]) and grid["feasible"].any()
    tri = design.loading_ternary(newtonian_pair(), (0, 1, "liquid"), 10.0, n=7,
                                 basis="volume", windows=windows)
    for spec in (charts.design_map(grid, "mPa*s", big), charts.design_triangle(tri, "Pa*s", big),
                 charts.design_map(grid, "mPa*s", big, joined=True)):
        _valid(spec)
        assert "vega-lite" in spec["$schema"]
    text = json.dumps(charts.design_map(grid, "mPa*s", big))
    for label in ("packing limit", "pumping limit", "sag limit", "feasible region",
                  "a [vol%]", "b [vol%]", "current recipe"):
        assert label in text
    assert charts.to_png(charts.design_map(grid, "mPa*s", big, joined=True))[:4] == b"\x89PNG"
    assert "<svg" in charts.to_svg(charts.design_triangle(tri, "Pa*s", big, joined=True))


def test_map_chart_with_frames_is_the_same_chart_as_the_plain_one():
    """The page's spec (datasets left as DataFrames for Streamlit) carries the same rows
    as the plain-JSON spec of the exports, and the same everything else."""
    grid = design.loading_map(demo(), 0, 1, (0.30, 0.60), (0.0, 0.15), 50.0, n=9,
                              windows=[("pump", 100.0, 5.0, None)])
    plain = charts.design_map(grid, "mPa*s")
    framed = charts.design_map(grid, "mPa*s", frames=True)
    assert {k: v for k, v in plain.items() if k != "datasets"} == \
        {k: v for k, v in framed.items() if k != "datasets"}
    assert plain["datasets"].keys() == framed["datasets"].keys()
    for name, frame in framed["datasets"].items():
        assert isinstance(frame, pd.DataFrame)
        assert charts._records(frame) == plain["datasets"][name]
