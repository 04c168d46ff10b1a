"""Liquids: water and glycerol-water against outside references, laws against their limits.

Outside references: the `iapws` package (IAPWS-95 density and its own IAPWS 2008 viscosity,
test-only); the defining equations and limits of each liquid law (Chhabra & Richardson,
Non-Newtonian Flow and Applied Rheology, 2008); the Chateau, Ovarlez & Trung (J. Rheol. 52,
489, 2008) closed forms for a Herschel-Bulkley liquid (formulas from memory).
"""

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import predictor as pr
from predictor import liquids as L
from predictor.errors import InputRangeError

iapws = pytest.importorskip("iapws")

TEMPS_C = np.linspace(0.01, 99.9, 12)


def _iapws_liquid(t_k):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return iapws.IAPWS95(T=float(t_k), P=L.ATMOSPHERIC_PRESSURE_MPa)


@pytest.mark.parametrize("t_c", TEMPS_C)
def test_water_viscosity_matches_iapws_package_within_0_1_percent(t_c):
    # Reference: iapws package, IAPWS-95 density + IAPWS 2008 viscosity at 0.101325 MPa.
    ref = _iapws_liquid(273.15 + t_c)
    assert L.water_viscosity(273.15 + t_c) == pytest.approx(ref.mu, rel=1e-3)
    # Observed agreement is far better (density correlation only): keep it visible.
    assert L.water_viscosity(273.15 + t_c) == pytest.approx(ref.mu, rel=1e-4)


@pytest.mark.parametrize("t_c", TEMPS_C)
def test_kell_density_matches_iapws95_within_20_ppm(t_c):
    # Reference: iapws package IAPWS-95 density; Kell (1975) claims a few ppm at 1 atm.
    assert L.water_density(273.15 + t_c) == pytest.approx(_iapws_liquid(273.15 + t_c).rho,
                                                          rel=2e-5)


def test_iapws_2008_core_matches_iapws_package_at_same_density():
    # Reference: iapws package's own IAPWS 2008 viscosity at (T, rho), far from critical.
    from iapws._iapws import _Viscosity
    for t, rho in [(280.0, 999.9), (320.0, 989.0), (360.0, 967.0), (500.0, 831.0)]:
        assert L.iapws_2008_viscosity(t, rho) == pytest.approx(_Viscosity(rho, t), rel=1e-9)


def test_water_scalar_in_float_out_and_vectorised():
    assert isinstance(L.water_viscosity(300.0), float)
    out = L.water_viscosity(np.array([280.0, 300.0, 340.0]))
    assert out.shape == (3,) and np.all(np.diff(out) < 0)  # viscosity falls with temperature


@pytest.mark.parametrize("bad", [273.0, 373.2, np.nan, np.inf, -5.0])
def test_water_outside_range_raises_naming_the_field(bad):
    with pytest.raises(InputRangeError, match="temperature_K"):
        L.water_viscosity(bad)


def test_glycerol_water_limits_are_cheng_end_members():
    # Cheng (2008): C = 0 gives his water formula, C = 1 his glycerol formula.
    t = 293.15
    mu_w = 1.790 * np.exp((-1230 - 20) * 20 / (36100 + 360 * 20)) * 1e-3
    mu_g = 12100 * np.exp((-1233 + 20) * 20 / (9900 + 70 * 20)) * 1e-3
    assert L.glycerol_water_viscosity(0.0, t) == pytest.approx(mu_w, rel=1e-12)
    assert L.glycerol_water_viscosity(1.0, t) == pytest.approx(mu_g, rel=1e-12)
    # Cheng's water end member agrees with IAPWS within 1 % over 0-100 degC.
    for tk in 273.15 + TEMPS_C:
        assert L.glycerol_water_viscosity(0.0, tk) == pytest.approx(L.water_viscosity(tk),
                                                                    rel=0.01)


