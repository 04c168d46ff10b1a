"""Pair energies, the stability verdict and the YODEL yield stress (predictor.interactions).

Each check names its outside reference; limits derived from the published equations are
marked as such.
"""

import math

import numpy as np
import pytest
from scipy import integrate

from predictor import interactions as it
from predictor.errors import InputRangeError

KT = it.BOLTZMANN * 298.15


def hamaker_exact(h, a, hamaker):
    """Hamaker's full energy of two equal spheres (Hamaker, Physica 4, 1058, 1937, Eq. 21;
    as restated in Israelachvili 2011, Table 13.1 notes; from memory)."""
    c = 2 * a + h
    return -hamaker / 6 * (2 * a * a / (h * (4 * a + h)) + 2 * a * a / c**2
                           + math.log(h * (4 * a + h) / c**2))


@pytest.mark.parametrize("ratio", [1e-4, 1e-3])
def test_derjaguin_form_is_hamakers_close_range_limit(ratio):
    # Hamaker 1937: the exact sphere-sphere energy tends to -A a/(12 h) for h << a.
    a = 0.5e-6
    exact = hamaker_exact(ratio * a, a, 5e-20)
    assert it.van_der_waals_energy(ratio * a, a, 5e-20) == pytest.approx(exact, rel=5 * ratio)


def test_derjaguin_form_fails_where_it_should():
    # At h = a the close-range form overestimates the exact attraction several-fold.
    a = 0.5e-6
    assert it.van_der_waals_energy(a, a, 5e-20) < 3 * hamaker_exact(a, a, 5e-20)


def test_negative_hamaker_only_across_an_intermediate_medium():
    # Israelachvili 2011, Ch. 13: A_132 < 0 when medium 3 lies between 1 and 2; A_131 >= 0.
    assert it.hamaker_combining(15e-20, 5.2e-20) > 0
    assert it.hamaker_combining(3.7e-20, 5.2e-20) > 0          # water across oil: attract
    assert it.hamaker_combining(15e-20, 5.2e-20, 3.7e-20) < 0  # alumina-water across oil
    assert it.van_der_waals_energy(2e-9, 1e-6, -1e-21) > 0     # repulsive, and allowed
    with pytest.raises(InputRangeError, match="different materials"):
        it.stability_verdict(1e-6, -1e-21, 0.03, 1e-3)
    with pytest.raises(InputRangeError, match="different materials"):
        it.yodel_yield_stress(0.4, 0.28, 0.64, 1e-6, -1e-21, 2e-9)


def test_debye_length_scales_as_inverse_root_ionic_strength():
    # Debye & Hueckel 1923: kappa^2 proportional to I; Israelachvili 2011: 0.304 nm at 1 M.
    values = it.debye_length(np.array([1e-4, 1e-2, 1.0]), 298.15, it.water_permittivity(298.15))
    assert values * np.sqrt([1e-4, 1e-2, 1.0]) == pytest.approx(0.304e-9, abs=0.0005e-9)


def test_double_layer_forms_and_their_limits():
    a, psi, length = 0.5e-6, 0.03, 10e-9
    pre = 2 * np.pi * 78.3 * it.VACUUM_PERMITTIVITY * a * psi**2
    h = np.array([0.5e-9, 5e-9, 20e-9, 80e-9])
    cp = it.hogg_healy_fuerstenau(h, a, psi, length)
    cc = it.wiese_healy(h, a, psi, length)
    # Russel, Saville & Schowalter 1989, Ch. 4: constant charge repels more than constant
    # potential at every h, and the two meet the weak-overlap form for kappa h >> 1.
    assert np.all(cc > cp)
    weak = pre * np.exp(-h / length)
    assert cp[-1] == pytest.approx(weak[-1], rel=1e-3)
    assert cc[-1] == pytest.approx(weak[-1], rel=1e-3)
    # Hogg, Healy & Fuerstenau 1966: finite at contact (2 pi eps a psi^2 ln 2).
    assert it.hogg_healy_fuerstenau(0.0, a, psi, length) == pytest.approx(pre * math.log(2))
    # Sign of the potential does not matter for equal surfaces (psi^2).
    assert it.hogg_healy_fuerstenau(5e-9, a, -psi, length) == pytest.approx(cp[1])


