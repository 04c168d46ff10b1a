"""Size distributions: constructors, conversions, statistics and bad input.

Outside references: the closed-form moments of the lognormal distribution (Hatch-Choate
relations: a lognormal in number with median m and sigma of ln d has raw moments
m**k exp(k**2 sigma**2 / 2), and is a lognormal in volume with median m exp(3 sigma**2));
the Rosin-Rammler cumulative curve Q(d) = 1 - exp(-(d/d')**n) (Rosin & Rammler, J. Inst.
Fuel 7, 29, 1933); hand calculations written out beside each check.
"""

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from predictor.errors import InputRangeError
from predictor.sizes import SizeDistribution, class_edges

Z90 = 1.2815515655446004  # standard normal 90 % point


@pytest.mark.parametrize("sigma", [0.1, 0.3, 0.6, 0.9])
def test_lognormal_matches_closed_form_moments(sigma):
    # Hatch-Choate relations (closed form); volume median m = 10 um.
    m = 10e-6
    dist = SizeDistribution.lognormal(m, math.exp(sigma))
    s2 = sigma**2
    assert dist.d50_m == pytest.approx(m, rel=1e-4)
    assert dist.d10_m == pytest.approx(m * math.exp(-Z90 * sigma), rel=1e-3)
    assert dist.d90_m == pytest.approx(m * math.exp(Z90 * sigma), rel=1e-3)
    assert dist.span == pytest.approx(2 * math.sinh(Z90 * sigma), rel=2e-3)
    assert dist.sauter_diameter_m == pytest.approx(m * math.exp(-0.5 * s2), rel=1e-3)
    assert dist.de_brouckere_diameter_m == pytest.approx(m * math.exp(0.5 * s2), rel=1e-3)
    assert dist.number_mean_diameter_m == pytest.approx(m * math.exp(-2.5 * s2), rel=2e-3)
    assert dist.polydispersity == pytest.approx(math.sqrt(math.exp(s2) - 1), rel=2e-3)
    skew = (math.exp(s2) + 2) * math.sqrt(math.exp(s2) - 1)
    assert dist.skewness == pytest.approx(skew, rel=5e-3)
    assert dist.fractions.sum() == pytest.approx(1.0)


def test_lognormal_number_basis_median_shifts_by_hatch_choate():
    # Number median m_n -> volume median m_n exp(3 sigma^2) (Hatch-Choate).
    sigma = 0.4
    dist = SizeDistribution.lognormal(2e-6, math.exp(sigma), basis="number")
    assert dist.d50_m == pytest.approx(2e-6 * math.exp(3 * sigma**2), rel=1e-3)


def test_rosin_rammler_median_and_characteristic_size():
    # Q(d) = 1 - exp(-(d/d')^n): D50 = d' (ln 2)^(1/n); 63.2 % finer at d'.
    dist = SizeDistribution.rosin_rammler(10e-6, 2.0)
    assert dist.d50_m == pytest.approx(10e-6 * math.log(2) ** 0.5, rel=1e-3)
    assert dist.quantile_m(1 - math.exp(-1)) == pytest.approx(10e-6, rel=1e-3)


def test_hand_calculation_two_classes():
    # Hand calculation: equal volumes at 1 and 2 um.
    # D[4,3] = 0.5*1 + 0.5*2 = 1.5 um; D[3,2] = 1/(0.5/1 + 0.5/2) = 1.3333 um;
    # number fractions ~ 0.5/1 : 0.5/8 = 8:1 -> D[1,0] = (8*1 + 1*2)/9 = 1.1111 um;
    # delta = sqrt(8/9*(0.9-1)^2 + 1/9*(1.8-1)^2) = sqrt(0.08) = 0.28284;
    # skewness = (8/9*(-0.1)^3 + 1/9*(0.8)^3) / 0.08^1.5 = 0.056 / 0.022627 = 2.4749.
    dist = SizeDistribution.from_table([1e-6, 2e-6], [50, 50])
    assert dist.de_brouckere_diameter_m == pytest.approx(1.5e-6)
    assert dist.sauter_diameter_m == pytest.approx(4e-6 / 3)
    assert dist.number_mean_diameter_m == pytest.approx(10e-6 / 9)
    assert dist.number_fractions == pytest.approx([8 / 9, 1 / 9])
    assert dist.polydispersity == pytest.approx(math.sqrt(0.08))
    assert dist.skewness == pytest.approx(0.056 / 0.08**1.5)


