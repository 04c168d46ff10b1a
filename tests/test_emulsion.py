"""Emulsion relations: published limits, domain edges, properties and solver convergence.

Sources beside each check; published point values are in tests/published/emulsion.py.
"""

import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import predictor as pr
from predictor import emulsion, suspension
from predictor.errors import InputRangeError, ValidityWarning

INF = np.inf
ratios = st.one_of(st.floats(0.0, 1e12), st.just(INF))
phis = st.floats(0.0, 0.99)


def taylor_coefficient(lam):
    """(2.5 lambda + 1)/(lambda + 1): Taylor, Proc. R. Soc. A 138, 41, 1932 (restated)."""
    return 2.5 if np.isinf(lam) else (2.5 * lam + 1.0) / (lam + 1.0)


# ---- Registry and dispatcher ---------------------------------------------------------------

def test_design_names_are_registered_as_emulsion_relations():
    names = {spec.name for spec in pr.models("emulsion")}
    assert {"taylor", "pal", "phan-thien-pham"} <= names


def test_dispatcher_calls_taylor_with_the_design_api():
    # Taylor 1932 hand calculation: 1 + 0.02 * 3.5/2.
    assert pr.relative_viscosity(0.02, model="taylor", viscosity_ratio=1.0) == pytest.approx(1.035)


def test_dispatcher_warns_outside_taylor_range():
    # Taylor is first order in phi (dilute; 0.03 is common practice, no source).
    with pytest.warns(ValidityWarning, match="taylor"):
        pr.relative_viscosity(0.3, model="taylor", viscosity_ratio=1.0)


def test_dispatcher_refuses_out_of_bounds_parameters():
    with pytest.raises(InputRangeError, match="viscosity_ratio"):
        pr.relative_viscosity(0.2, model="pal", viscosity_ratio=-1.0)
    with pytest.raises(InputRangeError, match="phi_max"):
        pr.relative_viscosity(0.2, model="pal", viscosity_ratio=1.0, phi_max=1.5)


# ---- Taylor ---------------------------------------------------------------------------------

@pytest.mark.parametrize("phi", [0.0, 0.01, 0.02])
def test_taylor_rigid_limit_is_einstein(phi):
    # Taylor 1932 with lambda -> inf is Einstein's 1 + 2.5 phi (Einstein 1906/1911).
    assert emulsion.taylor(phi, 1e12) == pytest.approx(suspension.einstein(phi), rel=1e-12)
    assert emulsion.taylor(phi, INF) == pytest.approx(suspension.einstein(phi), rel=1e-15)


def test_taylor_bubble_limit():
    # Taylor 1932 with lambda = 0: 1 + phi (checked against a secondary restatement).
    assert emulsion.taylor(0.02, 0.0) == pytest.approx(1.02)


def test_taylor_broadcasts_and_keeps_scalars():
    out = emulsion.taylor(np.array([[0.0], [0.02]]), np.array([0.0, 1.0, INF]))
    assert out.shape == (2, 3)
    assert isinstance(emulsion.taylor(0.01, 1.0), float)


# ---- Phan-Thien & Pham ----------------------------------------------------------------------

@given(phi=st.floats(0.0, 0.999))
@settings(max_examples=100, deadline=None)
def test_phan_thien_pham_limits(phi):
    # Phan-Thien & Pham 1997 (from memory): bubbles 1/(1 - phi), rigid (1 - phi)^-2.5.
    assert emulsion.phan_thien_pham(phi, 0.0) == pytest.approx(1.0 / (1.0 - phi), rel=1e-12)
    assert emulsion.phan_thien_pham(phi, INF) == pytest.approx((1.0 - phi) ** -2.5, rel=1e-12)
    # lambda = 1e12 differs from rigid by about 0.6 eta_r / lambda (first order in 1/lambda).
    rigid = (1.0 - phi) ** -2.5
    assert emulsion.phan_thien_pham(phi, 1e12) == pytest.approx(rigid, rel=1e-12 + rigid / 1e12)


