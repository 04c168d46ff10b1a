"""Implicit emulsion relations on 10**6 (phi, viscosity ratio) pairs against a per-point loop.

Goal (issue 5): the vectorised Phan-Thien & Pham solve at least 100x faster per point than a
per-point scipy root-finding loop (brentq on the same equation, bracketed by the bubble and
rigid-sphere limits), measured on a sample of the same pairs. The compiled kernel is warmed
up once before timing, so compilation is not counted (it is cached on disk after the first
run).
"""

import numpy as np
from scipy.optimize import brentq

from predictor import emulsion
from tests.benchmarks.common import median_time, row

N = 1_000_000
SAMPLE = 2_000


def _pairs(n, seed=0):
    rng = np.random.default_rng(seed)
    return rng.uniform(0.0, 0.95, n), 10.0 ** rng.uniform(-3.0, 3.0, n)


def _brentq_loop(phi, lam):
    out = np.empty_like(phi)
    for i, (p, k) in enumerate(zip(phi, lam, strict=True)):
        right = (1.0 - p) ** -2.5

        def residual(eta, k=k, right=right):
            return eta * ((2.0 * eta + 5.0 * k) / (2.0 + 5.0 * k)) ** 1.5 - right

        out[i] = brentq(residual, 1.0 / (1.0 - p), right * (1 + 1e-12) + 1e-12,
                        xtol=1e-14, rtol=1e-13)
    return out


def run():
    phi, lam = _pairs(N)
    emulsion.phan_thien_pham(phi[:emulsion.NUMBA_MIN_SIZE], lam[:emulsion.NUMBA_MIN_SIZE])
    ours = median_time(lambda: emulsion.phan_thien_pham(phi, lam), repeat=5)
    sample_phi, sample_lam = phi[:SAMPLE], lam[:SAMPLE]
    loop = median_time(lambda: _brentq_loop(sample_phi, sample_lam), repeat=3)
    per_point_ours, per_point_loop = ours / N, loop / SAMPLE
    agree = np.max(np.abs(_brentq_loop(sample_phi, sample_lam)
                          / emulsion.phan_thien_pham(sample_phi, sample_lam) - 1.0))
    pal = median_time(lambda: emulsion.pal(phi * 0.6 / 0.95, lam, 0.64, 2), repeat=5)
    small_phi, small_lam = phi[:SAMPLE], lam[:SAMPLE]
    small = median_time(lambda: emulsion.phan_thien_pham(small_phi, small_lam), repeat=7)
    return [
        row("phan_thien_pham, 1e6 (phi, ratio) pairs", ours, per_point_loop * N,
            f"scipy brentq loop, {SAMPLE} points, scaled to 1e6",
            goal=">= 100x faster per point",
            note=f"{per_point_ours * 1e9:.0f} ns/pt vs {per_point_loop * 1e6:.1f} us/pt; "
                 f"max rel. diff {agree:.1e}"),
        row("pal (variant 2), 1e6 pairs", pal, note="same solver, packing limit 0.64"),
        row(f"phan_thien_pham, {SAMPLE} pairs (numpy path)", small, per_point_loop * SAMPLE,
            f"scipy brentq loop, {SAMPLE} points", note="below NUMBA_MIN_SIZE: no compiling"),
    ]
