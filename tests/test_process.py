"""Process checks: the numerical Rabinowitsch-Mooney path against the closed forms, the
regimes, the turbulent correlations against a reference library, mixers, coatings and the
formulation wiring."""

import math
import warnings

import numpy as np
import pytest

import predictor as pr
from predictor import process
from predictor.errors import InputRangeError, ValidityWarning

BINGHAM = {"yield_stress_Pa": 10.0, "plastic_viscosity_Pa_s": 0.1}
TAU_W = np.array([10.5, 12.0, 20.0, 50.0, 500.0])


def _demo():
    return pr.read_scenario(process.__file__.rsplit("/", 2)[0]
                            + "/data_demo/mineral_coating.loadline.json")


# --- laminar: numerical integral = closed forms to 1e-6 ------------------------------------


@pytest.mark.parametrize(("law", "params", "closed"), [
    # Hagen-Poiseuille: 8V/D = tau_w / mu
    ("newtonian", {"viscosity_Pa_s": 0.5}, lambda t: t / 0.5),
    # Buckingham-Reiner (Chhabra & Richardson 2008, ch. 3; Darby 2001)
    ("bingham", BINGHAM, lambda t: process.buckingham_reiner(t, 10.0, 0.1)),
    # power law 4n/(3n+1) (tau_w/K)^(1/n), thinning and thickening
    ("power-law", {"consistency_Pa_s": 2.0, "flow_index": 0.2},
     lambda t: 4 * 0.2 / 1.6 * (t / 2.0) ** 5.0),
    ("power-law", {"consistency_Pa_s": 2.0, "flow_index": 1.8},
     lambda t: 4 * 1.8 / 6.4 * (t / 2.0) ** (1 / 1.8)),
    # Herschel-Bulkley closed form (Chhabra & Richardson 2008, ch. 3)
    ("herschel-bulkley", {"yield_stress_Pa": 10.0, "consistency_Pa_s": 2.0, "flow_index": 0.4},
     lambda t: process.herschel_bulkley_pipe(t, 10.0, 2.0, 0.4)),
    ("herschel-bulkley", {"yield_stress_Pa": 10.0, "consistency_Pa_s": 2.0, "flow_index": 1.6},
     lambda t: process.herschel_bulkley_pipe(t, 10.0, 2.0, 1.6)),
])
def test_rabinowitsch_mooney_matches_closed_forms(law, params, closed):
    curve = process.law_curve(law, **params)
    nominal, _ = process._nominal_rate(curve, TAU_W)
    np.testing.assert_allclose(nominal, closed(TAU_W), rtol=1e-6)


def test_hb_closed_form_is_power_law_and_bingham_at_its_limits():
    # tau_y = 0: power law; n = 1: Buckingham-Reiner (both Chhabra & Richardson 2008, ch. 3)
    np.testing.assert_allclose(process.herschel_bulkley_pipe(TAU_W, 0.0, 2.0, 0.5),
                               0.8 * (TAU_W / 2.0) ** 2, rtol=1e-12)
    np.testing.assert_allclose(process.herschel_bulkley_pipe(TAU_W, 10.0, 0.1, 1.0),
                               process.buckingham_reiner(TAU_W, 10.0, 0.1), rtol=1e-12)


def test_laminar_pressure_drop_equals_hagen_poiseuille():
    q = np.geomspace(1e-7, 1e-5, 7)          # Re well below 2100 for 1 Pa s
    flow = process.pipe_pressure_drop(q, 0.02, 5.0, 1000.0, viscosity_Pa_s=1.0)
    assert set(flow.regime) == {"laminar"}
    np.testing.assert_allclose(flow.pressure_drop_Pa,
                               process.hagen_poiseuille(q, 0.02, 5.0, 1.0), rtol=1e-9)
    np.testing.assert_allclose(flow.friction_factor * flow.reynolds, 16.0, rtol=1e-9)


