"""Mass <-> volume fraction conversions against hand calculations."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from predictor import InputRangeError
from predictor.composition import mass_fractions, mixture_density, volume_fractions


def test_single_powder_by_hand():
    # 40 wt% of a 3.9 g/cm3 powder in water: (0.4/3.9)/(0.4/3.9 + 0.6/1.0) = 0.145985
    # (hand calculation; ideal mixing, common practice, no source).
    assert volume_fractions([0.4], [True], [3900.0], 1000.0)[0] == pytest.approx(0.1459854, 1e-6)


def test_two_powders_by_hand():
    # 30 wt% at 2.7 and 20 wt% at 4.0 g/cm3 in water (1.0): volumes per 100 g are
    # 11.111, 5.0 and 50.0 cm3, so phi = 11.111/66.111 and 5/66.111 (hand calculation).
    phi = volume_fractions([0.3, 0.2], [True, True], [2700.0, 4000.0], 1000.0)
    assert phi == pytest.approx([11.1111 / 66.1111, 5.0 / 66.1111], rel=1e-4)


def test_mixed_bases_by_hand():
    # 10 vol% droplets (0.85 g/cm3) and 30 wt% powder (2.7 g/cm3) in water (1.0).
    # Per 1 cm3: droplets 0.1 cm3 = 0.085 g; the powder of volume v weighs 2.7 v and the
    # water (0.9 - v) g; 2.7 v = 0.3 (0.085 + 2.7 v + 0.9 - v) -> v = 0.2955/2.19 = 0.13493.
    phi = volume_fractions([0.1, 0.3], [False, True], [850.0, 2700.0], 1000.0)
    assert phi == pytest.approx([0.1, 0.2955 / 2.19], rel=1e-6)


@given(w=st.lists(st.floats(0.0, 0.3), min_size=1, max_size=3),
       rho=st.floats(500.0, 8000.0), rho_l=st.floats(700.0, 1500.0))
@settings(max_examples=100, deadline=None)
def test_round_trip(w, rho, rho_l):
    dens = np.full(len(w), rho)
    phi = volume_fractions(w, [True] * len(w), dens, rho_l)
    assert mass_fractions(phi, dens, rho_l) == pytest.approx(w, abs=1e-12)


def test_vectorised_over_rows():
    loadings = np.array([[0.3, 0.1], [0.2, 0.05]])
    phi = volume_fractions(loadings, [True, True], [2700.0, 1500.0], 1000.0)
    assert phi.shape == (2, 2)
    assert phi[1] == pytest.approx(volume_fractions(loadings[1], [True, True],
                                                    [2700.0, 1500.0], 1000.0))


def test_mixture_density_by_hand():
    assert mixture_density([0.2, 0.1], [2500.0, 800.0], 1000.0) == pytest.approx(1280.0)


@pytest.mark.parametrize("kwargs,field", [
    (dict(loadings=[0.7, 0.5], is_mass=[True, True], densities_kg_per_m3=[2000, 2000],
          liquid_density_kg_per_m3=1000), "total mass loading"),
    (dict(loadings=[1.2], is_mass=[True], densities_kg_per_m3=[2000],
          liquid_density_kg_per_m3=1000), "loading"),
    (dict(loadings=[0.3], is_mass=[True], densities_kg_per_m3=[-2000],
          liquid_density_kg_per_m3=1000), "density"),
    (dict(loadings=[np.nan], is_mass=[True], densities_kg_per_m3=[2000],
          liquid_density_kg_per_m3=1000), "loading"),
    (dict(loadings=[0.9, 0.5], is_mass=[False, True], densities_kg_per_m3=[900, 3000],
          liquid_density_kg_per_m3=1000), "loadings"),
])
def test_impossible_loadings_are_refused(kwargs, field):
    with pytest.raises(InputRangeError, match=field):
        volume_fractions(**kwargs)
