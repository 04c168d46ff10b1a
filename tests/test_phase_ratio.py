"""Phase-ratio explorer: the table passes the relations' values through, and the inverse finds them.

The numbers themselves are checked in tests/test_emulsion.py; here the checks are that the
orchestration calls the right relation on the right branch, marks the regimes, and that the
inverse returns what the forward table gives. Scenario values are invented.
"""

import warnings

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from predictor import emulsion, phase_ratio
from predictor.errors import InputRangeError, UnknownModelError, ValidityWarning

# Invented scenario: a light cream, oil 50 mPa*s in a water phase of 2 mPa*s, 5 mN/m,
# d32 = 5 um, viewed at 10 1/s.
CREAM = dict(continuous_viscosity_Pa_s=2e-3, droplet_viscosity_Pa_s=50e-3,
             interfacial_tension_N_per_m=5e-3, sauter_diameter_m=5e-6, shear_rate_1_per_s=10.0)


def sweep(**changes):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        return phase_ratio.phase_ratio_sweep(**{**CREAM, **changes})


def branch(table, name):
    return table[table["branch"] == name].set_index("phi")


def test_table_shape_and_columns():
    table = sweep()
    assert list(table.columns) == list(phase_ratio.COLUMNS)
    assert len(table) == 2 * len(phase_ratio.DEFAULT_PHI)
    assert table["phi"].min() == 0.0 and table["phi"].max() == pytest.approx(0.95)
    assert isinstance(table, pd.DataFrame)


def test_fluid_rows_are_the_registered_relation_times_the_continuous_viscosity():
    # Newtonian (zero capillary number) values: deformation thinning off.
    table = sweep(model="pal", phi_max=0.7, deformation_thinning=False)
    direct = branch(table, "direct")
    fluid = direct[direct["dispersed_fraction"] < 0.7]
    expected = 2e-3 * emulsion.pal(fluid["dispersed_fraction"].to_numpy(), 25.0, 0.7)
    assert np.allclose(fluid["viscosity_Pa_s"].to_numpy(), expected, rtol=1e-14)
    inverted = branch(table, "inverted")
    fluid = inverted[inverted["dispersed_fraction"] < 0.7]
    expected = 50e-3 * emulsion.pal(fluid["dispersed_fraction"].to_numpy(), 2e-3 / 50e-3, 0.7)
    assert np.allclose(fluid["viscosity_Pa_s"].to_numpy(), expected, rtol=1e-14)


def test_fluid_rows_are_thinned_by_droplet_deformation_at_the_branch_capillary_number():
    # Invented high-shear case, 1e5 1/s: Ca = eta_continuous * rate * d32/2 / Gamma on each
    # branch (Taylor 1934's definition), thinning from predictor.emulsion.deformation_thinning.
    table = sweep(model="pal", phi_max=0.7, shear_rate_1_per_s=1e5)
    for name, eta_cont, lam in (("direct", 2e-3, 25.0), ("inverted", 50e-3, 2e-3 / 50e-3)):
        rows = branch(table, name)
        fluid = rows[rows["dispersed_fraction"] < 0.7]
        x = fluid["dispersed_fraction"].to_numpy()
        ca = eta_cont * 1e5 * 2.5e-6 / 5e-3
        assert np.allclose(fluid["capillary_number"], ca, rtol=1e-14)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ValidityWarning)
            thinned = emulsion.deformation_thinning(x, ca, lam, model="pal",
                                                    model_params={"phi_max": 0.7})
        assert np.allclose(fluid["viscosity_Pa_s"], eta_cont * thinned, rtol=1e-14)
        zero = emulsion.pal(x, lam, 0.7)
        assert np.allclose(fluid["thinning_factor"], thinned / zero, rtol=1e-14)


@pytest.mark.parametrize("rigid", [False, True])
def test_thinning_lowers_the_viscosity_at_high_shear_only(rigid):
    # Llewellin et al. 2002 form (and our generalisation): eta_r falls with Ca, and Ca -> 0
    # gives the Newtonian relation; rigid droplets do not deform, so they do not thin.
    for rate in (1e-9, 1e5):
        on = sweep(shear_rate_1_per_s=rate, surfactant_rigid=rigid)
        off = sweep(shear_rate_1_per_s=rate, surfactant_rigid=rigid, deformation_thinning=False)
        v_on, v_off = on["viscosity_Pa_s"].to_numpy(), off["viscosity_Pa_s"].to_numpy()
        jammed = (on["regime"] == "jammed").to_numpy()
        fluid = on["regime"].isin(["dilute", "concentrated"]).to_numpy()
        assert np.array_equal(v_on[jammed], v_off[jammed])
        assert np.all(v_on[fluid] <= v_off[fluid])
        assert (off.loc[fluid, "thinning_factor"] == 1.0).all()
        assert (on.loc[jammed, "thinning_factor"] == 1.0).all()
        if rate < 1.0 or rigid:
            assert np.array_equal(v_on[fluid], v_off[fluid])
        else:
            # Both branches thin visibly wherever there are droplets (phi > 0 on that branch).
            some = fluid & (on["dispersed_fraction"] > 0.1).to_numpy()
            assert np.all(v_on[some] < 0.99 * v_off[some])
            assert np.all(on.loc[some, "thinning_factor"] < 0.99)