def test_steric_energy_derives_from_the_de_gennes_pressure():
    # de Gennes 1987 pressure between brushes; Derjaguin: force = pi a W(h) between equal
    # spheres, W the energy per area of flat plates. Checked by numerical integration.
    a, layer, s = 0.5e-6, 3e-9, 2e-9

    def pressure(h):
        x = h / (2 * layer)
        return KT / s**3 * (x**-2.25 - x**0.75) if x < 1 else 0.0

    def plate_energy(h):
        return integrate.quad(pressure, h, 2 * layer)[0]

    for h in (1e-9, 3e-9, 5e-9):
        sphere = pressure_derived = integrate.quad(plate_energy, h, 2 * layer)[0] * np.pi * a
        assert it.alexander_de_gennes(h, a, layer, s) == pytest.approx(sphere, rel=1e-6)
        assert pressure_derived > 0
    assert it.alexander_de_gennes(6.5e-9, a, layer, s) == 0.0
    assert it.alexander_de_gennes(1e-9, a, 0.0, s) == 0.0


def test_energy_curve_is_the_sum_of_its_parts():
    curve = it.energy_curve(1e-6, 4.8e-20, 0.03, 1e-3, layer_thickness_m=1e-9)
    total = curve.van_der_waals_kT + curve.double_layer_kT + curve.steric_kT
    assert curve.total_kT == pytest.approx(total)
    assert curve.separation_m[0] == it.CLOSEST_APPROACH_m
    assert curve.kappa_a == pytest.approx(0.5e-6 / it.debye_length(1e-3, 298.15, 78.3033),
                                          rel=1e-4)
    # forces have faded at the far end (h = a at most, where -A a/(12 h) = -A/12)
    assert abs(curve.total_kT[-1]) <= 4.8e-20 / 12 / KT + 1e-9


@pytest.mark.parametrize("salt, expected", [(1e-4, "stable"), (1e-3, "weakly flocculated"),
                                            (0.1, "flocculated")])
def test_salt_screens_the_barrier(salt, expected):
    # DLVO (Israelachvili 2011, Ch. 14): adding salt lowers the barrier and deepens the
    # secondary minimum until the particles coagulate.
    assert it.stability_verdict(1e-6, 4.8e-20, 0.03, salt).verdict == expected


def test_barrier_falls_with_salt_and_rises_with_potential():
    barriers = [it.stability_verdict(1e-6, 4.8e-20, 0.03, c).barrier_kT
                for c in (1e-5, 1e-4, 1e-3, 1e-2)]
    assert barriers == sorted(barriers, reverse=True) and barriers[-1] < barriers[0]
    by_potential = [it.stability_verdict(1e-6, 4.8e-20, p, 1e-3).barrier_kT
                    for p in (0.01, 0.02, 0.04)]
    assert by_potential == sorted(by_potential)


def test_critical_coagulation_concentration_in_weak_overlap():
    # Low-potential DLVO: with V = 2 pi eps a psi^2 exp(-kappa h) - A a/(12 h), the barrier
    # vanishes (V = V' = 0 at kappa h = 1) at kappa_c = 24 pi eps psi^2 / (e A) (Hiemenz &
    # Rajagopalan 1997, Ch. 13; from memory). The constant-potential form lies below the
    # weak-overlap form, so our barrier is already gone there.
    eps, psi, hamaker = 78.3033 * it.VACUUM_PERMITTIVITY, 0.02, 2e-20
    kappa_c = 24 * np.pi * eps * psi**2 / (math.e * hamaker)
    ionic = lambda kappa: (1 / kappa / it.debye_length(1.0, 298.15, 78.3033)) ** -2  # noqa: E731
    assert it.energy_curve(20e-6, hamaker, psi, ionic(kappa_c)).total_kT.max() < 1.0
    assert it.energy_curve(20e-6, hamaker, psi, ionic(0.3 * kappa_c)).total_kT.max() > 15.0