def test_cumulative_table_reproduces_its_own_points():
    # The cumulative curve through the class boundaries is the table itself (hand check):
    # 30 % passing 2 um, 80 % passing 4 um -> D50 = 2 * 2**0.4 by log interpolation.
    dist = SizeDistribution.from_table([1e-6, 2e-6, 4e-6, 8e-6], [0, 30, 80, 100],
                                       cumulative=True)
    assert dist.quantile_m(0.3) == pytest.approx(2e-6)
    assert dist.quantile_m(0.8) == pytest.approx(4e-6)
    assert dist.d50_m == pytest.approx(2e-6 * 2**0.4)


def test_edges_table_and_number_basis():
    # Edges 1-2-4 um, number amounts 1:1 -> volume amounts ~ d^3 at the class mid-points.
    dist = SizeDistribution.from_table([1e-6, 2e-6, 4e-6], [0.5, 0.5], basis="number")
    mids = np.sqrt([2.0, 8.0]) * 1e-6
    assert dist.diameters_m == pytest.approx(mids)
    assert dist.fractions == pytest.approx(mids**3 / np.sum(mids**3))
    assert dist.fractions_on("number") == pytest.approx([0.5, 0.5])


def test_blend_mass_shares_use_densities():
    # 50/50 by mass, densities 2000 and 4000 -> volumes 1/2000 : 1/4000 = 2:1.
    mix = SizeDistribution.blend([SizeDistribution.single(10e-6),
                                  SizeDistribution.single(1e-6)], [50, 50], basis="mass",
                                 densities_kg_per_m3=[2000, 4000])
    assert mix.fractions == pytest.approx([1 / 3, 2 / 3])


def test_resample_keeps_quantiles():
    dist = SizeDistribution.rosin_rammler(20e-6, 1.5)
    coarse = dist.resample(30)
    assert coarse.diameters_m.size == 30
    for p in (0.1, 0.5, 0.9):
        # 30 classes over four decades: class width sets the precision (about 2 %).
        assert coarse.quantile_m(p) == pytest.approx(dist.quantile_m(p), rel=0.02)


def test_dict_round_trip_is_exact_and_json_safe():
    dist = SizeDistribution.blend([SizeDistribution.lognormal(3e-6, 1.5),
                                   SizeDistribution.single(20e-6)], [0.7, 0.3])
    text = json.dumps(dist.to_dict())
    again = SizeDistribution.from_dict(json.loads(text))
    assert again == dist
    assert np.array_equal(again.fractions, dist.fractions)


def test_single_size_statistics():
    dist = SizeDistribution.single(5e-6)
    assert dist.d10_m == dist.d50_m == dist.d90_m == 5e-6
    assert dist.span == 0.0 and dist.polydispersity == 0.0 and dist.skewness == 0.0
    assert dist.sauter_diameter_m == pytest.approx(5e-6)


def test_arrays_are_read_only():
    dist = SizeDistribution.single(5e-6)
    with pytest.raises(ValueError):
        dist.fractions[0] = 0.5


def test_class_edges_geometric_midpoints():
    # sqrt(1*4) = 2; mirrored outer edges 0.5 and 8 (hand calculation).
    assert class_edges([1.0, 4.0]) == pytest.approx([0.5, 2.0, 8.0])


