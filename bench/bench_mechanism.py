"""Speed and accuracy of the mechanism check (DLO upper bound), on one core.

Run from the repository root:
    python bench/bench_mechanism.py [--nodes 350] [--walls 30] [--quick]

Prints:
1. one load factor (Prandtl, N_c) and one strength factor (a 6 m reinforced wall) at about
   ``--nodes`` nodes: time, nodes, lines (target: one factor <= 1 s at 300-400 nodes);
2. Prandtl's N_c error against 2 + pi as the grid grows, and the N_q and N_gamma errors
   (N_gamma against Martin's 14.75, from memory) at the working resolution;
3. the strength factor of ``--walls`` invented wall sections in sequence (heights 3-10 m,
   sand or clay foundations, some toe slopes and backslopes; the referred/marginal share of a
   300-segment corridor), total and per wall (target: the whole share <= 60 s on this
   2-core machine);
4. the choices of the root search and the LP starts on the same walls (CPU, LPs, and the
   largest change of F against a tight search): as solve.py does; without the warm start
   across F; without the multiplier cap (lp.MULTIPLIER_CAP); at the old 0.3 % tolerance;
5. one factor as the mechanism check runs it (check.NODES with the coarse start), three
   times: nodes and seconds (target <= 1 s at 300-400 nodes);
6. (--bias) the discretisation bias behind the flag's allowance: F of demo segments at the
   working grid against a grid of ~700 nodes;
7. the mechanism check on every referred or marginal segment of a ``--corridor``-segment
   corridor (the demo corridor repeated, heights varied by up to 8 % so that no two
   sections are alike) in 2 worker processes (target <= 60 s).

``--check-only`` runs items 5-7 only.

The walls are invented for the benchmark, not a design case.
"""

from __future__ import annotations

import argparse
import math
import os
import resource
import time

os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import numpy as np  # noqa: E402

from screening.engine.mechanism.reference_problems import footing_problem  # noqa: E402
from screening.engine.mechanism.section import (  # noqa: E402
    MechanismLayer,
    MechanismSection,
    SoilStrength,
)
from screening.engine.mechanism.solve import load_factor, strength_factor  # noqa: E402

NC = 2.0 + math.pi
NQ_30 = math.exp(math.pi * math.tan(math.radians(30))) * math.tan(math.radians(60)) ** 2
NGAMMA_30_ROUGH = 14.75


def invented_wall(
    height_m: float,
    strength_kn_m: float = 40.0,
    clay_cu_kpa: float | None = None,
    toe_slope_deg: float = 0.0,
    backslope_deg: float = 0.0,
) -> MechanismSection:
    """Geogrid-like layers every 0.6 m, pullout 0.67 tan(phi) x 0.8 x 2 x sigma_v."""
    fstar = 0.67 * math.tan(math.radians(34.0))
    levels = np.arange(0.3, height_m, 0.6)
    layers = tuple(
        MechanismLayer(
            float(y), strength_kn_m, fstar * 0.8 * 2.0 * 20.0 * (height_m - y), strength_kn_m
        )
        for y in levels
    )
    embed = max(0.6, height_m / (7.0 if toe_slope_deg else 20.0))
    found = (
        SoilStrength(18.0, 0.0, 0.0, clay_cu_kpa) if clay_cu_kpa else SoilStrength(19.0, 0.0, 32.0)
    )
    return MechanismSection(
        design_height_m=height_m,
        embedment_m=embed,
        length_m=round(0.7 * height_m + 0.05, 1),
        foundation=found,
        reinforced=SoilStrength(20.0, 0.0, 34.0),
        retained=SoilStrength(19.0, 0.0, 30.0),
        layers=layers,
        backslope_deg=backslope_deg,
        toe_slope_deg=toe_slope_deg,
        toe_slope_fall_m=height_m if toe_slope_deg else 0.0,
        dead_surcharge_kpa=5.0,
        live_surcharge_kpa=12.0,
    )


def invented_walls(n: int, seed: int = 11) -> list[MechanismSection]:
    rng = np.random.default_rng(seed)
    walls = []
    for _ in range(n):
        walls.append(
            invented_wall(
                float(np.round(rng.uniform(3.0, 10.0), 1)),
                strength_kn_m=float(rng.choice([30.0, 45.0, 60.0])),
                clay_cu_kpa=float(rng.uniform(40.0, 90.0)) if rng.random() < 0.25 else None,
                toe_slope_deg=26.57 if rng.random() < 0.2 else 0.0,
                backslope_deg=18.43 if rng.random() < 0.2 else 0.0,
            )
        )
    return walls