@given(lam=ratios)
@settings(max_examples=100, deadline=None)
def test_phan_thien_pham_reduces_to_taylor_at_small_phi(lam):
    # Phan-Thien & Pham 1997 built on Taylor 1932: the slope at phi -> 0 is Taylor's.
    phi = 1e-7
    slope = (emulsion.phan_thien_pham(phi, lam) - 1.0) / phi
    assert slope == pytest.approx(taylor_coefficient(lam), rel=1e-5)


@given(phi=st.floats(0.0, 0.999), lam=ratios)
@settings(max_examples=150, deadline=None)
def test_phan_thien_pham_lies_between_bubbles_and_rigid_spheres(phi, lam):
    eta = emulsion.phan_thien_pham(phi, lam)
    assert (1.0 - phi) ** -1.0 * (1 - 1e-12) <= eta <= (1.0 - phi) ** -2.5 * (1 + 1e-12)


def test_phan_thien_pham_diverges_only_at_one():
    assert emulsion.phan_thien_pham(1.0, 1.0) == INF
    assert np.isfinite(emulsion.phan_thien_pham(1.0 - 1e-15, 1.0))


# ---- Pal ------------------------------------------------------------------------------------

@given(phi=st.floats(0.0, 0.63), phi_max=st.floats(0.64, 0.9))
@settings(max_examples=100, deadline=None)
def test_pal_rigid_limits_are_krieger_dougherty_and_mooney(phi, phi_max):
    # Pal 2001 (from memory) with lambda -> inf: variant 2 is Krieger & Dougherty 1959 with
    # [eta] = 2.5, variant 1 Mooney 1951 with crowding factor 1/phi_max.
    kd = suspension.krieger_dougherty(phi, phi_max=phi_max, intrinsic_viscosity=2.5)
    mooney = suspension.mooney(phi, crowding_factor=1.0 / phi_max, intrinsic_viscosity=2.5)
    assert emulsion.pal(phi, INF, phi_max, 2) == pytest.approx(kd, rel=1e-12)
    assert emulsion.pal(phi, INF, phi_max, 1) == pytest.approx(mooney, rel=1e-12)


@pytest.mark.parametrize("variant", [1, 2])
@pytest.mark.parametrize("lam", [0.0, 0.1, 1.0, 30.0, INF])
def test_pal_reduces_to_taylor_at_small_phi(variant, lam):
    # Pal 2001: both right-hand sides are 1 + 2.5 phi to first order -> Taylor 1932.
    phi = 1e-7
    slope = (emulsion.pal(phi, lam, 0.64, variant) - 1.0) / phi
    assert slope == pytest.approx(taylor_coefficient(lam), rel=1e-5)


def test_pal_diverges_at_phi_max():
    assert emulsion.pal(0.64, 1.0, 0.64) == INF
    assert emulsion.pal(0.7, 1.0, 0.64, 1) == INF
    assert np.isfinite(emulsion.pal(0.6399, 1.0, 0.64))


def test_pal_refuses_an_unknown_variant():
    with pytest.raises(InputRangeError, match="variant = 3"):
        emulsion.pal(0.3, 1.0, 0.64, 3)


# ---- Properties shared by the three relations --------------------------------------------

RELATIONS = {
    "taylor": lambda phi, lam: emulsion.taylor(phi, lam),
    "phan-thien-pham": lambda phi, lam: emulsion.phan_thien_pham(phi, lam),
    "pal-1": lambda phi, lam: emulsion.pal(phi, lam, 0.64, 1),
    "pal-2": lambda phi, lam: emulsion.pal(phi, lam, 0.64, 2),
}


@pytest.mark.parametrize("name", RELATIONS)
@given(phi=st.floats(0.0, 0.62), dphi=st.floats(1e-4, 0.01), lam=ratios)
@settings(max_examples=60, deadline=None)
def test_viscosity_increases_with_phi(name, phi, dphi, lam):
    f = RELATIONS[name]
    assert f(phi + dphi, lam) > f(phi, lam)


