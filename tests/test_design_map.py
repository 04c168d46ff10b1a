"""Design-space maps (`design.loading_map`, `design.loading_ternary`) and candidate tables."""

import dataclasses

import numpy as np
import pandas as pd
import pytest

from predictor import design, scenario
from predictor import formulation as fm
from predictor.errors import InputRangeError
from predictor.formulation import Formulation, Ingredient, Liquid

DEMO = "data_demo/mineral_coating.loadline.json"
PHI_MAX = 0.6
ETA_L = 0.05


def newtonian_pair() -> Formulation:
    """Two coarse powders (no Brownian term above 3 um) with a given phi_max, in an oil."""
    liquid = Liquid(name="oil", preset="", law="newtonian", params={"viscosity_Pa_s": ETA_L},
                    density_kg_per_m3=950.0)
    powder = dict(density_kg_per_m3=2500.0, basis="volume", diameter_m=20e-6, phi_max=PHI_MAX,
                  intrinsic_viscosity=2.5)
    return Formulation(liquid=liquid, ingredients=(Ingredient("a", loading=0.2, **powder),
                                                   Ingredient("b", loading=0.1, **powder)))


def test_map_equals_hand_computed_krieger_dougherty():
    # Krieger & Dougherty, Trans. Soc. Rheol. 3, 137 (1959), Eq. (the relation):
    # eta = eta_L (1 - phi/phi_max)^(-[eta] phi_max), [eta] = 2.5 (Einstein); phi = x + y on
    # a volume basis (no adsorbed layer); at or beyond phi_max no flow (inf, "jammed").
    grid = design.loading_map(newtonian_pair(), "a", "b", (0.0, 0.4), (0.0, 0.4), 10.0, n=9,
                              basis="volume")
    assert len(grid) == 81
    phi = grid["x_loading"].to_numpy() + grid["y_loading"].to_numpy()
    below = phi < PHI_MAX - 1e-9
    expected = ETA_L * (1.0 - phi[below] / PHI_MAX) ** (-2.5 * PHI_MAX)
    np.testing.assert_allclose(grid["viscosity_Pa_s"].to_numpy()[below], expected, rtol=1e-9)
    np.testing.assert_allclose(grid["phi_over_phi_max"], phi / PHI_MAX, rtol=1e-9)
    above = phi > PHI_MAX + 1e-9
    assert np.isinf(grid["viscosity_Pa_s"].to_numpy()[above]).all()
    assert (grid["regime"].to_numpy()[above] == "jammed").all()
    assert grid.attrs["current"] == pytest.approx({"x_loading": 0.2, "y_loading": 0.1})


def test_cells_equal_predict_of_the_same_recipe():
    form = scenario.read_scenario(DEMO)
    grid = design.loading_map(form, 0, "white pigment", (0.2, 0.45), (0.05, 0.25), 100.0, n=3)
    for row in grid.itertuples():
        ings = (dataclasses.replace(form.ingredients[0], loading=row.x_loading, basis="mass"),
                dataclasses.replace(form.ingredients[1], loading=row.y_loading, basis="mass"))
        one = fm.predict(dataclasses.replace(form, ingredients=ings), 100.0)
        assert row.viscosity_Pa_s == pytest.approx(float(one["viscosity_Pa_s"][0]), rel=1e-12)
        assert row.regime == one["regime"][0]
        assert row.phi_over_phi_max == pytest.approx(one.attrs["headroom"], rel=1e-12)