def line(label: str, r, ref: float | None = None, scale: float = 1.0, cpu=None) -> str:
    value = scale * r.factor
    err = f"  error {100 * (value / ref - 1):+6.2f} %" if ref else ""
    cpu = f"  CPU {cpu:6.3f} s" if cpu is not None else ""
    return (
        f"{label:<34} {value:9.4f}{err}  nodes {r.nodes:4d}  lines {r.candidate_lines:6d}"
        f"  used {r.lines_used:5d}  LPs {r.lp_solves:2d}  {r.seconds:6.3f} s{cpu}"
    )


def timed(fn, *args, **kwargs):
    """(fn(*args, **kwargs), CPU seconds of this process)."""
    t0 = time.process_time()
    out = fn(*args, **kwargs)
    return out, time.process_time() - t0


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--nodes", type=int, default=350)
    ap.add_argument("--walls", type=int, default=30)
    ap.add_argument("--quick", action="store_true", help="skip the convergence table")
    ap.add_argument("--check-only", action="store_true", help="items 5-7 only")
    ap.add_argument("--bias", action="store_true", help="item 6 (slow: ~700-node grids)")
    ap.add_argument("--corridor", type=int, default=300, help="segments of item 7 (0: skip)")
    args = ap.parse_args()
    if args.check_only:
        check_items(args)
        return
    load_factor(footing_problem(), nodes=60)  # imports and first HiGHS instance
    print("mechanism check (DLO): every factor is an upper bound, on the unsafe side\n")
    print("1. one factor")
    print(line("Prandtl N_c (load factor)", load_factor(footing_problem(), nodes=args.nodes), NC))
    wall = invented_wall(6.0)
    for _ in range(3):
        r, cpu = timed(strength_factor, wall, nodes=args.nodes)
        print(line("6 m wall (strength factor, F0 = 1)", r, cpu=cpu))
    if not args.quick:
        print("\n2. convergence")
        for n in (150, 200, 300, 400, 600):
            print(line(f"N_c at ~{n} nodes", load_factor(footing_problem(), nodes=n), NC))
        nq = footing_problem(cohesion_kpa=0.0, friction_deg=30.0, surcharge_kpa=1.0)
        ng = footing_problem(cohesion_kpa=0.0, friction_deg=30.0, unit_weight_kn_m3=1.0)
        for n in (300, 420, 600):
            print(line(f"N_q phi 30 at ~{n} nodes", load_factor(nq, nodes=n), NQ_30))
        for n in (300, 400, 600):
            r = load_factor(ng, nodes=n)
            print(line(f"N_gamma phi 30 rough ~{n} nodes", r, NGAMMA_30_ROUGH, scale=2.0))
        for n in (200, 300, 400):
            print(line(f"6 m wall at ~{n} nodes", strength_factor(wall, nodes=n)))
    print(f"\n3. {args.walls} wall sections in sequence (one core)")
    t0 = time.perf_counter()
    c0 = time.process_time()
    results = [strength_factor(w, nodes=args.nodes) for w in invented_walls(args.walls)]
    total = time.perf_counter() - t0
    cpu = time.process_time() - c0
    times = np.array([r.seconds for r in results])
    print(
        f"total {total:6.2f} s ({cpu:.2f} s CPU), per wall mean {times.mean():.3f} s, max {times.max():.3f} s, "
        f"nodes {min(r.nodes for r in results)}-{max(r.nodes for r in results)}, "
        f"F {min(r.factor for r in results):.3f}-{max(r.factor for r in results):.3f}"
    )
    print(f"\n4. the {args.walls} walls: what the root search and the LP starts give (CPU)")
    search_items(invented_walls(args.walls), args.nodes)
    check_items(args)


