"""Core relation against a bare numpy power on the same 10**6 values (goal: ratio <= 3)."""

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
                note=f"time ratio ours/bare = {ours / bare:.2f}")]