def test_feasible_region_is_the_intersection_of_the_window_passes():
    windows = [("pumping", 100.0, 0.4), design.ProcessWindow("sag resistance", 0.1, None, 0.1),
               {"name": "levelling", "shear_rate_1_per_s": 1.0, "max_viscosity_Pa_s": 2.0}]
    grid = design.loading_map(newtonian_pair(), 0, 1, (0.0, 0.5), (0.0, 0.5), 10.0, n=11,
                              basis="volume", windows=windows)
    passes = grid[["pumping_pass", "sag_resistance_pass", "levelling_pass"]].to_numpy()
    np.testing.assert_array_equal(grid["feasible"].to_numpy(), passes.all(axis=1))
    # Each pass is its own limit on the viscosity at its own shear rate (Newtonian: same
    # viscosity at every rate), jammed cells fail.
    eta = grid["viscosity_Pa_s"].to_numpy()
    np.testing.assert_array_equal(grid["pumping_pass"], np.isfinite(eta) & (eta <= 0.4))
    np.testing.assert_array_equal(grid["sag_resistance_pass"], np.isfinite(eta) & (eta >= 0.1))
    assert 0 < grid["feasible"].sum() < len(grid)      # the region is a real band
    np.testing.assert_allclose(grid["levelling_viscosity_Pa_s"], eta, rtol=1e-12)


def test_cells_without_room_for_the_liquid_are_marked():
    grid = design.loading_map(newtonian_pair(), 0, 1, (0.0, 0.8), (0.0, 0.8), 10.0, n=5,
                              basis="volume", windows=[("pumping", 100.0, 1.0)])
    full = grid["x_loading"] + grid["y_loading"] >= 1.0
    assert full.any()
    assert (grid.loc[full, "regime"] == design.NO_LIQUID).all()
    assert grid.loc[full, "viscosity_Pa_s"].isna().all()
    assert not grid.loc[full, "feasible"].any()


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"x_ingredient": 5}, "x_ingredient"),
    ({"y_ingredient": "no such powder"}, "y_ingredient"),
    ({"y_ingredient": 0}, "y_ingredient"),
    ({"x_range": (0.3, 0.1)}, "x_range"),
    ({"y_range": (0.0, 1.5)}, "y_range"),
    ({"x_range": "wide"}, "x_range"),
    ({"n": 1}, "n"),
    ({"n": 10_000}, "n"),
    ({"basis": "number"}, "basis"),
    ({"shear_rate_1_per_s": -1.0}, "shear_rate_1_per_s"),
    ({"windows": [("a", 1.0, 1.0), ("A", 2.0, 1.0)]}, "windows"),
    ({"windows": [("a", float("nan"), 1.0)]}, "window 'a' shear rate"),
])
def test_bad_map_input_names_the_field(kwargs, field):
    args = {"x_ingredient": 0, "y_ingredient": 1, "x_range": (0.0, 0.3),
            "y_range": (0.0, 0.3), "shear_rate_1_per_s": 10.0, "n": 3} | kwargs
    with pytest.raises(InputRangeError) as err:
        design.loading_map(newtonian_pair(), **args)
    assert err.value.field == field


def test_ternary_with_the_liquid_matches_the_plane_map():
    form = newtonian_pair()
    tri = design.loading_ternary(form, ("a", "b", "liquid"), 10.0, n=6, basis="volume")
    assert len(tri) == 21
    np.testing.assert_allclose(tri[["share_1", "share_2", "share_3"]].sum(axis=1), 1.0)
    assert tri.attrs["total"] == pytest.approx(1.0)           # two powders + liquid, now
    phi = tri["loading_1"] + tri["loading_2"]
    below = phi < PHI_MAX - 1e-9
    expected = ETA_L * (1.0 - phi[below] / PHI_MAX) ** (-2.5 * PHI_MAX)   # Krieger-Dougherty
    np.testing.assert_allclose(tri.loc[below, "viscosity_Pa_s"], expected, rtol=1e-9)
    assert (tri.loc[(phi > PHI_MAX + 1e-9) & (phi < 1 - 1e-9), "regime"] == "jammed").all()
    assert (tri.loc[tri["share_3"] == 0.0, "regime"] == design.NO_LIQUID).all()   # no liquid


