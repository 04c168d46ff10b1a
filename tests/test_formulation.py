"""The orchestration layer: right relation, right SI inputs, consistent results."""

import dataclasses
import pathlib

import numpy as np
import pytest

import predictor as pr
from predictor import formulation as fm
from predictor import liquids, packing
from predictor.scenario import read_scenario

DEMO = pathlib.Path(__file__).parents[1] / "data_demo"


def one_powder(loading=0.4, basis="mass", **kw):
    liquid = fm.Liquid(name="oil", preset="", law="newtonian", params={"viscosity_Pa_s": 0.1},
                       density_kg_per_m3=1000.0)
    powder = fm.Ingredient("powder", density_kg_per_m3=3900.0, loading=loading, basis=basis,
                           diameter_m=10e-6, **kw)
    return fm.Formulation(liquid=liquid, ingredients=(powder,))


def test_mixture_volume_fraction_by_hand():
    # 40 wt% at 3.9 g/cm3 in a 1.0 g/cm3 liquid: phi = 0.145985 (hand calculation).
    mix = fm.mixture(one_powder())
    assert mix.phi_solids == pytest.approx(0.1459854, rel=1e-6)
    assert mix.mass_fraction[0] == pytest.approx(0.4)


def test_user_phi_max_and_intrinsic_viscosity_are_used():
    f = one_powder(phi_max=0.55, intrinsic_viscosity=3.0)
    mix = fm.mixture(f)
    assert (mix.phi_max, mix.intrinsic_viscosity) == (0.55, 3.0)
    frame = fm.predict(f, [1.0])
    expected = pr.relative_viscosity(mix.phi_solids, "krieger-dougherty", phi_max=0.55,
                                     intrinsic_viscosity=3.0)
    assert frame["relative_viscosity"].iloc[0] == pytest.approx(expected, rel=1e-9)


def test_packing_called_with_si_diameters(mocker):
    spy = mocker.spy(packing, "max_packing_blends")     # all rows' blends in one call
    fm.mixture(one_powder())
    diameters = np.asarray(spy.call_args.args[0])
    assert diameters.max() == pytest.approx(10e-6)


def test_water_preset_calls_water_viscosity_in_kelvin(mocker):
    spy = mocker.spy(liquids, "water_viscosity")
    f = dataclasses.replace(one_powder(), liquid=fm.Liquid(temperature_K=293.15))
    mix = fm.mixture(f)
    assert spy.call_args.args[0] == pytest.approx(293.15)
    # IAPWS R12-08 check value at 0.101325 MPa and 20 degC: 1.001596 mPa s (seen).
    assert mix.liquid_viscosity_Pa_s == pytest.approx(1.001596e-3, rel=1e-3)


def test_layer_swells_the_solid_volume():
    bare = fm.mixture(one_powder())
    coated = fm.mixture(one_powder(layer_thickness_m=0.5e-6))
    # a 0.5 um layer on 5 um radius: factor 1.1**3 = 1.331 (geometry).
    assert coated.phi_solids_effective == pytest.approx(bare.phi_solids * 1.331, rel=1e-9)


def test_max_loading_matches_inverted_krieger_dougherty():
    # Krieger-Dougherty inverts in closed form: phi = phi_max (1 - r**(-1/([eta] phi_max))).
    f = one_powder(phi_max=0.6)
    mix = fm.mixture(f)
    limit = 2.0  # Pa s, i.e. eta_r = 20 in a 0.1 Pa s liquid
    expected = 0.6 * (1 - 20.0 ** (-1 / (mix.intrinsic_viscosity * 0.6)))
    assert fm.max_loading(f, limit, 10.0) == pytest.approx(expected, rel=1e-9)


def test_max_loading_is_zero_when_the_liquid_alone_is_too_thick():
    assert fm.max_loading(one_powder(), 0.05, 1.0) == 0.0


@pytest.mark.parametrize("limit,rate", [(-1.0, 1.0), (np.nan, 1.0), (1.0, 0.0), (1.0, np.inf)])
def test_max_loading_refuses_bad_input(limit, rate):
    with pytest.raises(pr.InputRangeError):
        fm.max_loading(one_powder(), limit, rate)


def test_loading_sweep_rises_to_the_asymptote():
    sweep = fm.loading_sweep(one_powder(phi_max=0.6), n=50)
    assert np.all(np.diff(sweep["viscosity_Pa_s"]) > 0)
    assert sweep["phi"].max() < 0.6 and sweep.attrs["phi_max"] == 0.6
    assert np.all(np.diff(sweep["mass_fraction"]) > 0)


def test_sweep_mass_fraction_matches_composition_at_current_loading():
    f = one_powder()
    mix = fm.mixture(f)
    w = fm.solid_mass_fraction(f, [mix.phi_solids_effective], mix)
    assert w[0] == pytest.approx(0.4, rel=1e-9)


def test_scaled_copy_sits_at_the_new_loading():
    f = fm.with_solids_scaled(one_powder(), 0.3)
    assert fm.mixture(f).phi_solids_effective == pytest.approx(0.3)


def test_loading_beyond_packing_gives_inf_not_garbage():
    f = one_powder(loading=0.7, basis="volume", phi_max=0.6)
    frame = fm.predict(f, [1.0])
    assert np.isinf(frame["viscosity_Pa_s"].iloc[0])


