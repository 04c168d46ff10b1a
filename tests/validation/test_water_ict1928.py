"""Water viscosity table (ICT1928) against `predictor.water_viscosity` and the iapws package.

Tolerance per point: 1 % (IAPWS R12-08's uncertainty for the liquid near 0.1 MPa, from
memory, not checked) or the table's printed precision (half a unit in its last digit),
whichever is larger. Loadline against the iapws package (IAPWS-95 density and IAPWS 2008
viscosity): 0.1 %.
"""

import numpy as np

from tests.validation import common


def test_table_against_iapws():
    w = common.water_result("ICT1928")
    assert np.all(np.abs(w["deviation"]) <= w["tolerance"]), w["deviation"]
    assert w["ours_vs_iapws"] < 1e-3
