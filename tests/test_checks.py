"""The shared input checks: every value outside the allowed range is named, inside passes.

The checks have a fast path (the extremes of the array) beside the element-wise one; these
cases pin that both give the same verdict at the ends of the range (common practice, no
source: the behaviour asked of every input in this project).
"""

from __future__ import annotations

import numpy as np
import pytest

from predictor._checks import fraction, in_range, positive
from predictor.errors import InputRangeError


@pytest.mark.parametrize("value", [0.0, 1.0, 0.5, [0.0, 1.0], np.full((3, 1), 0.25)])
def test_closed_ends_accept_their_limits(value):
    out = fraction(value, "phi")
    np.testing.assert_array_equal(out, np.asarray(value, dtype=float))


@pytest.mark.parametrize(("value", "bad"), [
    (-1e-12, -1e-12), (1.0 + 1e-12, 1.0 + 1e-12), ([0.2, np.nan], np.nan),
    ([0.2, np.inf], np.inf), (np.array([[0.1], [1.5]]), 1.5)])
def test_values_outside_a_closed_range_are_named(value, bad):
    with pytest.raises(InputRangeError) as err:
        fraction(value, "phi")
    assert "phi" in str(err.value)
    assert str(bad) in str(err.value) or f"{bad:g}" in str(err.value)


@pytest.mark.parametrize(("value", "low_open", "high_open", "ok"), [
    (0.0, True, False, False), (0.0, False, False, True), (1.0, False, True, False),
    (1.0, False, False, True), ([0.0, 0.5], True, False, False), ([0.5, 1.0], False, True, False)])
def test_open_ends_refuse_their_limits(value, low_open, high_open, ok):
    if ok:
        assert np.all(in_range(value, "x", 0.0, 1.0, low_open=low_open, high_open=high_open)
                      == np.asarray(value, dtype=float))
    else:
        with pytest.raises(InputRangeError, match="x"):
            in_range(value, "x", 0.0, 1.0, low_open=low_open, high_open=high_open)


def test_positive_refuses_zero_infinity_and_text():
    assert positive(2.5, "rate") == 2.5
    for value in (0.0, np.inf, -3.0, "fast", [1.0, None]):
        with pytest.raises(InputRangeError, match="rate"):
            positive(value, "rate")


def test_an_empty_array_passes_unchanged():
    assert in_range([], "x", 0.0, 1.0).size == 0
