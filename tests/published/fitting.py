"""Inverse questions: hand calculations from the published relations, solved for phi."""

from tests.published import Case

CASES = [
    Case("design.loading_for_relative_viscosity",
         {"model": "quemada", "relative_viscosity": 4.0, "phi_max": 0.64}, "0.320",
         "Quemada, Rheol. Acta 16, 82, 1977: (1 - phi/phi_m)^-2 = 4 -> phi = phi_m / 2",
         note="hand calculation", models=("quemada",)),
    Case("design.loading_for_relative_viscosity",
         {"model": "krieger-dougherty", "relative_viscosity": 100.0, "phi_max": 0.64,
          "intrinsic_viscosity": 2.5}, "0.604010",
         "Krieger & Dougherty, Trans. Soc. Rheol. 3, 137, 1959 (Eq. 1 of Farr 2014)",
         note="hand calculation: 0.64 (1 - 100^(-1/1.6)) = 0.64 (1 - 10^-1.25)",
         models=("krieger-dougherty",)),
    Case("design.loading_for_relative_viscosity",
         {"model": "einstein", "relative_viscosity": 1.05}, "0.0200",
         "Einstein, Ann. Phys. 1906/1911: eta_r = 1 + 2.5 phi", note="hand calculation",
         models=("einstein",)),
    Case("design.max_loading_many",
         {"model": "maron-pierce", "viscosity_limit_Pa_s": 0.016,
          "liquid_viscosity_Pa_s": 1e-3, "phi_max": 0.64}, "0.480",
         "Maron & Pierce, J. Colloid Sci. 11, 80, 1956: (1 - phi/phi_m)^-2 = 16",
         note="hand calculation: phi = 0.64 * 3/4", models=("maron-pierce",)),
]
