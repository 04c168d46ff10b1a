"""AppTest of the Sizes & packing page: D-values, estimates and blends from predictor."""

from __future__ import annotations

import pathlib

from app import widgets
from predictor import batch, blend, packing, sizes
from tests.app.conftest import demo, messages, metric, page

TABLE = pathlib.Path(__file__).parent / "data" / "size_table.csv"


def test_generated_distribution_statistics_pass_through():
    at = page("sizes_packing", scenario="ceramic_slip").run()
    at.number_input(key="sz_size").set_value(3.0).run()
    at.number_input(key="sz_spread").set_value(1.8).run()
    assert not at.exception
    dist = sizes.SizeDistribution.lognormal(3e-6, 1.8)
    assert metric(at, "D50") == widgets.fmt(dist.d50_m * 1e6, 3)
    assert metric(at, "D90") == widgets.fmt(dist.d90_m * 1e6, 3)
    assert metric(at, "φmax") == f"{packing.packing_estimates(dist).default:.3f}"


def test_uploaded_size_table_is_read_and_given_to_an_ingredient():
    at = page("sizes_packing", scenario="ceramic_slip").run()
    at.file_uploader(key="sz_upload").set_value(
        (TABLE.name, TABLE.read_bytes(), "text/csv")).run()
    assert not at.exception
    dist = batch.read_size_table(TABLE)
    assert metric(at, "D50") == widgets.fmt(dist.d50_m * 1e6, 3)
    at.button(key="sz_use").click().run()
    assert not at.exception
    assert at.session_state["ing0_size_json"] == at.session_state["sz_dist_json"]


def test_demo_size_table_in_one_click():
    # No file to hand: one button loads the invented demo table, read as predictor reads it.
    at = page("sizes_packing", scenario="ceramic_slip").run()
    at.button(key="sz_demo").click().run()
    assert not at.exception
    assert at.session_state["sz_source"] == "table"
    demo_table = pathlib.Path(__file__).parents[2] / "data_demo" / "sizes_filler_coarse.csv"
    dist = batch.read_size_table(demo_table)
    assert metric(at, "D50") == widgets.fmt(dist.d50_m * 1e6, 3)
    assert metric(at, "φmax") == f"{packing.packing_estimates(dist).default:.3f}"


def test_bad_size_table_names_the_problem():
    at = page("sizes_packing", scenario="ceramic_slip").run()
    at.file_uploader(key="sz_upload").set_value(
        ("sizes.csv", b"diameter,how much\n1,2\n", "text/csv")).run()
    assert not at.exception
    assert "size [um]" in messages(at)


def test_blend_optimiser_matches_predictor():
    at = page("sizes_packing", scenario="ceramic_slip", sz_size=20.0, sz_spread=1.3).run()
    assert not at.exception
    coarse = sizes.SizeDistribution.lognormal(20e-6, 1.3)
    fine = demo("ceramic_slip").ingredients[0].distribution()
    at.multiselect(key="bl_powders").set_value(["calcined alumina",
                                                "(the distribution above)"]).run()
    assert not at.exception
    res = blend.optimise_blend([fine, coarse], densities_kg_per_m3=[3950.0, 2500.0],
                               phi_total=None)
    at.toggle(key="bl_at_loading").set_value(False).run()
    assert metric(at, "Densest blend") == f"{res.best_phi_max:.3f}"


def test_simulation_runs_on_demand_only():
    at = page("sizes_packing", scenario="ceramic_slip", sz_particles=400, sz_seeds=1,
              sz_spread=1.2).run()
    assert not at.session_state["sz_sim"]
    at.button(key="sz_run").click().run(timeout=240)
    assert not at.exception
    sim = at.session_state["sz_sim"]
    assert 0.5 < sim["phi"] < 0.8
    assert any("Simulated φmax" in s.value for s in at.success)


def test_size_table_with_very_many_classes_is_rebinned_with_a_note():
    # issue 20: a 5 000-class table is rebinned onto sizes.MAX_CLASSES classes and the page
    # says so (the note once reached only the server log). D50 of equal retained amounts on a
    # log grid from 1 to 1000 um is sqrt(1 * 1000) = 31.6 um (by hand).
    rows = "".join(f"{10 ** (3 * k / 5000):.9g},1\n" for k in range(5000))
    at = page("sizes_packing", scenario="ceramic_slip").run()
    at.file_uploader(key="sz_upload").set_value(
        ("many.csv", ("size [um],retained [g]\n" + rows).encode(), "text/csv")).run()
    assert not at.exception
    assert "5000 size classes were rebinned" in messages(at)
    assert metric(at, "D50") == widgets.fmt(31.6, 3)
