"""The one engine: N formulations x M shear rates, checked row by row against `predict`.

Each row of `engine.evaluate` must equal `formulation.predict` of the same formulation
(relative 1e-9 where the solve converges), over sets that mix every liquid law, frictional
thickening, Brownian thinning and droplets. The single-formulation values are themselves
checked against published closed forms in tests/test_shear.py (Chateau, Ovarlez & Trung,
J. Rheol. 52, 2008, Herschel-Bulkley liquid; Wyart & Cates, PRL 112, 2014, S-shape).
"""

from __future__ import annotations

import dataclasses
import warnings

import numpy as np
import pytest

from predictor import engine
from predictor import formulation as fm
from predictor.errors import InputRangeError, ValidityWarning

RATES = np.logspace(-2, 4, 9)

LIQUIDS = [
    fm.Liquid(),                                             # water preset
    fm.Liquid(preset="glycerol-water", glycerol_mass_fraction=0.6, density_kg_per_m3=1150.0),
    fm.Liquid(preset="", law="newtonian", params={"viscosity_Pa_s": 0.05},
              activation_temperature_K=3000.0, temperature_K=310.0),
    fm.Liquid(preset="", law="power-law", params={"consistency_Pa_s": 0.5, "flow_index": 0.6}),
    fm.Liquid(preset="", law="carreau-yasuda",
              params={"zero_shear_viscosity_Pa_s": 2.0, "infinite_shear_viscosity_Pa_s": 0.01,
                      "time_constant_s": 0.5, "flow_index": 0.4, "yasuda_exponent": 2.0},
              activation_temperature_K=2500.0, temperature_K=290.0),
    fm.Liquid(preset="", law="cross",
              params={"zero_shear_viscosity_Pa_s": 1.0, "infinite_shear_viscosity_Pa_s": 0.005,
                      "time_constant_s": 0.1, "cross_exponent": 0.8}),
    fm.Liquid(preset="", law="bingham",
              params={"yield_stress_Pa": 5.0, "plastic_viscosity_Pa_s": 0.05}),
    fm.Liquid(preset="", law="herschel-bulkley",
              params={"yield_stress_Pa": 8.0, "consistency_Pa_s": 0.8, "flow_index": 0.5}),
    fm.Liquid(preset="", law="casson",
              params={"yield_stress_Pa": 3.0, "casson_viscosity_Pa_s": 0.02}),
]


def _formulation(liquid, loading=0.35, thickening=False, droplets=False, small=False):
    ings = [fm.Ingredient("filler", 2600.0, loading, diameter_m=0.2e-6 if small else 4e-6)]
    if droplets:
        ings.append(fm.Ingredient("oil", 900.0, 0.08, kind="droplet", diameter_m=2e-6,
                                  droplet_viscosity_Pa_s=0.05,
                                  interfacial_tension_N_per_m=0.005))
    return fm.Formulation(liquid=liquid, ingredients=tuple(ings),
                          thickening_onset_stress_Pa=50.0 if thickening else None)


def _mixed_set():
    forms = []
    for k, liquid in enumerate(LIQUIDS):
        forms.append(_formulation(liquid, 0.2 + 0.04 * k, small=k % 2 == 0))
        forms.append(_formulation(liquid, 0.62, thickening=True))
        forms.append(_formulation(liquid, 0.45, droplets=True, small=True))
    return forms


def test_each_row_equals_predict_over_every_liquid_law_thickening_and_droplets():
    forms = _mixed_set()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        res = engine.evaluate(engine.stack(forms), RATES)
        for i, f in enumerate(forms):
            frame = fm.predict(f, RATES)
            assert np.allclose(res.viscosity_Pa_s[i], frame["viscosity_Pa_s"], rtol=1e-9,
                               atol=0), (i, f.liquid.law)
            assert list(res.regime[i]) == list(frame["regime"]), i
            assert res.phi[i] == pytest.approx(frame.attrs["phi"], rel=1e-12)
            assert res.phi_max[i] == pytest.approx(frame.attrs["phi_max"], rel=1e-12)
    assert {"thickening", "discontinuous-thickening", "jammed"} & set(res.regime.ravel())