@pytest.mark.parametrize(("law", "params", "closed"), [
    ("bingham", BINGHAM, lambda t: process.buckingham_reiner(t, 10.0, 0.1)),
    ("herschel-bulkley", {"yield_stress_Pa": 5.0, "consistency_Pa_s": 3.0, "flow_index": 0.5},
     lambda t: process.herschel_bulkley_pipe(t, 5.0, 3.0, 0.5)),
])
def test_pressure_drop_inverts_the_closed_forms(law, params, closed):
    d, length = 0.05, 10.0
    q = closed(TAU_W) * math.pi * d**3 / 32
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)   # the last rate is far turbulent
        flow = process.pipe_pressure_drop(q, d, length, 1000.0, law=law, **params)
    laminar = flow.regime == "laminar"
    assert laminar[:4].all()
    np.testing.assert_allclose(flow.wall_shear_stress_Pa[laminar], TAU_W[laminar], rtol=1e-6)
    np.testing.assert_allclose(flow.pressure_drop_Pa[laminar],
                               4 * TAU_W[laminar] * length / d, rtol=1e-6)
    # plug radius R tau_y / tau_w (force balance)
    ty = params["yield_stress_Pa"]
    np.testing.assert_allclose(flow.plug_radius_m[laminar], d / 2 * ty / TAU_W[laminar],
                               rtol=1e-6)
    # n' from the Rabinowitsch-Mooney relation: gammadot_w = (3n'+1)/(4n') 8V/D
    n = flow.flow_index[laminar]
    np.testing.assert_allclose(flow.wall_shear_rate_1_per_s[laminar],
                               (3 * n + 1) / (4 * n) * closed(TAU_W[laminar]), rtol=1e-6)


def test_power_law_n_prime_is_n_and_reynolds_is_metzner_reed():
    n, k = 0.45, 3.0
    flow = process.pipe_pressure_drop(1e-4, 0.03, 2.0, 1100.0, law="power-law",
                                      consistency_Pa_s=k, flow_index=n)
    assert flow.regime == "laminar"
    assert flow.flow_index == pytest.approx(n, rel=1e-9)
    v = flow.mean_velocity_m_per_s
    k_prime = k * ((3 * n + 1) / (4 * n)) ** n      # Metzner & Reed (1955)
    assert flow.reynolds == pytest.approx(
        process.metzner_reed_reynolds(1100.0, v, 0.03, k_prime, n), rel=1e-9)


# --- regimes and turbulent correlations --------------------------------------------------------


def test_newtonian_regimes_follow_reynolds():
    mu, rho, d = 1e-3, 1000.0, 0.05
    re = np.array([1000.0, 3000.0, 1e5])
    q = re * mu / (rho * d) * math.pi * d**2 / 4
    flow = process.pipe_pressure_drop(q, d, 1.0, rho, viscosity_Pa_s=mu)
    np.testing.assert_allclose(flow.reynolds, re, rtol=1e-9)
    assert list(flow.regime) == ["laminar", "transitional", "turbulent"]


def test_turbulent_newtonian_matches_fluids_colebrook():
    fluids = pytest.importorskip("fluids")    # Caleb Bell's reference library, tests only
    rho, mu, d, eps = 998.0, 1e-3, 0.05, 4.6e-5
    q = np.array([2e-3, 1e-2, 5e-2])
    flow = process.pipe_pressure_drop(q, d, 20.0, rho, roughness_m=eps, viscosity_Pa_s=mu)
    for i, qi in enumerate(q):
        v = qi / (math.pi * d**2 / 4)
        fd = fluids.friction.Colebrook(rho * v * d / mu, eps / d)
        assert flow.pressure_drop_Pa[i] == pytest.approx(fd * 20.0 / d * rho * v**2 / 2,
                                                         rel=1e-9)


@pytest.mark.parametrize(("re", "eps_d", "darcy"), [
    (1e4, 0.0, 0.0309), (1e6, 0.0, 0.0116), (1e6, 1e-3, 0.0199), (1e7, 0.01, 0.0379),
])
def test_colebrook_moody_chart_values(re, eps_d, darcy):
    # Moody, Trans. ASME 66 (1944) 671, chart readings to 3 digits (from memory)
    assert 4 * process.colebrook(re, eps_d) == pytest.approx(darcy, rel=0.01)