def test_ternary_of_three_ingredients_keeps_their_total():
    form = newtonian_pair()
    third = dataclasses.replace(form.ingredients[0], name="c", loading=0.05)
    form = dataclasses.replace(form, ingredients=(*form.ingredients, third))
    tri = design.loading_ternary(form, (0, 1, 2), 10.0, n=5, basis="volume",
                                 windows=[("pumping", 100.0, 0.5)])
    assert tri.attrs["total"] == pytest.approx(0.35)
    np.testing.assert_allclose(tri[["loading_1", "loading_2", "loading_3"]].sum(axis=1), 0.35)
    # Every point has the same total solids and all three share one phi_max: one viscosity.
    eta = tri["viscosity_Pa_s"].to_numpy()
    np.testing.assert_allclose(eta, ETA_L * (1 - 0.35 / PHI_MAX) ** (-2.5 * PHI_MAX), rtol=1e-9)
    np.testing.assert_array_equal(tri["feasible"], tri["pumping_pass"])
    assert tri.attrs["current"] == pytest.approx({"share_1": 0.2 / 0.35, "share_2": 0.1 / 0.35,
                                                  "share_3": 0.05 / 0.35})


@pytest.mark.parametrize(("parts", "total"), [
    ((0, 1), None), ((0, "liquid", "liquid"), None), ((0, 0, 1), None), ((0, 1, "liquid"), 0.0),
    ((0, 1, "liquid"), 1.5),
])
def test_bad_ternary_input_is_refused(parts, total):
    with pytest.raises(InputRangeError):
        design.loading_ternary(newtonian_pair(), parts, 10.0, total=total, n=3)


def test_map_frame_is_plain_data():
    grid = design.loading_map(newtonian_pair(), 0, 1, (0.0, 0.3), (0.0, 0.3), 10.0, n=2)
    assert isinstance(grid, pd.DataFrame)
    assert list(grid.columns) == ["x_loading", "y_loading", "viscosity_Pa_s",
                                  "phi_over_phi_max", "regime"]


def test_report_has_the_map_of_the_first_two_solids(monkeypatch):
    from predictor import report

    monkeypatch.setattr(report, "MAP_POINTS", 4)
    form = scenario.read_scenario(DEMO)
    sections = {s.title: s for s in report.build_report(form).sections}
    sec = sections["Design map of the first two solids"]
    (spec,) = sec.charts
    assert "platy mineral filler [wt%]" in str(spec) and "white pigment [wt%]" in str(spec)
    one_solid = dataclasses.replace(form, ingredients=form.ingredients[:1])
    titles = [s.title for s in report.build_report(one_solid).sections]
    assert "Design map of the first two solids" not in titles


# --- candidate tables for the batch screen ---------------------------------------------------

def two_powders_in_water() -> Formulation:
    from predictor.sizes import SizeDistribution

    return Formulation(name="invented slurry", ingredients=(
        Ingredient("coarse filler", 2700.0, 0.3, diameter_m=8e-6),
        Ingredient("fine pigment", 4100.0, 0.1, size=SizeDistribution.lognormal(0.6e-6, 1.5),
                   layer_thickness_m=2e-9)))


def _recipe(form: Formulation, row) -> Formulation:
    """The scenario with a candidate row's factors applied (by hand, for the check)."""
    coarse = dataclasses.replace(form.ingredients[0], loading=row["ingredient 1 loading"],
                                 diameter_m=row["ingredient 1 d50"])
    fine = form.ingredients[1]
    scale = row["ingredient 2 d50"] / fine.size.d50_m
    fine = dataclasses.replace(fine, size=type(fine.size)(fine.size.diameters_m * scale,
                                                          fine.size.fractions))
    liquid = dataclasses.replace(form.liquid, temperature_K=row["temperature"])
    return dataclasses.replace(form, liquid=liquid, ingredients=(coarse, fine))


@pytest.mark.parametrize(("design_name", "rows"), [("full-factorial", 16),
                                                   ("latin-hypercube", 7), ("sobol", 8),
                                                   ("halton", 5)])
