"""The vectorised bisection finds the shortest passing length on the 0.1 m grid.

Checked against a brute-force scan of every trial length (common practice, no source: the
definition of "shortest L that passes" in METHOD section 7).
"""

from __future__ import annotations

import numpy as np

from screening.engine.arrays import build_arrays
from screening.engine.checks.internal import prepare
from screening.engine.context import build_context
from screening.engine.samples import GEOGRID, GRID, make_corridor, make_segment
from screening.engine.sizing import PASS_TOL, size_length, sizing_cdr
from screening.model import Foundation


def _corridor():
    segs = []
    for i, (h, traffic, q, fam, phi_f) in enumerate(
        [
            (2.0, "approach", 0.0, None, 30.0),
            (3.5, "approach", 10.0, GRID, 30.0),
            (6.0, "parallel", 20.0, GEOGRID, 24.0),
            (8.0, "none", 30.0, None, 22.0),
            (10.0, 15.0, 0.0, GRID, 20.0),
            (9.0, "none", 40.0, None, 12.0),
        ]
    ):
        kw = dict(
            height_start_m=h,
            height_end_m=h,
            traffic=traffic,
            surcharge_kpa=q,
            foundation=Foundation(friction_deg=phi_f),
        )
        if fam is not None:
            kw["reinforcement"] = fam
        segs.append(make_segment(i, **kw))
    return make_corridor(segs)


def test_bisection_equals_brute_force() -> None:
    ctx = build_context(build_arrays(_corridor()))
    s = prepare(ctx)
    got = size_length(ctx, s)
    step = ctx.a.rules.length_step_m
    k = int(np.max(np.round((ctx.geom.max_length_m - ctx.geom.rule_length_m) / step))) + 1
    trials = np.round(ctx.geom.rule_length_m[:, None] + step * np.arange(k)[None, :], 10)
    trials = np.minimum(trials, ctx.geom.max_length_m[:, None])
    ok = np.stack([sizing_cdr(ctx, s, (), trials[:, j]) >= 1 - PASS_TOL for j in range(k)], axis=1)
    any_ok = ok.any(axis=1)
    first = np.where(any_ok, trials[np.arange(ctx.n), np.argmax(ok, axis=1)], ctx.geom.max_length_m)
    np.testing.assert_allclose(got.length_m, first)
    np.testing.assert_array_equal(got.exhausted, ~any_ok)
    assert got.exhausted.any() and (~got.exhausted).any()
    assert (got.length_m > ctx.geom.rule_length_m + 1e-9).any()  # some lengthened by checks