def test_dodge_metzner_newtonian_limit_and_equation():
    from scipy.optimize import brentq

    # n' = 1: the smooth-pipe law, within 0.5 % of Colebrook's smooth pipe
    for re in (5e3, 1e4, 1e5):
        assert process.dodge_metzner(re, 1.0) == pytest.approx(process.colebrook(re, 0.0),
                                                               rel=5e-3)
    # independent root finder on the equation as restated (Chhabra & Richardson 2008)
    for re, n in ((4e3, 0.4), (2e4, 0.7)):
        def g(y, re=re, n=n):
            return y - (4 / n**0.75 * np.log10(re * y ** -(2 - n)) - 0.4 / n**1.2)
        assert process.dodge_metzner(re, n) == pytest.approx(1 / brentq(g, 1, 100) ** 2,
                                                             rel=1e-10)
    # shear thinning lowers the friction factor (Dodge & Metzner 1959, their chart)
    assert process.dodge_metzner(1e4, 0.4) < process.dodge_metzner(1e4, 0.8)


def test_darby_blend_tends_to_laminar_and_hanks():
    # Laminar limit: Buckingham-Reiner; He = 0: Newtonian 16/Re at low Re
    assert process.darby_mun_boger(100.0, 0.0) == pytest.approx(0.16, rel=1e-6)
    he = 1e5
    re_c = process.hanks_critical_reynolds(he)
    assert 2100 < re_c < 1e4
    # at the critical point Buckingham-Reiner holds with x_c (Hanks 1963, from memory)
    x = float(process._hanks_x(np.array(he)))
    assert x / (1 - x) ** 3 == pytest.approx(he / 16800, rel=1e-9)


def test_bingham_pipe_uses_hanks_and_darby():
    rho, d = 1300.0, 0.254
    flow = process.pipe_pressure_drop([1e-3, 0.254**2 * math.pi / 4 * 2.3], d, 10.0, rho,
                                      law="bingham", yield_stress_Pa=6.0,
                                      plastic_viscosity_Pa_s=0.02)
    assert flow.regime[0] == "laminar" and flow.regime[1] == "turbulent"
    assert flow.hedstrom_number == pytest.approx(rho * 6.0 * d**2 / 0.02**2)
    # Darby's worked case (restated in open code citing Darby 2001): Darcy 0.019050
    assert 4 * flow.friction_factor[1] == pytest.approx(0.0190500771, rel=1e-8)
    assert flow.correlation[1] == "darby-mun-boger"


def test_restart_pressure_and_start_up():
    assert process.restart_pressure(20.0, 0.025, 10.0) == pytest.approx(32000.0)
    flow = process.pipe_pressure_drop(1e-5, 0.025, 10.0, 1000.0, law="bingham", **BINGHAM)
    assert flow.startup_pressure_Pa == pytest.approx(4 * 10.0 * 10.0 / 0.025)
    assert flow.pressure_drop_Pa > flow.startup_pressure_Pa


# --- bad input ----------------------------------------------------------------------------------


@pytest.mark.parametrize(("field", "kwargs"), [
    ("flow_rate_m3_per_s", {"flow_rate_m3_per_s": 0.0}),
    ("flow_rate_m3_per_s", {"flow_rate_m3_per_s": -1e-3}),
    ("diameter_m", {"diameter_m": 0.0}),
    ("diameter_m", {"diameter_m": -0.02}),
    ("length_m", {"length_m": 0.0}),
    ("density_kg_per_m3", {"density_kg_per_m3": float("nan")}),
    ("roughness_m", {"roughness_m": 1.0}),
])
def test_bad_pipe_input_names_the_field(field, kwargs):
    args = {"flow_rate_m3_per_s": 1e-4, "diameter_m": 0.025, "length_m": 10.0,
            "density_kg_per_m3": 1000.0, **kwargs}
    with pytest.raises(InputRangeError, match=field):
        process.pipe_pressure_drop(**args, viscosity_Pa_s=1e-3)


def test_reynolds_beyond_every_correlation_warns():
    with pytest.warns(ValidityWarning, match="beyond the data of colebrook"):
        process.pipe_pressure_drop(50.0, 0.5, 10.0, 1000.0, viscosity_Pa_s=1e-6)
    with pytest.warns(ValidityWarning, match="dodge-metzner"):
        process.pipe_pressure_drop(5.0, 0.1, 10.0, 1000.0, law="power-law",
                                   consistency_Pa_s=0.001, flow_index=0.6)


def test_no_warning_in_range():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        flow = process.pipe_pressure_drop(1e-3, 0.05, 10.0, 1000.0, viscosity_Pa_s=1e-3)
    assert flow.regime == "turbulent" and flow.pressure_drop_Pa > 0