def test_candidate_rows_screen_to_predict_of_the_same_recipe(tmp_path, design_name, rows):
    from predictor import batch, candidates

    form = two_powders_in_water()
    factors = {"ingredient 1 loading": (0.2, 0.4), "ingredient 1 d50": (4e-6, 20e-6),
               "ingredient 2 d50": (0.3e-6, 1.2e-6), "temperature": (288.15, 318.15)}
    table, files = candidates.candidate_table(form, factors, design=design_name, n=rows,
                                              levels=2, windows=[("pumping", 100.0, 0.01)])
    assert len(table) == rows
    for name, data in candidates.file_bytes(files).items():
        (tmp_path / name).write_bytes(data)
    result = batch.screen(table, base_dir=tmp_path)
    assert (result["status"] == "ok").all(), result["error"].tolist()
    points = candidates.design_points(list(factors.values()), design_name, rows, 2)
    for i in range(rows):
        row = dict(zip(factors, points[i], strict=True))
        for name, (low, high) in factors.items():       # every point inside its box
            assert low <= row[name] <= high
        eta = float(fm.predict(_recipe(form, row), 100.0)["viscosity_Pa_s"][0])
        assert float(result["window 1 viscosity [Pa*s]"][i]) == pytest.approx(eta, rel=1e-6)


def test_space_filling_designs_spread_over_the_box():
    from predictor import candidates

    # Latin hypercube (McKay, Beckman & Conover, Technometrics 21, 239, 1979): each of the
    # n equal strata of every factor holds exactly one point.
    pts = candidates.design_points([[0.0, 1.0], [10.0, 20.0]], "latin-hypercube", n=10, seed=3)
    for column, (low, high) in zip(pts.T, [(0.0, 1.0), (10.0, 20.0)], strict=True):
        strata = np.floor((column - low) / (high - low) * 10).astype(int)
        assert sorted(strata) == list(range(10))
    again = candidates.design_points([[0.0, 1.0], [10.0, 20.0]], "latin-hypercube", n=10,
                                     seed=3)
    np.testing.assert_array_equal(pts, again)                 # seeded: reproducible


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"factors": {"ingredient 3 loading": (0.1, 0.2)}}, "factor"),
    ({"factors": {"colour": (0.1, 0.2)}}, "factor"),
    ({"factors": {"ingredient 1 loading": (0.3, 0.1)}}, "ingredient 1 loading"),
    ({"factors": {"ingredient 1 d50": (1.0, 2.0)}}, "ingredient 1 d50"),
    ({"factors": {"liquid viscosity": (0.001, 0.01)}}, "factor"),
    ({"factors": {"temperature": (290.0, 300.0)}, "design": "sobol", "n": 10}, "n"),
    ({"factors": {"temperature": (290.0, 300.0)}, "design": "random"}, "design"),
    ({"factors": {"temperature": (290.0, 300.0)}, "levels": 1}, "levels"),
    ({"factors": {}}, "factors"),
])
def test_bad_candidate_requests_name_the_field(kwargs, field):
    from predictor import candidates

    with pytest.raises(InputRangeError) as err:
        candidates.candidate_table(two_powders_in_water(), **kwargs)
    assert err.value.field == field


