"""Time ``screening.engine.screen`` on a generated 10,000-segment corridor (target <= 1 s).

Run: ``python bench/bench_screen.py [--segments N] [--repeat R]``. Prints the time of each
stage (arrays, full screen) as the best of R runs, on one core (BLAS threads pinned to 1).
The corridor is generated from a fixed seed: heights 1-15 m, every reinforcement family,
fills, traffic classes, surcharges, backslopes, toe slopes, drained and undrained
foundations, so every branch of the engine runs.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import time  # noqa: E402
from dataclasses import replace  # noqa: E402

import numpy as np  # noqa: E402

from screening.engine import screen, screen_iter  # noqa: E402
from screening.engine.arrays import build_arrays  # noqa: E402
from screening.engine.samples import (  # noqa: E402
    FOUNDATION,
    GEOGRID,
    GRID,
    LRFD,
    SELECT_FILL,
    STRIP,
    make_corridor,
    make_segment,
)
from screening.model import Fill, Foundation  # noqa: E402


def generated_corridor(n: int, seed: int = 20261201):
    rng = np.random.default_rng(seed)
    families = (STRIP, GRID, GEOGRID)
    fills = (
        SELECT_FILL,
        Fill(unit_weight_kn_m3=19.0, friction_deg=32.0, uniformity_coefficient=3.0),
        Fill(unit_weight_kn_m3=21.0, friction_deg=36.0, uniformity_coefficient=15.0),
    )
    founds = (
        FOUNDATION,
        Foundation(friction_deg=26.0, cohesion_kpa=5.0, water_depth_m=1.0),
        Foundation(friction_deg=28.0, undrained_strength_kpa=60.0, water_depth_m=0.0),
    )
    traffic = ("none", "parallel", "approach", 12.0)
    h0 = rng.uniform(1.0, 15.0, n)
    h1 = np.clip(h0 + rng.uniform(-1.0, 1.0, n), 0.5, None)
    fam = rng.integers(0, 3, n)
    segs = [
        make_segment(
            i,
            height_start_m=float(h0[i]),
            height_end_m=float(h1[i]),
            reinforcement=families[fam[i]],
            spacing_m=families[fam[i]].spacing_m,
            fill=fills[i % 3],
            foundation=founds[(i // 3) % 3],
            traffic=traffic[i % 4],
            surcharge_kpa=float(rng.choice([0.0, 0.0, 10.0, 20.0])),
            backslope_deg=float(rng.choice([0.0, 0.0, 0.0, 10.0, 18.43])),
            toe_slope_deg=float(rng.choice([0.0, 0.0, 18.43, 26.57])),
            structure="abutment" if i % 10 == 0 else "wall",
        )
        for i in range(n)
    ]
    return make_corridor(segs, LRFD)


def best_of(repeat: int, fn) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--segments", type=int, default=10_000)
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument(
        "--plugins",
        type=int,
        default=0,
        metavar="N",
        help="also time a screen of the first N segments with the plug-in checks installed "
        "(compound, seismic); they are costly, so N is kept small",
    )
    args = parser.parse_args()
    corridor = generated_corridor(args.segments)
    screen(replace(corridor, segments=corridor.segments[:50]), extra_checks=())  # warm imports

    t_arrays, _ = best_of(args.repeat, lambda: build_arrays(corridor))
    t_screen, result = best_of(args.repeat, lambda: screen(corridor, extra_checks=()))

    def drive():
        gen = screen_iter(corridor, chunk_size=500, extra_checks=())
        while True:
            try:
                next(gen)
            except StopIteration as stop:
                return stop.value

    t_iter, _ = best_of(max(1, args.repeat // 2), drive)
    counts = result.counts()
    print(f"segments            {args.segments}")
    print(f"layers (max)        {result.layers.mask.shape[1]}")
    print(f"build_arrays        {t_arrays * 1000:8.1f} ms")
    print(f"screen (core)       {t_screen * 1000:8.1f} ms   target <= 1000 ms")
    print(f"screen_iter (500)   {t_iter * 1000:8.1f} ms")
    print(f"per segment         {t_screen / args.segments * 1e6:8.1f} us")
    print(f"verdicts            {counts}")
    if args.plugins:
        from screening.engine import default_extra_checks

        plug = default_extra_checks()
        part = replace(corridor, segments=corridor.segments[: args.plugins])
        t_plug, r_plug = best_of(1, lambda: screen(part, extra_checks=plug))
        names = ", ".join(c.name for c in plug) or "none installed"
        print(f"with plug-ins       {t_plug * 1000:8.1f} ms for {args.plugins} segments ({names})")
        print(f"verdicts            {r_plug.counts()}")


if __name__ == "__main__":
    main()