@settings(max_examples=60, deadline=None)
@given(c=st.floats(0.0, 0.99), t=st.floats(273.15, 372.0))
def test_glycerol_water_rises_with_glycerol_and_falls_with_temperature(c, t):
    assert L.glycerol_water_viscosity(c + 0.01, t) > L.glycerol_water_viscosity(c, t)
    assert L.glycerol_water_viscosity(c, t + 1.0) < L.glycerol_water_viscosity(c, t)


def test_glycerol_water_bad_inputs_raise():
    with pytest.raises(InputRangeError, match="glycerol_mass_fraction"):
        L.glycerol_water_viscosity(1.2, 300.0)
    with pytest.raises(InputRangeError, match="temperature_K"):
        L.glycerol_water_viscosity(0.5, 380.0)


@settings(max_examples=80, deadline=None)
@given(t1=st.floats(250, 400), t2=st.floats(250, 400), ta=st.floats(0, 8000),
       eta=st.floats(1e-4, 1e3))
def test_arrhenius_round_trip(t1, t2, ta, eta):
    # Andrade form: the two-point fit inverts the shift exactly (algebra, no source needed).
    if abs(t1 - t2) < 1.0:
        return
    eta2 = L.arrhenius_viscosity(t2, eta, t1, ta)
    assert L.arrhenius_from_two_points(t1, eta, t2, eta2) == pytest.approx(ta, abs=1e-6 * ta
                                                                            + 1e-6)
    assert L.arrhenius_shift(t1, t1, ta) == 1.0


def test_arrhenius_interpolates_water_between_two_points():
    # Outside reference: IAPWS water. E/R from 20 and 30 degC predicts 25 degC within 0.3 %.
    e20, e30 = L.water_viscosity(293.15), L.water_viscosity(303.15)
    ta = L.arrhenius_from_two_points(293.15, e20, 303.15, e30)
    assert L.arrhenius_viscosity(298.15, e20, 293.15, ta) == pytest.approx(
        L.water_viscosity(298.15), rel=3e-3)


def test_arrhenius_equal_temperatures_raise():
    with pytest.raises(InputRangeError, match="temperature_2_K"):
        L.arrhenius_from_two_points(300.0, 1.0, 300.0, 2.0)


# --- Liquid laws ---------------------------------------------------------------------------

RATES = np.logspace(-4, 6, 41)


def test_power_law_with_n_1_is_newtonian():
    assert np.allclose(L.power_law(RATES, 0.3, 1.0), L.newtonian(RATES, 0.3), rtol=1e-14)


def test_carreau_yasuda_plateaus_and_carreau_special_case():
    eta = L.carreau_yasuda(np.array([1e-9, 1e12]), 10.0, 0.01, 1.0, 0.4, 1.5)
    assert eta[0] == pytest.approx(10.0, rel=1e-9)
    assert eta[1] == pytest.approx(0.01, rel=1e-3)
    # a = 2 is Carreau (Trans. Soc. Rheol. 16, 99, 1972): eta0 (1 + (lam g)^2)^((n-1)/2).
    carreau = 10.0 * (1 + (0.5 * RATES) ** 2) ** ((0.4 - 1) / 2)
    assert np.allclose(L.carreau_yasuda(RATES, 10.0, 0.0, 0.5, 0.4, 2.0), carreau, rtol=1e-13)
    # Thinning slope tends to n - 1 between the plateaus.
    g = np.array([1e3, 1e4])
    eta = L.carreau_yasuda(g, 10.0, 0.0, 1.0, 0.4, 2.0)
    assert np.log(eta[1] / eta[0]) / np.log(10) == pytest.approx(-0.6, abs=1e-5)


def test_cross_midway_and_plateaus():
    assert L.cross(1 / 0.3, 4.0, 1.0, 0.3, 0.8) == pytest.approx(2.5, rel=1e-14)
    assert L.cross(1e-12, 4.0, 1.0, 0.3, 0.8) == pytest.approx(4.0, rel=1e-8)


