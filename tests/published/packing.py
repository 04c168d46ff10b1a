"""Published values for the packing limits (predictor.packing) and size statistics."""

from tests.published import Case

_ONE = {"diameters_m": [1e-6], "fractions": [1.0]}
SEC_MLM = ("checked against a secondary restatement: two independent codes citing Eq. 49 of "
           "Mader, Llewellin & Mueller 2013")
_BERRYMAN = ("Berryman, Phys. Rev. A 27, 1053 (1983): random close packing of equal spheres "
             "0.64 +- 0.02")

CASES = [
    # Every analytic method at a single size gives the equal-sphere random close packing.
    *[Case("packing.max_packing", {**_ONE, "method": m}, "0.64", _BERRYMAN,
           models=(m,))
      for m in ("ouchiyama-tanaka", "desmond-weeks", "compressible-packing", "furnas",
                "simulation-fit")],
    # The simulation, small enough for CI: within 0.01 of 0.64 (O'Hern et al., Phys. Rev. E
    # 68, 011306 (2003) give 0.639 in the large-system limit).
    Case("packing.simulation", {**_ONE, "n_particles": 600, "n_seeds": 1, "seed": 0},
         "0.64", _BERRYMAN + "; O'Hern et al. 2003: 0.639 for large systems",
         note="jamming simulation, 600 spheres, one seed", rel_tol=0.01 / 0.64,
         models=("simulation",)),
    Case("packing.max_packing", {**_ONE, "state": "random-loose"}, "0.550",
         "Jerkins et al., Phys. Rev. Lett. 101, 018301 (2008): random loose packing "
         "0.550 +- 0.001"),
    # Furnas limit for two very different sizes at the optimum coarse share phi1/phi_max.
    Case("packing.furnas", {"diameters_m": [1e-8, 1e-4],
                            "fractions": [1 - 0.64 / 0.8704, 0.64 / 0.8704]},
         "0.8704", "Furnas, Ind. Eng. Chem. 23, 1052 (1931): 1 - (1 - 0.64)**2 = 0.8704 "
         "(geometry, infinite size ratio)", models=("furnas",)),
    Case("packing.phi_max_for_aspect_ratio", {"aspect_ratio": 1.0}, "0.656",
         "Mueller, Llewellin & Mader, Geophys. Res. Lett. 38, L13316 (2011): phi_m1 of "
         "smooth particles", note=SEC_MLM),
    Case("packing.phi_max_for_aspect_ratio", {"aspect_ratio": 1.0, "surface": "rough"},
         "0.55", "Mueller, Llewellin & Mader (2011): phi_m1 of rough particles",
         note=SEC_MLM),
    Case("packing.intrinsic_viscosity_for_aspect_ratio", {"aspect_ratio": 1.0}, "2.5",
         "Einstein, Ann. Phys. 1906/1911: [eta] = 2.5 for spheres"),
]