def test_vary_contract_shapes_basis_and_jammed_rows():
    f = _formulation(LIQUIDS[4], droplets=True)
    x = np.array([0.05, 0.3, 0.6, 0.9])
    fs = engine.vary(f, loadings={0: x}, basis="mass")
    res = engine.evaluate(fs, shear_rate_1_per_s=[100.0, 1000.0])
    assert res.viscosity_Pa_s.shape == (4, 2) and res.regime.shape == (4, 2)
    assert res.phi.shape == (4,) and res.phi_max.shape == (4,)
    assert np.all(np.diff(res.phi) > 0)
    jam = res.phi >= res.phi_max
    assert jam[-1] and not jam[0]
    assert np.all(np.isinf(res.viscosity_Pa_s[jam])) and np.all(res.regime[jam] == "jammed")
    # Each row is the formulation with that loading (the droplets held at theirs).
    for i in range(3):
        one = dataclasses.replace(f, ingredients=(dataclasses.replace(
            f.ingredients[0], loading=float(x[i]), basis="mass"), f.ingredients[1]))
        assert np.allclose(res.viscosity_Pa_s[i], fm.predict(one, [100.0, 1000.0])
                           ["viscosity_Pa_s"], rtol=1e-9)


def test_vary_on_a_volume_basis_sets_volume_fractions():
    f = _formulation(LIQUIDS[0])
    fs = engine.vary(f, loadings={0: [0.1, 0.2]}, basis="volume")
    assert np.allclose(fs.phi_solids, [0.1, 0.2], rtol=1e-12)


@pytest.mark.parametrize("bad", [{3: [0.1]}, {0: [1.5]}, {0: [0.1, 0.2], 1: [0.1, 0.2, 0.3]}])
def test_vary_names_bad_input(bad):
    f = _formulation(LIQUIDS[0], droplets=True)
    with pytest.raises(InputRangeError):
        engine.vary(f, loadings=bad)


def _two_powder_paint():
    """Two powders of different sizes (the blend's packing limit moves with their shares), an
    adsorbed layer, a flocculated solid, droplets on a volume basis and thickening."""
    return fm.Formulation(
        liquid=LIQUIDS[4], thickening_onset_stress_Pa=80.0,
        ingredients=(
            fm.Ingredient("coarse", 2700.0, 0.30, size=fm.sizes.SizeDistribution.lognormal(
                8e-6, 1.6), layer_thickness_m=20e-9),
            fm.Ingredient("fine", 4200.0, 0.10, diameter_m=0.4e-6, hamaker_J=1e-20,
                          flocculated=True),
            fm.Ingredient("oil", 900.0, 0.05, basis="volume", kind="droplet",
                          diameter_m=2e-6, droplet_viscosity_Pa_s=0.05,
                          interfacial_tension_N_per_m=0.005)))


def test_vary_rows_equal_the_one_row_resolution_of_each_variant():
    # engine.vary resolves all rows at once (formulation.mixtures); every row must equal
    # row_inputs of that variant built on its own: the same physics, one model.
    f = _two_powder_paint()
    x, y = np.meshgrid([0.05, 0.2, 0.35], [0.0, 0.08, 0.2])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        fs = engine.vary(f, loadings={0: x.ravel(), 1: y.ravel()}, basis="mass")
        ref = engine.stack(dataclasses.replace(f, ingredients=(
            dataclasses.replace(f.ingredients[0], loading=float(a)),
            dataclasses.replace(f.ingredients[1], loading=float(b)), f.ingredients[2]))
            for a, b in zip(x.ravel(), y.ravel(), strict=True))
    assert len(np.unique(fs.phi_max.round(6))) > 3        # the blend's limit moves per row
    for field in dataclasses.fields(fs):
        ours, theirs = getattr(fs, field.name), getattr(ref, field.name)
        if isinstance(ours, dict):
            assert sorted(ours) == sorted(theirs)
            for k in ours:
                assert np.allclose(ours[k], theirs[k], rtol=1e-12, equal_nan=True), (field, k)
        elif field.name == "network":
            for a, b in zip(ours, theirs, strict=True):
                assert (a is None) == (b is None)
                if a is not None:
                    assert a[:2] == pytest.approx(b[:2], rel=1e-12)
                    assert np.allclose(a[2], b[2], rtol=1e-12)
        elif ours.dtype.kind in "fb":
            assert np.allclose(ours, theirs, rtol=1e-12, equal_nan=True), field.name
        else:
            assert list(ours) == list(theirs), field.name
    # Mass to volume by hand (ideal mixing, common practice, no source): row 3 holds
    # 5 wt% coarse (2700), 8 wt% fine (4200), 5 vol% oil (900) in the liquid (997 kg/m3):
    # with rho_m the mixture density, phi_i = w_i rho_m / rho_i and
    # rho_m = 0.05*900 + rho_l*(1 - 0.05 - phi_c - phi_f) + w_c rho_m + w_f rho_m.
    rho_l = f.liquid.density_kg_per_m3
    assert rho_l == 997.0
    rho_m = (0.05 * 900.0 + rho_l * 0.95) / (1 - 0.05 - 0.08 + rho_l * (0.05 / 2700.0
                                                                      + 0.08 / 4200.0))
    assert fs.phi_solids[3] == pytest.approx(rho_m * (0.05 / 2700.0 + 0.08 / 4200.0), rel=1e-9)


