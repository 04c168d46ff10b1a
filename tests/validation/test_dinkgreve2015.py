"""Dinkgreve, Paredes, Michels & Bonn, Phys. Rev. E 92, 012305 (2015), Fig. 2(a): emulsions
with rigid interfaces, phi 0.65-0.80.

The digitised file as it is (`data/emulsion_flowcurves_Dinkgreve2015_fig2.csv`)
runs through the protocol and
tolerances of `common.check_emulsion`.
"""

from tests.validation import common


def test_import_fit_and_critical_fraction():
    r = common.check_emulsion("Dinkgreve2015", series=7, rms_max=0.10)
    assert abs(r["phi_c"] - r["spec"].reported_phi_c) <= common.PHI_C_TOLERANCE