def search_items(walls, nodes: int) -> None:
    """Each setting on the same walls: CPU, LPs, simplex iterations and the largest change of
    F against a tight search (rtol 1e-5)."""
    from screening.engine.mechanism import lp, solve

    reference = [strength_factor(w, nodes=nodes, rtol=1e-5).factor for w in walls]
    settings = {
        "as solve.py (Newton, warm, cap)": {},
        "no warm start across F": {"warm": False},
        "no multiplier cap": {"cap": math.inf},
        "rtol 0.3 % (was the default)": {"rtol": 3e-3},
    }
    for label, s in settings.items():
        solve.WARM_START = s.get("warm", True)
        lp.MULTIPLIER_CAP = s.get("cap", 1e3)
        t0 = time.process_time()
        rs = [strength_factor(w, nodes=nodes, rtol=s.get("rtol", solve.RTOL)) for w in walls]
        cpu = time.process_time() - t0
        dev = max(abs(r.factor / f - 1.0) for r, f in zip(rs, reference, strict=True) if f > 0)
        print(
            f"{label:<34} CPU {cpu:6.2f} s  LPs {sum(r.lp_solves for r in rs):4d}  "
            f"rounds {sum(r.rounds for r in rs):4d}  largest change of F {100 * dev:.2f} %"
        )
    solve.WARM_START, lp.MULTIPLIER_CAP = True, 1e3


def varied_corridor(n: int, seed: int = 5):
    """The demo corridor repeated to ``n`` segments, every height scaled by 0.92-1.0."""
    from dataclasses import replace

    from screening import store
    from screening.engine.samples import repeated
    from screening.model.presets import demo_corridor_path

    rng = np.random.default_rng(seed)
    base = repeated(store.load(demo_corridor_path()), n)
    segs = []
    for seg in base.segments:
        k = float(rng.uniform(0.92, 1.0))
        segs.append(
            replace(seg, height_start_m=seg.height_start_m * k, height_end_m=seg.height_end_m * k)
        )
    return replace(base, segments=tuple(segs))


def check_items(args) -> None:
    from screening import store
    from screening.engine import screen
    from screening.engine.arrays import build_arrays
    from screening.engine.mechanism import check
    from screening.engine.mechanism.adapter import mechanism_cases
    from screening.model.presets import demo_corridor_path

    print(f"\n5. one factor as the check runs it ({check.NODES} nodes, coarse start)")
    wall = invented_wall(6.0)
    for _ in range(3):
        r, cpu = timed(strength_factor, wall, nodes=check.NODES, coarse_nodes=check.COARSE_NODES)
        print(line("6 m wall (check's grid)", r, cpu=cpu))
    for _ in range(3):
        r, cpu = timed(strength_factor, wall, nodes=330, start=1.3)
        print(line("6 m wall, 330 nodes, from F0 = 1.3", r, cpu=cpu))
    if args.bias:
        print("\n6. discretisation bias: demo segments, working grid against ~700 nodes")
        demo = store.load(demo_corridor_path())
        result = screen(demo)
        rows = check.needs_mechanism(result)
        for case in mechanism_cases(build_arrays(demo), result, rows):
            if case.section is None:
                continue
            work = strength_factor(case.section, nodes=check.NODES, coarse_nodes=120)
            fine = strength_factor(case.section, nodes=700, coarse_nodes=120)
            print(
                f"{case.segment_id:<7} {case.case:<28} F {work.factor:.3f} ({work.nodes}) "
                f"vs {fine.factor:.3f} ({fine.nodes}): {100 * (work.factor / fine.factor - 1):+.1f} %"
            )
    if args.corridor:
        corridor = varied_corridor(args.corridor)
        t0 = time.perf_counter()
        result = screen(corridor)
        t_screen = time.perf_counter() - t0
        rows = check.needs_mechanism(result)
        print(
            f"\n7. {len(corridor.segments)}-segment corridor: screened in {t_screen:.1f} s, "
            f"{rows.size} referred or marginal segments"
        )
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu0 = time.process_time()
        mech = check.run_mechanism(corridor, result, workers=2)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        workers_cpu = (after.ru_utime + after.ru_stime) - (before.ru_utime + before.ru_stime)
        per = np.array([s.seconds for s in mech.segments if s is not None])
        print(
            f"mechanism check on {rows.size} segments, 2 processes: {mech.seconds:.1f} s wall, "
            f"CPU {workers_cpu:.1f} s in the workers + {time.process_time() - cpu0:.1f} s in "
            f"the parent (per segment in its process: mean {per.mean():.2f} s, "
            f"max {per.max():.2f} s wall; {len(mech.flagged())} flagged); "
            f"load average {os.getloadavg()[0]:.1f}"
        )


if __name__ == "__main__":
    main()