@pytest.mark.parametrize("name", RELATIONS)
@given(phi=st.floats(0.001, 0.62), lam=st.floats(0.0, 1e6), factor=st.floats(1.01, 100.0))
@settings(max_examples=60, deadline=None)
def test_viscosity_increases_with_viscosity_ratio(name, phi, lam, factor):
    f = RELATIONS[name]
    assert f(phi, lam * factor + 1e-3) >= f(phi, lam) * (1 - 1e-12)


@pytest.mark.parametrize("name", RELATIONS)
@pytest.mark.parametrize("bad", [-0.1, 1.1, np.nan, "oil"])
def test_bad_phi_raises_a_named_error(name, bad):
    with pytest.raises(InputRangeError, match="phi"):
        RELATIONS[name](bad, 1.0)


@pytest.mark.parametrize("name", RELATIONS)
@pytest.mark.parametrize("bad", [-1.0, np.nan, -INF])
def test_bad_viscosity_ratio_raises_a_named_error(name, bad):
    with pytest.raises(InputRangeError, match="viscosity_ratio"):
        RELATIONS[name](0.2, bad)


# ---- The implicit solver ----------------------------------------------------------------

def _residual(y, c, lam):
    """ln of the left-hand side minus ln R, in the equation of Phan-Thien & Pham / Pal."""
    q = 2.0 / (2.0 + 5.0 * lam)
    return y + 1.5 * np.log1p(q * np.expm1(y)) - c


@given(c=st.floats(0.0, 90.0), lam=st.floats(0.0, 1e12))
@settings(max_examples=200, deadline=None)
def test_solver_converges_over_the_domain(c, lam):
    eta = emulsion.differential_scheme_solve(c, lam)
    y = np.log(eta)
    assert abs(_residual(y, c, lam)) <= 1e-12 * (1.0 + c)


def test_solver_handles_extreme_right_sides_without_overflow():
    # Pal's variant 1 right-hand side grows without bound near phi_max: ln R = 1e16.
    eta = emulsion.differential_scheme_solve(np.array([1e3, 1e10, 1e16]), 1.0)
    assert np.isfinite(eta[0]) and eta[0] > 1e170       # e^400: still a float
    assert np.all(np.isinf(eta[1:]))                    # e^(4e9) is not: honest inf
    y = emulsion._halley_numpy(np.array([1e3, 1e10]), np.array([2 / 7, 2 / 7]), 1e-13, 50)[0]
    # Large-y asymptote: y = (c - 1.5 ln q)/2.5.
    assert y == pytest.approx((np.array([1e3, 1e10]) - 1.5 * np.log(2 / 7)) / 2.5, rel=1e-12)


def test_compiled_and_numpy_solvers_agree():
    rng = np.random.default_rng(7)
    n = emulsion.NUMBA_MIN_SIZE
    phi = np.concatenate([rng.uniform(0.0, 1.0, n), [0.0, 1.0 - 1e-15, 1.0]])
    lam = np.concatenate([10.0 ** rng.uniform(-8, 12, n), [0.0, INF, 1.0]])
    big = emulsion.phan_thien_pham(phi, lam)                       # compiled path
    small = np.concatenate([emulsion.phan_thien_pham(phi[i:i + 1000], lam[i:i + 1000])
                            for i in range(0, phi.size, 1000)])   # numpy path
    assert np.allclose(big, small, rtol=1e-12, equal_nan=False)
    assert big[-1] == INF


def test_solver_refuses_negative_right_side():
    with pytest.raises(InputRangeError, match="log_right_side"):
        emulsion.differential_scheme_solve(-1.0, 1.0)


# ---- Deformation and breakup --------------------------------------------------------------

def test_capillary_number_definition():
    # Ca = eta_c * shear_rate * R / Gamma (Taylor 1934; Grace 1982).
    assert emulsion.capillary_number(2e-3, 500.0, 4e-6, 8e-3) == pytest.approx(5e-4)


