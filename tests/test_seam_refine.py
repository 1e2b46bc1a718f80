"""The refinement of each seam's maxima measures only new points and stops only on flat measures.

The reference is the plain nested grid search (every grid point of every round
measured, no early stop; Press et al., Numerical Recipes, 3rd ed., sec. 10.2
for bracketing a maximum), written out here slowly for one seam and one measure.
"""

from __future__ import annotations

import numpy as np
from numpy.testing import assert_allclose

from geometry.seams.batch import ZOOM_POINTS, ZOOM_ROUNDS, evaluate_unique, even_samples, refine_maxima_batch

KEYS = ("wave", "flat", "bump")


def _measures(rng, n_seams):
    phase = rng.uniform(0.0, 2 * np.pi, (n_seams, 3))
    freq = rng.uniform(1.0, 9.0, (n_seams, 3))

    def evaluate(seam, tau):
        seam, tau = np.asarray(seam), np.asarray(tau)
        wave = np.sin(freq[seam, 0] * tau + phase[seam, 0]) + 0.3 * np.sin(freq[seam, 1] * tau + phase[seam, 1])
        bump = np.exp(-(((tau - 0.37) * freq[seam, 2]) ** 2))
        return {"wave": wave, "flat": np.full(tau.shape, 0.25), "bump": bump}

    return evaluate


def _plain(evaluate, seam_id, tau, values):
    """Every grid point of every round, one seam, one measure: (tau, value)."""
    top = values.size - 1 - int(np.argmax(values[::-1]))  # the last of equal samples, as the batch takes
    lo, hi = tau[max(top - 1, 0)], tau[min(top + 1, tau.size - 1)]
    b_tau, b_val = tau[top], values[top]
    for _ in range(ZOOM_ROUNDS):
        grid = np.linspace(lo, hi, ZOOM_POINTS)
        rows = evaluate(np.full(grid.size, seam_id), grid)
        j = int(np.argmax(rows))
        if rows[j] > b_val:
            b_tau, b_val = grid[j], rows[j]
        step = (hi - lo) / (ZOOM_POINTS - 1)
        lo, hi = max(b_tau - step, lo), min(b_tau + step, hi)
    return b_tau, b_val


def test_refinement_equals_the_plain_grid_search_with_fewer_points():
    rng = np.random.default_rng(7)
    n_seams = 12
    measures = _measures(rng, n_seams)
    counts = rng.integers(5, 40, n_seams)
    seam, tau, start = even_samples(counts)
    values = measures(seam, tau)
    asked = []

    def evaluate(s, t):
        asked.append(len(t))
        return measures(s, t)

    tau_best, best = refine_maxima_batch(evaluate, seam, tau, start, values, KEYS)
    for j in range(n_seams):
        rows = slice(start[j], start[j] + counts[j])
        for k, key in enumerate(KEYS):
            ref_tau, ref_val = _plain(lambda s, t, key=key: measures(s, t)[key], j, tau[rows], values[key][rows])
            assert_allclose(best[j, k], ref_val, rtol=1e-13, atol=1e-15)
            assert abs(tau_best[j, k] - ref_tau) < 1e-9
    # The plain search measures 9 points per round, per seam and measure, for 10 rounds.
    assert sum(asked) < 0.5 * n_seams * len(KEYS) * ZOOM_POINTS * ZOOM_ROUNDS
    # A flat measure keeps its first sample and stops after one round.
    assert_allclose(best[:, 1], 0.25, rtol=0, atol=0)


def test_evaluate_unique_measures_each_pair_once():
    seen = []

    def evaluate(seam, tau):
        seen.append(seam.size)
        return {"x": seam * 10.0 + tau, "xyz": np.stack([tau, tau, seam], axis=1)}

    seam = np.array([0, 1, 0, 1, 2])
    tau = np.array([0.5, 0.5, 0.5, 0.25, 0.5])
    out = evaluate_unique(evaluate, seam, tau)
    assert seen == [4]
    assert_allclose(out["x"], seam * 10.0 + tau)
    assert out["xyz"].shape == (5, 3)
