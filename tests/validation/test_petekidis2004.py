"""Petekidis, Vlassopoulos & Pusey, J. Phys.: Condens. Matter 16, S3955 (2004), Fig. 5: hard-
sphere PMMA colloidal glasses, phi 0.586-0.63.

Loadline's flow curve, above the zero-shear packing limit, warns of "a Brownian glass with a
yield stress of order k_B T/a^3". Compared here: the apparent yield stress (Herschel-Bulkley
fit of each series) in units of k_B T/a^3, with a = 366 nm read from the curators' stress
factor (see `common.glass_radius_m`: an inference, since the paper's axis was normalised).
Checks: every series fits (rms at most 0.10 in ln(stress), digitising error plus misfit);
the apparent yield stress rises with phi and lies above k_B T/a^3 at every phi above the
hard-sphere glass transition phi_g = 0.58 (Pusey & van Megen, Nature 320, 340, 1986; from
memory): the glass scale is a floor, as the README states.
"""

import numpy as np

from predictor import shear
from tests.validation import common


def test_glass_yield_stress_against_the_brownian_scale():
    g = common.glass_result()
    assert g["series"] == 5 and not g["fits"].failed
    assert g["rms_ln"] <= 0.10
    assert np.all(np.diff(g["yield_stress_Pa"]) > 0), g["yield_stress_Pa"]
    above = g["phi"] > common.PHI_GLASS
    assert above.all()
    assert np.all(g["reduced"][above] > 1.0)
    # the scale is the one the flow curve uses: k_B T / a^3 at the stated radius
    assert g["scale_Pa"] == float(shear.BOLTZMANN_J_PER_K * common.GLASS_TEMPERATURE_K
                                  / g["radius_m"] ** 3)
    assert 0.3e-6 < g["radius_m"] < 0.45e-6