def test_demo_paint_candidates_screen_to_predict_of_the_same_recipe(tmp_path):
    # The demo paint (Carreau-Yasuda liquid, a sized pigment) is written beside the table
    # as its base scenario; each screened row must equal `predict` of the same recipe.
    from predictor import batch, candidates

    form = scenario.read_scenario(DEMO)
    factors = {"ingredient 1 loading": (0.2, 0.4), "ingredient 2 loading": (0.05, 0.2),
               "ingredient 2 d50": (0.2e-6, 0.5e-6), "temperature": (288.15, 308.15)}
    table, files = candidates.candidate_table(form, factors, design="halton", n=6,
                                              windows=[("stirring", 100.0, 3.0)])
    assert set(table["base scenario"]) == {candidates.BASE_NAME}
    for name, data in candidates.file_bytes(files).items():
        (tmp_path / name).write_bytes(data)
    result = batch.screen(table, base_dir=tmp_path)
    assert (result["status"] == "ok").all(), result["error"].tolist()
    points = candidates.design_points(list(factors.values()), "halton", 6)
    pigment = form.ingredients[1]
    for i, (x, y, d50, temp) in enumerate(points):
        size = type(pigment.size)(pigment.size.diameters_m * d50 / pigment.size.d50_m,
                                  pigment.size.fractions)
        recipe = dataclasses.replace(
            form, liquid=dataclasses.replace(form.liquid, temperature_K=temp),
            ingredients=(dataclasses.replace(form.ingredients[0], loading=x),
                         dataclasses.replace(pigment, loading=y, size=size),
                         *form.ingredients[2:]))
        eta = float(fm.predict(recipe, 100.0)["viscosity_Pa_s"][0])
        assert float(result["window 1 viscosity [Pa*s]"][i]) == pytest.approx(eta, rel=1e-6)


@pytest.mark.parametrize(("change", "field"), [
    ({"model_params": {"phi_max": 0.6}}, "model_params"),
    ({"ingredients": (fm.Ingredient("clay", 2600.0, 0.2, hamaker_J=1e-20, flocculated=True),)},
     "ingredients[0].hamaker_J"),
])
def test_scenarios_the_batch_cannot_read_are_refused(change, field):
    from predictor import candidates

    form = dataclasses.replace(two_powders_in_water(), **change)
    with pytest.raises(InputRangeError) as err:
        candidates.candidate_table(form, {"ingredient 1 loading": (0.1, 0.3)})
    assert err.value.field == field


# --- hostile arguments: a frame or an InputRangeError, never a crash -------------------------

from hypothesis import given  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

from tests.conftest import FUZZ_CASES  # noqa: E402

_wild = st.one_of(st.floats(allow_nan=True, allow_infinity=True),
                  st.sampled_from([0.0, -0.0, 1.0, -1.0, 0.5, 1e-300, 1e300]))
_pair = st.one_of(st.tuples(_wild, _wild), st.just((0.1,)), st.just("0.1 0.3"), st.none(),
                  st.tuples(st.floats(0.0, 0.5), st.floats(0.5, 1.0)))


_HOSTILE = {"x_range": _pair, "y_range": _pair, "shear_rate_1_per_s": _wild,
            "n": st.sampled_from([-1, 0, 1, 402, 10**6, True, 2.5, "3"]),
            "x_ingredient": st.sampled_from([1, 2, -1, "b", "liquid", None, 1.0]),
            "windows": st.lists(st.tuples(st.text(max_size=5), _wild, _wild), max_size=2)}


@given(spoiled=st.lists(st.sampled_from(sorted(_HOSTILE)), max_size=2, unique=True),
       data=st.data())
def test_fuzz_loading_map_arguments(spoiled, data):
    # A valid call with zero, one or two arguments replaced by hostile values.
    FUZZ_CASES["design.loading_map"] += 1
    args = {"x_ingredient": 0, "y_ingredient": 1, "x_range": (0.0, 0.5), "y_range": (0.1, 0.7),
            "shear_rate_1_per_s": 10.0, "n": 3, "basis": "volume",
            "windows": [("pumping", 100.0, 0.5)]}
    for name in spoiled:
        args[name] = data.draw(_HOSTILE[name], label=name)
    try:
        grid = design.loading_map(newtonian_pair(), **args)
    except InputRangeError as err:
        assert str(err).strip() and spoiled
        return
    assert len(grid) == args["n"] ** 2
    assert np.isin(grid["regime"], ["plateau", "jammed", design.NO_LIQUID]).all()
    flowing = grid["regime"] == "plateau"
    assert np.isfinite(grid.loc[flowing, "viscosity_Pa_s"]).all()
    assert (grid["viscosity_Pa_s"][grid["regime"] == "jammed"] == np.inf).all()
