"""Benchmark of the corridor tools: profile split, quantities, sensitivity, Monte Carlo, report.

Run from the repository root:  python bench/bench_corridor_tools.py [--points 20000]

Inputs are invented for the benchmark (a seeded random road profile; the shipped demo
corridor); they are not a design case. Prints one line per tool with its wall-clock time.
"""

from __future__ import annotations

import argparse
import os
import tempfile
import time
from pathlib import Path

os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import numpy as np  # noqa: E402

from screening import store  # noqa: E402
from screening.corridor.quantities import corridor_quantities  # noqa: E402
from screening.corridor.sensitivity import corridor_sensitivity, monte_carlo  # noqa: E402
from screening.engine import screen  # noqa: E402
from screening.model.presets import demo_corridor_path  # noqa: E402
from screening.profile.build import corridor_from_profile  # noqa: E402
from screening.report import write_report  # noqa: E402


def invented_profile(points: int, seed: int = 5) -> str:
    """A seeded random wall-height profile every 2.5 m (invented data)."""
    rng = np.random.default_rng(seed)
    ch = np.arange(points) * 2.5
    h = np.clip(6.0 + np.cumsum(rng.normal(0.0, 0.08, points)), 0.0, 11.5)
    return "chainage_m,height_m\n" + "\n".join(
        f"{c:.2f},{v:.3f}" for c, v in zip(ch, h, strict=True)
    )


def timed(label: str, fn):
    t = time.perf_counter()
    out = fn()
    print(f"{label:<52} {time.perf_counter() - t:8.2f} s")
    return out


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--points", type=int, default=20000)
    ap.add_argument("--samples", type=int, default=200)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "profile.csv"
        path.write_text(invented_profile(args.points))
        corridor = timed(
            f"profile import + split, {args.points} points",
            lambda: corridor_from_profile(path, name="bench"),
        )
        print(f"  -> {len(corridor.segments)} segments")
        result = timed("screen of those segments", lambda: screen(corridor))
        timed("quantities of those segments", lambda: corridor_quantities(corridor, result))
        demo = store.load(demo_corridor_path())
        demo_result = screen(demo)
        flagged = [i for i, v in enumerate(demo_result.verdict) if v != "clear"]
        timed(
            f"sensitivity of {len(flagged)} demo segments (one engine call)",
            lambda: corridor_sensitivity(demo, flagged, result=demo_result),
        )
        timed(
            f"Monte Carlo, {args.samples} samples x {len(demo.segments)} demo segments",
            lambda: monte_carlo(demo, args.samples, seed=1),
        )
        timed(
            f"Monte Carlo, core checks only, {args.samples} x {len(demo.segments)}",
            lambda: monte_carlo(demo, args.samples, seed=1, extra_checks=()),
        )
        timed(
            "HTML report of the demo corridor",
            lambda: write_report(demo, demo_result, Path(tmp) / "r.html"),
        )
        timed(
            "Markdown report of the demo corridor",
            lambda: write_report(demo, demo_result, Path(tmp) / "r.md"),
        )


if __name__ == "__main__":
    main()
