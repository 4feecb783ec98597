"""Which inputs a segment's outcome hangs on: one-at-a-time sensitivity and Monte Carlo.

:func:`segment_sensitivity` screens one segment with each input moved to the low and the
high end of its range (presets/sensitivity.toml), all variants in one engine call, and
ranks the inputs: those that flip the verdict first, then by how far they move L, then by
how far they move the smallest capacity/demand ratio.

:func:`monte_carlo` draws every input of every segment at once (normal, mean = the
file's value, standard deviation = range/2, cut at physical limits), screens the corridor
of samples × segments in one engine call, and gives each segment its probability of
being referred, so the team sees which verdicts are robust and which hang on one soil
test. Seeded: the same seed gives the same answer.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from screening.engine import screen
from screening.engine.result import CorridorResult
from screening.model import Corridor, FactorSet, Segment

SENSITIVITY_FILE = "sensitivity.toml"


@dataclass(frozen=True)
class Input:
    """One input that sensitivity varies: where it sits in a segment and its physical limits."""

    key: str
    label: str
    unit: str
    part: str | None
    """Segment field holding a soil (fill, retained, foundation), or None for the segment."""
    field: str
    """Field name (``traffic`` is read as the engine's resolved kPa, written as a number)."""
    lowest: float
    highest: float

    def get(self, seg: Segment, traffic_kpa: float) -> float | None:
        """The input's value, None where it does not apply (no cu on a drained foundation)."""
        if self.field == "traffic":
            return traffic_kpa
        value = (
            getattr(getattr(seg, self.part), self.field) if self.part else getattr(seg, self.field)
        )
        return None if value is None else float(value)

    def put(self, seg: Segment, value: float) -> Segment:
        return put_values(seg, {self: value})


def put_values(seg: Segment, values: dict[Input, float], **also: object) -> Segment:
    """The segment with several inputs set at once (one replace per soil)."""
    top: dict[str, object] = dict(also)
    parts: dict[str, dict[str, float]] = {}
    for p, v in values.items():
        if p.part is None:
            top[p.field] = float(v)
        else:
            parts.setdefault(p.part, {})[p.field] = float(v)
    for part, changes in parts.items():
        top[part] = dataclasses.replace(getattr(seg, part), **changes)
    return dataclasses.replace(seg, **top)


INPUTS: tuple[Input, ...] = (
    Input("fill_friction_deg", "φ of reinforced fill", "deg", "fill", "friction_deg", 15.0, 50.0),
    Input(
        "fill_unit_weight_kn_m3",
        "γ of reinforced fill",
        "kN/m3",
        "fill",
        "unit_weight_kn_m3",
        12.0,
        26.0,
    ),
    Input(
        "retained_friction_deg", "φ of retained fill", "deg", "retained", "friction_deg", 15.0, 50.0
    ),
    Input(
        "retained_unit_weight_kn_m3",
        "γ of retained fill",
        "kN/m3",
        "retained",
        "unit_weight_kn_m3",
        12.0,
        26.0,
    ),
    Input(
        "foundation_friction_deg", "φ of foundation", "deg", "foundation", "friction_deg", 0.0, 50.0
    ),
    Input(
        "foundation_unit_weight_kn_m3",
        "γ of foundation",
        "kN/m3",
        "foundation",
        "unit_weight_kn_m3",
        12.0,
        26.0,
    ),
    Input(
        "foundation_undrained_strength_kpa",
        "cu of foundation",
        "kPa",
        "foundation",
        "undrained_strength_kpa",
        1.0,
        1000.0,
    ),
    Input("surcharge_kpa", "permanent surcharge", "kPa", None, "surcharge_kpa", 0.0, 1000.0),
    Input("traffic_kpa", "traffic surcharge", "kPa", None, "traffic", 0.0, 1000.0),
    Input(
        "water_depth_m",
        "water table depth below base",
        "m",
        "foundation",
        "water_depth_m",
        0.0,
        100.0,
    ),
)
"""Inputs in presets/sensitivity.toml order; limits keep drawn values physical."""

INPUT_KEYS = tuple(p.key for p in INPUTS)


def load_ranges(path: str | Path | None = None) -> dict[str, float]:
    """Half-ranges by input key from presets/sensitivity.toml (or ``path``)."""
    from screening.model.presets import parse_toml, presets_root, read_text
    from screening.model.schema import Range, SourceMap, Where, number, suggest, table

    file = Path(str(presets_root() / SENSITIVITY_FILE)) if path is None else Path(path)
    source = str(file)
    text = read_text(file, source)
    doc = parse_toml(text, source)
    top = Where(source, section=("", 0), smap=SourceMap(text))
    for key in doc:
        if key != "range":
            raise top.error(key, suggest(key, ["range"]), at_value=False)
    where = Where(source, table="range", section=("range", 0), smap=top.smap)
    out = {}
    for key, value in table(doc.get("range", {}), "range", where).items():
        if key not in INPUT_KEYS:
            raise where.error(key, suggest(key, INPUT_KEYS), at_value=False)
        out[key] = number(value, key, where, Range(0.0, 1000.0))
    return out


# ------------------------------------------------------------------ one segment


@dataclass(frozen=True)
class Sensitivity:
    """How one input moves one segment's outcome over its ± range."""

    key: str
    label: str
    unit: str
    base: float
    low: float
    high: float
    verdict_low: str
    verdict_high: str
    length_low_m: float
    length_high_m: float
    min_cdr_low: float
    min_cdr_high: float
    flips: bool
    """The verdict differs from the base verdict at either end."""
    length_shift_m: float
    """Largest |L - L_base| over the two ends."""
    cdr_shift: float
    """Largest |min CDR - base min CDR| over the two ends."""


def _variants(seg: Segment, traffic_kpa: float, ranges: dict[str, float]):
    for p in INPUTS:
        half = ranges.get(p.key, 0.0)
        base = p.get(seg, traffic_kpa)
        if base is None or half <= 0.0:
            continue
        lo = float(np.clip(base - half, p.lowest, p.highest))
        hi = float(np.clip(base + half, p.lowest, p.highest))
        yield p, float(base), lo, hi


def segment_sensitivity(
    corridor: Corridor,
    i: int,
    *,
    ranges: dict[str, float] | None = None,
    factor_set: FactorSet | None = None,
    result: CorridorResult | None = None,
    extra_checks: Sequence | None = None,
) -> list[Sensitivity]:
    """Inputs of segment ``i`` ranked by how much they matter (see module docstring).

    ``result``: a screen of ``corridor`` already at hand (only its traffic is read);
    ``ranges``: half-ranges by input key (default: presets/sensitivity.toml).
    """
    return corridor_sensitivity(
        corridor,
        [i],
        ranges=ranges,
        factor_set=factor_set,
        result=result,
        extra_checks=extra_checks,
    )[i]


def corridor_sensitivity(
    corridor: Corridor,
    indices: Sequence[int],
    *,
    ranges: dict[str, float] | None = None,
    factor_set: FactorSet | None = None,
    result: CorridorResult | None = None,
    extra_checks: Sequence | None = None,
) -> dict[int, list[Sensitivity]]:
    """:func:`segment_sensitivity` of several segments, all variants in one engine call.

    ``extra_checks`` goes to the engine (None: every check, compound search included;
    ``()``: the core checks only, many times faster but blind to compound stability).
    """
    ranges = load_ranges() if ranges is None else ranges
    indices = list(dict.fromkeys(indices))
    if not indices:
        return {}
    if result is None:
        picked = dataclasses.replace(
            corridor, segments=tuple(corridor.segments[i] for i in indices)
        )
        traffic = dict(
            zip(indices, screen(picked, factor_set, ()).traffic_kpa.tolist(), strict=True)
        )
    else:
        traffic = {i: float(result.traffic_kpa[i]) for i in indices}
    plans = {}
    variants: list[Segment] = []
    for i in indices:
        seg = corridor.segments[i]
        plan = list(_variants(seg, traffic[i], ranges))
        plans[i] = (len(variants), plan)
        # every row its own id: the engine keys per-screen caches by segment id
        variants.append(dataclasses.replace(seg, id=f"{seg.id}#0"))
        for k, (p, _, lo, hi) in enumerate(plan, start=1):
            variants += [
                put_values(seg, {p: lo}, id=f"{seg.id}#{k}-"),
                put_values(seg, {p: hi}, id=f"{seg.id}#{k}+"),
            ]
    run = screen(dataclasses.replace(corridor, segments=tuple(variants)), factor_set, extra_checks)
    return {i: _rank(run, first, plan) for i, (first, plan) in plans.items()}


def _rank(run: CorridorResult, first: int, plan: list) -> list[Sensitivity]:
    v0, l0, c0 = run.verdict[first], float(run.length_m[first]), float(run.min_cdr[first])
    out = []
    for k, (p, base, lo, hi) in enumerate(plan):
        a, b = first + 1 + 2 * k, first + 2 + 2 * k
        la, lb = float(run.length_m[a]), float(run.length_m[b])
        ca, cb = float(run.min_cdr[a]), float(run.min_cdr[b])
        out.append(
            Sensitivity(
                key=p.key,
                label=p.label,
                unit=p.unit,
                base=base,
                low=lo,
                high=hi,
                verdict_low=run.verdict[a],
                verdict_high=run.verdict[b],
                length_low_m=la,
                length_high_m=lb,
                min_cdr_low=ca,
                min_cdr_high=cb,
                flips=run.verdict[a] != v0 or run.verdict[b] != v0,
                length_shift_m=max(abs(la - l0), abs(lb - l0)),
                cdr_shift=max(abs(ca - c0), abs(cb - c0)),
            )
        )
    out.sort(key=lambda s: (not s.flips, -round(s.length_shift_m, 6), -s.cdr_shift))
    return out


# ------------------------------------------------------------------ Monte Carlo


@dataclass(frozen=True)
class MonteCarlo:
    """Per-segment outcome frequencies over ``samples`` draws."""

    ids: list[str]
    samples: int
    seed: int
    p_refer: np.ndarray
    """Probability of refer per segment, shape (n,)."""
    p_marginal: np.ndarray
    p_clear: np.ndarray
    length_mean_m: np.ndarray
    length_p90_m: np.ndarray
    """90th percentile of L per segment."""
    base_verdict: list[str]
    core_only: bool = False
    """True when the compound search was left out (``extra_checks=()``)."""

    def robust(self, threshold: float = 0.9) -> np.ndarray:
        """True where the base verdict comes out in at least ``threshold`` of the draws."""
        p = {"clear": self.p_clear, "marginal": self.p_marginal, "refer": self.p_refer}
        return np.array([p[v][i] >= threshold for i, v in enumerate(self.base_verdict)], dtype=bool)


def draw_inputs(
    corridor: Corridor,
    n_samples: int,
    seed: int,
    ranges: dict[str, float],
    traffic_kpa: np.ndarray,
) -> dict[str, np.ndarray]:
    """Drawn values by input key, shape (n_samples, n); NaN where an input does not apply."""
    rng = np.random.default_rng(seed)
    n = len(corridor.segments)
    out = {}
    for p in INPUTS:  # fixed order: the same seed always gives the same draws
        base = np.array(
            [
                np.nan if (v := p.get(s, float(traffic_kpa[j]))) is None else float(v)
                for j, s in enumerate(corridor.segments)
            ]
        )
        sigma = ranges.get(p.key, 0.0) / 2.0
        noise = rng.standard_normal((n_samples, n))
        out[p.key] = np.clip(base[None, :] + sigma * noise, p.lowest, p.highest)
    return out


def monte_carlo(
    corridor: Corridor,
    n_samples: int = 200,
    seed: int = 0,
    *,
    ranges: dict[str, float] | None = None,
    factor_set: FactorSet | None = None,
    extra_checks: Sequence | None = None,
) -> MonteCarlo:
    """Probability of each verdict per segment over ``n_samples`` draws of every input.

    One engine call screens ``n_samples × n`` segments (rows sample-major). Cost grows
    with that product: measured about 0.2 ms per segment-sample with the core checks and
    5-10 ms with the compound search (bench/bench_corridor_tools.py); ``extra_checks=()``
    leaves the compound search out when speed matters more than compound stability.
    """
    if n_samples < 1:
        raise ValueError("n_samples must be at least 1")
    ranges = load_ranges() if ranges is None else ranges
    base = screen(corridor, factor_set, extra_checks)
    drawn = draw_inputs(corridor, n_samples, seed, ranges, base.traffic_kpa)
    varied = [p for p in INPUTS if ranges.get(p.key, 0.0) > 0.0]
    rows = []
    for k in range(n_samples):
        for j, seg in enumerate(corridor.segments):
            values = {p: drawn[p.key][k, j] for p in varied if not np.isnan(drawn[p.key][k, j])}
            rows.append(put_values(seg, values, id=f"{seg.id}#{k}"))
    run = screen(dataclasses.replace(corridor, segments=tuple(rows)), factor_set, extra_checks)
    n = len(corridor.segments)
    verdict = np.array(run.verdict, dtype=object).reshape(n_samples, n)
    length = np.asarray(run.length_m).reshape(n_samples, n)
    return MonteCarlo(
        ids=[s.id for s in corridor.segments],
        samples=n_samples,
        seed=seed,
        p_refer=(verdict == "refer").mean(axis=0),
        p_marginal=(verdict == "marginal").mean(axis=0),
        p_clear=(verdict == "clear").mean(axis=0),
        length_mean_m=length.mean(axis=0),
        length_p90_m=np.percentile(length, 90, axis=0),
        base_verdict=list(base.verdict),
        core_only=extra_checks is not None and len(extra_checks) == 0,
    )
