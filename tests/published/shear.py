"""Shear-rate relations: hand calculations from the defining equations as quoted.

Peclet number and reduced stress follow their definitions (Bergenholtz, Brady & Vicic 2002;
Krieger 1972); the Krieger interpolation and the Wyart-Cates form of phi_J are recalled from
memory (not checked against the papers), so those rows say so. The fraction of frictional
contacts f = 1 - exp(-sigma/sigma*) is Loadline's choice between the two forms found in public
code (see `shear.wyart_cates_jamming_fraction`); the last rows pin that choice.
"""

from tests.published import Case

CASES = [
    Case("shear.peclet_number", {"shear_rate_1_per_s": 10.0, "radius_m": 1e-6,
                                 "viscosity_Pa_s": 1e-3, "temperature_K": 300.0}, "45.51",
         "Bergenholtz, Brady & Vicic, J. Fluid Mech. 456 (2002) 239: Pe = 6 pi eta a^3 "
         "gammadot/(k_B T) = 6 pi 1e-3 1e-18 10 / (1.380649e-23 300)", "hand calculation"),
    Case("shear.reduced_stress", {"shear_stress_Pa": 2.0, "radius_m": 1e-6,
                                  "temperature_K": 300.0}, "482.86",
         "Krieger, Adv. Colloid Interface Sci. 3 (1972) 111: sigma a^3/(k_B T)",
         "hand calculation"),
    Case("shear.krieger_shear_thinning", {"reduced_stress": 0.3,
                                          "zero_shear_relative_viscosity": 50.0,
                                          "high_shear_relative_viscosity": 10.0,
                                          "critical_reduced_stress": 0.1}, "20.0",
         "Krieger (1972): 10 + 40/(1 + 3)", "hand calculation; form from memory"),
    Case("shear.wyart_cates", {"phi": 0.55, "shear_stress_Pa": 1e6, "onset_stress_Pa": 1.0,
                               "phi_frictionless": 0.64, "phi_frictional": 0.58}, "373.78",
         "Wyart & Cates, Phys. Rev. Lett. 112 (2014) 098302, frictional limit "
         "(1 - 0.55/0.58)**-2", "hand calculation; from memory"),
    Case("shear.wyart_cates_jamming_fraction", {"shear_stress_Pa": 2.0,
                                                "onset_stress_Pa": 1.0,
                                                "phi_frictionless": 0.64,
                                                "phi_frictional": 0.58}, "0.58812",
         "Wyart & Cates (2014): f = 1 - e**-2 = 0.864665; 0.64 - 0.06 f",
         "hand calculation; from memory"),
    # The choice of f: at sigma = sigma*, 1 - 1/e = 0.632121 of the contacts are frictional
    # (the other form, exp(-sigma*/sigma), would give 1/e = 0.367879: phi_J = 0.617927).
    Case("shear.wyart_cates_jamming_fraction", {"shear_stress_Pa": 1.0,
                                                "onset_stress_Pa": 1.0,
                                                "phi_frictionless": 0.64,
                                                "phi_frictional": 0.58}, "0.602073",
         "Loadline's choice f = 1 - exp(-sigma/sigma*): 0.64 - 0.06 (1 - 1/e)",
         "hand calculation"),
    # ... and at sigma = sigma*/10 f is nearly linear, 1 - e**-0.1 = 0.0951626 (the other
    # form would give e**-10 = 4.5e-5, phi_J = 0.639997).
    Case("shear.wyart_cates_jamming_fraction", {"shear_stress_Pa": 0.1,
                                                "onset_stress_Pa": 1.0,
                                                "phi_frictionless": 0.64,
                                                "phi_frictional": 0.58}, "0.634290",
         "Loadline's choice f = 1 - exp(-sigma/sigma*): 0.64 - 0.06 * 0.0951626",
         "hand calculation"),
]
