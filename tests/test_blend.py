"""Blend design: grids, optima against the Furnas limit, and Farris' multimodal view.

Outside references: Furnas (Ind. Eng. Chem. 23, 1052, 1931) for the two-size optimum
1 - (1 - phi1)^2 at coarse share phi1 / phi_max; Farris (Trans. Soc. Rheol. 12, 281, 1968)
for the product rule and its central finding that splitting a loading over well-separated
sizes lowers the viscosity.
"""

import numpy as np
import pytest

from predictor import packing
from predictor.blend import farris_viscosity, optimise_blend, share_grid
from predictor.errors import InputRangeError
from predictor.sizes import SizeDistribution

COARSE = SizeDistribution.single(100e-6)
FINE = SizeDistribution.single(1e-6)


def test_share_grid_covers_the_simplex():
    grid = share_grid(3, 11)
    assert grid.shape == (66, 3)          # (n + 1)(n + 2) / 2 points for n = 10 steps
    assert np.allclose(grid.sum(axis=1), 1.0)
    assert grid.min() == 0.0 and grid.max() == 1.0


def test_two_very_different_sizes_reach_the_furnas_optimum():
    res = optimise_blend([COARSE, FINE], n_points=1001, method="furnas")
    assert res.best_phi_max == pytest.approx(1 - 0.36**2, abs=5e-4)
    assert res.best_packing_shares[0] == pytest.approx(0.64 / 0.8704, abs=2e-3)


def test_default_blend_optimum_below_furnas_and_endpoints_are_the_powders():
    res = optimise_blend([SizeDistribution.lognormal(30e-6, 1.4),
                          SizeDistribution.lognormal(3e-6, 1.4)], n_points=101)
    # shares [1, 0] and [0, 1] are the powders on their own
    ends = {tuple(s): p for s, p in zip(res.shares.tolist(), res.phi_max, strict=True)
            if 1.0 in s}
    own = packing.max_packing(SizeDistribution.lognormal(30e-6, 1.4))
    assert ends[(1.0, 0.0)] == pytest.approx(own)
    # Furnas: two powders packing at phi1 each cannot exceed 1 - (1 - phi1)^2
    assert res.best_phi_max <= 1 - (1 - own) ** 2
    assert res.best_phi_max > max(ends.values())


def test_viscosity_views_at_fixed_loading():
    res = optimise_blend([COARSE, FINE], phi_total=0.6, n_points=101,
                         densities_kg_per_m3=[2500, 5000])
    # Krieger-Dougherty viscosity falls as phi_max rises: same optimum as packing.
    assert np.array_equal(res.best_viscosity_shares, res.best_packing_shares)
    assert np.all(np.isfinite(res.relative_viscosity[res.phi_max > 0.61]))
    assert res.best_relative_viscosity_farris < np.inf
    # phi = 0.6 as one size is near jamming; the best Farris blend flows several times easier
    single = farris_viscosity([0.6], [0.64])
    assert res.best_relative_viscosity_farris < single / 4
    assert np.allclose(res.mass_shares.sum(axis=1), 1.0)
    # mass share of the coarse powder at 50/50 by volume: 2500 / (2500 + 5000)
    mid = np.flatnonzero(np.isclose(res.shares[:, 0], 0.5))[0]
    assert res.mass_shares[mid, 0] == pytest.approx(1 / 3)


def test_farris_product_rule():
    kd = lambda phi, pm: (1 - phi / pm) ** (-2.5 * pm)  # noqa: E731
    # one class is the monomodal relation itself
    assert farris_viscosity([0.4], [0.64]) == pytest.approx(kd(0.4, 0.64))
    # an empty class changes nothing
    assert farris_viscosity([0.4, 0.0], [0.64, 0.64]) == pytest.approx(kd(0.4, 0.64))
    # Eq. of Farris: coarse sees phi_c, fine sees phi_f / (1 - phi_c)
    assert farris_viscosity([0.3, 0.2], [0.64, 0.6]) == pytest.approx(
        kd(0.3, 0.64) * kd(0.2 / 0.7, 0.6))
    # Farris' finding: splitting 0.5 over two separated sizes lowers the viscosity
    assert farris_viscosity([0.25, 0.25], [0.64, 0.64]) < kd(0.5, 0.64)
    # a class at its own limit jams the whole
    assert farris_viscosity([0.64, 0.1], [0.64, 0.64]) == np.inf


def test_three_powders():
    res = optimise_blend([COARSE, SizeDistribution.single(10e-6), FINE], n_points=21,
                         phi_total=0.5)
    assert res.shares.shape == (231, 3)
    assert res.best_phi_max == pytest.approx(res.phi_max.max())
    # three well-separated sizes pack denser than the best two (Furnas)
    two = optimise_blend([COARSE, FINE], n_points=21)
    assert res.best_phi_max > two.best_phi_max


@pytest.mark.parametrize("call, match", [
    (lambda: optimise_blend([COARSE]), "distributions"),
    (lambda: optimise_blend([COARSE] * 4), "distributions"),
    (lambda: optimise_blend([COARSE, FINE], phi_total=1.2), "phi_total"),
    (lambda: optimise_blend([COARSE, FINE], densities_kg_per_m3=[1000]), "densities"),
    (lambda: optimise_blend([COARSE, FINE], n_points=1), "n_points"),
    (lambda: optimise_blend([COARSE, FINE], state="wet"), "state"),
])
def test_bad_input(call, match):
    with pytest.raises(InputRangeError, match=match):
        call()