@pytest.mark.parametrize("name", ["mineral_coating", "ceramic_slip", "hand_cream"])
def test_demo_scenarios_predict_finite_viscosity(name):
    f = read_scenario(DEMO / f"{name}.loadline.json")
    frame = fm.predict(f, [1.0, 100.0])
    assert np.all(np.isfinite(frame["viscosity_Pa_s"]))
    assert np.all(frame["viscosity_Pa_s"] > frame["liquid_viscosity_Pa_s"])


def test_solids_and_droplets_have_separate_parameter_spaces():
    # phi_max of the solids' relation must not leak into a droplet relation that also has a
    # phi_max (Pal's), and the droplets' own value must not change the solids' packing.
    import dataclasses

    ings = (fm.Ingredient("filler", 2600.0, 0.3, diameter_m=4e-6),
            fm.Ingredient("oil", 900.0, 0.15, kind="droplet", diameter_m=2e-6,
                          droplet_viscosity_Pa_s=0.01))
    base = fm.Formulation(ingredients=ings, droplet_model="pal")
    solids = dataclasses.replace(base, model_params={"phi_max": 0.55})
    droplets = dataclasses.replace(base, droplet_model_params={"phi_max": 0.55})
    mix = fm.mixture(base)
    assert fm.mixture(solids).phi_max == 0.55 and fm.mixture(droplets).phi_max == mix.phi_max
    assert fm.droplet_factor(solids, mix) == fm.droplet_factor(base, mix)
    # Pal's relation with phi_max 0.55 instead of its default 0.64 (Pal, J. Rheol. 2001)
    assert fm.droplet_factor(droplets, mix) > fm.droplet_factor(base, mix)


def test_scenario_keeps_both_parameter_spaces_and_reads_older_files():
    import dataclasses
    import json

    from predictor import scenario

    f = dataclasses.replace(fm.Formulation(droplet_model="pal"), model_params={"phi_max": 0.6},
                            droplet_model_params={"phi_max": 0.7})
    back = scenario.loads(scenario.dumps(f))
    assert back.model_params == {"phi_max": 0.6}
    assert back.droplet_model_params == {"phi_max": 0.7}
    doc = json.loads(scenario.dumps(f))
    del doc["relations"]["droplet_parameters"]       # a file written before the split
    old = scenario.loads(json.dumps(doc))
    assert old.droplet_model_params == {"phi_max": 0.6}   # what the shared space meant


def test_liquid_rows_are_the_one_liquid_resolution():
    # Many rows through formulation.liquid_shift / law_at_temperature / liquid_viscosities
    # give what each one-row Liquid gives. Outside check: the Arrhenius (Andrade) form
    # eta(T) = eta_ref * exp(T_A (1/T - 1/T_ref)) by hand (common practice, no source), and a
    # power-law liquid at 1 1/s has eta = K (Ostwald-de Waele, by definition).
    t = np.array([293.15, 323.15, 353.15])
    shift = fm.liquid_shift(["newtonian"] * 3, t, 298.15, 3000.0)
    assert shift == pytest.approx(np.exp(3000.0 * (1 / t - 1 / 298.15)), rel=1e-12)
    spec = pr.get_model("power-law", kind="liquid")
    law, params = fm.law_at_temperature(spec, {"consistency_Pa_s": np.full(3, 2.0),
                                               "flow_index": np.full(3, 0.5)}, shift)
    assert params["flow_index"] == pytest.approx([0.5] * 3)      # flow indices are kept
    eta = fm.liquid_viscosities(law, t, params=params)
    assert eta == pytest.approx(2.0 * shift, rel=1e-12)
    for i, ti in enumerate(t):
        one = fm.Liquid(preset="", law="power-law", temperature_K=float(ti),
                        params={"consistency_Pa_s": 2.0, "flow_index": 0.5},
                        activation_temperature_K=3000.0)
        assert one.shift_factor() == shift[i]
        assert one.newtonian_viscosity_Pa_s() == pytest.approx(eta[i], rel=1e-15)
        water = fm.Liquid(temperature_K=float(ti), activation_temperature_K=3000.0)
        assert water.shift_factor() == 1.0                     # presets are not shifted
        assert water.newtonian_viscosity_Pa_s() == fm.liquid_viscosities("water", t)[i]


def test_range_checks_one_row_and_many_rows_say_the_same():
    # The batch's vectorised test and message are the ones Formulation raises
    # (limits: common practice, no source; loading is a fraction, 0 to 1 by definition).
    loadings = np.array([0.3, 1.2, np.nan, -0.1])
    bad = fm.out_of_range(loadings, 0.0, 1.0)
    assert bad.tolist() == [False, True, True, True]
    for value, refused in zip(loadings, bad, strict=True):
        if refused:
            with pytest.raises(pr.InputRangeError) as err:
                one_powder(loading=float(value))
            assert str(err.value) == str(fm.range_error("ingredients[0].loading", value,
                                                         0.0, 1.0))
        else:
            one_powder(loading=float(value))
    spec = pr.get_model("power-law", kind="liquid")
    index = spec.params[1]                       # flow_index, 0.05 to 2
    assert spec.out_of_bounds(index, [0.5, 3.0]).tolist() == [False, True]
    with pytest.raises(pr.InputRangeError) as err:
        spec.check_params({"flow_index": 3.0})
    assert str(err.value) == str(spec.param_error(index, 3.0))