def test_thinning_factor_is_nan_where_there_is_no_emulsion():
    row = branch(sweep(phi=[0.0]), "inverted").loc[0.0]
    assert np.isnan(row["thinning_factor"])
    assert branch(sweep(phi=[0.0]), "direct").loc[0.0, "thinning_factor"] == 1.0


def test_a_thinner_emulsion_needs_more_droplets_for_the_same_target():
    # Thinned viscosity <= Newtonian at every phi, so the target is reached at a phi at least
    # as high (invented high-shear case).
    target = 10e-3
    on = for_target(target_viscosity_Pa_s=target, shear_rate_1_per_s=1e5)
    off = for_target(target_viscosity_Pa_s=target, shear_rate_1_per_s=1e5,
                     deformation_thinning=False)
    assert on > off
    row = branch(sweep(phi=[on], shear_rate_1_per_s=1e5), "direct").iloc[0]
    assert row["viscosity_Pa_s"] == pytest.approx(target, rel=1e-9)


def test_jammed_rows_use_the_flow_curve_and_the_yield_stress():
    table = sweep(phi=[0.8], jammed_yield="mason")
    row = branch(table, "direct").loc[0.8]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        stress = emulsion.flow_stress_jammed(0.8, 10.0, 2e-3, 5e-3, 5e-6, 25.0, 0.64, "mason")
        tau_y = emulsion.yield_stress_mason(0.8, 5e-3, 5e-6, 0.64)
    assert row["regime"] == "jammed"
    assert row["viscosity_Pa_s"] == pytest.approx(stress / 10.0)
    assert row["yield_stress_Pa"] == pytest.approx(tau_y)


def test_regimes_follow_the_dispersed_fraction():
    table = sweep(phi_max=0.7)
    x = table["dispersed_fraction"]
    assert (table.loc[x < phase_ratio.DILUTE_LIMIT, "regime"] == "dilute").all()
    assert (table.loc[(x >= 0.03) & (x < 0.7), "regime"] == "concentrated").all()
    assert (table.loc[(x >= 0.7) & (x <= 0.99), "regime"] == "jammed").all()
    fluid = table["regime"].isin(["dilute", "concentrated"])
    assert (table.loc[fluid, "yield_stress_Pa"] == 0).all()


def test_no_emulsion_left_gives_nan_not_a_number_made_up():
    # phi = 0 on the inverted branch: dispersed fraction 1, nothing to disperse into.
    row = branch(sweep(phi=[0.0]), "inverted").loc[0.0]
    assert row["regime"] == "none" and np.isnan(row["viscosity_Pa_s"])


def test_inversion_caution_band():
    # Common practice, no source: inversion is commonly seen from a dispersed fraction of 0.6.
    table = sweep()
    flagged = table["dispersed_fraction"] >= phase_ratio.INVERSION_CAUTION_BAND[0]
    assert (table["inversion_caution"] == flagged).all()


def test_lower_viscosity_marks_the_cheaper_continuous_phase():
    table = sweep()
    for _, rows in table.groupby("phi"):
        marked = rows[rows["lower_viscosity"]]
        assert len(marked) >= 1
        assert marked["viscosity_Pa_s"].iloc[0] == rows["viscosity_Pa_s"].min()
    # Low oil fraction: the water-continuous branch is the thinner one (limit: pure water).
    assert branch(table, "direct").loc[0.1, "lower_viscosity"]


@given(eta_a=st.floats(1e-3, 1.0), eta_b=st.floats(1e-3, 1.0),
       phi=st.floats(0.05, 0.9))
@settings(max_examples=25, deadline=None)
def test_swapping_the_liquids_swaps_the_branches(eta_a, eta_b, phi):
    one = sweep(continuous_viscosity_Pa_s=eta_a, droplet_viscosity_Pa_s=eta_b, phi=[phi])
    two = sweep(continuous_viscosity_Pa_s=eta_b, droplet_viscosity_Pa_s=eta_a,
                phi=[1.0 - phi])
    a = one[one["branch"] == "direct"]["viscosity_Pa_s"].iloc[0]
    b = two[two["branch"] == "inverted"]["viscosity_Pa_s"].iloc[0]
    assert a == pytest.approx(b, rel=1e-9)