def test_yield_laws_reduce_to_their_special_cases():
    assert np.allclose(L.herschel_bulkley(RATES, 0.0, 2.0, 0.6), L.power_law(RATES, 2.0, 0.6),
                       rtol=1e-14)
    assert np.allclose(L.herschel_bulkley(RATES, 5.0, 0.2, 1.0), L.bingham(RATES, 5.0, 0.2),
                       rtol=1e-14)
    assert np.allclose(L.casson(RATES, 0.0, 0.2), L.newtonian(RATES, 0.2), rtol=1e-14)


@pytest.mark.parametrize("law,params", [
    ("bingham", {"yield_stress_Pa": 3.0}), ("herschel-bulkley", {"yield_stress_Pa": 3.0}),
    ("casson", {"yield_stress_Pa": 3.0}), ("power-law", {"flow_index": 0.5})])
def test_apparent_viscosity_is_infinite_at_rest(law, params):
    assert L.liquid_viscosity(0.0, law, **params) == np.inf
    assert L.liquid_stress(0.0, law, **params) == params.get("yield_stress_Pa", 0.0)


LAWS = [spec.name for spec in pr.models("liquid")]


@pytest.mark.parametrize("law", LAWS)
def test_inverse_law_round_trips(law):
    rates = np.logspace(-5, 5, 31)
    tau = L.liquid_stress(rates, law)
    assert np.allclose(L.liquid_shear_rate(tau, law), rates, rtol=1e-9)


@pytest.mark.parametrize("law", LAWS)
def test_stress_rises_with_rate(law):
    assert np.all(np.diff(L.liquid_stress(RATES, law)) > 0)


def test_bad_law_inputs_raise_with_the_field():
    with pytest.raises(InputRangeError, match="shear_rate_1_per_s"):
        L.power_law(-1.0)
    with pytest.raises(InputRangeError, match="infinite_shear_viscosity_Pa_s"):
        L.cross(1.0, 1.0, 2.0)
    with pytest.raises(InputRangeError, match="flow_index"):
        L.liquid_viscosity(1.0, "power-law", flow_index=3.0)
    with pytest.raises(InputRangeError, match="viscosity_Pa_s"):
        L.newtonian(1.0, np.nan)
    with pytest.raises(pr.UnknownModelError):
        L.liquid_viscosity(1.0, "krieger-dougherty")


def test_laws_broadcast_and_return_float_for_scalars():
    assert isinstance(L.carreau_yasuda(1.0), float)
    out = L.herschel_bulkley(RATES[:, None], np.array([0.0, 1.0, 10.0]))
    assert out.shape == (RATES.size, 3)


# --- Rigid particles in a non-Newtonian liquid ---------------------------------------------


@settings(max_examples=60, deadline=None)
@given(phi=st.floats(0.0, 0.55), n=st.floats(0.2, 1.5), ty=st.floats(0, 50),
       rate=st.floats(1e-3, 1e4))
def test_herschel_bulkley_suspension_matches_chateau_closed_form(phi, n, ty, rate):
    # Chateau, Ovarlez & Trung (2008): tau_y sqrt((1-phi) g) + K (1-phi)^((1-n)/2)
    # g^((1+n)/2) gammadot^n, with g from Krieger-Dougherty (formulas from memory).
    g = pr.relative_viscosity(phi, "krieger-dougherty", phi_max=0.64)
    expected = ty * L.chateau_yield_stress_factor(phi, g) + 2.0 * L.chateau_consistency_factor(
        phi, g, n) * rate**n
    got = L.suspension_in_liquid_stress(rate, phi, g, "herschel-bulkley", yield_stress_Pa=ty,
                                        consistency_Pa_s=2.0, flow_index=n)
    assert got == pytest.approx(expected, rel=1e-12)


def test_chateau_limits():
    # n = 1: the consistency scales like the Newtonian relative viscosity; phi = 0: no change.
    assert L.chateau_consistency_factor(0.4, 5.0, 1.0) == pytest.approx(5.0, rel=1e-14)
    assert L.chateau_yield_stress_factor(0.0, 1.0) == 1.0
    assert L.local_shear_rate_factor(0.0, 1.0) == 1.0
    with pytest.raises(InputRangeError, match="phi"):
        L.local_shear_rate_factor(1.0, 2.0)
