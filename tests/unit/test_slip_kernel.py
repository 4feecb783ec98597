"""The compiled slip kernel computes what the numpy path computes, circle by circle.

Both evaluate Bishop's simplified method [pub, Bishop 1955] on the same slices; the numpy
path is the one the validation tests check against published results (ACADS 1(a), Taylor's
chart, the infinite slope, brute-force searches), so agreement to 1e-9 carries those checks
over to the kernel. The walls are random (invented test data); the ACADS slope is
Giam & Donald (1989) problem 1(a) [from memory], referee F = 1.00.
"""

from __future__ import annotations

import numpy as np
import pytest

from screening.engine.slip import kernel, kernel_search, search
from screening.engine.slip.density import FINE, STANDARD
from screening.engine.slip.wall import (
    Factors,
    WallSlipInput,
    wall_grid,
    wall_layers,
    wall_section,
    wall_soils,
)

pytestmark = pytest.mark.skipif(not kernel.available(), reason="numba not installed")


def random_walls(n: int, seed: int) -> WallSlipInput:
    """Invented walls: heights 2-12 m, toe slopes, backslopes, water, clay, steel and sheets."""
    rng = np.random.default_rng(seed)
    h = rng.uniform(2.0, 12.0, n)
    sv = 0.6
    m = int(np.max(np.floor(h / sv)))
    j = np.arange(m)[None, :]
    mask = j < np.floor(h / sv)[:, None]
    level = np.where(mask, sv / 2 + j * sv, 0.0)
    depth = np.clip(h[:, None] - level, 0.0, None)
    return WallSlipInput(
        height_m=h,
        embedment_m=np.maximum(0.6, h / 20),
        length_m=np.round(h * rng.uniform(0.6, 1.1, n), 1),
        backslope_deg=rng.choice([0.0, 14.0, 18.43], n),
        toe_slope_deg=rng.choice([0.0, 0.0, 18.43, 26.57], n),
        toe_slope_height_m=h,
        fill_unit_weight_kn_m3=np.full(n, 20.0),
        fill_cohesion_kpa=np.zeros(n),
        fill_friction_deg=rng.uniform(30.0, 38.0, n),
        retained_unit_weight_kn_m3=np.full(n, 19.0),
        retained_cohesion_kpa=np.zeros(n),
        retained_friction_deg=rng.uniform(26.0, 34.0, n),
        found_unit_weight_kn_m3=np.full(n, 19.0),
        found_cohesion_kpa=rng.uniform(0.0, 10.0, n),
        found_friction_deg=rng.uniform(22.0, 36.0, n),
        found_undrained_kpa=np.full(n, np.nan),
        found_water_depth_m=rng.choice([0.0, 2.0, 20.0], n),
        surcharge_kpa=rng.choice([0.0, 10.0], n),
        live_kpa=rng.choice([0.0, 11.4], n),
        abutment=np.zeros(n, dtype=bool),
        layer_level_m=level,
        layer_mask=mask,
        layer_rupture_kn_m=np.where(mask, rng.uniform(20.0, 200.0, (n, 1)), 0.0),
        layer_pullout_kn_m2=np.where(mask, 20.0 * depth, 0.0),
        tangent=rng.random(n) < 0.5,
        firm_depth_m=np.where(rng.random(n) < 0.3, 3.0, np.inf),
    )


def _both(fn):
    """fn() on the numpy path, then on the compiled kernels (compiled or loaded first)."""
    kernel_search.warm_up()
    assert kernel_search.ready()
    old = kernel.ENABLED
    try:
        kernel.ENABLED = False
        ref = fn()
        kernel.ENABLED = True
        got = fn()
    finally:
        kernel.ENABLED = old
    return ref, got