def test_verdict_edge_cases():
    assert it.stability_verdict(1e-6, 0.0, 0.0, 1e-3).verdict == "stable"       # no forces
    bare = it.stability_verdict(1e-6, 4.8e-20, 0.0, 1e-3)                       # vdW only
    assert bare.verdict == "flocculated" and bare.barrier_kT == 0.0
    assert bare.bond_separation_m == pytest.approx(it.CLOSEST_APPROACH_m, rel=0.05)
    # -A a/(24 L) at h = 2L: 2.4 kT for 200 nm particles with 20 nm layers
    thick = it.stability_verdict(200e-9, 4.8e-20, 0.0, 0.1, layer_thickness_m=20e-9)
    assert thick.verdict == "stable" and thick.bond_force_N == 0.0
    small = it.stability_verdict(20e-9, 1e-20, 0.06, 1e-5)
    assert any("kappa a" in n for n in small.notes) and any("50 mV" in n for n in small.notes)
    assert "rule of thumb" in small.criterion


def test_steric_layer_moves_the_bond_out_to_the_layers():
    verdict = it.stability_verdict(1e-6, 4.8e-20, 0.0, 0.1, layer_thickness_m=2e-9)
    assert verdict.verdict == "flocculated"
    assert 3e-9 < verdict.bond_separation_m < 5e-9      # about 2L, not the bare contact


@pytest.mark.parametrize("kwargs, field", [
    ({"diameter_m": -1e-6}, "diameter_m"), ({"ionic_strength_mol_per_L": 0.0},
                                            "ionic_strength_mol_per_L"),
    ({"surface_potential_V": 1.0}, "surface_potential_V"), ({"hamaker_J": 1e-16}, "hamaker_J"),
    ({"boundary": "floating"}, "boundary"), ({"temperature_K": 500.0}, "temperature_K"),
])
def test_verdict_rejects_bad_input(kwargs, field):
    args = dict(diameter_m=1e-6, hamaker_J=4.8e-20, surface_potential_V=0.03,
                ionic_strength_mol_per_L=1e-3)
    args.update(kwargs)
    with pytest.raises(InputRangeError, match=field):
        it.stability_verdict(**args)


def test_yodel_phi_dependence():
    # Flatt & Bowen 2006: tau ~ phi (phi - phi0)^2 / (phi_m (phi_m - phi)).
    args = dict(phi_percolation=0.28, phi_max=0.64, diameter_m=1e-6, hamaker_J=4.8e-20,
                separation_m=2e-9)
    phi = np.array([0.1, 0.28, 0.3, 0.4, 0.5, 0.6, 0.64, 0.7])
    tau = it.yodel_yield_stress(phi, **args)
    assert tau[0] == tau[1] == 0.0 and np.all(np.isinf(tau[-2:]))
    assert np.all(np.diff(tau[1:6]) > 0)
    # near percolation: quadratic in the excess
    near = it.yodel_yield_stress(np.array([0.281, 0.282]), **args)
    assert near[1] / near[0] == pytest.approx(4.0 * 0.282 / 0.281 * 0.359 / 0.358, rel=1e-9)
    # near the packing limit: diverges as 1/(phi_m - phi)
    far = it.yodel_yield_stress(np.array([0.639, 0.6395]), **args)
    assert far[1] / far[0] == pytest.approx(2.0 * 0.6395 / 0.639 * (0.3595 / 0.359) ** 2)


