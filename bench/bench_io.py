"""Reading, writing and reporting, without the engine (issue 11, the parts outside the slip
search).

Run from the repository root:  python bench/bench_io.py [--segments 10000] [--report 400]

The corridor is bench_screen.py's invented one (seeded). Each stage prints its CPU seconds
(``time.process_time`` plus the pool workers it waited for) and its wall-clock seconds; the screen runs once
per corridor, in this process, and is timed on its own line so what is left is the cost of
files and text:

1. ``store.dumps`` of the inputs (the file ``check`` reads) and its size;
2. ``store.load`` of that file (parse and validation);
3. ``screen`` (every check unless ``--builtin``; the process pool as configured);
4. the text of ``check --json`` (``screening.cli.json_write.dumps``) and its size, and for
   comparison ``json.dumps(corridor_json(...), indent=1)``, which must give the same text;
5. ``store.dumps`` with the results and quantities (what ``save`` writes) and its size;
6. ``--report`` segments: ``write_report`` to HTML (its own data: quantities and the
   sensitivity of up to 60 flagged segments, which screens again), size of the file.

Best of ``--repeat`` runs for each text stage (the machine is shared: see bench/README.md).
``PYTHONPATH=/path/to/old/tree python bench/bench_io.py`` measures an older tree.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import json  # noqa: E402
import resource  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

sys.path.insert(0, str(Path(__file__).parent))

from bench_screen import generated_corridor  # noqa: E402

from screening import store  # noqa: E402
from screening.cli.jsonout import corridor_json  # noqa: E402
from screening.engine import screen  # noqa: E402
from screening.model.presets import load_presets  # noqa: E402
from screening.report import write_report  # noqa: E402


def json_text(corridor, result) -> str:
    """What ``check --json`` writes (an older tree without json_write: the json module)."""
    try:
        from screening.cli import json_write
    except ImportError:
        return json.dumps(corridor_json(corridor, result), indent=1)
    return json_write.dumps(corridor, result)


def _cpu() -> float:
    """CPU seconds of this process and of its finished children (pool workers)."""
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return time.process_time() + kids.ru_utime + kids.ru_stime


def timed(label: str, fn, repeat: int = 1, size=None):
    best_cpu, best_wall, out = float("inf"), float("inf"), None
    for _ in range(repeat):
        c0, w0 = _cpu(), time.perf_counter()
        out = fn()
        best_cpu = min(best_cpu, _cpu() - c0)
        best_wall = min(best_wall, time.perf_counter() - w0)
    extra = f"   {size(out) / 1e6:8.2f} MB" if size is not None else ""
    print(f"{label:<46} CPU {best_cpu:7.2f} s   wall {best_wall:7.2f} s{extra}", flush=True)
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--segments", type=int, default=10_000)
    ap.add_argument("--report", type=int, default=400, metavar="N")
    ap.add_argument("--repeat", type=int, default=2)
    ap.add_argument("--builtin", action="store_true", help="screen with the built-in checks only")
    args = ap.parse_args()
    extra = {"extra_checks": ()} if args.builtin else {}
    load_presets()
    print(f"load average {os.getloadavg()[0]:.1f} (2 shared cores)")
    with tempfile.TemporaryDirectory() as tmp:
        n = args.segments
        path = Path(tmp) / "bench.toml"
        text = timed(
            f"{n}: dumps, inputs only",
            lambda: store.dumps(generated_corridor(n)),
            args.repeat,
            lambda t: len(t.encode()),
        )
        path.write_text(text, encoding="utf-8")
        corridor = timed(f"{n}: load (parse and validation)", lambda: store.load(path), args.repeat)
        result = timed(f"{n}: screen (engine, not this stage's)", lambda: screen(corridor, **extra))
        fast = timed(
            f"{n}: check --json text",
            lambda: json_text(corridor, result),
            args.repeat,
            lambda t: len(t.encode()),
        )
        slow = timed(
            f"{n}: json.dumps(corridor_json, indent=1)",
            lambda: json.dumps(corridor_json(corridor, result), indent=1),
        )
        print(f"{'':<46} same text: {fast == slow}")
        timed(
            f"{n}: dumps with results (save)",
            lambda: store.dumps(corridor, result),
            args.repeat,
            lambda t: len(t.encode()),
        )
        if args.report:
            small = generated_corridor(args.report)
            small_result = timed(f"{args.report}: screen (engine)", lambda: screen(small, **extra))
            out = Path(tmp) / "report.html"
            timed(
                f"{args.report}: HTML report (its sensitivity screens)",
                lambda: write_report(small, small_result, out),
                args.repeat,
                lambda p: p.stat().st_size,
            )
            timed(
                f"{args.report}: HTML report, no sensitivity",
                lambda: write_report(small, small_result, out, sensitivity=False),
                args.repeat,
                lambda p: p.stat().st_size,
            )


if __name__ == "__main__":
    main()
