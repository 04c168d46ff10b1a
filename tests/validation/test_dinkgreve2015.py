"""Dinkgreve, Paredes, Michels & Bonn, Phys. Rev. E 92, 012305 (2015), Fig. 2(a): emulsions
with rigid interfaces, phi 0.65-0.80.

Run as a user would: the digitised file as it is
(`data/emulsion_flowcurves_Dinkgreve2015_fig2.csv`), a Herschel-Bulkley fit of every series,
then Mason et al.'s yield stress against phi with phi_c free. Tolerances (our choice,
stated): rms error of the fits at most 0.10 in ln(stress) (digitising error of a few % plus
the misfit of the law); fitted phi_c within 0.05 of the value the paper reports (see
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
    common.check_emulsion("Dinkgreve2015", series=7, rms_max=0.10)
