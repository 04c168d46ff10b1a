"""Thixotropy: the limits of Moore's kinetics, hand calculations from its equations.

Moore, Trans. Br. Ceram. Soc. 58 (1959) 470: d lambda/dt = a (1 - lambda) - b gammadot
lambda, eta = eta_inf + c lambda (form checked against a secondary restatement: the
generalised form restated from Barnes, J. Non-Newtonian Fluid Mech. 70 (1997) 1).
"""

from tests.published import Case

_MOORE = "Moore, Trans. Br. Ceram. Soc. 58 (1959) 470, equilibrium of its kinetic equation"

CASES = [
    # At rest the structure is full: eta_0 = eta_inf + c = 0.1 + 10 = 10.1 Pa s.
    Case("thixotropy.moore", {"shear_rate_1_per_s": 0.0, "infinite_shear_viscosity_Pa_s": 0.1,
                              "structure_viscosity_Pa_s": 10.0, "build_up_rate_1_per_s": 0.05,
                              "breakdown_coefficient": 0.05},
         "10.1", _MOORE + ": eta_0 = eta_inf + c",
         "hand calculation; form checked against a secondary restatement",
         models=("moore",)),
    # gammadot = a/b: lambda_e = 1/2, eta = 0.1 + 5 = 5.1 Pa s.
    Case("thixotropy.moore", {"shear_rate_1_per_s": 1.0, "infinite_shear_viscosity_Pa_s": 0.1,
                              "structure_viscosity_Pa_s": 10.0, "build_up_rate_1_per_s": 0.05,
                              "breakdown_coefficient": 0.05},
         "5.1", _MOORE + ": lambda_e = a/(a + b gammadot)",
         "hand calculation; form checked against a secondary restatement",
         models=("moore",)),
]
