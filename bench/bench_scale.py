"""A 100,000-segment corridor through save, load, screen and save again (issue 14, item 5).

Run: ``python bench/bench_scale.py [--segments 100000] [--full-segments 10000] [--full-all]``.

The corridor is the shipped demo corridor (29 segments of three walls, every reinforcement
family, abutments, seismic) repeated along the chainage (``engine.samples.repeated``), so
the file is what a person would write, not a synthetic minimum. Stages, each timed:
save (text and atomic write), load (parse and validation), the overlap and gap search,
the screen with the built-in checks (``extra_checks=()``), the save with the results and
quantities, a save that keeps comments typed in the file, and the screen with every check
(slip circles, seismic) on ``--full-segments`` of them (``--full-all``: all of them; this
takes minutes). Peak memory is the process's peak resident size after each stage
(``resource.getrusage``, monotonic: a stage that does not raise it used less).
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import resource  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

from screening import store  # noqa: E402
from screening.corridor.layout import find_layout_problems  # noqa: E402
from screening.engine import screen  # noqa: E402
from screening.engine.samples import repeated  # noqa: E402
from screening.model.presets import demo_corridor_path  # noqa: E402


def peak_mb() -> float:
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return rss / 1024 if sys.platform != "darwin" else rss / 1024**2


def stage(name: str, fn):
    t0 = time.perf_counter()
    out = fn()
    took = time.perf_counter() - t0
    print(f"{name:<44} {took:8.2f} s   peak {peak_mb():7.0f} MB", flush=True)
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--segments", type=int, default=100_000)
    ap.add_argument("--full-segments", type=int, default=10_000)
    ap.add_argument("--full-all", action="store_true", help="every check on all segments")
    args = ap.parse_args()
    n = args.segments
    print(f"peak at start (imports): {peak_mb():.0f} MB")
    demo = store.load(demo_corridor_path())
    corridor = stage(f"build {n:,} segments", lambda: repeated(demo, n))
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "scale.toml"
        stage("save (inputs only)", lambda: store.save(path, corridor))
        print(f"  file: {path.stat().st_size / 1e6:.1f} MB")
        loaded = stage("load (parse + validation)", lambda: store.load(path))
        assert loaded == corridor, "load(save(x)) != x"
        problems = stage("overlaps and gaps", lambda: find_layout_problems(loaded))
        print(f"  layout problems: {len(problems)}")
        result = stage("screen, built-in checks", lambda: screen(loaded, extra_checks=()))
        counts = result.counts()
        print(f"  verdicts: {counts}")
        stage("save with results and quantities", lambda: store.save(path, loaded, result))
        text = path.read_text(encoding="utf-8")
        marked = text.replace("\n[[segment]]\n", "\n# checked on site\n[[segment]]\n", 50).replace(
            "\n[corridor]\n", "\n# the project's corridor\n[corridor]\n", 1
        )
        path.write_text(marked, encoding="utf-8")
        stage("save keeping 51 comments", lambda: store.save(path, loaded, result))
        kept = path.read_text(encoding="utf-8").count("# checked on site")
        print(f"  comments kept: {kept + 1} of 51")
        assert store.load(path) == loaded
        full_n = n if args.full_all else min(args.full_segments, n)
        part = replace(loaded, segments=loaded.segments[:full_n])
        stage(f"screen, every check, {full_n:,} segments", lambda: screen(part))
    print(f"peak resident memory: {peak_mb():.0f} MB")


if __name__ == "__main__":
    main()
