"""Settling and creaming: hand calculations, published constants, verdict rules."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from predictor import stability
from predictor.errors import InputRangeError

KT = 1.380649e-23 * 298.15


def test_stokes_velocity_hand_calculation():
    # Hand calculation of v = (rho_p - rho_f) g d^2 / (18 eta) (Stokes 1851):
    # 1650 * 9.81 * (10e-6)^2 / (18 * 1e-3) = 8.99250e-5 m/s.
    v = stability.stokes_velocity(10e-6, 2650.0, 1000.0, 1e-3, gravity_m_per_s2=9.81)
    assert v == pytest.approx(1650 * 9.81 * 1e-10 / 0.018, rel=1e-12)
    assert v == pytest.approx(8.99250e-5, abs=5e-10)


def test_droplets_lighter_than_the_liquid_cream():
    # Sign convention: negative = upwards. Oil 900 kg/m3 in water, hand value
    # -100 * 9.80665 * 4e-12 / 18e-3 = -2.17926e-7 m/s.
    v = stability.stokes_velocity(2e-6, 900.0, 1000.0, 1e-3)
    assert v == pytest.approx(-100 * 9.80665 * 4e-12 / 18e-3)


def test_richardson_zaki_stokes_exponent():
    # Richardson & Zaki (1954): n = 4.65 in the Stokes regime (seen in the source).
    assert stability.RICHARDSON_ZAKI_STOKES == 4.65
    assert stability.richardson_zaki_exponent(0.01) == 4.65
    assert stability.richardson_zaki(0.0) == 1.0
    assert stability.richardson_zaki(0.3) == pytest.approx(0.7**4.65)
    # Piecewise correlation above Re = 0.2 (checked against a transcription of the 1997 reprint).
    assert stability.richardson_zaki_exponent(1000.0) == 2.39


def test_hindered_velocity_is_stokes_times_the_hindrance():
    v0 = stability.stokes_velocity(20e-6, 2500.0, 1000.0, 2e-3)
    v = stability.hindered_settling_velocity(20e-6, 0.25, 2500.0, 1000.0, 2e-3)
    assert v == pytest.approx(v0 * 0.75**4.65)


def test_peclet_is_stokes_velocity_over_stokes_einstein_diffusivity():
    # Pe_g = v0 a / D0 with D0 = kT / (6 pi eta a) (Einstein 1905); any viscosity gives
    # the same Pe_g, which we check against the independent product.
    d, eta = 1e-6, 3.7e-3
    v0 = stability.stokes_velocity(d, 2650.0, 1000.0, eta)
    d0 = KT / (6 * math.pi * eta * d / 2)
    pe = stability.gravitational_peclet(d, 2650.0, 1000.0, 298.15)
    assert pe == pytest.approx(v0 * (d / 2) / d0, rel=1e-12)
    # Gravitational length k_B T / (Delta m g), hand formula.
    dm = 4 / 3 * math.pi * (d / 2) ** 3 * 1650.0
    assert stability.gravitational_length(d, 2650.0, 1000.0, 298.15) == pytest.approx(
        KT / (dm * 9.80665))


def test_beris_parameter_and_critical_value():
    # Beris et al. (1985) abstract: a sphere falls only below 0.143 (seen). Definition
    # Y = 3 tau_y / (2 R drho g) from memory; hand value for 1 Pa, 100 um, 1650 kg/m3:
    # 3 / (100e-6 * 1650 * 9.81) = 1.85340.
    assert stability.BERIS_CRITICAL == 0.143
    y = stability.beris_yield_parameter(1.0, 100e-6, 2650.0, 1000.0, 9.81)
    assert y == pytest.approx(3.0 / (100e-6 * 1650 * 9.81))
    tau_c = 0.143 * 100e-6 * 1650 * 9.80665 / 3          # yield stress at the threshold
    held = stability.storage_verdict(100e-6, 2650.0, 1000.0, 1e-3, 0.1, 1.01 * tau_c)
    falls = stability.storage_verdict(100e-6, 2650.0, 1000.0, 1e-3, 0.1, 0.99 * tau_c)
    assert held.stable and held.reason == "held-by-yield-stress"
    assert not falls.stable and falls.reason == "settles"


def test_clear_layer_time():
    assert stability.clear_layer_time(1e-3, 1e-6) == pytest.approx(1000.0)
    assert stability.clear_layer_time(1e-3, -1e-6) == pytest.approx(1000.0)
    assert np.isinf(stability.clear_layer_time(1e-3, 0.0))


@pytest.mark.parametrize("args, kwargs, reason, stable", [
    ((10e-6, 2650.0, 1000.0, 1e-3), {"phi": 0.2}, "settles", False),
    ((5e-6, 900.0, 1000.0, 1e-3), {"phi": 0.2}, "creams", False),
    ((10e-6, 1000.0, 1000.0, 1e-3), {}, "density-matched", True),
    ((10e-9, 2650.0, 1000.0, 1e-3), {}, "brownian", True),
    ((1e-6, 1100.0, 1000.0, 50.0), {"phi": 0.3}, "slow", True),
])
def test_verdicts(args, kwargs, reason, stable):
    # Invented cases chosen to land in each branch of the documented rules.
    v = stability.storage_verdict(*args, **kwargs)
    assert (v.reason, v.stable) == (reason, stable)
    assert v.message and str(round(v.clear_layer_m * 1e3)) in v.message


def test_verdict_numbers_are_consistent():
    v = stability.storage_verdict(10e-6, 2650.0, 1000.0, 1e-3, phi=0.2, clear_layer_m=2e-3)
    assert v.hindered_velocity_m_per_s == pytest.approx(v.stokes_velocity_m_per_s * 0.8**4.65)
    assert v.clear_layer_time_s == pytest.approx(2e-3 / v.hindered_velocity_m_per_s)
    assert v.direction == "settles" and "clear layer on top" in v.message


def test_bad_inputs_raise_with_the_field_named():
    with pytest.raises(InputRangeError, match="diameter_m"):
        stability.stokes_velocity(-1e-6, 2650.0, 1000.0, 1e-3)
    with pytest.raises(InputRangeError, match="viscosity_Pa_s"):
        stability.stokes_velocity(1e-6, 2650.0, 1000.0, np.nan)
    with pytest.raises(InputRangeError, match="phi"):
        stability.richardson_zaki(1.2)
    with pytest.raises(InputRangeError, match="yield_stress_Pa"):
        stability.beris_yield_parameter(-1.0, 1e-6, 2650.0, 1000.0)
    with pytest.raises(InputRangeError, match="scalars"):
        stability.storage_verdict(np.array([1e-6, 2e-6]), 2650.0, 1000.0, 1e-3)


@settings(max_examples=100, deadline=None)
@given(d=st.floats(1e-8, 1e-3), rho=st.floats(500.0, 8000.0), phi=st.floats(0.0, 0.7),
       eta=st.floats(1e-4, 1e3))
def test_hindered_settling_is_slower_and_same_direction(d, rho, phi, eta):
    v0 = stability.stokes_velocity(d, rho, 1000.0, eta)
    v = stability.hindered_settling_velocity(d, phi, rho, 1000.0, eta)
    assert abs(v) <= abs(v0) and v * v0 >= 0


def test_vectorised_over_arrays():
    d = np.array([1e-6, 10e-6, 100e-6])
    v = stability.stokes_velocity(d, 2650.0, 1000.0, 1e-3)
    assert v.shape == (3,) and np.allclose(v[1:] / v[:-1], 100.0)


def test_storage_reasons_is_storage_verdict_over_many_cases():
    # One decision rule: the vectorised form must give the scalar verdict element by element
    # (the scalar's own checks are against Stokes, Richardson & Zaki and Beris above).
    rng = np.random.default_rng(3)
    n = 300
    d = 10 ** rng.uniform(-8, -4, n)
    rho_p = rng.choice([900.0, 1000.0, 2650.0, 4100.0], n)
    eta = 10 ** rng.uniform(-3.5, 1, n)
    phi = rng.uniform(0, 0.5, n)
    tau = np.where(rng.random(n) < 0.3, 10 ** rng.uniform(-3, 1, n), 0.0)
    r = stability.storage_reasons(d, rho_p, 1000.0, eta, phi, tau)
    for i in range(n):
        v = stability.storage_verdict(float(d[i]), float(rho_p[i]), 1000.0, float(eta[i]),
                                      phi=float(phi[i]), yield_stress_Pa=float(tau[i]))
        assert (r["reason"][i], bool(r["stable"][i]), r["direction"][i]) == (
            v.reason, v.stable, v.direction)
        assert r["clear_layer_time_s"][i] == v.clear_layer_time_s
    assert len(set(r["reason"])) >= 4
