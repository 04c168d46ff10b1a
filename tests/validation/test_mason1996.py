"""Mason, Bibette & Weitz, J. Colloid Interface Sci. 179, 439 (1996), Fig. 5: monodisperse
emulsions, phi 0.55-0.65.

The digitised file as it is (`data/emulsion_flowcurves_Mason1996_fig5.csv`)
runs through the protocol and
tolerances of `common.check_emulsion`.
"""

from tests.validation import common


def test_import_fit_and_critical_fraction():
    r = common.check_emulsion("Mason1996", series=6, rms_max=0.10)
    assert abs(r["phi_c"] - r["spec"].reported_phi_c) <= common.PHI_C_TOLERANCE
