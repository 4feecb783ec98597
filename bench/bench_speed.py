"""Speed of a whole screen with every check, per stage (issue 11 targets).

Run from the repository root:  python bench/bench_speed.py [--segments 10000] [--small 300]

Stages, each printed on one line (BLAS threads pinned to 1; "one core" means the process
pool off):

1. compile: the slip kernel compiled from nothing (a fresh numba cache in a temporary
   folder), then loaded from that cache by a new process;
2. one segment re-screened with every check, as the interface's edit path does
   (``screening.engine.screen`` on a one-segment corridor, after a warm-up): each segment of
   the demo corridor in turn, median and worst; with the kernel and on the numpy path;
3. ``--small`` segments of bench_screen.py's corridor: ``screen`` in this process;
4. ``--segments`` segments: the whole ``wallscreen check FILE --json`` process, pool on
   (the default) and off, plus the time of its parts in this process (load, screen, JSON).

``--seismic KH`` gives every segment of the generated corridor a site coefficient kh0
(the seismic check then runs its pseudo-static slip search too). Works on older trees
without the kernel (it then says so), which is how bench/README's "before" was measured:
``PYTHONPATH=/path/to/old/tree python bench/bench_speed.py``.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import json  # noqa: E402
import resource  # noqa: E402
import statistics  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

sys.path.insert(0, str(Path(__file__).parent))

from bench_screen import generated_corridor  # noqa: E402

from screening import store  # noqa: E402
from screening.engine import screen  # noqa: E402

try:
    from screening.engine.slip import kernel, kernel_search
except ImportError:  # a tree from before the kernel
    kernel = kernel_search = None

ENGINE = sys.modules["screening.engine"]

_WARM = "from screening.engine.slip import kernel_search; print(kernel_search.warm_up())"


def compile_times() -> None:
    if kernel is None or not kernel.available():
        print("compile             no compiled kernel in this tree (numpy only)")
        return
    with tempfile.TemporaryDirectory() as cache:
        env = dict(os.environ, NUMBA_CACHE_DIR=cache)
        out = []
        for _ in range(2):
            start = time.perf_counter()
            inner = subprocess.run(
                [sys.executable, "-c", _WARM], env=env, capture_output=True, text=True, check=True
            )
            out.append((time.perf_counter() - start, float(inner.stdout.strip())))
    (p1, k1), (p2, k2) = out
    print(
        f"compile             first run {k1:6.2f} s (process {p1:.2f} s); "
        f"from cache {k2:.2f} s (process {p2:.2f} s, numba import included)"
    )


def bench_corridor(n: int, seismic_kh: float):
    corridor = generated_corridor(n)
    if seismic_kh:
        segs = tuple(replace(s, seismic_kh=seismic_kh) for s in corridor.segments)
        corridor = replace(corridor, segments=segs)
    return corridor


def one_segment(use_kernel: bool) -> str:
    from screening.model.presets import demo_corridor_path

    if kernel is not None:
        kernel.ENABLED = use_kernel
    elif use_kernel:
        return "n/a"
    demo = store.load(demo_corridor_path())
    singles = [replace(demo, segments=(s,)) for s in demo.segments]
    if kernel_search is not None:
        kernel_search.warm_up()  # the interface's process has loaded it long before an edit
    for one in singles:
        screen(one)  # warm-up: imports, and the memo's first allocations
    times, cpu = [], []
    for one in singles:
        start, c0 = time.perf_counter(), time.process_time()
        screen(one)
        times.append(time.perf_counter() - start)
        cpu.append(time.process_time() - c0)
    if kernel is not None:
        kernel.ENABLED = True
    return (
        f"median {1000 * statistics.median(times):6.1f} ms, worst {1000 * max(times):6.1f} ms"
        f" (CPU {1000 * statistics.median(cpu):.1f} / {1000 * max(cpu):.1f} ms)"
    )


def in_process(corridor, label: str, repeat: int) -> float:
    best, best_cpu = float("inf"), float("inf")
    for _ in range(repeat):
        start, c0 = time.perf_counter(), time.process_time()
        result = screen(corridor)
        best = min(best, time.perf_counter() - start)
        best_cpu = min(best_cpu, time.process_time() - c0)
    print(f"{label:<19} {best:7.2f} s (CPU {best_cpu:.2f} s)   verdicts {result.counts()}")
    return best


def process(path: Path, pool: bool) -> str:
    code = (
        "import sys, screening.engine as e\n"
        + ("" if pool else "e.POOL_WORKERS = 1\n")
        + "from screening.cli import main\n"
        + f"sys.exit(main(['check', {str(path)!r}, '--json']))\n"
    )
    start, before = time.perf_counter(), resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run([sys.executable, "-c", code], stdout=subprocess.DEVNULL, check=True)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime
    return f"{time.perf_counter() - start:.2f} s (CPU of all its processes {cpu:.2f} s)"


def parts(path: Path) -> str:
    from screening.cli.jsonout import corridor_json

    clock = time.process_time
    start = clock()
    corridor = store.load(path)
    t_load = clock() - start
    start, wall = clock(), time.perf_counter()
    result = screen(corridor)
    t_screen, w_screen = clock() - start, time.perf_counter() - wall
    start = clock()
    json.dumps(corridor_json(corridor, result), indent=1)
    t_json = clock() - start
    return (
        f"CPU: load {t_load:.2f} s, screen {t_screen:.2f} s (wall {w_screen:.2f} s), "
        f"JSON {t_json:.2f} s"
    )


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--segments", type=int, default=10_000)
    ap.add_argument("--small", type=int, default=300)
    ap.add_argument("--seismic", type=float, default=0.0, metavar="KH")
    ap.add_argument("--skip-large", action="store_true", help="stages 1-3 only")
    args = ap.parse_args()
    pool = hasattr(ENGINE, "POOL_WORKERS")
    print(f"tree                {Path(ENGINE.__file__).parent.parent.parent}")
    compile_times()
    print(f"one segment, kernel {one_segment(True)}")
    print(f"one segment, numpy  {one_segment(False)}")
    small = bench_corridor(args.small, args.seismic)
    if pool:
        ENGINE.POOL_WORKERS = 1
    in_process(small, f"{args.small} segments", 3)
    if args.skip_large:
        return
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.toml"
        path.write_text(store.dumps(bench_corridor(args.segments, args.seismic)))
        print(f"{args.segments} segments  parts in one process (one core): {parts(path)}")
        print(f"{args.segments} segments  check --json process, one core {process(path, False)}")
        if pool:
            print(f"{args.segments} segments  check --json process, pool on  {process(path, True)}")


if __name__ == "__main__":
    main()
