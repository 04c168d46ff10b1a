"""Formulation flow curve: wiring to `shear.flow_curve`, the liquid law, process windows.

Checks at this layer are about wiring: the right inputs reach the solver
in SI, and results agree with the function layer or with closed forms (Krieger-Dougherty in a
Newtonian liquid; Chateau, Ovarlez & Trung for a Herschel-Bulkley liquid, from memory;
Andrade's Arrhenius factor). The numbers themselves are checked in test_shear.py.
"""

import dataclasses

import numpy as np
import pytest

from predictor import formulation as fm
from predictor import liquids, shear


def paint(diameter_m=10e-6, liquid=None, **kw):
    liquid = liquid or fm.Liquid(name="base", preset="", law="newtonian",
                                 params={"viscosity_Pa_s": 0.05}, density_kg_per_m3=1000.0)
    solids = (fm.Ingredient("filler", density_kg_per_m3=2700.0, loading=0.3, basis="volume",
                            diameter_m=diameter_m, phi_max=0.62),
              fm.Ingredient("pigment", density_kg_per_m3=4100.0, loading=0.1, basis="volume",
                            diameter_m=diameter_m, phi_max=0.62))
    return fm.Formulation(liquid=liquid, ingredients=solids, **kw)


def test_predict_columns_regime_and_attrs():
    frame = fm.predict(paint())
    assert list(frame.columns) == ["shear_rate_1_per_s", "viscosity_Pa_s", "shear_stress_Pa",
                                   "relative_viscosity", "liquid_viscosity_Pa_s", "regime"]
    assert len(frame) == 61 and frame["shear_rate_1_per_s"].iloc[0] == pytest.approx(1e-3)
    assert frame["shear_rate_1_per_s"].iloc[-1] == pytest.approx(1e5)
    assert set(frame["regime"]) <= set(shear.REGIMES)
    assert "thinning_onset_1_per_s" in frame.attrs["markers"]
    assert isinstance(frame.attrs["warnings"], tuple)


def test_large_particles_in_newtonian_liquid_give_krieger_dougherty():
    # Non-Brownian (10 um), no thickening: the Newtonian view, (1 - 0.4/0.62)**(-2.5*0.62).
    f = paint()
    frame = fm.predict(f, [0.1, 10.0, 1e3])
    expected = (1 - 0.4 / 0.62) ** (-2.5 * 0.62)
    assert np.allclose(frame["relative_viscosity"], expected, rtol=1e-12)
    assert np.allclose(frame["viscosity_Pa_s"], 0.05 * expected, rtol=1e-12)
    assert any("negligible" in w for w in frame.attrs["warnings"])


def test_wiring_passes_si_inputs_to_the_solver(mocker):
    spy = mocker.spy(shear, "flow_curve")
    f = paint(diameter_m=0.4e-6)
    fm.predict(f, [1.0])
    kwargs = spy.call_args.kwargs
    mix = fm.mixture(f)
    assert spy.call_args.args[1] == pytest.approx(mix.phi_solids_effective)
    assert kwargs["phi_max_high_shear"] == pytest.approx(0.62)
    assert kwargs["phi_max_zero_shear"] == pytest.approx(0.62 * fm.ZERO_SHEAR_RATIO)
    assert kwargs["radius_m"] == pytest.approx(0.2e-6)          # Sauter radius of the solids
    assert kwargs["liquid_params"] == {"viscosity_Pa_s": 0.05}
    assert kwargs["onset_stress_Pa"] is None


def test_fine_particles_thin_between_their_plateaus():
    # phi = 0.5: plateaus (1 - 0.5/0.55)**-1.375 = 27 and (1 - 0.5/0.62)**-1.55 = 12.8.
    frame = fm.predict(fm.with_solids_scaled(paint(diameter_m=0.2e-6), 0.5))
    m = frame.attrs["markers"]
    assert m["zero_shear_relative_viscosity"] > m["high_shear_relative_viscosity"]
    assert "thinning" in set(frame["regime"])
    # At 1e-3 1/s (sigma_r about 1e-4) the curve sits within 0.5 % of its zero-shear plateau.
    assert frame["viscosity_Pa_s"].iloc[0] == pytest.approx(m["zero_shear_viscosity_Pa_s"],
                                                            rel=5e-3)
    assert frame["viscosity_Pa_s"].iloc[0] < m["zero_shear_viscosity_Pa_s"]


