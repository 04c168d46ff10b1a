"""Shear-rate physics: definitions, limits, and the flow-curve solver against independent solves.

Outside references: the definitions of the Peclet number and reduced stress (Bergenholtz,
Brady & Vicic 2002; Krieger 1972); the limits of the Krieger interpolation and of the
Wyart-Cates model (Phys. Rev. Lett. 112, 098302, 2014; phi_J from memory, f our choice); a
closed-form (quadratic) solution of Krieger's interpolation in a Newtonian liquid (algebra); a
plain scipy root finder point by point; a brute-force evaluation of the Wyart-Cates flow curve for
the S-shape; the Chateau-Ovarlez-Trung closed form for a Herschel-Bulkley liquid; the
closed form for a Newtonian liquid against the flow-curve solve, its plateaus (Krieger &
Dougherty 1959; Krieger 1972) and its midpoint by hand.
"""

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from predictor import shear as S
from predictor.errors import InputRangeError, ValidityWarning
from predictor.formulation import ZERO_SHEAR_RATIO

KT = S.BOLTZMANN_J_PER_K * 298.15
RATES = np.logspace(-3, 5, 200)


def test_peclet_and_reduced_stress_are_consistent():
    # Pe = 6 pi sigma_r when sigma = eta_s gammadot (both definitions, same a, T).
    pe = S.peclet_number(3.0, 200e-9, 2e-3, 298.15)
    sr = S.reduced_stress(2e-3 * 3.0, 200e-9, 298.15)
    assert pe == pytest.approx(6 * np.pi * sr, rel=1e-14)


def test_krieger_interpolation_limits():
    assert S.krieger_shear_thinning(0.0, 30.0, 5.0) == 30.0
    assert S.krieger_shear_thinning(1e12, 30.0, 5.0) == pytest.approx(5.0, rel=1e-9)
    s = S.thinning_onset_reduced_stress(30.0, 5.0, 0.2)
    assert S.krieger_shear_thinning(s, 30.0, 5.0, 0.2) == pytest.approx(27.0, rel=1e-12)
    assert np.isinf(S.thinning_onset_reduced_stress(30.0, 29.0))  # never reached


def test_wyart_cates_limits_and_jamming():
    # Low stress: frictionless (1 - phi/phi_0)^-2; high stress: frictional; inf past phi_mu.
    assert S.wyart_cates(0.5, 0.0, 1.0) == pytest.approx((1 - 0.5 / 0.64) ** -2, rel=1e-14)
    assert S.wyart_cates(0.5, 1e9, 1.0) == pytest.approx((1 - 0.5 / 0.58) ** -2, rel=1e-12)
    assert S.wyart_cates(0.6, 1e9, 1.0) == np.inf
    with pytest.raises(InputRangeError, match="phi_frictional"):
        S.wyart_cates(0.5, 1.0, 1.0, 0.58, 0.64)


def _krieger_quadratic(rate, eta_s, g0, ginf, sc):
    # sigma = eta_s rate [ginf + (g0 - ginf)/(1 + sigma/sc)]  ->  quadratic in sigma.
    a = eta_s * rate
    b = 1.0 - a * ginf / sc
    return (-b + np.sqrt(b * b + 4 * a * g0 / sc)) / (2 / sc)


BROWNIAN = dict(liquid_params={"viscosity_Pa_s": 1e-3}, radius_m=100e-9,
                phi_max_zero_shear=0.57, phi_max_high_shear=0.68,
                relation_params={"intrinsic_viscosity": 2.5})


