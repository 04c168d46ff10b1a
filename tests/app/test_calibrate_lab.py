"""AppTest of the Calibrate page's lab panels: several flow curves, wall slip, thixotropy.

The numbers shown are predictor's for the same files (the page only passes values through).
"""

from __future__ import annotations

import numpy as np

from app import widgets
from predictor import labdata, thixotropy
from tests.app.conftest import REPO, messages, metric, page

DEMO = REPO / "data_demo"


def _demo(at):
    at.button(key="cal_demo").click().run()
    assert not at.exception
    return at


def test_demo_lab_data_fills_every_panel_with_predictors_numbers():
    at = _demo(page("calibrate").run())         # the paint: a thickened, non-Newtonian liquid
    assert at.session_state["lab_curves_source"] == "lab_emulsion_series.csv"
    curves = labdata.read_flow_curves(DEMO / "lab_emulsion_series.csv")
    fits = labdata.fit_flow_curves(curves, "herschel-bulkley")
    assert metric(at, "Series fitted") == f"{len(fits.fits)} of {len(curves.series())}"
    phi, tau, _ = fits.parameter("yield_stress_Pa")
    trend = labdata.fit_yield_stress_trend(phi, tau, "mason")
    assert metric(at, "φc of the yield stress") == widgets.fmt(trend.params["phi_c"])
    gaps = labdata.read_flow_curves(DEMO / "lab_slip_gaps.csv").by_gap()
    corrected = labdata.slip_correction(gaps)
    assert metric(at, "Slip-corrected points") == str(int((~corrected["slip_only"]).sum()))
    steps, loops = labdata.read_flow_curves(DEMO / "lab_step_test.csv").thixotropy_tests()
    assert len(steps) == 3 and len(loops) == 1
    fit = thixotropy.fit_moore(steps, loops)
    expected = thixotropy.recovery_time(0.9, fit.params, 1000.0)
    assert metric(at, "Recovery to 90") == widgets.fmt(expected) + " s"
    assert np.isfinite(expected) and expected > 0
    # the loading-series part got the demo file too
    assert at.session_state["cal_source"] == "lab_loading_series_relative.csv"
    assert not at.error          # the loading series calibrates whatever scenario is open


def test_changing_the_law_and_the_step_inputs_refits():
    at = _demo(page("calibrate", scenario="ceramic_slip").run())
    at.selectbox(key="lab_model").set_value("power-law").run()
    assert not at.exception
    at.number_input(key="lab_process_rate").set_value(0.0).run()
    assert not at.exception
    assert metric(at, "Recovery to 90") == "0 s"      # never broken down: nothing to regain


def test_hostile_values_never_give_a_traceback():
    at = _demo(page("calibrate", scenario="ceramic_slip").run())
    for key, value in (("lab_fraction", 99.9), ("lab_fraction", 1.0),
                       ("lab_process_rate", 1e7), ("lab_view_rate", 0.0)):
        at.number_input(key=key).set_value(value).run()
        assert not at.exception, (key, value)
    at.segmented_control(key="lab_branch").set_value(None).run()
    assert not at.exception


def test_bad_export_names_file_line_and_column():
    at = page("calibrate", scenario="ceramic_slip").run()
    bad = b"shear rate [1/s],shear stress [Pa]\n1,2\n2,abc\n"
    at.file_uploader(key="lab_curves_upload").set_value(("export.csv", bad, "text/csv")).run()
    assert not at.exception
    text = messages(at)
    assert "export.csv, line 3, column 'shear stress [Pa]'" in text
    slip_one_gap = b"shear stress [Pa],shear rate [1/s],gap [mm]\n1,2,1\n2,3,1\n"
    at.file_uploader(key="lab_slip_upload").set_value(("gap.csv", slip_one_gap,
                                                        "text/csv")).run()
    assert not at.exception
    assert "two or more gaps" in messages(at)


def test_tables_name_parameters_in_words():
    at = _demo(page("calibrate", scenario="ceramic_slip").run())
    cells = " ".join(str(v) for frame in at.dataframe for v in frame.value.to_numpy().ravel())
    assert "build-up rate at rest a [1/s]" in cells
    assert "infinite_shear_viscosity_Pa_s" not in cells