def test_capillary_number_refuses_zero_tension():
    with pytest.raises(InputRangeError, match="interfacial_tension_N_per_m"):
        emulsion.capillary_number(1e-3, 10.0, 1e-6, 0.0)


def test_taylor_deformation_warns_beyond_small_deformation():
    with pytest.warns(ValidityWarning, match="small deformation"):
        emulsion.taylor_deformation(0.5, 1.0)


@given(lam=ratios, radius=st.floats(1e-7, 1e-4))
@settings(max_examples=50, deadline=None)
def test_onset_shear_rate_inverts_taylor_deformation(lam, radius):
    rate = emulsion.deformation_onset_shear_rate(1e-3, radius, 5e-3, lam, deformation=0.1)
    ca = emulsion.capillary_number(1e-3, rate, radius, 5e-3)
    assert emulsion.taylor_deformation(ca, lam) == pytest.approx(0.1, rel=1e-12)


def test_breakup_curve_shape():
    # Grace 1982 / de Bruijn 1989: minimum near lambda about 1 (Janssen & Meijer, J. Rheol.
    # 37, 597, 1993, abstract: "minimum if the viscosity ratio ... is about one", seen),
    # no breakup in simple shear above lambda of about 4 (from memory).
    lam = np.logspace(-3, np.log10(4.0), 400)
    ca = emulsion.critical_capillary_de_bruijn(lam)
    assert 0.2 < lam[np.argmin(ca)] < 1.5
    assert 0.4 < ca.min() < 0.5
    assert emulsion.critical_capillary_de_bruijn(4.08) == INF
    assert emulsion.critical_capillary_de_bruijn(50.0) == INF


def test_breakup_fit_warns_below_its_data():
    with pytest.warns(ValidityWarning, match="below the range"):
        emulsion.critical_capillary_de_bruijn(1e-6)


def test_largest_surviving_droplet():
    # d_max = 2 Ca_crit Gamma / (eta_c shear_rate), with Ca based on the radius.
    ca = emulsion.critical_capillary_de_bruijn(1.0)
    d = emulsion.max_stable_droplet_diameter(0.1, 1e4, 5e-3, 1.0)
    assert d == pytest.approx(2 * ca * 5e-3 / (0.1 * 1e4))
    # Consistency: a droplet of that diameter sits exactly at the critical capillary number.
    assert emulsion.capillary_number(0.1, 1e4, d / 2, 5e-3) == pytest.approx(ca)
    with pytest.warns(ValidityWarning, match="cannot break"):
        assert emulsion.max_stable_droplet_diameter(0.1, 1e4, 5e-3, 10.0) == INF


# ---- Jammed emulsions ----------------------------------------------------------------------

def test_princen_kiss_modulus_zero_below_its_onset_and_warns():
    # Princen & Kiss 1986 (from memory): G = 0 at phi = 0.712.
    with pytest.warns(ValidityWarning, match="shear_modulus_princen_kiss"):
        assert emulsion.shear_modulus_princen_kiss(0.7, 10e-3, 10e-6) == 0.0


def test_princen_kiss_yield_stress_warns_outside_fit():
    # Fitted 0.83 <= phi <= 0.98 (Princen & Kiss 1989, from memory).
    with pytest.warns(ValidityWarning, match="0.83 to 0.98"):
        emulsion.yield_stress_princen_kiss(0.75, 10e-3, 10e-6)
    with warnings.catch_warnings():
        warnings.simplefilter("error", ValidityWarning)
        emulsion.yield_stress_princen_kiss(0.9, 10e-3, 10e-6)


def test_laplace_scaling_of_jammed_properties():
    # All four scale as Gamma/R (Princen & Kiss; Mason et al.): halving d32 doubles them.
    for f in (emulsion.shear_modulus_princen_kiss, emulsion.yield_stress_princen_kiss,
              emulsion.shear_modulus_mason, emulsion.yield_stress_mason):
        assert f(0.84, 10e-3, 5e-6) == pytest.approx(2 * f(0.84, 10e-3, 10e-6))