def test_yodel_scales_with_the_contact_force():
    # m1 ~ A a* / (12 H^2) / R^2 (Flatt & Bowen 2006, Eq. 41, secondary restatement).
    base = it.yodel_yield_stress(0.45, 0.28, 0.64, 1e-6, 4.8e-20, 2e-9)
    assert it.yodel_yield_stress(0.45, 0.28, 0.64, 1e-6, 9.6e-20, 2e-9) == pytest.approx(2 * base)
    assert it.yodel_yield_stress(0.45, 0.28, 0.64, 1e-6, 4.8e-20, 4e-9) == pytest.approx(base / 4)
    assert it.yodel_yield_stress(0.45, 0.28, 0.64, 2e-6, 4.8e-20, 2e-9) == pytest.approx(base / 2)
    assert it.yodel_yield_stress(0.45, 0.28, 0.64, 1e-6, 4.8e-20, 2e-9,
                                 contact_radius_ratio=0.1) == pytest.approx(base / 10)
    with pytest.raises(InputRangeError, match="phi_max"):
        it.yodel_yield_stress(0.45, 0.5, 0.4, 1e-6, 4.8e-20, 2e-9)


def test_yodel_size_factor():
    assert it.yodel_size_factor([1e-6], [1.0]) == pytest.approx(1.0)
    assert it.yodel_size_factor([1e-6, 1e-6], [0.3, 0.7]) == pytest.approx(1.0)
    # a fine tail adds many contacts per area: the factor rises above 1
    assert it.yodel_size_factor([0.2e-6, 1e-6, 2e-6], [0.1, 0.6, 0.3]) > 1.0
    with pytest.raises(InputRangeError, match="fractions"):
        it.yodel_size_factor([1e-6, 2e-6], [1.0])


def test_electroviscous_fraction():
    phi = it.electroviscous_effective_fraction(0.2, 100e-9, 0.05, np.array([1e-4, 1e-2, 1.0]))
    assert np.all(np.diff(phi) < 0) and np.all(phi >= 0.2)
    assert phi[-1] == pytest.approx(0.2, rel=0.05)      # screened: hard spheres again
    assert it.electroviscous_effective_fraction(0.2, 100e-9, 0.0, 1e-4) == 0.2
    # closed form check: V_DL(h*) = kT with the constant-potential form
    a, length = 50e-9, it.debye_length(1e-3, 298.15, it.water_permittivity(298.15))
    swell = it.electroviscous_effective_fraction(1.0, 2 * a, 0.05, 1e-3) ** (1 / 3) - 1
    energy = it.hogg_healy_fuerstenau(2 * a * swell, a, 0.05, length,
                                      it.water_permittivity(298.15))
    assert energy == pytest.approx(KT, rel=1e-6)


def test_hamaker_table_has_sources_and_sensible_values():
    for name, entry in it.HAMAKER_CONSTANTS.items():
        assert entry.source and ("memory" in entry.source or "checked" in entry.source), name
        assert 0 <= entry.oil_J < entry.vacuum_J and 0 < entry.water_J < entry.vacuum_J, name


def test_temperature_range_follows_the_permittivity():
    # water's permittivity is tabulated from 0 to 100 C only (Malmberg & Maryott 1956)
    with pytest.raises(InputRangeError, match="temperature_K"):
        it.energy_curve(1e-6, 1e-20, 0.03, 1e-3, temperature_K=400.0)
    hot_oil = it.energy_curve(1e-6, 1e-20, 0.03, 1e-3, temperature_K=400.0,
                              relative_permittivity=2.1)
    assert hot_oil.debye_length_m == pytest.approx(
        it.debye_length(1e-3, 400.0, 2.1))


def test_reachable_well_is_the_primary_minimum_without_a_barrier():
    coagulated = it.stability_verdict(1e-6, 4.8e-20, 0.03, 0.1)
    assert coagulated.reachable_well_kT == pytest.approx(coagulated.primary_minimum_kT)
    loose = it.stability_verdict(1e-6, 4.8e-20, 0.03, 1e-3)
    assert loose.reachable_well_kT == pytest.approx(loose.secondary_minimum_kT)