@pytest.mark.parametrize("sizes, amounts, kwargs, words", [
    ([1e-6, -2e-6], [50, 50], {}, ["row 1", "size_m", "-2e-06"]),
    ([0.0, 2e-6], [50, 50], {}, ["row 0", "size_m"]),
    ([2e-6, 1e-6], [50, 50], {}, ["row 1", "sort"]),
    ([1e-6, 1e-6], [50, 50], {}, ["row 1", "above the previous"]),
    ([1e-6, 2e-6], [50, 40], {}, ["sum of amounts", "90", "100"]),
    ([1e-6, 2e-6, 4e-6], [10, 60, 50], {"cumulative": True}, ["row 2", "cumulative"]),
    ([], [], {}, ["at least two rows"]),
    ([1e-6], [100], {}, ["at least two rows"]),
    ([1e-6, "abc"], [50, 50], {}, ["row 1", "size_m", "'abc'", "a number"]),
    ([1e-6, 2e-6], [50, "n/a"], {}, ["row 1", "amount", "'n/a'"]),
    ([1e-6, 2e-6], [50, float("nan")], {}, ["row 1", "finite"]),
    ([1e-6, 2e-6], [-10, 110], {}, ["row 0", ">= 0"]),
    ([1e-6, 2e-6, 3e-6], [50, 50], {"cumulative": True}, ["one per amount"]),
])
def test_bad_tables_name_row_and_column(sizes, amounts, kwargs, words):
    with pytest.raises(InputRangeError) as err:
        SizeDistribution.from_table(sizes, amounts, **kwargs)
    for word in words:
        assert word in str(err.value)


def test_first_row_offsets_the_reported_row():
    with pytest.raises(InputRangeError, match="row 5, column D_um"):
        SizeDistribution.from_table([1e-6, 2e-6, -1], [30, 30, 40],
                                    columns=("D_um", "vol_pct"), first_row=3)


def test_normalise_accepts_sieve_masses():
    dist = SizeDistribution.from_table([1e-6, 2e-6], [3.0, 1.0], normalise=True)
    assert dist.fractions == pytest.approx([0.75, 0.25])


@pytest.mark.parametrize("call", [
    lambda: SizeDistribution.lognormal(-1e-6, 1.5),
    lambda: SizeDistribution.lognormal(1e-6, 0.9),
    lambda: SizeDistribution.lognormal(1e-6, float("inf")),
    lambda: SizeDistribution.rosin_rammler(1e-6, 0.0),
    lambda: SizeDistribution.single(float("nan")),
    lambda: SizeDistribution.blend([SizeDistribution.single(1e-6)], [0.5, 0.5]),
    lambda: SizeDistribution.blend([SizeDistribution.single(1e-6)], [1.0], basis="mass"),
    lambda: SizeDistribution(np.array([2e-6, 1e-6]), np.array([0.5, 0.5])),
    lambda: SizeDistribution(np.array([1e-6, 2e-6]), np.array([0.5, 0.6])),
    lambda: SizeDistribution.from_dict({"diameters_m": [1e-6]}),
])
def test_bad_constructor_input_raises(call):
    with pytest.raises(InputRangeError):
        call()


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(0.01, 100.0), min_size=2, max_size=12, unique=True),
       st.lists(st.floats(0.0, 1.0), min_size=12, max_size=12))
def test_statistics_are_ordered_and_consistent(sizes, weights):
    # Properties of any distribution (inequalities between means, common practice):
    # D[1,0] <= D[3,2] <= D[4,3]; D10 <= D50 <= D90; number/volume conversions invert.
    sizes = sorted(sizes)
    w = np.array(weights[: len(sizes)]) + 1e-3
    dist = SizeDistribution.from_table(np.array(sizes) * 1e-6, w, normalise=True)
    tol = 1 + 1e-9
    assert dist.number_mean_diameter_m <= dist.sauter_diameter_m * tol
    assert dist.sauter_diameter_m <= dist.de_brouckere_diameter_m * tol
    assert dist.d10_m <= dist.d50_m * tol and dist.d50_m <= dist.d90_m * tol
    back = SizeDistribution.from_table(dist.diameters_m, dist.number_fractions,
                                       basis="number", normalise=True)
    assert back.fractions == pytest.approx(dist.fractions, rel=1e-9, abs=1e-12)