def test_mason_relations_vanish_at_phi_c():
    # Mason, Bibette & Weitz 1995 (abstract, seen): G ~ phi (phi - phi_c), phi_c = 0.635.
    assert emulsion.shear_modulus_mason(0.635, 10e-3, 10e-6) == 0.0
    assert emulsion.yield_stress_mason(0.60, 10e-3, 10e-6) == 0.0
    assert emulsion.shear_modulus_mason(0.70, 10e-3, 10e-6) > 0.0


@given(phi=st.floats(0.64, 0.97), rate=st.floats(1e-3, 1e4),
       relation=st.sampled_from(emulsion.JAMMED_YIELD_RELATIONS))
@settings(max_examples=80, deadline=None)
def test_jammed_flow_curve_is_herschel_bulkley_like(phi, rate, relation):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        args = (1e-3, 5e-3, 5e-6, 1.0, 0.64, relation)
        at_rest = emulsion.flow_stress_jammed(phi, 0.0, *args)
        slow = emulsion.flow_stress_jammed(phi, rate, *args)
        fast = emulsion.flow_stress_jammed(phi, 2 * rate, *args)
        if relation == "mason":
            tau_y = emulsion.yield_stress_mason(phi, 5e-3, 5e-6, 0.64)
        else:
            tau_y = emulsion.yield_stress_princen_kiss(phi, 5e-3, 5e-6)
    assert at_rest == pytest.approx(tau_y)          # stress -> yield stress as rate -> 0
    assert tau_y <= slow < fast                     # increasing above the yield stress
    # never below the droplets flowing as a liquid (our floor, Phan-Thien & Pham 1997)
    floor = 1e-3 * rate * emulsion.phan_thien_pham(phi, 1.0)
    assert slow >= tau_y + floor - 1e-12 * slow


def test_jammed_flow_refuses_unknown_relation():
    with pytest.raises(InputRangeError, match="yield_relation"):
        emulsion.flow_stress_jammed(0.8, 1.0, 1e-3, 5e-3, 5e-6, yield_relation="foam")


# ---- Shear thinning by droplet deformation --------------------------------------------------
#
# Sources for the checks below (checked against secondary restatements: two independent
# codes and a thesis code):
# LMW 2002 = E. W. Llewellin, H. M. Mader and S. D. R. Wilson, "The constitutive equation and
#   flow dynamics of bubbly magmas", Geophys. Res. Lett. 29(24), 2170, 2002, steady-flow form
#   eta_r = eta_inf + (eta_0 - eta_inf) / (1 + (6/5 Ca)^2);
# MLM 2013 = H. M. Mader, E. W. Llewellin and S. P. Mueller, "The rheology of two-phase magmas:
#   A review and analysis", J. Volcanol. Geotherm. Res. 257, 135-158, 2013, which recommends it
#   with eta_0 = (1 - phi)^-1 and eta_inf = (1 - phi)^(5/3);
# Oldroyd 1953 = J. G. Oldroyd, "The elastic and viscous properties of emulsions and
#   suspensions", Proc. R. Soc. Lond. A 218, 122-132, 1953: dilute relaxation time
#   (19K + 16)(2K + 3)/(40(K + 1)) and high-Ca intrinsic viscosity 5(K - 1)/(2K + 3).
# The generalisation to any viscosity ratio is Loadline's own construction (see the docstring);
# the checks of it below are its limits, not published values.

def llewellin_mader(phi, ca):
    """LMW 2002 / MLM 2013 bubble relation, written out independently of predictor."""
    eta_0 = 1.0 / (1.0 - phi)
    eta_inf = (1.0 - phi) ** (5.0 / 3.0)
    return eta_inf + (eta_0 - eta_inf) / (1.0 + (6.0 / 5.0 * ca) ** 2)


def high_shear_intrinsic(lam):
    """Oldroyd 1953 (secondary restatement): 5(K - 1)/(2K + 3); 5/2 for rigid spheres."""
    return 2.5 if np.isinf(lam) else 5.0 * (lam - 1.0) / (2.0 * lam + 3.0)