@pytest.mark.parametrize("undrained", [False, True])
def test_kernel_matches_numpy_circle_by_circle(undrained: bool) -> None:
    """Factor, convergence, family and circle of 300 random circles on each of 40 walls,
    with and without a pseudo-static kh: the same to 1e-9 (the sums run in another order)."""
    inp = random_walls(40, seed=5)
    if undrained:
        inp = WallSlipInput(**{**inp.__dict__, "found_undrained_kpa": np.full(inp.n, 40.0)})
    f = Factors("test")
    sec, soils, layers = wall_section(inp, f), wall_soils(inp, f, undrained), wall_layers(inp)
    grid, b = wall_grid(inp, STANDARD)
    rng = np.random.default_rng(9)
    shape = (inp.n, 300)
    random = np.stack(
        [
            rng.uniform(b.exit_min_m[:, None], 0.0, shape),
            rng.uniform(b.entry_min_m[:, None], b.entry_max_m[:, None], shape),
            rng.uniform(np.radians(5.0), np.radians(150.0), shape),
        ],
        -1,
    )
    params = np.concatenate([grid, random], axis=1)
    kh = np.where(np.arange(inp.n) % 2 == 0, 0.12, 0.0)
    ref, got = _both(lambda: search._evaluate_params(sec, soils, layers, params, STANDARD, kh))
    (f0, ok0, c0, g0), (f1, ok1, c1, g1) = ref, got
    assert np.array_equal(c0, c1)
    assert np.array_equal(ok0, ok1)
    assert np.array_equal(np.isfinite(f0), np.isfinite(f1))
    fin = np.isfinite(f0)
    assert fin.sum() > 1000  # enough circles are valid for the comparison to mean something
    np.testing.assert_allclose(f1[fin], f0[fin], rtol=1e-9)
    valid = c0 != -1
    np.testing.assert_allclose(g1[valid], g0[valid], rtol=1e-9, atol=1e-9)


def test_acads_1a_on_the_kernel() -> None:
    """ACADS 1(a) [Giam & Donald 1989, from memory]: 10 m, 2H:1V, c' 3 kPa, phi' 19.6 deg,
    gamma 20 kN/m3; referee F = 1.00. The kernel's search finds it as the numpy path does."""
    from screening.engine.slip.geometry import SlipLayers, SlipSection, SlipSoils

    gx = np.array([[-200.0, 0.0, 20.0, 320.0]])
    gy = np.array([[0.0, 0.0, 10.0, 10.0]])
    section = SlipSection(gx, gy, np.array([10.0]), np.zeros(1), np.array([-1e3]), np.zeros(1))
    soils = SlipSoils(
        np.full((1, 3), 20.0), np.full((1, 3), 3.0), np.full((1, 3), np.tan(np.radians(19.6)))
    )
    e, n, a = np.meshgrid(
        np.linspace(-12.0, 0.0, 7), np.linspace(8.0, 40.0, 9), np.radians([30.0, 60.0, 90.0]),
        indexing="ij",
    )  # fmt: skip
    grid = np.stack([e.ravel(), n.ravel(), a.ravel()], -1)[None]
    bounds = search.Bounds(np.array([-30.0]), np.zeros(1), np.array([2.0]), np.array([60.0]))

    def run():
        return search.search(section, soils, SlipLayers.none(1), grid, bounds, FINE).least.factor

    ref, got = _both(run)
    assert got[0] == pytest.approx(1.00, abs=0.03)
    assert got[0] == pytest.approx(ref[0], rel=1e-6)


def test_compiled_search_finds_the_numpy_search_circles() -> None:
    """The whole search (grid, compiled pattern search, final circles) on 8 random walls,
    with kh on half of them: the same critical circles and factors as the numpy loop."""
    from screening.engine.slip.check import compound_check

    inp = random_walls(8, seed=13)
    kh = np.where(np.arange(inp.n) % 2 == 0, 0.1, 0.0)
    phi = {"compound": 0.65}
    ref, got = _both(lambda: compound_check(inp, "lrfd", phi, kh=kh))
    for fam in ("compound", "global_"):
        a, b = getattr(ref, fam), getattr(got, fam)
        assert np.array_equal(a.found, b.found)
        np.testing.assert_allclose(b.factor[a.found], a.factor[a.found], rtol=1e-9)
        np.testing.assert_allclose(b.params[a.found], a.params[a.found], rtol=1e-9, atol=1e-12)
