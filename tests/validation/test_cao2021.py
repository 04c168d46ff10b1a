"""Cao, Liao, Breedveld & Weeks, arXiv:2011.11806 (Soft Matter 2021), Fig. 2(a) and 2(b): two
droplet sizes across the glass and jamming transitions.

The digitised file as it is (`data/emulsion_flowcurves_Cao2021_fig2a.csv, ..._fig2b.csv`)
runs through the protocol and
tolerances of `common.check_emulsion`.
"""

from tests.validation import common


def test_import_fit_and_critical_fraction():
    r = common.check_emulsion("Cao2021a", series=12, rms_max=0.10)
    assert abs(r["phi_c"] - r["spec"].reported_phi_c) <= common.PHI_C_TOLERANCE


def test_second_panel():
    r = common.check_emulsion("Cao2021b", series=10, rms_max=0.10)
    assert abs(r["phi_c"] - r["spec"].reported_phi_c) <= common.PHI_C_TOLERANCE
