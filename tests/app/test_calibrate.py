"""AppTest of the Calibrate page: the fit shown is predictor's fit, and it reaches the
other pages."""

from __future__ import annotations

import json
import pathlib

from app import widgets
from predictor import labdata
from tests.app.conftest import demo, messages, metric, page

LAB = pathlib.Path(__file__).parent / "data" / "lab_loading_series.csv"


def _upload(at, name="lab.csv", data=None):
    at.file_uploader(key="cal_upload").set_value(
        (name, LAB.read_bytes() if data is None else data, "text/csv")).run()
    return at


def test_fit_matches_predictor_and_is_used_everywhere():
    at = _upload(page("calibrate", scenario="ceramic_slip").run())
    assert not at.exception
    result = labdata.read_lab_text(LAB.read_text(), formulation=demo("ceramic_slip")).fit(
        "krieger-dougherty")
    assert metric(at, "φmax") == widgets.fmt(result.params["phi_max"])
    assert metric(at, "[η]") == widgets.fmt(
        result.params["intrinsic_viscosity"])
    at.button(key="cal_use").click().run()
    assert not at.exception
    assert at.session_state["model"] == "krieger-dougherty"
    assert at.session_state["param_phi_max"] == result.params["phi_max"]
    assert at.session_state["auto_phi_max"] is False
    assert json.loads(at.session_state["calibration_json"])["source"] == "lab.csv"
    assert "Calibrated relation in use" in messages(at)


def test_changing_the_relation_refits():
    at = _upload(page("calibrate", scenario="ceramic_slip").run())
    at.selectbox(key="cal_model").set_value("quemada").run()
    assert not at.exception
    result = labdata.read_lab_text(LAB.read_text(), formulation=demo("ceramic_slip")).fit(
        "quemada")
    assert metric(at, "φmax") == widgets.fmt(result.params["phi_max"])


def test_bad_lab_file_names_the_problem():
    at = _upload(page("calibrate", scenario="ceramic_slip").run(), name="bad.csv",
                 data=b"solids [vol%],viscosity [mPa*s]\n10,1.2\nabc,1.5\n")
    assert not at.exception
    assert "line 3" in messages(at).lower() or "abc" in messages(at)


def test_binary_file_is_refused_with_its_name():
    at = _upload(page("calibrate", scenario="ceramic_slip").run(), name="photo.csv",
                 data=b"\xff\xd8\xff\xe0 binary")
    assert not at.exception
    assert "photo.csv is not UTF-8 text" in messages(at)
