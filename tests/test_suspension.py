"""Limits and properties every suspension relation must show, and its bad-input behaviour."""

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import predictor as pr
from predictor import suspension

DIVERGENT = ["krieger-dougherty", "quemada", "maron-pierce", "eilers", "chong", "frankel-acrivos"]
DILUTE_EINSTEIN = ["einstein", "batchelor", "krieger-dougherty", "eilers", "mooney"]


@pytest.mark.parametrize("name", DILUTE_EINSTEIN)
def test_dilute_limit_is_einstein(name):
    # Einstein (1906/1911): eta_r -> 1 + 2.5 phi as phi -> 0 (seen, Kolloid-Z. 27, 137, 1920).
    phi = 1e-5
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", pr.ValidityWarning)
        slope = (pr.relative_viscosity(phi, model=name) - 1.0) / phi
    assert slope == pytest.approx(2.5, rel=1e-3)


@pytest.mark.parametrize("name,phi_max", [("quemada", 0.8), ("chong", 0.6)])
def test_dilute_limit_where_relation_is_einstein_only_for_one_phi_max(name, phi_max):
    # Quemada's slope is 2/phi_max and Chong's 1.5/phi_max: Einstein's 2.5 at these phi_max.
    phi = 1e-6
    slope = (pr.relative_viscosity(phi, model=name, phi_max=phi_max) - 1.0) / phi
    assert slope == pytest.approx(2.5, rel=1e-3)


@given(phi=st.floats(0.0, 0.63), phi_max=st.floats(0.5, 0.74))
@settings(max_examples=100, deadline=None)
def test_krieger_dougherty_with_eta_phi_max_2_is_quemada(phi, phi_max):
    # Identity of the two published forms when [eta] phi_max = 2 (Quemada 1977).
    kd = suspension.krieger_dougherty(phi, phi_max, intrinsic_viscosity=2.0 / phi_max)
    assert kd == pytest.approx(suspension.quemada(phi, phi_max), rel=1e-12)


@pytest.mark.parametrize("spec", pr.models("suspension"), ids=lambda s: s.name)
@given(a=st.floats(0.0, 0.55), b=st.floats(0.0, 0.55))
@settings(max_examples=60, deadline=None)
def test_monotone_in_phi(spec, a, b):
    low, high = sorted((a, b))
    f = spec.func
    assert f(low) <= f(high)


@pytest.mark.parametrize("name", DIVERGENT)
def test_divergence_returns_inf_at_and_beyond_phi_max(name):
    values = pr.relative_viscosity(np.array([0.64, 0.7, 1.0]), model=name, phi_max=0.64)
    assert np.all(np.isinf(values))


def test_thomas_dilute_limit_as_printed():
    # Thomas' correlation as printed carries 0.00273 exp(16.6 phi): eta_r(0) = 1.00273 and
    # slope 2.5 + 0.00273*16.6 = 2.545 (hand calculation), i.e. Einstein within 2 %.
    assert suspension.thomas(0.0) == pytest.approx(1.00273)
    slope = (suspension.thomas(1e-6) - suspension.thomas(0.0)) / 1e-6
    assert slope == pytest.approx(2.5, rel=0.02)


def test_mooney_diverges_at_one_over_k():
    assert np.isinf(suspension.mooney(0.5, crowding_factor=2.0))
    assert np.isfinite(suspension.mooney(0.45, crowding_factor=2.0))


def test_array_in_array_out_and_float_in_float_out():
    assert isinstance(suspension.krieger_dougherty(0.3), float)
    out = suspension.krieger_dougherty(np.array([[0.1], [0.2]]), np.array([0.6, 0.64]))
    assert out.shape == (2, 2)


@pytest.mark.parametrize("spec", pr.models("suspension"), ids=lambda s: s.name)
@pytest.mark.parametrize("bad", [-0.1, 1.2, np.nan, np.inf, -np.inf])
def test_bad_phi_raises_with_the_field_named(spec, bad):
    with pytest.raises(pr.InputRangeError, match="phi"):
        spec.func(bad)


@pytest.mark.parametrize("params,field", [
    ({"phi_max": 0.1}, "phi_max"), ({"phi_max": 1.5}, "phi_max"),
    ({"intrinsic_viscosity": -1.0}, "intrinsic_viscosity"), ({"phi_max": np.nan}, "phi_max"),
    ({"no_such_thing": 1.0}, "no_such_thing"),
])
def test_dispatcher_refuses_parameters_out_of_bounds(params, field):
    with pytest.raises(pr.InputRangeError, match=field) as err:
        pr.relative_viscosity(0.3, model="krieger-dougherty", **params)
    assert "expected" in str(err.value)


def test_unknown_model_names_the_choices():
    with pytest.raises(pr.UnknownModelError, match="quemada"):
        pr.relative_viscosity(0.3, model="no-such-relation")


def test_use_outside_validity_is_reported():
    with pytest.warns(pr.ValidityWarning, match="einstein"):
        pr.relative_viscosity(0.2, model="einstein")
    with pytest.warns(pr.ValidityWarning, match="phi/phi_max"):
        pr.relative_viscosity(0.2, model="frankel-acrivos", phi_max=0.64)


def test_no_warning_inside_validity():
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # any warning fails the test
        assert pr.relative_viscosity(0.3, model="krieger-dougherty") > 1.0


def test_effective_volume_fraction_refuses_negative_layer():
    with pytest.raises(pr.InputRangeError, match="layer_thickness_m"):
        suspension.effective_volume_fraction(0.3, -1e-9, 1e-7)
