"""Mutate corridor files and push every one through load, screen and save (issue 14, item 2).

Run: ``python bench/fuzz_corridors.py [--count 10000] [--seed 14] [--core-only]``.

Each document is one of a few small corridor files (invented, like the demo) changed by one
to three mutations, half of them on the text (delete, duplicate or swap lines, flip or
insert a character, truncate, cut a span) and half on the values (a number replaced by an
extreme, NaN, inf, a negative, zero, a wrong type or text; a key dropped or an unknown one
added). Then: ``store.loads``; if it loads, ``engine.screen`` (all checks unless
``--core-only``), every result array checked finite, ``store.dumps`` with the result read
back equal, and the JSON of ``check --json`` written with ``allow_nan=False``.

A run passes when the only exception is :class:`InputError` (a clear message), nothing is
NaN or inf, and no document takes longer than 20 s. NaN or inf in ``result.extras`` alone is
counted apart (``extras-marker``): the slip and seismic plug-ins mark "no circle in the
search range" and "Mononobe-Okabe has no solution" that way, with the segment referred and
the JSON writing null; the figures say how often. Failing documents are written to
``--out`` (default ``/tmp/wallscreen-fuzz``) to be replayed. Prints the figures.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import argparse  # noqa: E402
import dataclasses  # noqa: E402
import datetime  # noqa: E402
import json  # noqa: E402
import random  # noqa: E402
import signal  # noqa: E402
import time  # noqa: E402
import tomllib  # noqa: E402
import traceback  # noqa: E402
from collections import Counter  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import tomli_w  # noqa: E402

from screening import store  # noqa: E402
from screening.cli.jsonout import corridor_json  # noqa: E402
from screening.engine import screen  # noqa: E402
from screening.model.errors import InputError  # noqa: E402
from screening.model.presets import demo_corridor_path, load_presets  # noqa: E402
from screening.model.schema import RANGES  # noqa: E402

LIMIT_S = 20.0
HANG_S = 120

BASES = {
    "one-segment": """schema = "wallscreen/1"

[corridor]
name = "Fuzz one"
factor_set = "aashto-lrfd"
design_life_years = 100

[defaults]
fill = "granular-wellgraded"
retained = { unit_weight_kn_m3 = 19.0, friction_deg = 30.0 }
foundation = { unit_weight_kn_m3 = 19.0, friction_deg = 30.0, cohesion_kpa = 0.0, water_depth_m = 20.0 }
reinforcement = "steel-strip"
spacing_m = 0.75
surcharge_kpa = 0.0
traffic = "approach"

[[segment]]
id = "E-01"
wall = "East"
structure = "wall"
chainage_start_m = 1000.0
chainage_end_m = 1030.0
height_start_m = 2.0
height_end_m = 4.5
""",
    "three-kinds": """schema = "wallscreen/1"

[corridor]
name = "Fuzz three"
factor_set = { preset = "asd", eccentricity_limit_soil = 0.2 }

[rules]
max_height_m = 11.0
marginal_cdr = 1.15

[defaults]
wall = "Ramp"
fill = { preset = "gravel-sandy", friction_deg = 36.0 }
retained = "sand-silty-marginal"
foundation = { unit_weight_kn_m3 = 18.0, friction_deg = 26.0, cohesion_kpa = 5.0, undrained_strength_kpa = 60.0, water_depth_m = 2.0 }
reinforcement = { preset = "geogrid", spacing_m = 0.5 }
traffic = 12.5
seismic_kh = 0.15

[[segment]]
id = "R-1"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = 0.5
height_end_m = 3.0
backslope_deg = 12.0

[[segment]]
id = "R-2"
structure = "abutment"
chainage_start_m = 20.0
chainage_end_m = 32.5
height_start_m = 3.0
height_end_m = 7.5
reinforcement = "steel-grid"
toe_slope_deg = 8.0
note = "bridge seat # 2"