def test_brownian_flow_curve_matches_closed_form_solution():
    phi = 0.5
    fc = S.flow_curve(RATES, phi, **BROWNIAN)
    g0 = (1 - phi / 0.57) ** (-2.5 * 0.57)
    ginf = (1 - phi / 0.68) ** (-2.5 * 0.68)
    sc = S.CRITICAL_REDUCED_STRESS * KT / 100e-9**3
    exact = _krieger_quadratic(RATES, 1e-3, g0, ginf, sc)
    assert np.allclose(fc.shear_stress_Pa, exact, rtol=1e-11)
    assert fc.markers["zero_shear_relative_viscosity"] == pytest.approx(g0, rel=1e-14)
    assert fc.markers["high_shear_relative_viscosity"] == pytest.approx(ginf, rel=1e-14)
    assert {"plateau", "thinning"} <= set(fc.regime)


def test_flow_curve_agrees_with_per_point_scipy_root_finding():
    phi = 0.55
    kw = dict(BROWNIAN, onset_stress_Pa=50.0, phi_max_frictional=0.6)
    fc = S.flow_curve(RATES[::10], phi, **kw)
    g = S.krieger_shear_thinning
    sc = S.CRITICAL_REDUCED_STRESS * KT / 100e-9**3

    def eta_r(sig):
        f = -np.expm1(-sig / 50.0)
        pj = f * 0.6 + (1 - f) * 0.68
        return g(sig / sc * S.CRITICAL_REDUCED_STRESS, (1 - phi / 0.57) ** (-2.5 * 0.57),
                 (1 - phi / pj) ** (-2.5 * pj))

    for rate, got in zip(RATES[::10], fc.shear_stress_Pa, strict=True):
        ref = brentq(lambda s, r=rate: s - 1e-3 * r * eta_r(s), 1e-12, 1e9, xtol=1e-14,
                     rtol=1e-13)
        assert got == pytest.approx(ref, rel=1e-9)


def test_thinning_onset_is_ten_percent_drop_and_scales_as_inverse_cube_of_radius():
    phi = 0.5
    onsets = []
    for a in (50e-9, 100e-9, 200e-9):
        fc = S.flow_curve(RATES, phi, **dict(BROWNIAN, radius_m=a))
        onset = fc.markers["thinning_onset_1_per_s"]
        at = S.flow_curve([onset], phi, **dict(BROWNIAN, radius_m=a))
        assert at.viscosity_Pa_s[0] == pytest.approx(
            0.9 * fc.markers["zero_shear_viscosity_Pa_s"], rel=1e-6)
        onsets.append(onset * a**3)
    assert np.allclose(onsets, onsets[0], rtol=1e-6)


def _wc_rate(sig, phi, star=1.0, p0=0.64, pm=0.58, eta=1e-3):
    # Brute force: gammadot(sigma) = sigma / (eta (1 - phi/phi_J)^-2).
    return sig * (1 - phi / S.wyart_cates_jamming_fraction(sig, star, p0, pm)) ** 2 / eta


WC = dict(relation="quemada", liquid_params={"viscosity_Pa_s": 1e-3}, phi_max_high_shear=0.64,
          phi_max_frictional=0.58, onset_stress_Pa=1.0)


@pytest.mark.parametrize("phi", [0.5, 0.565, 0.575])
def test_wyart_cates_flow_curve_satisfies_the_model_and_finds_the_s_shape(phi):
    fc = S.flow_curve(RATES, phi, **WC)
    sig = fc.shear_stress_Pa
    assert np.allclose(sig, 1e-3 * RATES * S.wyart_cates(phi, sig, 1.0), rtol=1e-10)
    dense = np.logspace(-6, 6, 400001)
    gd = _wc_rate(dense, phi)
    falls = np.flatnonzero(np.diff(gd) < 0)
    if falls.size == 0:
        assert np.isnan(fc.markers["dst_low_1_per_s"])
        assert "discontinuous-thickening" not in set(fc.regime)
        return
    high = gd[falls[0]]
    low = gd[falls[-1] + 1]
    assert fc.markers["dst_high_1_per_s"] == pytest.approx(high, rel=1e-3)
    assert fc.markers["dst_low_1_per_s"] == pytest.approx(low, rel=1e-3)
    inside = (RATES > low * 1.01) & (RATES < high * 0.99)
    assert np.all(fc.regime[inside] == "discontinuous-thickening")
    # Lower branch below the turning point, upper branch after it: stress jumps once.
    assert np.all(np.diff(sig) > 0)


