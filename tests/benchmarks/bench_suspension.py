"""Core relation against a bare numpy power on the same 10**6 values (goal: ratio <= 3)."""

import pathlib
import warnings

import numpy as np

import predictor as pr
from tests.benchmarks.common import median_time, row


def run():
    phi = np.linspace(0.0, 0.6, 1_000_000)
    ours = median_time(lambda: pr.relative_viscosity(phi, model="krieger-dougherty",
                                                     phi_max=0.64, intrinsic_viscosity=2.5))
    bare = median_time(lambda: np.power(1.0 - phi / 0.64, -1.6))
    return [row("relative_viscosity KD, 1e6 values", ours, bare, "bare numpy.power",
                goal="time ratio ours/bare <= 3",
                note=f"time ratio ours/bare = {ours / bare:.2f}"), _max_loading()]


def _max_loading():
    """max_loading of one formulation (the invented slip, whose curve jumps at 100 1/s)."""
    from predictor import flowset

    demo = pathlib.Path(__file__).parents[2] / "data_demo" / "ceramic_slip.loadline.json"
    formulation = pr.read_scenario(demo)
    calls = []
    evaluate = flowset.evaluate

    def counted(*args, **kwargs):
        calls.append(1)
        return evaluate(*args, **kwargs)

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", pr.ValidityWarning)
        flowset.evaluate = counted
        try:
            phi = pr.max_loading(formulation, 0.5, 100.0)
        finally:
            flowset.evaluate = evaluate
        ours = median_time(lambda: pr.max_loading(formulation, 0.5, 100.0), repeat=5)
    return row("max_loading, one formulation (invented slip, 0.5 Pa*s at 100 1/s)", ours,
               note=f"phi = {phi:.4f}; {len(calls)} engine calls at one shear rate")