# --- stirred tanks ------------------------------------------------------------------------------


def test_stirred_tank_laminar_power_and_metzner_otto_viscosity():
    ks, kp, _ = process.IMPELLERS["anchor"]
    tank = process.stirred_tank(0.2, 0.5, 0.55, 1200.0, impeller="anchor", law="power-law",
                                consistency_Pa_s=50.0, flow_index=0.4)
    rate = ks * 0.2
    eta = 50.0 * rate ** (0.4 - 1)
    assert tank.effective_shear_rate_1_per_s == pytest.approx(rate)
    assert tank.viscosity_Pa_s == pytest.approx(eta)
    assert tank.reynolds == pytest.approx(1200.0 * 0.2 * 0.5**2 / eta)
    assert tank.regime == "laminar"
    assert tank.power_W == pytest.approx(kp * eta * 0.2**2 * 0.5**3)


def test_turbulent_tank_uses_power_number():
    with pytest.warns(ValidityWarning):
        tank = process.stirred_tank(5.0, 0.2, 0.6, 1000.0, viscosity_Pa_s=1e-3)
    assert tank.regime == "turbulent"
    assert tank.power_W == pytest.approx(5.0 * 1000.0 * 5.0**3 * 0.2**5)


def test_cavern_flag_for_yield_stress():
    slow = process.stirred_tank(1.0, 0.1, 0.5, 1000.0, law="bingham", yield_stress_Pa=50.0,
                                plastic_viscosity_Pa_s=1.0)
    assert slow.cavern and slow.cavern_diameter_m < 0.5
    fast = process.stirred_tank(10.0, 0.2, 0.3, 1000.0, law="bingham", yield_stress_Pa=1.0,
                                plastic_viscosity_Pa_s=0.01)
    assert not fast.cavern
    newtonian = process.stirred_tank(1.0, 0.1, 0.5, 1000.0, viscosity_Pa_s=1.0)
    assert not newtonian.cavern and math.isinf(newtonian.cavern_diameter_m)


def test_bad_tank_input():
    with pytest.raises(InputRangeError, match="impeller_diameter_m"):
        process.stirred_tank(1.0, 0.5, 0.4, 1000.0)
    with pytest.raises(InputRangeError, match="impeller"):
        process.stirred_tank(1.0, 0.1, 0.4, 1000.0, impeller="egg beater")
    with pytest.raises(InputRangeError, match="rotational_speed"):
        process.stirred_tank(0.0, 0.1, 0.4, 1000.0)


# --- coatings -----------------------------------------------------------------------------------


def test_newtonian_sag_and_orchard_levelling():
    h, rho, eta = 100e-6, 1200.0, 2.0
    film = process.coating(h, rho, wavelength_m=2e-3, surface_tension_N_per_m=0.03,
                           viscosity_Pa_s=eta)
    # surface velocity of a falling Newtonian film rho g h^2 / (2 eta) (force balance)
    assert film.sag_velocity_m_per_s == pytest.approx(rho * 9.80665 * h**2 / (2 * eta),
                                                      rel=1e-9)
    assert not film.stands
    # Newtonian: tenfold decay takes ln(10) Orchard time constants
    assert film.levelling_time_s == pytest.approx(
        math.log(10) * process.orchard_levelling_time(eta, 2e-3, h, 0.03), rel=1e-9)


def test_bingham_film_stands_below_rho_g_h():
    rho, h = 1000.0, 200e-6      # rho g h = 1.96 Pa
    stands = process.coating(h, rho, law="bingham", yield_stress_Pa=2.5,
                             plastic_viscosity_Pa_s=0.5)
    sags = process.coating(h, rho, law="bingham", yield_stress_Pa=1.0,
                           plastic_viscosity_Pa_s=0.5)
    assert stands.stands and stands.sag_velocity_m_per_s == 0.0
    assert not sags.stands
    tau_w = rho * 9.80665 * h
    assert sags.sag_velocity_m_per_s == pytest.approx(
        (tau_w - 1.0) ** 2 / (2 * 0.5 * rho * 9.80665), rel=1e-9)


def test_yield_stress_holds_a_ripple():
    film = process.coating(50e-6, 1000.0, wavelength_m=3e-3, law="bingham",
                           yield_stress_Pa=20.0, plastic_viscosity_Pa_s=0.5)
    assert math.isinf(film.levelling_time_s) and film.residual_amplitude_m > 0