def test_shear_jamming_above_the_frictional_packing_limit():
    phi = 0.6
    fc = S.flow_curve(RATES, phi, **WC)
    sig_jam = -np.log1p(-(0.64 - phi) / (0.64 - 0.58))
    dense = np.linspace(1e-6, sig_jam * (1 - 1e-12), 200001)
    top = _wc_rate(dense, phi).max()
    assert fc.markers["shear_jamming_1_per_s"] == pytest.approx(top, rel=1e-4)
    jammed = RATES > top
    assert np.all(fc.regime[jammed] == "jammed")
    assert np.all(np.isinf(fc.viscosity_Pa_s[jammed]))
    assert np.all(np.isfinite(fc.viscosity_Pa_s[~jammed]))
    assert any("Shear jamming" in w for w in fc.warnings)


def test_yield_stress_liquid_with_particles_matches_chateau_closed_form():
    phi = 0.35
    fc = S.flow_curve(RATES, phi, liquid_law_name="herschel-bulkley",
                      liquid_params={"yield_stress_Pa": 20.0, "consistency_Pa_s": 3.0,
                                     "flow_index": 0.4})
    g = (1 - phi / 0.64) ** -1.6
    ty = 20.0 * np.sqrt((1 - phi) * g)
    expected = ty + 3.0 * (1 - phi) ** 0.3 * g**0.7 * RATES**0.4
    assert np.allclose(fc.shear_stress_Pa, expected, rtol=1e-11)
    assert fc.markers["apparent_yield_stress_Pa"] == pytest.approx(ty, rel=1e-9)
    assert fc.regime[0] == "yield" and fc.regime[-1] == "thinning"


def test_past_packing_limits_warn_and_never_crash():
    with pytest.warns(ValidityWarning, match="zero-shear packing limit"):
        fc = S.flow_curve(RATES, 0.6, **BROWNIAN)
    assert np.all(np.isfinite(fc.viscosity_Pa_s))
    with pytest.warns(ValidityWarning, match="no flow"):
        fc = S.flow_curve(RATES, 0.7, liquid_params={"viscosity_Pa_s": 1e-3})
    assert np.all(fc.regime == "jammed") and np.all(np.isinf(fc.viscosity_Pa_s))


def test_large_particles_get_a_brownian_note():
    fc = S.flow_curve(RATES, 0.3, **dict(BROWNIAN, radius_m=20e-6))
    assert any("negligible" in w for w in fc.warnings)


@pytest.mark.parametrize("rates", [[0.0, 1.0], [np.nan], [-1.0]])
def test_bad_rates_raise(rates):
    with pytest.raises(InputRangeError, match="shear_rate_1_per_s"):
        S.flow_curve(rates, 0.3)


def test_thickening_needs_a_frictional_limit():
    with pytest.raises(InputRangeError, match="phi_max_frictional"):
        S.flow_curve(RATES, 0.3, onset_stress_Pa=1.0)


@settings(max_examples=60, deadline=None)
@given(phi=st.floats(0.0, 0.66), star=st.floats(1e-2, 1e3), radius=st.floats(2e-8, 5e-6),
       law=st.sampled_from(["newtonian", "carreau-yasuda", "casson", "power-law"]),
       friction=st.floats(0.52, 0.63))