# Beyond PTP's registered range, or beyond breakup: warned, and intended here.
@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
@pytest.mark.parametrize("phi", [0.01, 0.1, 0.3, 0.5, 0.7])
@pytest.mark.parametrize("ca", [0.0, 0.05, 0.5, 0.8333, 3.0, 100.0])
def test_bubbles_follow_llewellin_mader(phi, ca):
    # LMW 2002, steady-flow viscosity as recommended by MLM 2013 (secondary restatement).
    got = emulsion.deformation_thinning(phi, ca, viscosity_ratio=0.0)
    assert got == pytest.approx(llewellin_mader(phi, ca), rel=1e-12)


def test_bubble_relation_is_half_thinned_at_ca_five_sixths():
    # LMW 2002: (6/5 Ca)^2 = 1 at Ca = 5/6, the midpoint between eta_0 and eta_inf.
    phi = 0.4
    mid = 0.5 * (1.0 / (1.0 - phi) + (1.0 - phi) ** (5.0 / 3.0))
    assert emulsion.deformation_thinning(phi, 5.0 / 6.0, 0.0) == pytest.approx(mid, rel=1e-12)


def test_oldroyd_relaxation_time_at_the_limits():
    # Oldroyd 1953 (restated): 6/5 for bubbles, the constant of LMW 2002; 35*5/80 for
    # equal viscosities (hand calculation); grows like 19K/20; rigid spheres never relax.
    assert emulsion.relaxation_time_oldroyd(0.0) == pytest.approx(6.0 / 5.0, rel=1e-15)
    assert emulsion.relaxation_time_oldroyd(1.0) == pytest.approx(35.0 * 5.0 / 80.0, rel=1e-15)
    assert emulsion.relaxation_time_oldroyd(1e9) == pytest.approx(19.0 / 20.0 * 1e9, rel=1e-8)
    assert emulsion.relaxation_time_oldroyd(INF) == INF
    out = emulsion.relaxation_time_oldroyd(np.array([0.0, 0.5, 4.0]))
    lam = np.array([0.0, 0.5, 4.0])
    assert np.allclose(out, (19 * lam + 16) * (2 * lam + 3) / (40 * (lam + 1)), rtol=1e-14)


ZERO_SHEAR = {
    "phan-thien-pham": (lambda phi, lam: emulsion.phan_thien_pham(phi, lam), {}),
    "pal": (lambda phi, lam: emulsion.pal(phi, lam, 0.7, 1), {"phi_max": 0.7, "variant": 1}),
    "taylor": (lambda phi, lam: emulsion.taylor(phi, lam), {}),
}


@pytest.mark.parametrize("model", ZERO_SHEAR)
@pytest.mark.parametrize("lam", [0.0, 0.1, 1.0, 25.0, INF])
def test_zero_capillary_number_gives_the_chosen_relation(model, lam):
    # Ca -> 0: the Newtonian relation itself (Phan-Thien & Pham 1997, Pal 2001, Taylor 1932).
    relation, params = ZERO_SHEAR[model]
    phi = np.array([0.0, 0.02, 0.2, 0.5]) if model != "taylor" else np.array([0.0, 0.01, 0.02])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        at_rest = emulsion.deformation_thinning(phi, 0.0, lam, model=model, model_params=params)
        slow = emulsion.deformation_thinning(phi, 1e-10, lam, model=model, model_params=params)
    assert np.array_equal(at_rest, relation(phi, lam))
    assert np.allclose(slow, relation(phi, lam), rtol=1e-12)