# --- formulations -------------------------------------------------------------------------------


def test_formulation_of_a_plain_liquid_equals_the_law():
    form = pr.Formulation(liquid=pr.Liquid(preset="", law="power-law",
                                           params={"consistency_Pa_s": 2.0,
                                                   "flow_index": 0.5},
                                           density_kg_per_m3=1000.0))
    q = np.geomspace(1e-6, 1e-3, 5)
    of = process.pipe_flow_of(form, q, 0.02, 3.0)
    direct = process.pipe_pressure_drop(q, 0.02, 3.0, 1000.0, law="power-law",
                                        consistency_Pa_s=2.0, flow_index=0.5)
    np.testing.assert_allclose(of.pressure_drop_Pa, direct.pressure_drop_Pa, rtol=1e-6)


def test_demo_paint_system_curve():
    form = _demo()
    q = np.geomspace(1e-6, 1e-2, 50)
    flow = process.pipe_flow_of(form, q, 0.025, 10.0)
    assert np.all(np.diff(flow.pressure_drop_Pa) > 0)
    assert flow.regime[0] == "laminar"
    # one flow rate gives the same numbers as the same rate inside the curve
    one = process.pipe_flow_of(form, float(q[10]), 0.025, 10.0)
    assert one.pressure_drop_Pa == pytest.approx(flow.pressure_drop_Pa[10], rel=1e-9)
    # the wall stress lies on the predicted flow curve (table inverted by interpolation)
    frame = pr.predict(form, [one.wall_shear_rate_1_per_s])
    assert frame["shear_stress_Pa"].iloc[0] == pytest.approx(one.wall_shear_stress_Pa, rel=0.01)


def test_demo_paint_mixer_and_coating():
    form = _demo()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        tank = process.stirred_tank_of(form, 2.0, 0.1, 0.3)
    frame = pr.predict(form, [tank.effective_shear_rate_1_per_s])
    assert tank.viscosity_Pa_s == pytest.approx(frame["viscosity_Pa_s"].iloc[0], rel=0.01)
    film = process.coating_of(form, 100e-6)
    assert film.sag_velocity_m_per_s > 0 and film.levelling_time_s > 0


def test_formulation_with_a_yield_stress_liquid_restarts_and_flows_like_its_law():
    # The tabulated path (predict -> table_curve) against the exact law path, Bingham liquid.
    form = pr.Formulation(liquid=pr.Liquid(preset="", law="bingham",
                                           params={"yield_stress_Pa": 20.0,
                                                   "plastic_viscosity_Pa_s": 0.2},
                                           density_kg_per_m3=1100.0))
    q = np.array([1e-5, 1e-4])
    of = process.pipe_flow_of(form, q, 0.025, 10.0)
    law = process.pipe_pressure_drop(q, 0.025, 10.0, 1100.0, law="bingham", yield_stress_Pa=20.0,
                                     plastic_viscosity_Pa_s=0.2)
    assert of.startup_pressure_Pa == pytest.approx(4 * 20.0 * 10.0 / 0.025, rel=1e-6)
    np.testing.assert_allclose(of.pressure_drop_Pa, law.pressure_drop_Pa, rtol=0.01)
    np.testing.assert_allclose(of.plug_radius_m, law.plug_radius_m, rtol=0.01)


@pytest.mark.filterwarnings("ignore::predictor.ValidityWarning")
def test_each_flow_rate_gives_the_same_answer_alone_and_in_a_system_curve():
    # laminar to turbulent, near-Newtonian and shear-thinning points in one curve
    form = pr.read_scenario(process.__file__.rsplit("/", 2)[0]
                            + "/data_demo/ceramic_slip.loadline.json")
    q = np.geomspace(1e-6, 3e-2, 9)
    curve = process.pipe_flow_of(form, q, 0.025, 10.0)
    assert {"laminar", "turbulent"} <= set(curve.regime)
    for i, qi in enumerate(q):
        one = process.pipe_flow_of(form, float(qi), 0.025, 10.0)
        assert one.pressure_drop_Pa == pytest.approx(curve.pressure_drop_Pa[i], rel=1e-9)
        assert one.correlation == curve.correlation[i]
