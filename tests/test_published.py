"""Every row of the published-values table (tests/published/) as its own test."""

import importlib

import pytest

from tests.published import CASES, assert_matches_published, printed_tolerance


def _call(dotted: str, inputs: dict):
    module_name, _, func_name = dotted.rpartition(".")
    module = importlib.import_module(f"predictor.{module_name}" if module_name else "predictor")
    return getattr(module, func_name)(**inputs)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_published_value(case):
    value = _call(case.func, case.inputs)
    assert_matches_published(float(value), case.expected, case.rel_tol)


def test_printed_tolerance_follows_digits():
    # The helper itself, on hand-worked examples (common practice, no source).
    assert printed_tolerance("12.65") == pytest.approx(0.005)
    assert printed_tolerance("889.735100") == pytest.approx(5e-7)
    assert printed_tolerance("6") == pytest.approx(0.5)
    assert printed_tolerance("1.5e-3") == pytest.approx(5e-5)
