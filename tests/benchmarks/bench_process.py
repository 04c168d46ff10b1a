"""Process checks: a 200-point system curve of the demo paint (goal: under 50 ms, the
formulation's flow-curve prediction included).

Ours: `process.pipe_flow_of` on 200 flow rates (one `predict` on the table of shear rates,
then the vectorised Rabinowitsch-Mooney solve, transition and turbulent correlations). The
baseline solves the laminar wall stress of each flow rate one at a time with scipy
(brentq on the wall stress, quad for the integral) on the same tabulated flow curve, the
plain way to write it; it is timed on every 10th flow rate and scaled to 200 (it takes
seconds per point). The pressure drops are compared at those laminar points.
"""

import pathlib
import warnings

import numpy as np
from scipy.integrate import quad
from scipy.optimize import brentq

from predictor import process
from predictor.scenario import read_scenario
from tests.benchmarks.common import median_time, row

DEMO = pathlib.Path(__file__).resolve().parents[2] / "data_demo" / "mineral_coating.loadline.json"
FLOWS = np.geomspace(1e-6, 1e-2, 200)        # 0.06 to 600 L/min
D, L = 0.025, 10.0


SUBSET = slice(None, None, 10)


def _per_point(curve):
    flows = FLOWS[SUBSET]
    out = np.empty(flows.size)
    for i, q in enumerate(flows):
        target = 32 * q / (np.pi * D**3)

        def gap(tau_w, target=target):
            integral = quad(lambda t: t**2 * float(curve.rate(t)), curve.yield_stress_Pa,
                            tau_w, limit=200)[0]
            return 4 / tau_w**3 * integral - target
        out[i] = 4 * L / D * brentq(gap, 1e-6, 1e7, rtol=1e-12)
    return out


def run():
    form = read_scenario(DEMO)
    process.pipe_flow_of(form, FLOWS, D, L)
    ours = median_time(lambda: process.pipe_flow_of(form, FLOWS, D, L), repeat=9)
    curve, _ = process.formulation_curve(form)
    flow = process.pipe_flow_of(form, FLOWS, D, L)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")           # quad's accuracy notes on the kinked table
        base = median_time(lambda: _per_point(curve), repeat=1) * 10
        lam = flow.regime[SUBSET] == "laminar"
        err = float(np.max(np.abs(flow.pressure_drop_Pa[SUBSET][lam]
                                  / _per_point(curve)[lam] - 1)))
    return [row("pipe_flow_of: 200-point system curve, demo paint", ours, base,
                "scipy brentq + quad per flow rate (laminar solve only)", goal="< 50 ms",
                note=f"includes predict; laminar points agree to {err:.1e}")]
