"""Quantities and a rough cost per segment and for the corridor, from a screen.

Per segment (height varies linearly between its two ends; design height H = exposed +
embedment at each end, with the segment's embedment ratio):

- ``face_area_m2``: exposed face, ½(h0 + h1)·length; ``facing_area_m2`` adds the buried
  part down to the levelling pad (what is supplied);
- ``levelling_pad_m``: the length along the wall;
- ``select_fill_m3``: the reinforced zone, L·½(H0 + H1)·length (facing thickness ignored);
- reinforcement at the screened length L and the grade chosen for each layer: layer *i*
  from the bottom (Sv/2 above the pad, then every Sv) runs where H(x) >= (i + 1)·Sv, the
  engine's layout rule, so a tapering segment has fewer layers at its low end;
  geosynthetics in m² per grade (L × run × Rc); steel strips as a count (whole strips per
  layer), their total length and mass; bar mats as mass of longitudinal and transverse
  bars. Steel density 7850 kg/m³ [mem, EN 1991-1-1 Table A.4, 77-78.5 kN/m³];
- ``cost``: quantities × unit rates: the shipped ``presets/rates.toml`` (placeholders;
  :attr:`Rates.placeholder` says so), with a corridor file's own ``[rates]`` table over
  them, or a whole rates file given with ``--rates FILE``.

Layers for which no grade passes are counted at the heaviest grade and flagged.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from screening.engine.result import CorridorResult
from screening.model import Corridor, Grade
from screening.model.errors import InputError

STEEL_DENSITY_KG_M3 = 7850.0
RATES_FILE = "rates.toml"


@dataclass(frozen=True)
class Rates:
    """Unit rates (``[rates]`` of presets/rates.toml), all in one currency."""

    face_m2: float
    levelling_pad_m: float
    select_fill_m3: float
    steel_kg: float
    geosynthetic_m2: float
    geosynthetic_m2_per_kn_m: float = 0.0
    currency: str = ""
    placeholder: bool = True
    """True while the rates are the shipped invented figures."""
    grade_m2: dict[str, float] = field(default_factory=dict)
    """Rate per m² for named geosynthetic grades, overriding the formula."""

    def geosynthetic_rate(self, grade: Grade) -> float:
        if grade.name in self.grade_m2:
            return self.grade_m2[grade.name]
        return self.geosynthetic_m2 + self.geosynthetic_m2_per_kn_m * (
            grade.ultimate_strength_kn_m or 0.0
        )


RATE_KEYS = ("face_m2", "levelling_pad_m", "select_fill_m3", "steel_kg", "geosynthetic_m2")
"""The rates every corridor uses; a table that sets all of them is no longer placeholder."""


def load_rates(path: str | Path | None = None) -> Rates:
    """Rates from ``path`` (default: the shipped presets/rates.toml); InputError on a problem.

    A rates file holds one ``[rates]`` table, as the shipped one (``wallscreen report
    --rates FILE``); keys it leaves out keep the shipped values."""
    from screening.model.presets import parse_toml, presets_root, read_text
    from screening.model.schema import SourceMap, Where, suggest

    file = Path(str(presets_root() / RATES_FILE)) if path is None else Path(path)
    source = str(file)
    text = read_text(file, source)
    doc = parse_toml(text, source)
    where = Where(source, table="rates", section=("rates", 0), smap=SourceMap(text))
    for key in doc:
        if key != "rates":
            raise Where(source, section=("", 0), smap=where.smap).error(
                key, suggest(key, ["rates"]), at_value=False
            )
    return rates_from_table(doc.get("rates", {}), where, None if path is None else load_rates())


def rates_from_table(value: object, where, base: Rates | None = None) -> Rates:
    """A ``[rates]`` table (of a rates file or of a corridor file) over ``base`` (None: the
    model's own defaults); InputError, at the key, on a problem. The result is
    placeholder only while it keeps some placeholder rate of ``base`` (or says so)."""
    from screening.model.schema import Where, build, number, table

    tab = dict(table(value, "rates", where))
    grades = table(tab.pop("grade", {}), "grade", where.inline("grade"))
    rates = build(Rates, tab, where, base=base, inline=False)
    sub = Where(where.file, table="rates.grade", section=("rates.grade", 0), smap=where.smap)
    grade_m2 = dict(base.grade_m2) if base is not None else {}
    grade_m2.update({k: number(v, k, sub) for k, v in grades.items()})
    placeholder = rates.placeholder
    if base is not None and "placeholder" not in tab:
        placeholder = base.placeholder and not all(k in tab for k in RATE_KEYS)
    return Rates(**{**rates.__dict__, "grade_m2": grade_m2, "placeholder": placeholder})


def corridor_rates(corridor: Corridor, override: Rates | None = None) -> Rates:
    """The rates a corridor's costs use: ``override`` (``--rates FILE``) when given, else
    the corridor file's own ``[rates]`` table over the shipped rates."""
    if override is not None:
        return override
    table = getattr(corridor, "rates", None)
    if not table:
        return load_rates()
    from screening.model.schema import Where

    return rates_from_table(dict(table), Where("corridor file", table="rates"), load_rates())


def rates_words(corridor: Corridor, override_path: str | Path | None = None) -> str:
    """Where the rates come from, in a few words."""
    if override_path is not None:
        return f"rates from {override_path}"
    if getattr(corridor, "rates", None):
        return "rates from the corridor file's [rates] table (the rest shipped)"
    return "shipped rates (presets/rates.toml)"


def amount(value: float) -> str:
    """A sum of money or a count as every screen and report writes it: ``12,345``."""
    return f"{value:,.0f}"


@dataclass(frozen=True)
class SegmentQuantities:
    id: str
    length_along_m: float
    face_area_m2: float
    facing_area_m2: float
    levelling_pad_m: float
    select_fill_m3: float
    reinforcement_length_m: float
    """Screened L of every layer."""
    layers: int
    """Layers at the tallest end."""
    material: str
    geosynthetic_m2: dict[str, float]
    """m² of product per grade name (geosynthetics)."""
    strip_count: int
    """Steel strips (or bar mats' longitudinal bars are counted in steel_kg)."""
    strip_length_m: float
    steel_kg: float
    cost: dict[str, float]
    """Cost per item: facing, levelling pad, select fill, steel, geosynthetic."""
    short_grade: bool = False
    """Some layer has no grade that passes: counted at the heaviest grade."""

    @property
    def cost_total(self) -> float:
        return sum(self.cost.values())

    def as_result(self) -> dict[str, float | int]:
        """Built-in numbers for a results table (the corridor file, JSON), SI, rounded."""
        out: dict[str, float | int] = {
            "face_area_m2": round(self.face_area_m2, 2),
            "facing_area_m2": round(self.facing_area_m2, 2),
            "select_fill_m3": round(self.select_fill_m3, 2),
            "levelling_pad_m": round(self.levelling_pad_m, 2),
        }
        if self.strip_count:
            out["strip_count"] = int(self.strip_count)
            out["strip_length_m"] = round(self.strip_length_m, 1)
        if self.steel_kg:
            out["steel_kg"] = round(self.steel_kg, 1)
        if self.geosynthetic_m2:
            out["geosynthetic_m2"] = round(sum(self.geosynthetic_m2.values()), 2)
        out["rough_cost"] = round(self.cost_total, 0)
        return out


@dataclass(frozen=True)
class CorridorQuantities:
    segments: list[SegmentQuantities]
    rates: Rates

    def total(self, name: str) -> float:
        """Sum of a numeric field (or ``cost_total``) over every segment."""
        return float(sum(getattr(s, name) for s in self.segments))

    def geosynthetic_m2(self) -> dict[str, float]:
        out: dict[str, float] = {}
        for s in self.segments:
            for grade, area in s.geosynthetic_m2.items():
                out[grade] = out.get(grade, 0.0) + area
        return out

    def cost(self) -> dict[str, float]:
        out: dict[str, float] = {}
        for s in self.segments:
            for item, value in s.cost.items():
                out[item] = out.get(item, 0.0) + value
        return out


def _design_ends(corridor: Corridor, result: CorridorResult) -> tuple[np.ndarray, np.ndarray]:
    """Design height at both ends: H = h + max(d_min, k·H) with the segment's ratio k."""
    h0 = np.array([s.height_start_m for s in corridor.segments], dtype=float)
    h1 = np.array([s.height_end_m for s in corridor.segments], dtype=float)
    k = np.asarray(result.extras.get("embedment_ratio", np.full(len(h0), 0.05)), dtype=float)
    d_min = corridor.rules.min_embedment_m

    def design(h: np.ndarray) -> np.ndarray:
        prop = h / (1.0 - k)
        return h + np.where(k * prop >= d_min, k * prop, d_min)

    return design(h0), design(h1)


def layer_runs_m(
    start_m: np.ndarray, end_m: np.ndarray, spacing_m: np.ndarray, length_m: np.ndarray, count: int
) -> np.ndarray:
    """Run length along the wall of layer i (from the bottom), shape (n, count).

    Layer i exists where the design height H(x) >= (i + 1)·Sv; H is linear from
    ``start_m`` to ``end_m`` over ``length_m``. The bottom layer runs the whole length.
    """
    i = np.arange(count)[None, :]
    need = (i + 1) * spacing_m[:, None]
    lo = np.minimum(start_m, end_m)[:, None]
    hi = np.maximum(start_m, end_m)[:, None]
    span = np.where(hi - lo > 1e-12, hi - lo, 1.0)
    frac = np.where(
        hi - lo > 1e-12, np.clip((hi - need) / span, 0.0, 1.0), (hi >= need - 1e-9) * 1.0
    )
    frac = np.where(i == 0, 1.0, frac)
    return frac * length_m[:, None]


def corridor_quantities(
    corridor: Corridor, result: CorridorResult, rates: Rates | None = None
) -> CorridorQuantities:
    """Quantities and rough cost of every segment (see the module docstring)."""
    if len(result) != len(corridor.segments) or list(result.ids) != [
        s.id for s in corridor.segments
    ]:
        raise InputError("the screen does not belong to this corridor; screen it again")
    rates = rates if rates is not None else corridor_rates(corridor)
    n = len(corridor.segments)
    along = np.array([s.length_along_m for s in corridor.segments], dtype=float)
    spacing = np.array([s.spacing_m for s in corridor.segments], dtype=float)
    big_h0, big_h1 = _design_ends(corridor, result)
    m = result.layers.mask.shape[1] if n else 0
    runs = layer_runs_m(big_h0, big_h1, spacing, along, m)  # bottom layer first
    count = result.layers.mask.sum(axis=1)
    out: list[SegmentQuantities] = []
    for i, seg in enumerate(corridor.segments):
        c = int(count[i])
        length = float(result.length_m[i])
        # engine layers are top first: bottom layer b has engine index c - 1 - b
        gidx = result.layers.grade_index[i, :c][::-1]
        grades = seg.reinforcement.grades
        short = bool((gidx < 0).any())
        gidx = np.where(gidx < 0, len(grades) - 1, gidx)
        run = runs[i, :c]
        geo: dict[str, float] = {}
        strips, strip_len, steel = 0, 0.0, 0.0
        material = seg.reinforcement.material
        for b in range(c):
            g = grades[int(gidx[b])]
            if material in ("geogrid", "geotextile"):
                geo[g.name] = geo.get(g.name, 0.0) + length * float(run[b]) * g.coverage_ratio
            elif material == "steel-strip":
                k = math.ceil((g.elements_per_m or 0.0) * float(run[b]) - 1e-9)
                strips += k
                area_m2 = (g.width_mm or 0.0) * (g.thickness_mm or 0.0) * 1e-6
                strip_len += k * length
                steel += k * length * area_m2 * STEEL_DENSITY_KG_M3
            else:  # steel-grid: longitudinal bars plus transverse bars across each mat
                steel += _mat_kg(seg.reinforcement, g, float(run[b]), length)
        fill = length * 0.5 * (big_h0[i] + big_h1[i]) * along[i]
        face = seg.face_area_m2
        facing = 0.5 * (big_h0[i] + big_h1[i]) * along[i]
        cost = {
            "facing": facing * rates.face_m2,
            "levelling pad": along[i] * rates.levelling_pad_m,
            "select fill": fill * rates.select_fill_m3,
            "steel": steel * rates.steel_kg,
            "geosynthetic": sum(
                area * rates.geosynthetic_rate(next(g for g in grades if g.name == name))
                for name, area in geo.items()
            ),
        }
        out.append(
            SegmentQuantities(
                id=seg.id,
                length_along_m=float(along[i]),
                face_area_m2=float(face),
                facing_area_m2=float(facing),
                levelling_pad_m=float(along[i]),
                select_fill_m3=float(fill),
                reinforcement_length_m=length,
                layers=c,
                material=material,
                geosynthetic_m2=geo,
                strip_count=strips,
                strip_length_m=strip_len,
                steel_kg=steel,
                cost={k: float(v) for k, v in cost.items()},
                short_grade=short,
            )
        )
    return CorridorQuantities(out, rates)


def _mat_kg(family, grade: Grade, run_m: float, length_m: float) -> float:
    """Bar mat steel: longitudinal bars (bars_per_m × run × L) and transverse bars
    (one every St along L, plus one, each Rc × run long)."""
    bar = math.pi / 4.0 * ((grade.bar_diameter_mm or 0.0) * 1e-3) ** 2
    longitudinal = (grade.bars_per_m or 0.0) * run_m * length_m * bar
    st = (family.transverse_bar_spacing_mm or 0.0) * 1e-3
    t = (family.transverse_bar_diameter_mm or 0.0) * 1e-3
    transverse = 0.0
    if st > 0.0:
        bars = math.floor(length_m / st + 1e-9) + 1
        transverse = bars * grade.coverage_ratio * run_m * math.pi / 4.0 * t**2
    return (longitudinal + transverse) * STEEL_DENSITY_KG_M3
