"""Process relations: pipe flow, transition, friction factors, mixers and levelling.

Sources are named per row. Chhabra & Richardson's worked examples could not be reached; the
rows below are the restated limits and values that could be read (Ryan-Johnson's extremes,
as quoted in Chapter 3 of Chhabra & Richardson; Darby's Bingham example, as restated in open
code citing Darby's text; the Moody chart's smooth-pipe value), plus hand calculations from
each relation's defining equation, labelled as such.
"""

from tests.published import Case

_CR = "Chhabra & Richardson, Non-Newtonian Flow and Applied Rheology, 2nd ed. (2008), ch. 3"

CASES = [
    Case("process.hagen_poiseuille", {"flow_rate_m3_per_s": 1e-3 / 60, "diameter_m": 0.01,
                                      "length_m": 10.0, "viscosity_Pa_s": 1e-3}, "679.061",
         "Hagen-Poiseuille, 128 mu L Q / (pi D^4) (any fluid-mechanics text)",
         "hand calculation"),
    Case("process.buckingham_reiner", {"wall_shear_stress_Pa": 20.0, "yield_stress_Pa": 10.0,
                                       "plastic_viscosity_Pa_s": 0.1}, "70.8333",
         _CR + ": 8V/D = (tau_w/mu_p)(1 - 4x/3 + x^4/3), x = 0.5: 200 * 0.3541667",
         "hand calculation; form from memory, also restated in Darby (2001)"),
    Case("process.herschel_bulkley_pipe", {"wall_shear_stress_Pa": 10.0, "yield_stress_Pa": 0.0,
                                           "consistency_Pa_s": 1.0, "flow_index": 0.5}, "80.0",
         _CR + ": power law 8V/D = (4n/(3n+1)) (tau_w/K)^(1/n) = 0.8 * 100",
         "hand calculation; form from memory"),
    Case("process.herschel_bulkley_pipe", {"wall_shear_stress_Pa": 20.0, "yield_stress_Pa": 10.0,
                                           "consistency_Pa_s": 0.1, "flow_index": 1.0},
         "70.8333", _CR + ": with n = 1 Herschel-Bulkley is Bingham (Buckingham-Reiner row)",
         "hand calculation"),
    Case("process.metzner_reed_reynolds", {"density_kg_per_m3": 1000.0,
                                           "mean_velocity_m_per_s": 2.0, "diameter_m": 0.05,
                                           "consistency_prime_Pa_s": 1e-3,
                                           "flow_index_prime": 1.0}, "100000",
         "Metzner & Reed, AIChE J. 1 (1955) 434: n' = 1 gives rho V D / mu",
         "hand calculation"),
    Case("process.ryan_johnson_critical_reynolds", {"flow_index": 1.0}, "2100",
         _CR + ", Eq. (3.31) (Ryan & Johnson, AIChE J. 5 (1959) 433): 2100 for n = 1",
         "seen in a restatement of Chhabra & Richardson's text", rel_tol=0.005),
    Case("process.ryan_johnson_critical_reynolds", {"flow_index": 0.4}, "2400",
         _CR + ": 'reaching a maximum of about 2400 at n = 0.4'",
         "seen in a restatement of Chhabra & Richardson's text; 'about'", rel_tol=0.01),
    Case("process.ryan_johnson_critical_reynolds", {"flow_index": 0.1}, "1600",
         _CR + ": 'dropping to 1600 at n = 0.1'",
         "seen in a restatement of Chhabra & Richardson's text; two printed digits",
         rel_tol=0.02),
    Case("process.hanks_critical_reynolds", {"hedstrom_number": 0.0}, "2100",
         "Hanks, AIChE J. 9 (1963) 306: He -> 0 gives the Newtonian 2100 (16800/8)",
         "hand calculation; criterion from memory"),
    Case("process.colebrook", {"reynolds": 1e5, "relative_roughness": 0.0}, "0.0045",
         "Moody, Trans. ASME 66 (1944) 671, smooth pipe at Re = 1e5: Darcy 0.018 "
         "(Fanning = Darcy / 4)", "chart reading, from memory"),
    Case("process.dodge_metzner", {"reynolds": 1e4, "flow_index": 1.0}, "0.007727",
         "Dodge & Metzner, AIChE J. 5 (1959) 189: n' = 1 is the smooth-pipe law "
         "1/sqrt(f) = 4 log10(Re sqrt(f)) - 0.4 (Fanning)",
         "hand calculation (solved to 4 digits); form checked against secondary "
         "restatements in open code"),
    Case("process.darby_mun_boger", {"reynolds": 0.254 * 2.3 * 1300 / 0.02,
                                     "hedstrom_number": 0.254**2 * 1300 * 6 / 0.02**2},
         "0.0047625193",
         "Darby, Chemical Engineering Fluid Mechanics, 2nd ed. (2001), Bingham correlation, "
         "as restated in open code citing it: D 0.254 m, V 2.3 m/s, rho 1300, tau_y 6 Pa, "
         "mu_p 0.02 Pa s gives Darcy 0.01905007708620241 (Fanning / 4)",
         "secondary restatement's example"),
    Case("process.metzner_otto", {"rotational_speed_1_per_s": 2.0, "impeller_constant": 11.5},
         "23.0", "Metzner & Otto, AIChE J. 3 (1957) 3: k_s N", "hand calculation"),
    Case("process.laminar_impeller_power", {"viscosity_Pa_s": 10.0,
                                            "rotational_speed_1_per_s": 1.0,
                                            "impeller_diameter_m": 0.2,
                                            "power_constant": 70.0}, "5.6",
         "Rushton, Costich & Everett, Chem. Eng. Prog. 46 (1950) 395: laminar Po = K_p/Re, "
         "P = K_p eta N^2 D^3", "hand calculation; form from memory"),
    Case("process.elson_cavern_diameter", {"impeller_diameter_m": 0.1,
                                           "rotational_speed_1_per_s": 5.0,
                                           "density_kg_per_m3": 1000.0, "yield_stress_Pa": 10.0,
                                           "power_number": 5.0}, "0.2526",
         "Elson, Cheesman & Nienow, Chem. Eng. Sci. 41 (1986) 2555: (D_c/D)^3 = "
         "(4 Po/pi^3)(rho N^2 D^2/tau_y)", "hand calculation; from memory"),
    Case("process.orchard_levelling_time", {"viscosity_Pa_s": 1.0, "wavelength_m": 1e-3,
                                            "thickness_m": 100e-6,
                                            "surface_tension_N_per_m": 0.035}, "0.05500",
         "Orchard, Appl. Sci. Res. A 11 (1962) 451: t = 3 eta lambda^4/(16 pi^4 sigma h^3)",
         "hand calculation; from memory"),
]
