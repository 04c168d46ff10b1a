"""Liquids: IAPWS 2008 check values, handbook glycerol-water values and the liquid laws.

IAPWS rows are the release's own check values (Table 4 of IAPWS R12-08, no critical
enhancement, seen). Glycerol-water rows are handbook values recalled from memory. The
liquid-law rows are hand calculations from each law's defining equation as written in the
source named (the worked examples of Chhabra & Richardson could not be reached, so none is
used here).
"""

from tests.published import Case

_R12 = "IAPWS R12-08 (2008), Table 4; Huber et al., J. Phys. Chem. Ref. Data 38 (2009) 101"
_CR = "Chhabra & Richardson, Non-Newtonian Flow and Applied Rheology, 2nd ed. (2008)"

CASES = [
    Case("liquids.iapws_2008_viscosity", {"temperature_K": 298.15, "density_kg_per_m3": 998.0},
         "889.735100e-6", _R12 + ": 889.735100 uPa s", "seen"),
    Case("liquids.iapws_2008_viscosity", {"temperature_K": 298.15, "density_kg_per_m3": 1200.0},
         "1437.649467e-6", _R12 + ": 1437.649467 uPa s", "seen"),
    Case("liquids.iapws_2008_viscosity", {"temperature_K": 373.15, "density_kg_per_m3": 1000.0},
         "307.883622e-6", _R12 + ": 307.883622 uPa s", "seen"),
    Case("liquids.water_viscosity", {"temperature_K": 293.15}, "1.001596e-3",
         "IAPWS R12-08 (2008), liquid water at 0.101325 MPa and 20 degC: 1.001596 mPa s",
         "seen; tolerance 5e-6 relative because the density comes from Kell's 1975 "
         "correlation (about 3 ppm from IAPWS-95 at 20 degC), not from IAPWS-95",
         rel_tol=5e-6),
    Case("liquids.glycerol_water_viscosity",
         {"glycerol_mass_fraction": 0.5, "temperature_K": 293.15}, "6.00e-3",
         "CRC Handbook of Chemistry and Physics, aqueous glycerol at 20 degC (Segur & "
         "Oberstar, Ind. Eng. Chem. 43 (1951) 2117): 6.00 mPa s",
         "from memory; Cheng (2008) quotes a few % accuracy, so 2 %", rel_tol=0.02),
    Case("liquids.glycerol_water_viscosity",
         {"glycerol_mass_fraction": 0.8, "temperature_K": 293.15}, "60.1e-3",
         "CRC Handbook, aqueous glycerol at 20 degC (Segur & Oberstar 1951): 60.1 mPa s",
         "from memory; 2 %", rel_tol=0.02),
    Case("liquids.glycerol_water_viscosity",
         {"glycerol_mass_fraction": 1.0, "temperature_K": 293.15}, "1412e-3",
         "CRC Handbook, glycerol at 20 degC (Segur & Oberstar 1951): 1412 mPa s",
         "from memory; 1 %", rel_tol=0.01),
    Case("liquids.newtonian", {"shear_rate_1_per_s": 7.0, "viscosity_Pa_s": 0.25}, "0.25",
         "Newton's law, " + _CR + ", ch. 1", "hand calculation", models=("newtonian",)),
    Case("liquids.power_law", {"shear_rate_1_per_s": 100.0, "consistency_Pa_s": 2.0,
                               "flow_index": 0.5}, "0.2",
         _CR + ", power law eta = K gammadot**(n-1): 2 * 100**-0.5", "hand calculation",
         models=("power-law",)),
    Case("liquids.carreau_yasuda", {"shear_rate_1_per_s": 10.0,
                                    "zero_shear_viscosity_Pa_s": 5.0,
                                    "infinite_shear_viscosity_Pa_s": 0.01,
                                    "time_constant_s": 0.2, "flow_index": 0.4,
                                    "yasuda_exponent": 2.0}, "3.0890",
         "Yasuda, Armstrong & Cohen, Rheol. Acta 20 (1981) 163 (law as in " + _CR + "): "
         "0.01 + 4.99 * (1 + 2**2)**(-0.3) = 3.0890", "hand calculation",
         models=("carreau-yasuda",)),
    Case("liquids.cross", {"shear_rate_1_per_s": 100.0, "zero_shear_viscosity_Pa_s": 1.0,
                           "infinite_shear_viscosity_Pa_s": 0.0, "time_constant_s": 0.1,
                           "cross_exponent": 0.5}, "0.24025",
         "Cross, J. Colloid Sci. 20 (1965) 417 (law as in " + _CR + "): "
         "1/(1 + 10**0.5) = 0.24025", "hand calculation", models=("cross",)),
    Case("liquids.bingham", {"shear_rate_1_per_s": 50.0, "yield_stress_Pa": 10.0,
                             "plastic_viscosity_Pa_s": 0.1}, "0.3",
         "Bingham (1922), as in " + _CR + ": (10 + 0.1*50)/50", "hand calculation",
         models=("bingham",)),
    Case("liquids.herschel_bulkley", {"shear_rate_1_per_s": 9.0, "yield_stress_Pa": 3.0,
                                      "consistency_Pa_s": 2.0, "flow_index": 0.5}, "1.0",
         "Herschel & Bulkley, Kolloid-Z. 39 (1926) 291, as in " + _CR + ": "
         "(3 + 2*9**0.5)/9", "hand calculation", models=("herschel-bulkley",)),
    Case("liquids.casson", {"shear_rate_1_per_s": 4.0, "yield_stress_Pa": 16.0,
                            "casson_viscosity_Pa_s": 1.0}, "9.0",
         "Casson (1959), as in " + _CR + ": (sqrt(16/4) + 1)**2", "hand calculation",
         models=("casson",)),
]