# Beyond PTP's registered range, or beyond breakup: warned, and intended here.
@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
@pytest.mark.parametrize("lam", [0.0, 0.3, 1.0, 10.0])
def test_dilute_slopes_are_taylor_at_rest_and_oldroyd_at_high_shear(lam):
    # Taylor 1932: slope (2.5K + 1)/(K + 1) at Ca -> 0; Oldroyd 1953 (restated):
    # 5(K - 1)/(2K + 3) at Ca -> inf; at K = 0 that is -5/3 (LMW 2002, MLM 2013).
    phi = 1e-7
    rest = (emulsion.deformation_thinning(phi, 0.0, lam) - 1.0) / phi
    fast = (emulsion.deformation_thinning(phi, 1e9, lam) - 1.0) / phi
    assert rest == pytest.approx(taylor_coefficient(lam), rel=1e-5)
    assert fast == pytest.approx(high_shear_intrinsic(lam), rel=1e-5, abs=1e-6)


# Beyond PTP's registered range, or beyond breakup: warned, and intended here.
@pytest.mark.filterwarnings("ignore::predictor.errors.ValidityWarning")
@pytest.mark.parametrize("phi", [0.05, 0.3, 0.6, 0.9])
def test_bubbles_at_high_capillary_number_tend_to_five_thirds_power(phi):
    # MLM 2013 (restated): eta_inf = (1 - phi)^(5/3) for bubbles; dilute slope -5/3.
    got = emulsion.deformation_thinning(phi, 1e8, 0.0)
    assert got == pytest.approx((1.0 - phi) ** (5.0 / 3.0), rel=1e-12)
    assert got < 1.0       # deformed bubbles make the flow easier than the liquid alone


@pytest.mark.parametrize("model", ZERO_SHEAR)
@pytest.mark.parametrize("ca", [0.0, 1e-3, 1.0, 1e6])
def test_rigid_spheres_do_not_thin(model, ca):
    # Rigid spheres (Einstein 1906; Phan-Thien & Pham 1997 / Pal 2001 rigid limits) do not
    # deform, so the viscosity is the zero-shear one at every capillary number.
    relation, params = ZERO_SHEAR[model]
    phi = np.array([0.0, 0.01, 0.02]) if model == "taylor" else np.array([0.0, 0.3, 0.6])
    got = emulsion.deformation_thinning(phi, ca, INF, model=model, model_params=params)
    assert np.array_equal(got, relation(phi, INF))


def test_very_viscous_droplets_hardly_thin_with_phan_thien_pham():
    # Dilute amplitude phi (19K + 16)/((2K + 2)(2K + 3)) -> 0 as K -> inf (Taylor 1932 minus
    # Oldroyd 1953 intrinsic viscosities, hand algebra): continuity with rigid spheres.
    rigid = emulsion.phan_thien_pham(0.3, INF)
    assert emulsion.deformation_thinning(0.3, 1e3, 1e12) == pytest.approx(rigid, rel=1e-9)


@pytest.mark.parametrize("model", ["phan-thien-pham", "pal"])
@given(phi=st.floats(0.0, 0.69), lam=ratios, ca=st.floats(0.0, 1e6), factor=st.floats(1.0, 1e3))
@settings(max_examples=80, deadline=None)
def test_thinning_never_thickens_and_stays_between_its_plateaus(model, phi, lam, ca, factor):
    # The form of LMW 2002 decreases with Ca from eta_0 to eta_inf. Our generalisation:
    # eta_inf = eta_0 (1 - phi)^([eta]_0 - [eta]_inf), Taylor 1932 minus Oldroyd 1953 (from
    # memory) intrinsic viscosities, a non-negative exponent, so it never thickens.
    params = {"phi_max": 0.7} if model == "pal" else {}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        slow = emulsion.deformation_thinning(phi, ca, lam, model=model, model_params=params)
        fast = emulsion.deformation_thinning(phi, ca * factor + 1e-9, lam, model=model,
                                             model_params=params)
        eta_0 = emulsion.deformation_thinning(phi, 0.0, lam, model=model, model_params=params)
    exponent = 0.0 if np.isinf(lam) else taylor_coefficient(lam) - high_shear_intrinsic(lam)
    assert exponent >= 0.0
    eta_inf = eta_0 * (1.0 - phi) ** exponent
    assert fast <= slow * (1 + 1e-12)
    assert eta_inf * (1 - 1e-12) <= fast <= slow <= eta_0 * (1 + 1e-12)