def test_mixture_is_the_one_row_case_of_mixtures():
    f = _two_powder_paint()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        rows = fm.mixtures(f, [[0.1, 0.2, 0.05], [0.3, 0.0, 0.05]], [True, True, False])
        one = fm.mixture(dataclasses.replace(f, ingredients=(
            dataclasses.replace(f.ingredients[0], loading=0.3),
            dataclasses.replace(f.ingredients[1], loading=0.0), f.ingredients[2])))
    second = rows.row(1)
    assert second.phi_max == pytest.approx(one.phi_max, rel=1e-12)
    assert second.phi_solids_effective == pytest.approx(one.phi_solids_effective, rel=1e-12)
    assert np.allclose(second.phi, one.phi, rtol=1e-12)
    assert rows.phi_max[0] != pytest.approx(rows.phi_max[1], rel=1e-3)


def test_additive_yield_stress_acts_like_herschel_bulkley():
    # A Newtonian liquid with an added yield stress tau_y is a Bingham liquid: the same
    # engine row with law "bingham" must give the same flow curve (Bingham 1922 form).
    water = fm.Liquid(preset="", law="newtonian", params={"viscosity_Pa_s": 0.1})
    bingham = fm.Liquid(preset="", law="bingham",
                        params={"yield_stress_Pa": 4.0, "plastic_viscosity_Pa_s": 0.1})
    fs = engine.stack([_formulation(water), _formulation(bingham)])
    fs = dataclasses.replace(fs, yield_stress_Pa=np.array([4.0, 0.0]))
    res = engine.evaluate(fs, RATES)
    assert np.allclose(res.viscosity_Pa_s[0], res.viscosity_Pa_s[1], rtol=1e-9)
    assert res.apparent_yield_stress_Pa[0] == pytest.approx(res.apparent_yield_stress_Pa[1])
    assert "yield" in set(res.regime[0])


def test_max_loading_rows_equal_the_single_formulation_solver_with_reasons():
    forms = [_formulation(liquid, 0.3, thickening=k % 3 == 0, droplets=k % 2 == 1)
             for k, liquid in enumerate(LIQUIDS)]
    limit = 1.0
    phi, reason = engine.max_loading(engine.stack(forms), limit, 10.0)
    for i, f in enumerate(forms):
        assert phi[i] == pytest.approx(fm.max_loading(f, limit, 10.0), abs=2e-9)
        if reason[i] == "viscosity" and f.thickening_onset_stress_Pa is None:
            # The limit is met at the answer (thickening rows may jump across it).
            eta = fm.predict(fm.with_solids_scaled(f, float(phi[i])), [10.0])
            assert eta["viscosity_Pa_s"].iloc[0] == pytest.approx(limit, rel=1e-5)
    assert set(reason) <= {"viscosity", "liquid", "packing"}
    # A liquid thicker than the limit leaves no room for solids.
    thick = _formulation(fm.Liquid(preset="", law="newtonian", params={"viscosity_Pa_s": 2.0}))
    phi, reason = engine.max_loading(engine.stack([thick]), limit, 10.0)
    assert phi[0] == 0.0 and reason[0] == "liquid"


