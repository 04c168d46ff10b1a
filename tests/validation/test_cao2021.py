"""Cao, Liao, Breedveld & Weeks, arXiv:2011.11806 (Soft Matter 2021), Fig. 2(a) and 2(b): two
droplet sizes across the glass and jamming transitions.

Run as a user would: the digitised file as it is
(`data/emulsion_flowcurves_Cao2021_fig2a.csv, ..._fig2b.csv`), a Herschel-Bulkley fit of
every series, then Mason et al.'s yield stress against phi with phi_c free. Tolerances (our
choice, stated): rms error of the fits at most 0.10 in ln(stress) (digitising error of a few
% plus the misfit of the law); fitted phi_c within 0.05 of the value the paper reports (see
`common.EMULSIONS`); shear thinning (n < 1) in every series more than 0.02 above the fitted
phi_c (common practice, no source).
Herschel-Bulkley beats a power law (no yield stress) by more than 2 in AIC in every
series above phi_c (Burnham & Anderson's rule of thumb, from memory).
Predicted (not fitted) with Loadline's jammed-emulsion flow curve from the fitted Laplace
pressure and phi_c (continuous phase 1 mPa*s assumed): the median of measured / predicted
stress above phi_c within a factor 3 (screening estimate; our choice).
"""

from tests.validation import common


def test_import_fit_and_critical_fraction():
    common.check_emulsion("Cao2021a", series=12, rms_max=0.10)


def test_second_panel():
    common.check_emulsion("Cao2021b", series=10, rms_max=0.10)