def test_herschel_bulkley_liquid_follows_chateau_closed_form():
    liquid = fm.Liquid(name="gel", preset="", law="herschel-bulkley",
                       params={"yield_stress_Pa": 5.0, "consistency_Pa_s": 2.0,
                               "flow_index": 0.5}, density_kg_per_m3=1000.0)
    rates = np.logspace(-2, 3, 11)
    frame = fm.predict(paint(liquid=liquid), rates)
    phi = fm.mixture(paint(liquid=liquid)).phi_solids_effective
    g = (1 - phi / 0.62) ** (-2.5 * 0.62)
    expected = 5.0 * np.sqrt((1 - phi) * g) + 2.0 * (1 - phi) ** 0.25 * g**0.75 * rates**0.5
    assert np.allclose(frame["shear_stress_Pa"], expected, rtol=1e-10)
    assert frame.attrs["markers"]["apparent_yield_stress_Pa"] == pytest.approx(
        5.0 * np.sqrt((1 - phi) * g), rel=1e-9)


def test_arrhenius_shift_scales_viscosity_and_time_but_not_yield_stress():
    base = fm.Liquid(name="gel", preset="", law="carreau-yasuda",
                     params={"zero_shear_viscosity_Pa_s": 2.0, "time_constant_s": 0.5},
                     temperature_K=318.15, reference_temperature_K=298.15,
                     activation_temperature_K=3000.0)
    law, params = fm.liquid_law_of(base)
    a = liquids.arrhenius_shift(318.15, 298.15, 3000.0)
    assert law == "carreau-yasuda"
    assert params["zero_shear_viscosity_Pa_s"] == pytest.approx(2.0 * a, rel=1e-14)
    assert params["time_constant_s"] == pytest.approx(0.5 * a, rel=1e-14)
    assert params["flow_index"] == 0.5
    hb = dataclasses.replace(base, law="bingham", params={"yield_stress_Pa": 7.0})
    assert fm.liquid_law_of(hb)[1]["yield_stress_Pa"] == 7.0


def test_thickening_fields_switch_on_frictional_thickening():
    f = paint(thickening_onset_stress_Pa=20.0)
    frame = fm.predict(f, np.logspace(-2, 5, 200))
    m = frame.attrs["markers"]
    assert np.isfinite(m["thickening_onset_1_per_s"])
    assert "thickening" in set(frame["regime"]) or "jammed" in set(frame["regime"])


def test_process_viscosities_match_predict_at_the_window_ends():
    f = paint(diameter_m=0.3e-6)
    table = fm.process_viscosities(f)
    assert list(table["process"]) == [w[0] for w in shear.PROCESS_SHEAR_RATES]
    direct = fm.predict(f, table["low_1_per_s"].to_numpy())
    assert np.allclose(table["viscosity_low_Pa_s"], direct["viscosity_Pa_s"], rtol=1e-9)
    assert list(table["regime_low"]) == list(direct["regime"])
    high = fm.predict(f, table["high_1_per_s"].to_numpy())
    assert np.allclose(table["viscosity_high_Pa_s"], high["viscosity_Pa_s"], rtol=1e-9)
    assert list(table["regime_high"]) == list(high["regime"])
    custom = fm.process_viscosities(f, windows=[("extrusion", 10.0, 100.0)])
    assert custom["high_1_per_s"].iloc[0] == 100.0
    with pytest.raises(fm.InputRangeError, match="window"):
        fm.process_viscosities(f, windows=[("bad", 10.0, 1.0)])


def test_flow_curve_summary_is_plain_data():
    summary = fm.flow_curve_summary(paint(diameter_m=0.3e-6))
    assert summary["phi"] == pytest.approx(0.4) and summary["phi_max"] == pytest.approx(0.62)
    assert isinstance(summary["thinning_onset_1_per_s"], float)
    assert isinstance(summary["warnings"], tuple)


@pytest.mark.parametrize("rates", [[0.0], [np.nan], [-3.0]])
def test_bad_shear_rates_raise(rates):
    with pytest.raises(fm.InputRangeError, match="shear_rate_1_per_s"):
        fm.predict(paint(), rates)
