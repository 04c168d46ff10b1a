"""AppTest of the Batch screen page: the table shown is predictor.batch's result."""

from __future__ import annotations

import pandas as pd

from predictor import batch
from tests.app.conftest import REPO, messages, metric, page


def test_demo_candidates_are_screened_like_the_core_does():
    at = page("batch_screen", scenario="ceramic_slip").run()
    at.button(key="batch_demo").click().run()
    at.button(key="batch_run").click().run()
    assert not at.exception
    summary, expected = batch.screen_file(REPO / "data_demo" / "candidates.csv",
                                          viscosity_unit="mPa*s", keep=-1)
    assert metric(at, "Candidates") == str(summary.rows)
    assert metric(at, "Pass every window") == str(summary.passed_all)
    shown = at.dataframe[0].value
    col = "headroom phi/phi_max [-]"
    pd.testing.assert_series_equal(shown[col].reset_index(drop=True),
                                   expected[col].reset_index(drop=True), check_names=False)


def test_rows_with_errors_are_named_not_raised():
    path = REPO / "data_demo" / "candidates_with_errors.csv"
    at = page("batch_screen", scenario="ceramic_slip").run()
    at.file_uploader(key="batch_upload").set_value(
        [(path.name, path.read_bytes(), "text/csv")]).run()
    at.button(key="batch_run").click().run()
    assert not at.exception
    assert "Line " in messages(at)
    assert int(metric(at, "With input errors")) > 0


def test_table_without_the_needed_columns_is_explained():
    at = page("batch_screen", scenario="ceramic_slip").run()
    at.file_uploader(key="batch_upload").set_value(
        [("colours.csv", b"name,colour\nA,red\n", "text/csv")]).run()
    at.button(key="batch_run").click().run()
    assert not at.exception
    assert messages(at)            # a message, whatever the core says exactly
    assert at.session_state["batch_result"] is None or int(
        metric(at, "With input errors")) == 1