def test_flow_curve_never_returns_garbage(phi, star, radius, law, friction):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        fc = S.flow_curve(RATES[::8], phi, liquid_law_name=law, radius_m=radius,
                          phi_max_zero_shear=0.58, phi_max_high_shear=0.64,
                          phi_max_frictional=friction, onset_stress_Pa=star)
    assert not np.any(np.isnan(fc.viscosity_Pa_s)) and not np.any(np.isnan(fc.shear_stress_Pa))
    assert np.all(fc.viscosity_Pa_s > 0)
    assert set(fc.regime) <= set(S.REGIMES)
    flowing = np.isfinite(fc.shear_stress_Pa)
    assert np.all(np.diff(fc.shear_stress_Pa[flowing]) > 0)  # rising envelope of the curve
    assert np.all(fc.regime[~flowing] == "jammed")


def test_process_shear_rates_table_is_well_formed():
    names = [n for n, _, _ in S.PROCESS_SHEAR_RATES]
    assert len(names) == len(set(names)) >= 8
    assert all(0 < lo < hi for _, lo, hi in S.PROCESS_SHEAR_RATES)


# --- newtonian_flow_viscosity / newtonian_flow_regime: the closed form ---------------------

def _plateaus(phi, phi_max, intrinsic):
    """Krieger-Dougherty at the high- and zero-shear packing limits (Krieger 1972 plateaus)."""
    from predictor.suspension import krieger_dougherty

    return (krieger_dougherty(phi, phi_max, intrinsic),
            krieger_dougherty(phi, ZERO_SHEAR_RATIO * phi_max, intrinsic))


@settings(max_examples=80, deadline=None)
@given(headroom=st.floats(0.0, 0.995), phi_max=st.floats(0.5, 0.74),
       intrinsic=st.floats(2.5, 4.0), log_radius=st.floats(-8.0, -4.5),
       temperature=st.floats(260.0, 380.0), log_eta=st.floats(-3.5, 1.0),
       medium=st.floats(1.0, 3.0), no_radius=st.booleans())
def test_closed_form_equals_the_flow_curve_solve(headroom, phi_max, intrinsic, log_radius,
                                                 temperature, log_eta, medium, no_radius):
    # Outside check: shear.flow_curve solves the same equation numerically (stress grid plus
    # regula falsi), so for a Newtonian liquid without thickening the two must agree to the
    # solver's precision. Cases include the Brownian term left out: no radius, a radius above
    # 3 um, phi at or above the zero-shear packing limit.
    phi, eta_l = headroom * phi_max, 10.0**log_eta
    radius = None if no_radius else 10.0**log_radius
    rates = np.logspace(-4, 6, 21)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        fc = S.flow_curve(rates, phi, liquid_params={"viscosity_Pa_s": eta_l},
                          medium_factor=medium, phi_max_high_shear=phi_max,
                          phi_max_zero_shear=ZERO_SHEAR_RATIO * phi_max, radius_m=radius,
                          temperature_K=temperature,
                          relation_params={"intrinsic_viscosity": intrinsic})
    g_hs, g0 = _plateaus(phi, phi_max, intrinsic)
    brownian = radius is not None and radius <= S.BROWNIAN_RADIUS_LIMIT_m
    scale = (S.CRITICAL_REDUCED_STRESS * S.BOLTZMANN_J_PER_K * temperature / radius**3
             if brownian else None)
    args = (rates, eta_l * medium, g_hs, g0 if brownian else None, scale)
    got = S.newtonian_flow_viscosity(*args)
    np.testing.assert_allclose(got, fc.viscosity_Pa_s, rtol=1e-9)
    # Regime labels: flow_curve takes the secant slope of its stress-grid segment, the closed
    # form the exact local slope, so labels may differ only where the slope is within a few
    # thousandths of the +-0.05 threshold; the slope here is a central difference of the
    # closed form itself (an independent estimate of d ln eta / d ln rate).
    step = 1e-4
    slope = (np.log(S.newtonian_flow_viscosity(rates * np.exp(step), *args[1:]))
             - np.log(S.newtonian_flow_viscosity(rates * np.exp(-step), *args[1:]))) / (2 * step)
    clear = np.abs(np.abs(slope) - S.PLATEAU_SLOPE) > 5e-3
    regime = S.newtonian_flow_regime(*args)
    assert np.all(regime[clear] == fc.regime[clear])
    expected = np.where(slope < -S.PLATEAU_SLOPE, "thinning",
                        np.where(slope > S.PLATEAU_SLOPE, "thickening", "plateau"))
    assert np.all(regime[clear] == expected[clear])


