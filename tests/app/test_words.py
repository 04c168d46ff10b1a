"""Screens speak in words where a number has none: no bare inf, ∞ or nan on any page.

A slip loaded past its packing limit (no flow at any rate) and droplets too viscous for
simple shear to break (de Bruijn's fit of Grace's curve: no breakup above a viscosity ratio
of about 4) are the two cases where the core returns infinity.
"""

from __future__ import annotations

import re

import pytest

from tests.app.conftest import metric, page

pytestmark = pytest.mark.filterwarnings("ignore::predictor.ValidityWarning")
BARE = re.compile(r"^\s*[-+]?(inf|infinity|nan|∞)\s*$", re.IGNORECASE)


def _shown(at) -> list[str]:
    """Every metric value and table cell on the page, as text."""
    cells = [str(m.value) for m in at.metric]
    for frame in at.dataframe:
        cells += [str(v) for v in frame.value.to_numpy().ravel()]
    return cells


@pytest.mark.parametrize("view", ["loading_sweep", "flow_curve", "sizes_packing",
                                  "process_checks"])
def test_a_jammed_slip_is_said_in_words(view):
    # 95 wt% alumina is far past the packing limit of the invented slip.
    at = page(view, scenario="ceramic_slip", ing0_loading=95.0).run()
    assert not at.exception
    bare = [c for c in _shown(at) if BARE.match(c)]
    assert not bare, bare


def test_jammed_slip_metrics_read_no_flow():
    at = page("loading_sweep", scenario="ceramic_slip", ing0_loading=95.0).run()
    assert metric(at, "Relative viscosity") == "no flow (jammed)"
    assert metric(at, "Viscosity now") == "no flow"


def test_unbreakable_droplets_are_said_in_words():
    at = page("droplets", scenario="hand_cream", ing0_droplet_viscosity=1e6).run()
    assert not at.exception
    assert metric(at, "Largest stable droplet") == "no breakup"
    assert not [c for c in _shown(at) if BARE.match(c)]
