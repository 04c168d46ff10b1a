"""Settling: hand calculations from the published equations and published constants."""

from tests.published import Case

CASES = [
    Case("stability.stokes_velocity",
         {"diameter_m": 10e-6, "particle_density_kg_per_m3": 2650.0,
          "liquid_density_kg_per_m3": 1000.0, "viscosity_Pa_s": 1e-3, "gravity_m_per_s2": 9.81},
         "8.99250e-05",
         "Stokes, Trans. Camb. Phil. Soc. 9, 8, 1851: v = drho g d^2 / (18 eta)",
         note="hand calculation: 1650 * 9.81 * 1e-10 / 0.018"),
    Case("stability.richardson_zaki_exponent", {"reynolds": 0.05}, "4.65",
         "Richardson & Zaki, Trans. Inst. Chem. Eng. 32, 35, 1954: Stokes-regime exponent",
         note="seen in the source"),
    Case("stability.richardson_zaki", {"phi": 0.2, "exponent": 4.65}, "0.354298",
         "Richardson & Zaki 1954: v/v0 = (1 - phi)^n",
         note="hand calculation: 0.8^4.65 = exp(4.65 ln 0.8)"),
    Case("stability.beris_yield_parameter",
         {"yield_stress_Pa": 1.0, "diameter_m": 100e-6, "particle_density_kg_per_m3": 2650.0,
          "liquid_density_kg_per_m3": 1000.0, "gravity_m_per_s2": 9.81},
         "1.85340",
         "Beris et al., J. Fluid Mech. 158, 219, 1985: Y = 3 tau_y / (2 R drho g)",
         note="definition of Y from memory; hand calculation 3 / (100e-6 * 1650 * 9.81)"),
    Case("stability.clear_layer_time", {"height_m": 1e-3, "velocity_m_per_s": 2.5e-7},
         "4000.0", "Kynch, Trans. Faraday Soc. 48, 166, 1952: interface falls at v",
         note="hand calculation; citation from memory"),
]
