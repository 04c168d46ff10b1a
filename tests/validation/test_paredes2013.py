"""Paredes, Michels & Bonn, Phys. Rev. Lett. 111, 015701 (2013), Fig. 1: emulsions across
jamming, phi 0.65-0.80.

The digitised file as it is (`data/emulsion_flowcurves_Paredes2013_fig1.csv`)
runs through the protocol and
tolerances of `common.check_emulsion`.
"""

from tests.validation import common


def test_import_fit_and_critical_fraction():
    r = common.check_emulsion("Paredes2013", series=10, rms_max=0.10)
    assert abs(r["phi_c"] - r["spec"].reported_phi_c) <= common.PHI_C_TOLERANCE