def test_repeated_rows_are_solved_once_with_the_same_answers():
    forms = [_formulation(LIQUIDS[k % 3], 0.3 + 0.05 * (k % 2), thickening=k % 3 == 1)
             for k in range(6)]
    fs = engine.stack(forms)
    many = fs.take(np.arange(300) % 6)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        one = engine.evaluate(fs, RATES)
        rep = engine.evaluate(many, RATES)
        phi1, why1 = engine.max_loading(fs, 1.0, 10.0)
        phi2, why2 = engine.max_loading(many, 1.0, 10.0)
    first, inverse = many.distinct()
    assert first.size == 6 and np.array_equal(many.take(first).phi[inverse], many.phi)
    assert np.array_equal(rep.viscosity_Pa_s, one.viscosity_Pa_s[np.arange(300) % 6])
    assert np.array_equal(rep.regime, one.regime[np.arange(300) % 6])
    assert np.allclose(phi2, phi1[np.arange(300) % 6], rtol=0, atol=1e-12)
    assert list(why2) == list(why1[np.arange(300) % 6])


def test_repeated_rates_are_solved_once_with_the_same_answers():
    # A map's window often sits at the map's own rate: [100, 100, 0.1] is solved at two.
    fs = engine.stack(_mixed_set())
    rates = np.array([100.0, 100.0, 0.1, 5.0, 0.1])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        rep = engine.evaluate(fs, rates)
        one = [engine.evaluate(fs, [rate]) for rate in rates]
    assert np.array_equal(rep.shear_rate_1_per_s, rates)
    for j in range(rates.size):
        for name in ("viscosity_Pa_s", "shear_stress_Pa", "liquid_viscosity_Pa_s"):
            np.testing.assert_allclose(getattr(rep, name)[:, j], getattr(one[j], name)[:, 0],
                                       rtol=1e-9, err_msg=f"{name} at {rates[j]} 1/s")
        assert list(rep.regime[:, j]) == list(one[j].regime[:, 0])
    assert np.array_equal(rep.viscosity_Pa_s[:, 0], rep.viscosity_Pa_s[:, 1])
    np.testing.assert_allclose(rep.apparent_yield_stress_Pa, one[0].apparent_yield_stress_Pa,
                               rtol=1e-9)


def test_without_regime_labels_the_numbers_are_the_same():
    # max_loading's search asks for the viscosity only (regimes=False).
    fs = engine.stack(_mixed_set())
    fs = fs.take(np.r_[np.arange(len(fs)), 1, 1]).at_loading(      # two rows pushed to jam
        np.r_[fs.phi, 0.999 * fs.phi_max[1], fs.phi_max[1]])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        full = engine.evaluate(fs, RATES)
        bare = engine.evaluate(fs, RATES, regimes=False)
    for f in dataclasses.fields(full):
        if f.name != "regime":
            np.testing.assert_array_equal(getattr(bare, f.name), getattr(full, f.name),
                                          err_msg=f.name)
    kept = np.isin(full.regime, ["jammed", "discontinuous-thickening"])
    assert kept.any() and np.array_equal(bare.regime[kept], full.regime[kept])
    assert set(bare.regime[~kept & (full.regime != "yield")]) == {""}


def test_max_loading_where_the_curve_jumps_answers_a_crossing_of_the_limit():
    # The invented ceramic slip demo thickens at 100 1/s, and near its zero-shear packing
    # limit its viscosity jumps up and falls back (the Brownian term is left out past it).
    # The search (several trial loadings per engine call on such rows) must answer a true
    # crossing: under the limit at the answer and over it one tolerance higher, the same
    # answer for the row alone and among other rows. A property of the solver itself.
    import pathlib

    from predictor import scenario

    slip = scenario.read_scenario(pathlib.Path(__file__).parents[1] / "data_demo"
                                  / "ceramic_slip.loadline.json")
    fs = engine.stack([slip])
    limits = np.array([0.1, 0.2, 0.274, 3.0])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        together, _ = engine.max_loading(fs.take(np.zeros(limits.size, int)), limits, 100.0,
                                         tolerance=1e-10)
        for limit, phi_all in zip(limits, together, strict=True):
            phi, why = engine.max_loading(fs, limit, 100.0, tolerance=1e-10)
            assert why[0] == "viscosity" and phi[0] == pytest.approx(phi_all, abs=1e-10)
            trial = np.array([phi[0], phi[0] + 2e-10])
            eta = engine.evaluate(fs.take(np.zeros(2, int)).at_loading(trial),
                                  np.full((2, 1), 100.0)).viscosity_Pa_s[:, 0]
            assert eta[0] < limit and not eta[1] < limit