def test_closed_form_plateaus_and_midpoint():
    # Hand check. Krieger & Dougherty (1959) / Krieger (1972): the Brownian suspension has a
    # zero-shear plateau mu*g0 and a high-shear plateau mu*g_inf. With g0 = 20, g_inf = 4,
    # mu = 1 mPa*s, sigma_c = 0.04 Pa: at 1e-9 1/s the stress (2e-11 Pa) is far below
    # sigma_c, so eta = 0.020 Pa*s; at 1e12 1/s it is far above, so eta = 0.004 Pa*s.
    # At sigma = sigma_c, g is midway (12) by the interpolation's definition, i.e. at
    # rate = 0.04 / (1e-3 * 12) = 3.3333 1/s the viscosity is 0.012 Pa*s.
    eta = S.newtonian_flow_viscosity([1e-9, 1e12, 0.04 / 0.012], 1e-3, 4.0, 20.0, 0.04)
    assert eta[0] == pytest.approx(0.020, rel=1e-9)
    assert eta[1] == pytest.approx(0.004, rel=1e-9)
    assert eta[2] == pytest.approx(0.012, rel=1e-12)
    assert list(S.newtonian_flow_regime([1e-9, 3.3333, 1e12], 1e-3, 4.0, 20.0, 0.04)) == [
        "plateau", "thinning", "plateau"]


def test_closed_form_without_brownian_term_and_when_jammed():
    # Without the Brownian term the viscosity is mu * g_inf at every rate (common practice,
    # no source: a Newtonian suspension); inf g_inf (phi >= phi_max) gives inf, "jammed".
    rates = np.logspace(-3, 5, 9)
    for g0, scale in ((None, None), (np.inf, 0.04), (30.0, None)):
        assert np.all(S.newtonian_flow_viscosity(rates, 2e-3, 5.0, g0, scale) == 2e-3 * 5.0)
        assert set(S.newtonian_flow_regime(rates, 2e-3, 5.0, g0, scale)) == {"plateau"}
    assert S.newtonian_flow_viscosity(1.0, 1e-3, np.inf, 20.0, 0.04) == np.inf
    assert S.newtonian_flow_regime(1.0, 1e-3, np.inf, 20.0, 0.04) == "jammed"
    # One value per row: elements may differ in everything, including the Brownian term.
    eta = S.newtonian_flow_viscosity([1.0, 1.0], [1e-3, 2e-3], [4.0, 5.0], [20.0, np.inf],
                                     [0.04, 1.0])
    assert eta[1] == pytest.approx(1e-2, rel=1e-15) and 0.004 < eta[0] < 0.02


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"shear_rate_1_per_s": 0.0}, "shear_rate_1_per_s"),
    ({"medium_viscosity_Pa_s": -1e-3}, "medium_viscosity_Pa_s"),
    ({"high_shear_relative_viscosity": np.nan}, "high_shear_relative_viscosity"),
    ({"zero_shear_relative_viscosity": 0.0}, "zero_shear_relative_viscosity"),
    ({"stress_scale_Pa": np.inf}, "stress_scale_Pa"),
])
def test_closed_form_bad_input_names_the_field(kwargs, field):
    args = {"shear_rate_1_per_s": 1.0, "medium_viscosity_Pa_s": 1e-3,
            "high_shear_relative_viscosity": 4.0, "zero_shear_relative_viscosity": 20.0,
            "stress_scale_Pa": 0.04, **kwargs}
    for func in (S.newtonian_flow_viscosity, S.newtonian_flow_regime):
        with pytest.raises(InputRangeError, match=field):
            func(**args)
