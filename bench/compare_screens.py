"""Compare two trees' screens of one corridor: verdicts, lengths, grade steps and CDRs.

Run from the repository root of each tree (its package on ``PYTHONPATH`` or installed):

    python bench/compare_screens.py dump before.json --corridor demo
    python bench/compare_screens.py dump before.json --corridor 300 [--seismic 0.1]
    (change the engine)
    python bench/compare_screens.py dump after.json --corridor 300
    python bench/compare_screens.py compare before.json after.json

``--corridor``: ``demo`` (the demo corridor), a number N (the first N segments of
bench_screen.py's generated corridor) or a corridor file. The dump holds every segment's
verdict, length, grade steps and every check's CDR at full precision, and the text of
``check --json`` (whose numbers are rounded); ``compare`` prints what changed and the
largest relative CDR change among segments whose length did not change.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import json  # noqa: E402
import sys  # noqa: E402
from dataclasses import replace  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

sys.path.insert(0, str(Path(__file__).parent))

CDR_TOLERANCE = 0.005
"""CDR changes above this (relative) are listed: the accuracy rule of issue 11."""


def load_corridor(spec: str, seismic_kh: float):
    from screening import store
    from screening.model.presets import demo_corridor_path

    if spec == "demo":
        corridor = store.load(demo_corridor_path())
    elif spec.isdigit():
        from bench_screen import generated_corridor

        corridor = generated_corridor(int(spec))
    else:
        corridor = store.load(Path(spec))
    if seismic_kh:
        segs = tuple(replace(s, seismic_kh=seismic_kh) for s in corridor.segments)
        corridor = replace(corridor, segments=segs)
    return corridor


def dump(out: Path, spec: str, seismic_kh: float) -> None:
    from screening.cli.jsonout import corridor_json
    from screening.engine import screen
    from screening.engine.slip import kernel_search

    kernel_search.warm_up()
    corridor = load_corridor(spec, seismic_kh)
    result = screen(corridor)
    data = {
        "ids": list(result.ids),
        "verdict": list(result.verdict),
        "length_m": result.length_m.tolist(),
        "grade_boost": result.grade_boost.tolist(),
        "cdr": {name: np.asarray(c.cdr, dtype=float).tolist() for name, c in result.checks.items()},
        "json": json.dumps(corridor_json(corridor, result), indent=1, sort_keys=True),
    }
    out.write_text(json.dumps(data))
    print(f"{out}: {len(result.ids)} segments, {result.counts()}")


def compare(a_path: Path, b_path: Path) -> int:
    a, b = json.loads(a_path.read_text()), json.loads(b_path.read_text())
    ids = a["ids"]
    if ids != b["ids"]:
        print("the dumps hold different segments")
        return 2
    la, lb = np.array(a["length_m"]), np.array(b["length_m"])
    same_l = np.abs(la - lb) < 1e-9
    problems = 0
    for i in np.flatnonzero(np.array(a["verdict"]) != np.array(b["verdict"])):
        print(f"verdict  {ids[i]}: {a['verdict'][i]} -> {b['verdict'][i]}")
        problems += 1
    for i in np.flatnonzero(~same_l):
        print(f"length   {ids[i]}: {la[i]:.1f} -> {lb[i]:.1f} m")
        problems += 1
    ga, gb = np.array(a["grade_boost"]), np.array(b["grade_boost"])
    for i in np.flatnonzero(ga != gb):
        print(f"grade    {ids[i]}: +{ga[i]} -> +{gb[i]}")
        problems += 1
    worst = (0.0, "", "")
    for name in a["cdr"]:
        ca, cb = np.array(a["cdr"][name]), np.array(b["cdr"][name])
        signed = (cb - ca) / np.maximum(np.abs(ca), 1e-9)
        rel = np.where(same_l & np.isfinite(signed), np.abs(signed), 0.0)
        for i in np.flatnonzero(rel > CDR_TOLERANCE):
            print(
                f"cdr      {ids[i]} {name}: {ca[i]:.4f} -> {cb[i]:.4f} ({100 * signed[i]:+.2f} %)"
            )
            problems += 1
        if rel.size and rel.max() > worst[0]:
            j = int(np.argmax(rel))
            worst = (float(rel[j]), ids[j], name)
    same_json = a["json"] == b["json"]
    print(
        f"{len(ids)} segments: {problems} changes beyond the rule; largest CDR change "
        f"{100 * worst[0]:.3f} % ({worst[1]} {worst[2]}); check --json identical: {same_json}"
    )
    return 1 if problems else 0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    sub = ap.add_subparsers(dest="command", required=True)
    d = sub.add_parser("dump")
    d.add_argument("out", type=Path)
    d.add_argument("--corridor", default="demo")
    d.add_argument("--seismic", type=float, default=0.0, metavar="KH")
    c = sub.add_parser("compare")
    c.add_argument("before", type=Path)
    c.add_argument("after", type=Path)
    args = ap.parse_args()
    if args.command == "dump":
        dump(args.out, args.corridor, args.seismic)
        return 0
    return compare(args.before, args.after)


if __name__ == "__main__":
    sys.exit(main())
