"""The invented demo scenarios read inside the range usual for their product class.

The ranges are common practice, no source (what formulators of each product class expect
of an apparent viscosity at a process shear rate); each scenario's description states the
same ranges, so a user sees what the demo was made to match. The check runs each demo through
`predict`, as a user would.
"""

from pathlib import Path

import pytest

import predictor as pr

DEMO = Path(__file__).resolve().parents[1] / "data_demo"

#: (shear rate [1/s], lowest, highest viscosity [Pa*s], the words in the description).
#: Common practice, no source.
RANGES = {
    "hand_cream": [(1.0, 5.0, 100.0, "5 to 100 Pa s at 1 1/s"),
                   (1e4, 0.01, 0.5, "0.01 to 0.5 Pa s at the 1e4 1/s")],
    "mineral_coating": [(0.1, 1.0, 30.0, "1 to 30 Pa s at 0.1-1 1/s"),
                        (1.0, 1.0, 30.0, "1 to 30 Pa s at 0.1-1 1/s"),
                        (100.0, 0.3, 3.0, "0.3 to 3 Pa s at 100 1/s"),
                        (1e4, 0.05, 0.3, "0.05 to 0.3 Pa s at 1e4 1/s")],
    "ceramic_slip": [(100.0, 0.02, 1.0, "0.02 to 1 Pa s at 100 1/s")],
}


@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
@pytest.mark.parametrize("name", sorted(RANGES))
def test_demo_reads_in_the_usual_range_of_its_product_class(name):
    scenario = pr.read_scenario(DEMO / f"{name}.loadline.json")
    rates = [rate for rate, *_ in RANGES[name]]
    curve = pr.predict(scenario, rates)
    for (rate, low, high, words), eta in zip(RANGES[name], curve["viscosity_Pa_s"],
                                             strict=True):
        assert low <= eta <= high, f"{name}: {eta:.3g} Pa s at {rate:g} 1/s"
        assert words in scenario.description


@pytest.mark.parametrize("name", sorted(RANGES))
def test_demo_says_it_is_invented_and_where_its_range_comes_from(name):
    scenario = pr.read_scenario(DEMO / f"{name}.loadline.json")
    assert "(invented)" in scenario.name
    assert "Invented scenario" in scenario.description
    assert "common practice, no source" in scenario.description


@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
def test_cream_water_phase_has_a_yield_stress_and_thins():
    # A cream stands on the finger: its water phase is a yield-stress gel, not water.
    scenario = pr.read_scenario(DEMO / "hand_cream.loadline.json")
    assert scenario.liquid.law == "herschel-bulkley"
    curve = pr.predict(scenario, [1e-2, 1.0, 1e4])
    eta = curve["viscosity_Pa_s"].to_numpy()
    assert eta[0] > eta[1] > eta[2]
    assert eta[0] > 100.0        # a yield stress: the apparent viscosity grows as rate falls
