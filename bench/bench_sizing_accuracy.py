"""Accuracy of whole screens (sizing included) against a fine search at every length.

Run from the repository root:
    python bench/bench_sizing_accuracy.py [--segments 300] [--seed 20261201] [--corridor FILE]

bench_compound.py compares one search with the fine one at a fixed length. A screen searches
each segment at many lengths and grades, most of them as warm refinements from the circles
found at other lengths, and decides at CDR = 1, where a small excess of F can make L a step
or more too short. Here the reference is the same screen with every slip search a full FINE
search (no warm refinement); the screen as it is is compared with it:

- verdicts that differ, and lengths shorter / longer than the reference's (shorter is the
  unsafe side) with the largest shortfall;
- on segments whose L agrees, the compound and global CDRs above the reference's (the
  largest excess, and how many exceed it by more than 1 %; CDRs between 0.5 and 3).

The reference takes about 60 ms of CPU a segment; it is kept in the temporary folder
for the engine's source as it is (``--fresh`` recomputes it). The corridor is bench_screen.py's invented one unless
``--corridor`` names a corridor file.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import hashlib  # noqa: E402
import pickle  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

sys.path.insert(0, str(Path(__file__).parent))

from bench_screen import generated_corridor  # noqa: E402

import screening.engine as engine  # noqa: E402
from screening import store  # noqa: E402
from screening.engine.slip import check, compound  # noqa: E402
from screening.engine.slip.density import FINE  # noqa: E402


def summary(result) -> dict:
    return {
        "verdict": list(result.verdict),
        "length_m": np.asarray(result.length_m),
        "compound": np.asarray(result.checks["compound"].cdr),
        "global": np.asarray(result.checks["global"].cdr),
    }


def reference(corridor) -> dict:
    """The screen with a full FINE search wherever the screen searches."""
    plain = check.compound_check

    def fine(inp, method, resistance, cases=(), density=None, kh=None, warm=None):
        return plain(inp, method, resistance, cases, FINE, kh, None)

    check.compound_check = compound.compound_check = fine
    try:
        return summary(engine.screen(corridor))
    finally:
        check.compound_check = compound.compound_check = plain


def excess(got: np.ndarray, ref: np.ndarray, same: np.ndarray) -> tuple[float, int]:
    keep = same & (ref > 0.5) & (ref < 3.0)
    if not keep.any():
        return 0.0, 0
    e = (got[keep] - ref[keep]) / ref[keep]
    return 100 * float(e.max()), int(np.sum(e > 0.01))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--segments", type=int, default=300)
    ap.add_argument("--seed", type=int, default=20261201)
    ap.add_argument("--corridor", type=Path, help="a corridor file instead of the invented one")
    ap.add_argument("--fresh", action="store_true", help="recompute the reference")
    args = ap.parse_args()
    engine.POOL_WORKERS = 1
    from screening.engine.slip import kernel_search

    kernel_search.warm_up()
    if args.corridor:
        corridor = store.load(args.corridor)
        key = hashlib.sha256(args.corridor.read_bytes()).hexdigest()[:16]
    else:
        corridor = generated_corridor(args.segments, args.seed)
        key = f"{args.segments}-{args.seed}"
    sources = sorted(Path(engine.__file__).parent.rglob("*.py"))  # the reference's own code
    tree = hashlib.sha256(b"".join(p.read_bytes() for p in sources)).hexdigest()[:8]
    cache = Path(tempfile.gettempdir()) / f"wallscreen-sizing-ref-{key}-{tree}.pkl"
    if cache.exists() and not args.fresh:
        ref = pickle.loads(cache.read_bytes())
    else:
        start = time.process_time()
        ref = reference(corridor)
        print(f"reference (FINE at every length): {time.process_time() - start:.1f} s CPU")
        cache.write_bytes(pickle.dumps(ref))
    start = time.process_time()
    got = summary(engine.screen(corridor))
    cpu = time.process_time() - start
    n = len(got["verdict"])
    ids = [s.id for s in corridor.segments]
    differ = [
        f"{ids[i]} {ref['verdict'][i]}->{got['verdict'][i]}"
        for i in range(n)
        if got["verdict"][i] != ref["verdict"][i]
    ]
    d_len = got["length_m"] - ref["length_m"]
    same = np.abs(d_len) < 1e-9
    print(f"{n} segments, the screen as it is: {cpu:.2f} s CPU")
    print(f"  verdicts differing from the reference: {len(differ)} {differ[:6]}")
    print(
        f"  L shorter than the reference: {int(np.sum(d_len < -1e-9))} (most {-d_len.min():.1f} m),"
        f" longer: {int(np.sum(d_len > 1e-9))}"
    )
    for family in ("compound", "global"):
        worst, over = excess(got[family], ref[family], same)
        print(f"  {family} CDR above the reference (same L): max {worst:.2f} %, > 1 %: {over}")


if __name__ == "__main__":
    main()