@given(phi=st.floats(0.0, 0.6), lam_oil=st.floats(1e-3, 1e3))
@settings(max_examples=25, deadline=None)
def test_surfactant_rigid_droplets_are_at_least_as_viscous(phi, lam_oil):
    # Rigid spheres are the upper limit of every relation (viscosity increases with lambda).
    free = sweep(droplet_viscosity_Pa_s=2e-3 * lam_oil, phi=[phi])
    rigid = sweep(droplet_viscosity_Pa_s=2e-3 * lam_oil, phi=[phi], surfactant_rigid=True)
    f = branch(free, "direct")["viscosity_Pa_s"].iloc[0]
    r = branch(rigid, "direct")["viscosity_Pa_s"].iloc[0]
    assert r >= f * (1 - 1e-12)
    assert np.isinf(branch(rigid, "direct")["viscosity_ratio"].iloc[0])


def test_deformation_flags_follow_the_capillary_number():
    slow = branch(sweep(phi=[0.2]), "direct").iloc[0]
    assert not slow["droplets_deformed"] and not slow["droplets_break"]
    # Invented high-shear case: 1e6 1/s, 100 um droplets: Ca = 2e-3 * 1e6 * 5e-5 / 5e-3 = 20.
    fast = branch(sweep(phi=[0.2], shear_rate_1_per_s=1e6, sauter_diameter_m=1e-4,
                        droplet_viscosity_Pa_s=2e-3), "direct").iloc[0]
    assert fast["capillary_number"] == pytest.approx(20.0)
    assert fast["droplets_deformed"] and fast["droplets_break"]


def test_sweep_warns_when_the_relation_is_out_of_range():
    with pytest.warns(ValidityWarning, match="taylor"):
        phase_ratio.phase_ratio_sweep(**CREAM, model="taylor", phi=[0.3])


@pytest.mark.parametrize("changes, field", [
    ({"continuous_viscosity_Pa_s": 0.0}, "continuous_viscosity_Pa_s"),
    ({"sauter_diameter_m": -1e-6}, "sauter_diameter_m"),
    ({"shear_rate_1_per_s": np.nan}, "shear_rate_1_per_s"),
    ({"phi": [0.5, 1.2]}, "phi"),
    ({"phi_max": 0.3}, "phi_max"),
    ({"jammed_yield": "foam"}, "jammed_yield"),
    ({"interfacial_tension_N_per_m": [1e-3, 2e-3]}, "interfacial_tension_N_per_m"),
])
def test_sweep_bad_inputs_raise_named_errors(changes, field):
    with pytest.raises(InputRangeError, match=field):
        phase_ratio.phase_ratio_sweep(**{**CREAM, **changes})


def test_sweep_unknown_model():
    with pytest.raises(UnknownModelError):
        phase_ratio.phase_ratio_sweep(**CREAM, model="krieger-dougherty")


# ---- Inverse ------------------------------------------------------------------------------

def for_target(**kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        return phase_ratio.phase_ratio_for_target(**{**CREAM, **kwargs})


@pytest.mark.parametrize("model", ["pal", "phan-thien-pham", "taylor"])
@pytest.mark.parametrize("name", ["direct", "inverted"])
@pytest.mark.parametrize("x", [0.1, 0.35, 0.55])
def test_inverse_round_trip_in_the_fluid_regime(model, name, x):
    phi = x if name == "direct" else 1.0 - x
    target = branch(sweep(model=model, phi=[phi]), name)["viscosity_Pa_s"].iloc[0]
    found = for_target(target_viscosity_Pa_s=target, branch=name, model=model)
    assert found == pytest.approx(phi, abs=1e-9)


@pytest.mark.parametrize("relation", emulsion.JAMMED_YIELD_RELATIONS)
def test_inverse_round_trip_for_yield_stress(relation):
    target = branch(sweep(phi=[0.88], jammed_yield=relation), "direct")["yield_stress_Pa"].iloc[0]
    found = for_target(target_yield_stress_Pa=target, jammed_yield=relation)
    assert found == pytest.approx(0.88, abs=1e-9)


def test_inverse_in_the_jammed_regime_only():
    target = branch(sweep(phi=[0.8]), "direct")["viscosity_Pa_s"].iloc[0]
    assert for_target(target_viscosity_Pa_s=target, regime="jammed") == pytest.approx(0.8)
    # Without the restriction the divergent relation reaches it first, below phi_max.
    assert for_target(target_viscosity_Pa_s=target) < 0.64


@pytest.mark.parametrize("kwargs, field", [
    ({"target_viscosity_Pa_s": 1e-3}, "target_viscosity_Pa_s"),     # thinner than water
    ({"target_yield_stress_Pa": 1e9}, "target_yield_stress_Pa"),    # unreachable
    ({"target_viscosity_Pa_s": 1.0, "target_yield_stress_Pa": 1.0}, "target"),
    ({}, "target"),
    ({"target_viscosity_Pa_s": 1.0, "branch": "sideways"}, "branch"),
    ({"target_viscosity_Pa_s": 1.0, "regime": "solid"}, "regime"),
])
def test_inverse_bad_targets_raise_named_errors(kwargs, field):
    with pytest.raises(InputRangeError, match=field):
        for_target(**kwargs)


def test_inverse_of_the_continuous_viscosity_is_zero():
    assert for_target(target_viscosity_Pa_s=2e-3) == 0.0
