"""Suspension relations against their printed equations, by hand calculation.

Each expected value was worked by hand (calculator) from the equation as printed or quoted in
the source named; rows marked "from memory" use an equation recalled, not checked against the
paper.
"""

from tests.published import Case

CASES = [
    Case("suspension.einstein", {"phi": 0.01}, "1.025",
         "Einstein, Ann. Phys. 34 (1911) 591, eta_r = 1 + 2.5 phi (seen via Einstein, "
         "Kolloid-Z. 27 (1920) 137)", "hand calculation", models=("einstein",)),
    Case("suspension.batchelor", {"phi": 0.05, "huggins_coefficient": 6.2}, "1.1405",
         "Batchelor, J. Fluid Mech. 83 (1977) 97, k_H = 6.2", "hand calculation; from memory",
         models=("batchelor",)),
    Case("suspension.krieger_dougherty", {"phi": 0.5, "phi_max": 0.64,
                                          "intrinsic_viscosity": 2.5}, "11.38",
         "Krieger & Dougherty, Trans. Soc. Rheol. 3 (1959) 137, as Eq. (1) of Farr, "
         "arXiv:1306.1442 (seen): (1 - 0.5/0.64)**-1.6 = 11.38", "hand calculation",
         models=("krieger-dougherty",)),
    Case("suspension.krieger_dougherty", {"phi": 0.4, "phi_max": 0.57,
                                          "intrinsic_viscosity": 3.13}, "8.66",
         "Krieger, Adv. Colloid Interface Sci. 3 (1972) 111, low-shear hard-sphere fit "
         "[eta] = 3.13, phi_max = 0.57: (1 - 0.4/0.57)**-1.7841 = 8.66",
         "hand calculation; parameters from memory", models=("krieger-dougherty",)),
    Case("suspension.quemada", {"phi": 0.4, "phi_max": 0.64}, "7.111",
         "Quemada, Rheol. Acta 16 (1977) 82: (1 - 0.4/0.64)**-2 = 7.111 (form restated with "
         "Quemada, Eur. Phys. J. Appl. Phys. 1 (1998) 119)",
         "hand calculation; checked against a secondary restatement", models=("quemada",)),
    Case("suspension.maron_pierce", {"phi": 0.3, "phi_max": 0.6}, "4.0",
         "Maron & Pierce, J. Colloid Sci. 11 (1956) 80: (1 - 0.5)**-2", "hand calculation; "
         "checked against a secondary restatement (open codes)", models=("maron-pierce",)),
    Case("suspension.eilers", {"phi": 0.4, "phi_max": 0.64}, "5.444",
         "Eilers, Kolloid-Z. 97 (1941) 313: [1 + 1.25*0.4/(1 - 0.625)]**2 = (7/3)**2",
         "hand calculation; from memory", models=("eilers",)),
    Case("suspension.mooney", {"phi": 0.3, "crowding_factor": 1.5}, "3.910",
         "Mooney, J. Colloid Sci. 6 (1951) 162: exp(2.5*0.3/(1 - 1.5*0.3)) = exp(1.3636)",
         "hand calculation; from memory",
         models=("mooney",)),
    Case("suspension.chong", {"phi": 0.3, "phi_max": 0.6}, "3.0625",
         "Chong, Christiansen & Baer, J. Appl. Polym. Sci. 15 (1971) 2007: "
         "(1 + 0.75*1)**2", "hand calculation; from memory", models=("chong",)),
    Case("suspension.thomas", {"phi": 0.2}, "1.9775",
         "Thomas, J. Colloid Sci. 20 (1965) 267: 1 + 0.5 + 0.402 + 0.00273 exp(3.32)",
         "hand calculation; checked against a secondary restatement (an open CFD code)",
         models=("thomas",)),
    Case("suspension.frankel_acrivos", {"phi": 0.5, "phi_max": 0.64}, "13.12",
         "Frankel & Acrivos, Chem. Eng. Sci. 22 (1967) 847: (9/8) c/(1 - c), "
         "c = 0.78125**(1/3) = 0.92083", "hand calculation; from memory",
         models=("frankel-acrivos",)),
    Case("suspension.effective_volume_fraction",
         {"phi": 0.4, "layer_thickness_m": 5e-9, "radius_m": 50e-9}, "0.5324",
         "geometry of a shell: 0.4 * 1.1**3 (common practice, no source)", "hand calculation"),
]