[[segment]]
id = "R-3"
wall = "Ramp, north"
chainage_start_m = 0.0
chainage_end_m = 15.0
height_start_m = 9.0
height_end_m = 12.5
water_in_fill = true
arrangement = "tiered"
surcharge_kpa = 10.0
""",
}


def _demo_head(n_segments: int = 4) -> str:
    text = demo_corridor_path().read_text(encoding="utf-8")
    cut = -1
    for _ in range(n_segments + 1):
        cut = text.find("\n[[segment]]", cut + 1)
        if cut < 0:
            return text
    return text[:cut] + "\n"


BASES["demo-head"] = _demo_head()

# ------------------------------------------------------------------ mutations

EXTREMES = [
    0,
    -1,
    -0.0,
    1e-300,
    -1e300,
    1e300,
    float("nan"),
    float("inf"),
    float("-inf"),
    2**63 - 1,
    -(2**63),
    0.1,
    29.999,
    30.0,
    1e7,
    "",
    "x",
    "approach",
    "abutment",
    "granular-wellgraded",
    "nan",
    "1e3",
    " " * 3,
    "é" * 200,
    True,
    False,
    [],
    [1.0, 2.0],
    {},
    {"preset": "geogrid"},
    {"unit_weight_kn_m3": 0.0},
    datetime.date(2026, 1, 2),
]


def _leaves(doc, path=()):
    if isinstance(doc, dict):
        for k, v in doc.items():
            yield path + (k,), v
            yield from _leaves(v, path + (k,))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            yield path + (i,), v
            yield from _leaves(v, path + (i,))


def _parent(doc, path):
    for p in path[:-1]:
        doc = doc[p]
    return doc


def _edge(key: str, value: float, rng: random.Random) -> float:
    """A value at or near an end of the field's valid range, or anywhere inside it: what
    validation lets through, where an engine is most likely to divide by zero."""
    rng_ = RANGES.get(key)
    if rng_ is None:
        return rng.choice([0.0, value * 2, value / 2, 1e6])
    tiny = 1e-9 * max(1.0, abs(rng_.hi - rng_.lo))
    lo = rng_.lo + tiny if rng_.lo_open else rng_.lo
    hi = rng_.hi - tiny if rng_.hi_open else rng_.hi
    return rng.choice([lo, hi, lo + tiny, hi - tiny, rng.uniform(lo, hi), rng.uniform(lo, hi)])


def value_mutation(text: str, rng: random.Random) -> tuple[str, str]:
    doc = tomllib.loads(text)
    leaves = list(_leaves(doc))
    path, value = rng.choice(leaves)
    parent = _parent(doc, path)
    roll = rng.random()
    if roll < 0.08 and isinstance(parent, dict):
        del parent[path[-1]]
        what = "drop key"
    elif roll < 0.13 and isinstance(parent, dict):
        parent[rng.choice(["extra", "height_m", "walls", "fill_id", "Wall"])] = 1.0
        what = "unknown key"
    elif isinstance(value, int | float) and not isinstance(value, bool) and roll < 0.65:
        parent[path[-1]] = _edge(str(path[-1]), value, rng)
        what = "edge of range"
    elif isinstance(value, int | float) and not isinstance(value, bool) and roll < 0.78:
        new = rng.choice(
            [-value, value * 1000, value / 1000, value + 1e-9, float("nan"), float("inf")]
        )
        parent[path[-1]] = new
        what = "scale number"
    else:
        parent[path[-1]] = rng.choice(EXTREMES)
        what = "extreme value"
    return tomli_w.dumps(doc), what


def text_mutation(text: str, rng: random.Random) -> tuple[str, str]:
    lines = text.split("\n")
    op = rng.choice(["delete", "duplicate", "swap", "flip", "insert", "truncate", "cut", "move"])
    i = rng.randrange(len(lines))
    j = rng.randrange(len(lines))
    if op == "delete":
        del lines[i]
    elif op == "duplicate":
        lines.insert(i, lines[i])
    elif op == "swap":
        lines[i], lines[j] = lines[j], lines[i]
    elif op == "move":
        lines.insert(j, lines.pop(i))
    elif op in ("flip", "insert"):
        line = lines[i]
        k = rng.randrange(len(line) + 1)
        ch = rng.choice("\"[]{}=#.,-+e0123456789 \t\\'\x00\x7fé\u2028\ufeffabcxyz")
        if op == "flip" and line:
            k = min(k, len(line) - 1)
            lines[i] = line[:k] + ch + line[k + 1 :]
        else:
            lines[i] = line[:k] + ch + line[k:]
    elif op == "truncate":
        out = "\n".join(lines)
        return out[: rng.randrange(len(out) + 1)], "truncate"
    elif op == "cut":
        out = "\n".join(lines)
        a = rng.randrange(len(out) + 1)
        return out[:a] + out[a + rng.randrange(200) :], "cut span"
    return "\n".join(lines), op


def mutate(text: str, rng: random.Random) -> tuple[str, list[str]]:
    kinds = []
    for _ in range(rng.choice([1, 1, 1, 2, 3])):
        try:
            if rng.random() < 0.5:
                text, kind = value_mutation(text, rng)
            else:
                text, kind = text_mutation(text, rng)
        except (tomllib.TOMLDecodeError, ValueError, TypeError, IndexError):
            text, kind = text_mutation(text, rng)  # a value change needs valid TOML
        kinds.append(kind)
    return text, kinds


# ------------------------------------------------------------------ checks


def non_finite(result) -> list[str]:
    """Names of the result arrays holding NaN or inf."""
    bad = []

    def look(name, value):
        if isinstance(value, np.ndarray) and value.dtype.kind in "fc":
            if not np.isfinite(value).all():
                bad.append(name)
        elif isinstance(value, float) and not np.isfinite(value):
            bad.append(name)

    for f in dataclasses.fields(result):
        value = getattr(result, f.name)
        if f.name == "checks":
            for check, arrays in value.items():
                for g in dataclasses.fields(arrays):
                    look(f"checks.{check}.{g.name}", getattr(arrays, g.name))
        elif f.name == "layers":
            for g in dataclasses.fields(value):
                look(f"layers.{g.name}", getattr(value, g.name))
        elif f.name == "extras":
            for key, arr in value.items():
                look(f"extras.{key}", np.asarray(arr) if isinstance(arr, list) else arr)
        else:
            look(f.name, value)
    look("length_ratio", result.length_ratio)
    return bad


class Hang(Exception):
    pass


def _alarm(signum, frame):
    raise Hang()


def run_one(text: str, presets, extra_checks) -> tuple[str, str]:
    """(outcome, detail): outcome is refused, screened, crash, non-finite or hang."""
    try:
        corridor = store.loads(text, "fuzz.toml", presets)
    except InputError as err:
        return "refused", str(err)
    if not corridor.segments:
        return "refused", "no segments"
    result = screen(corridor, extra_checks=extra_checks)
    bad = non_finite(result)
    core = [b for b in bad if not b.startswith("extras.")]
    if core:
        return "non-finite", ", ".join(bad)
    saved = store.dumps(corridor, result, presets)
    if store.loads(saved, "saved.toml", presets) != corridor:
        return "crash", "load(dumps(x)) != x"
    json.dumps(corridor_json(corridor, result), allow_nan=False)
    if bad:  # the plug-ins' own markers for "no value" (see the module docstring)
        return "extras-marker", ", ".join(bad)
    return "screened", ""


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--count", type=int, default=10_000)
    ap.add_argument("--seed", type=int, default=14)
    ap.add_argument("--core-only", action="store_true", help="built-in checks only")
    ap.add_argument("--out", type=Path, default=Path("/tmp/wallscreen-fuzz"))
    args = ap.parse_args()
    try:  # a runaway allocation must fail here, not push a shared machine into swap
        import resource

        cap = 4 * 1024**3
        resource.setrlimit(resource.RLIMIT_AS, (cap, cap))
    except (ImportError, ValueError, OSError):
        pass
    presets = load_presets()
    extra_checks = () if args.core_only else None
    rng = random.Random(args.seed)
    outcomes: Counter[str] = Counter()
    by_kind: Counter[str] = Counter()
    times: list[float] = []
    slowest = (0.0, "")
    failures = []
    markers: Counter[str] = Counter()
    signal.signal(signal.SIGALRM, _alarm)
    start = time.perf_counter()
    names = sorted(BASES)
    for n in range(args.count):
        base = names[n % len(names)]
        text, kinds = mutate(BASES[base], rng)
        t0 = time.perf_counter()
        signal.alarm(HANG_S)
        try:
            outcome, detail = run_one(text, presets, extra_checks)
        except Hang:
            outcome, detail = "hang", f"over {HANG_S} s"
        except Exception:  # noqa: BLE001 - what the fuzz is here to find
            outcome, detail = "crash", traceback.format_exc(limit=-3)
        finally:
            signal.alarm(0)
        took = time.perf_counter() - t0
        times.append(took)
        if took > slowest[0]:
            slowest = (took, f"#{n} {base} {'+'.join(kinds)}")
        outcomes[outcome] += 1
        if outcome == "extras-marker":
            markers.update(detail.split(", "))
        for kind in kinds:
            by_kind[kind] += 1
        if outcome in ("crash", "non-finite", "hang") or took > LIMIT_S:
            failures.append((n, base, kinds, outcome, detail))
            args.out.mkdir(parents=True, exist_ok=True)
            (args.out / f"{n:05d}-{outcome}.toml").write_text(text, encoding="utf-8")
            (args.out / f"{n:05d}-{outcome}.txt").write_text(detail, encoding="utf-8")
        if (n + 1) % 500 == 0:
            print(f"{n + 1} documents, {time.perf_counter() - start:.0f} s, {dict(outcomes)}")
    total = time.perf_counter() - start
    arr = np.array(times)
    print()
    print(
        f"documents: {args.count} (seed {args.seed}, {'core' if args.core_only else 'all'} checks)"
    )
    print(f"outcomes: {dict(outcomes)}")
    print(f"mutations: {dict(by_kind)}")
    print(
        f"time per document: median {np.median(arr) * 1e3:.1f} ms, 99th percentile "
        f"{np.percentile(arr, 99) * 1e3:.0f} ms, longest {slowest[0]:.2f} s ({slowest[1]}); "
        f"total {total:.0f} s"
    )
    print(f"failures (crash, NaN/inf, over {LIMIT_S:g} s): {len(failures)}")
    for key, count in sorted(markers.items()):
        print(f"  extras marker {key}: {count} documents")
    for n, base, kinds, outcome, detail in failures[:20]:
        print(f"  #{n} {base} {'+'.join(kinds)}: {outcome}: {detail.strip().splitlines()[-1]}")


if __name__ == "__main__":
    main()