def test_deformation_thinning_broadcasts_and_keeps_scalars():
    out = emulsion.deformation_thinning(np.array([[0.1], [0.3]]), np.array([0.0, 0.1, 10.0]),
                                        np.array([0.0, 1.0, INF]))
    assert out.shape == (2, 3)
    assert isinstance(emulsion.deformation_thinning(0.1, 0.1, 0.0), float)
    assert isinstance(emulsion.relaxation_time_oldroyd(1.0), float)


def test_deformation_thinning_warns_where_droplets_break():
    # Above the critical capillary number (de Bruijn 1989 fit of Grace 1982) droplets break.
    with pytest.warns(ValidityWarning, match="critical capillary number for breakup"):
        emulsion.deformation_thinning(0.2, 1.0, 1.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error", ValidityWarning)
        emulsion.deformation_thinning(0.2, 0.1, 1.0)       # below Ca_crit(1) = 0.48
        emulsion.deformation_thinning(0.2, 100.0, 10.0)    # K > 4.08: no breakup in shear
        emulsion.deformation_thinning(0.2, 100.0, 0.0)     # bubbles: no breakup in the fit


def test_deformation_thinning_reports_the_relation_range():
    with pytest.warns(ValidityWarning, match="taylor"):
        emulsion.deformation_thinning(0.3, 0.1, 1.0, model="taylor")


@pytest.mark.parametrize("kwargs, field", [
    ({"phi": -0.1}, "phi"),
    ({"phi": 1.0}, "phi"),
    ({"phi": np.nan}, "phi"),
    ({"phi": "oil"}, "phi"),
    ({"phi": 0.7, "model": "pal"}, "phi = 0.7"),          # at or above Pal's phi_max 0.64
    ({"capillary_number": -1.0}, "capillary_number"),
    ({"capillary_number": np.inf}, "capillary_number"),
    ({"capillary_number": np.nan}, "capillary_number"),
    ({"viscosity_ratio": -1.0}, "viscosity_ratio"),
    ({"viscosity_ratio": np.nan}, "viscosity_ratio"),
    ({"model_params": {"viscosity_ratio": 1.0}}, "model_params"),
    ({"model_params": {"phi_max": 2.0}, "model": "pal"}, "phi_max"),
    ({"model_params": {"phi_max": 0.7}}, "phi_max"),       # not a parameter of PTP
])
def test_deformation_thinning_bad_inputs_raise_named_errors(kwargs, field):
    args = {"phi": 0.3, "capillary_number": 0.1, **kwargs}
    with pytest.raises(InputRangeError, match=field):
        emulsion.deformation_thinning(**args)


def test_deformation_thinning_refuses_a_suspension_relation():
    with pytest.raises(pr.UnknownModelError, match="phan-thien-pham"):
        emulsion.deformation_thinning(0.3, 0.1, model="krieger-dougherty")


def test_viscous_droplets_keep_pals_packing_divergence_when_thinned():
    # With Pal 2001's packing limit the thinned value keeps the divergence at phi_max and,
    # for viscous droplets, stays close to the zero-shear one: the factor (1 - phi)^D with
    # D = (19K + 16)/(2(K + 1)(2K + 3)) (Taylor 1932 minus Oldroyd 1953, hand algebra)
    # is 0.983 at K = 100, phi = 0.5.
    params = {"phi_max": 0.64}
    rest = emulsion.deformation_thinning(0.5, 0.0, 100.0, model="pal", model_params=params)
    fast = emulsion.deformation_thinning(0.5, 1e9, 100.0, model="pal", model_params=params)
    assert fast / rest == pytest.approx(0.5 ** (1916.0 / (2 * 101 * 203)), rel=1e-9)
    near = emulsion.deformation_thinning(0.6399, 1e9, 1.0, model="pal", model_params=params)
    assert near > 50.0 * emulsion.deformation_thinning(0.3, 1e9, 1.0, model="pal",
                                                       model_params=params)
