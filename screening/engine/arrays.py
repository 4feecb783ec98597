"""Turn a corridor's frozen segments into a struct of numpy arrays, one row per segment.

This is the only place the engine touches model objects: everything after it works on the
arrays of :class:`SegmentArrays` (shape ``(n,)`` per input, ``(n, g)`` for the grades of each
segment's reinforcement family, padded) and the load-case factors of :class:`CaseArrays`
(shape ``(c,)``). Reading attributes out of ``n`` objects is the one unavoidable pass over the
segments; reinforcement families are read once each and gathered by index.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.result import BoolArray, FloatArray, IntArray
from screening.model import Corridor, FactorSet, Reinforcement, Rules, Segment
from screening.model.errors import EngineError

MATERIALS = ("steel-strip", "steel-grid", "geogrid", "geotextile")
"""Material codes: index into this tuple."""
STRIP, GRID, GEOGRID, GEOTEXTILE = range(4)

TRAFFIC_NONE, TRAFFIC_PARALLEL, TRAFFIC_APPROACH, TRAFFIC_KPA = range(4)

SIZING_CHECKS = ("sliding", "eccentricity", "bearing", "pullout")
"""Checks whose result depends on the reinforcement length L."""

RUPTURE_KEYS = {
    STRIP: "rupture_steel_strip",
    GRID: "rupture_steel_grid",
    GEOGRID: "rupture_geosynthetic",
    GEOTEXTILE: "rupture_geosynthetic",
}


@dataclass(frozen=True)
class CaseArrays:
    """Load and material factors of a factor set's cases, shape ``(c,)`` each."""

    names: list[str]
    ev: FloatArray
    ev_resisting: FloatArray
    eh: FloatArray
    es: FloatArray
    es_resisting: FloatArray
    ls: FloatArray
    tan_phi: FloatArray
    """Partial factor dividing tan(phi') of every soil in this case."""
    cohesion: FloatArray
    undrained: FloatArray
    applies: dict[str, BoolArray]
    """check name -> (c,) True where the case lists that check."""

    def uses(self, check: str) -> BoolArray:
        """(c,) mask of the cases that list ``check`` (all False when none does)."""
        return self.applies.get(check, np.zeros(len(self.names), dtype=bool))


@dataclass(frozen=True)
class SegmentArrays:
    """Inputs of ``n`` segments as arrays (SI units as in the names)."""

    n: int
    ids: list[str]
    exposed_height_m: FloatArray
    abutment: BoolArray
    toe_slope_deg: FloatArray
    backslope_deg: FloatArray
    surcharge_kpa: FloatArray
    traffic_class: IntArray
    """TRAFFIC_NONE | TRAFFIC_PARALLEL | TRAFFIC_APPROACH | TRAFFIC_KPA."""
    traffic_value_kpa: FloatArray
    """The live surcharge when the class is TRAFFIC_KPA, else 0."""
    seismic_kh: FloatArray
    water_in_fill: BoolArray
    arrangement: list[str]
    spacing_m: FloatArray
    # reinforced fill
    fill_unit_weight_kn_m3: FloatArray
    fill_friction_deg: FloatArray
    fill_uniformity: FloatArray
    fill_fines_percent: FloatArray
    fill_plasticity_index: FloatArray
    # retained fill
    retained_unit_weight_kn_m3: FloatArray
    retained_friction_deg: FloatArray
    # foundation
    found_unit_weight_kn_m3: FloatArray
    found_friction_deg: FloatArray
    found_cohesion_kpa: FloatArray
    found_undrained_kpa: FloatArray
    """cu, kPa; NaN for a drained (free-draining) foundation."""
    found_water_depth_m: FloatArray
    found_firm_depth_m: FloatArray
    """Depth of a firm stratum below the base, m; inf where none is known, (n,)."""
    found_rock: BoolArray
    # reinforcement family
    material: IntArray
    """Index into MATERIALS."""
    inextensible: BoolArray
    alpha: FloatArray
    rf_total: FloatArray
    """RF_ID * RF_CR * RF_D (geosynthetics; 1 for steel)."""
    yield_strength_mpa: FloatArray
    zinc_um: FloatArray
    transverse_bar_mm: FloatArray
    transverse_spacing_mm: FloatArray
    # grades, (n, g) padded with NaN; grade_count says how many are real
    grade_count: IntArray
    grade_ult_kn_m: FloatArray
    grade_elements_per_m: FloatArray
    grade_width_mm: FloatArray
    grade_thickness_mm: FloatArray
    grade_bars_per_m: FloatArray
    grade_bar_diameter_mm: FloatArray
    grade_coverage: FloatArray
    grade_names: list[tuple[str, ...]]
    design_life_years: FloatArray
    # factor set
    factor_set_id: str
    method: str
    cases: CaseArrays
    phi_sliding: float
    phi_bearing: float
    phi_pullout: float
    phi_rupture: FloatArray
    """Resistance factor of rupture by material, (n,)."""
    eccentricity_limit: FloatArray
    """Largest e / L for each segment (rock or soil limit), (n,)."""
    resistance: dict[str, float]
    """The factor set's full resistance table (for checks added later)."""
    rules: Rules


def _traffic(segment: Segment) -> tuple[int, float]:
    value = segment.traffic
    if isinstance(value, bool):
        raise EngineError(f"segment {segment.id}: traffic must be a class or a number in kPa")
    if isinstance(value, int | float):
        return TRAFFIC_KPA, float(value)
    text = str(value).strip().lower()
    classes = {"none": TRAFFIC_NONE, "parallel": TRAFFIC_PARALLEL, "approach": TRAFFIC_APPROACH}
    if text in classes:
        return classes[text], 0.0
    try:
        return TRAFFIC_KPA, float(text)
    except ValueError:
        raise EngineError(
            f"segment {segment.id}: traffic {value!r} is not none, parallel, approach or a number"
        ) from None


def _cases(factor_set: FactorSet) -> CaseArrays:
    cases = factor_set.cases
    if not cases:
        raise EngineError(f"factor set {factor_set.id!r} has no load cases")

    def col(name: str) -> FloatArray:
        return np.array([float(getattr(c, name)) for c in cases], dtype=np.float64)

    names = {check for c in cases for check in c.checks}
    applies = {
        check: np.array([check in c.checks for c in cases], dtype=bool) for check in sorted(names)
    }
    return CaseArrays(
        names=[c.name for c in cases],
        ev=col("ev"),
        ev_resisting=col("ev_resisting"),
        eh=col("eh"),
        es=col("es"),
        es_resisting=col("es_resisting"),
        ls=col("ls"),
        tan_phi=col("tan_phi"),
        cohesion=col("cohesion"),
        undrained=col("undrained"),
        applies=applies,
    )


def _resistance(factor_set: FactorSet, key: str) -> float:
    try:
        return float(factor_set.resistance[key])
    except KeyError:
        raise EngineError(
            f"factor set {factor_set.id!r} has no resistance factor {key!r} "
            f"(it has: {', '.join(sorted(factor_set.resistance))})"
        ) from None


_NEEDS = {
    "steel-strip": ("elements_per_m", "width_mm", "thickness_mm"),
    "steel-grid": ("bars_per_m", "bar_diameter_mm"),
    "geogrid": ("ultimate_strength_kn_m",),
    "geotextile": ("ultimate_strength_kn_m",),
}


def _check_family(fam: Reinforcement) -> None:
    """Every value the checks need is there, or a message that says which is missing."""
    name = fam.id or fam.name or fam.material
    if fam.material.startswith("steel") and fam.yield_strength_mpa is None:
        raise EngineError(f"reinforcement {name!r}: steel needs yield_strength_mpa")
    if fam.material == "steel-grid" and (
        fam.transverse_bar_diameter_mm is None or fam.transverse_bar_spacing_mm is None
    ):
        raise EngineError(
            f"reinforcement {name!r}: steel grids need transverse_bar_diameter_mm and "
            "transverse_bar_spacing_mm (for F*)"
        )
    for grade in fam.grades:
        missing = [k for k in _NEEDS[fam.material] if getattr(grade, k) is None]
        if missing:
            raise EngineError(
                f"reinforcement {name!r}, grade {grade.name!r}: {fam.material} needs "
                + ", ".join(missing)
            )


def _family_table(families: list[Reinforcement]) -> dict[str, np.ndarray]:
    """Per-family scalars and padded grade rows, read once per distinct family."""
    g = max((len(f.grades) for f in families), default=1) or 1

    def grade_rows(attr: str) -> FloatArray:
        out = np.full((len(families), g), np.nan)
        for i, fam in enumerate(families):
            for j, grade in enumerate(fam.grades):
                value = getattr(grade, attr)
                out[i, j] = np.nan if value is None else float(value)
        return out

    def scalar(attr: str, default: float) -> FloatArray:
        vals = [getattr(f, attr) for f in families]
        return np.array([default if v is None else float(v) for v in vals], dtype=np.float64)

    for fam in families:
        if fam.material not in MATERIALS:
            raise EngineError(
                f"reinforcement {fam.id or fam.name!r}: unknown material {fam.material!r}"
            )
        if not fam.grades:
            raise EngineError(f"reinforcement {fam.id or fam.name!r} has no grades")
        _check_family(fam)
    return {
        "material": np.array([MATERIALS.index(f.material) for f in families], dtype=np.int64),
        "inextensible": np.array([f.kind == "inextensible" for f in families], dtype=bool),
        "alpha": scalar("scale_effect_alpha", 1.0),
        "rf_total": np.array(
            [f.rf_installation * f.rf_creep * f.rf_durability for f in families], dtype=np.float64
        ),
        "yield": scalar("yield_strength_mpa", np.nan),
        "zinc": scalar("zinc_coating_um", 0.0),
        "tbar": scalar("transverse_bar_diameter_mm", np.nan),
        "tspacing": scalar("transverse_bar_spacing_mm", np.nan),
        "count": np.array([len(f.grades) for f in families], dtype=np.int64),
        "ult": grade_rows("ultimate_strength_kn_m"),
        "elements": grade_rows("elements_per_m"),
        "width": grade_rows("width_mm"),
        "thickness": grade_rows("thickness_mm"),
        "bars": grade_rows("bars_per_m"),
        "bar_dia": grade_rows("bar_diameter_mm"),
        "coverage": grade_rows("coverage_ratio"),
    }


def build_arrays(corridor: Corridor, factor_set: FactorSet | None = None) -> SegmentArrays:
    """Struct of arrays for every segment of ``corridor`` under ``factor_set`` (default: its own)."""
    fs = factor_set if factor_set is not None else corridor.factor_set
    segs = corridor.segments
    rules = corridor.rules

    def f(values: list[float]) -> FloatArray:
        return np.array(values, dtype=np.float64).reshape(len(segs))

    # Distinct reinforcement families, by identity first (cheap), then gathered per segment.
    fam_index: dict[int, int] = {}
    families: list[Reinforcement] = []
    seg_family = np.empty(len(segs), dtype=np.int64)
    for i, s in enumerate(segs):
        key = id(s.reinforcement)
        if key not in fam_index:
            fam_index[key] = len(families)
            families.append(s.reinforcement)
        seg_family[i] = fam_index[key]
    table = _family_table(families) if families else None

    def fam(name: str, empty_shape: tuple[int, ...] = (0,)) -> np.ndarray:
        if table is None:
            return np.zeros(empty_shape)
        return table[name][seg_family]

    traffic = [_traffic(s) for s in segs]
    abutment = np.array([s.structure == "abutment" for s in segs], dtype=bool).reshape(len(segs))
    if corridor.design_life_years is not None:
        life = np.full(len(segs), float(corridor.design_life_years))
    else:
        life = np.where(abutment, rules.design_life_abutment_years, rules.design_life_wall_years)
    material = fam("material").astype(np.int64)
    phi_rupture_by_material = np.array(
        [_resistance(fs, RUPTURE_KEYS[m]) if m in set(material.tolist()) else 1.0 for m in range(4)]
    )
    rock = np.array([s.foundation.rock for s in segs], dtype=bool).reshape(len(segs))
    cu = [s.foundation.undrained_strength_kpa for s in segs]
    names_by_family = [tuple(g.name for g in fam_.grades) for fam_ in families]
    return SegmentArrays(
        n=len(segs),
        ids=[s.id for s in segs],
        exposed_height_m=f([s.exposed_height_m for s in segs]),
        abutment=abutment,
        toe_slope_deg=f([s.toe_slope_deg for s in segs]),
        backslope_deg=f([s.backslope_deg for s in segs]),
        surcharge_kpa=f([s.surcharge_kpa for s in segs]),
        traffic_class=np.array([t[0] for t in traffic], dtype=np.int64).reshape(len(segs)),
        traffic_value_kpa=f([t[1] for t in traffic]),
        seismic_kh=f([s.seismic_kh for s in segs]),
        water_in_fill=np.array([s.water_in_fill for s in segs], dtype=bool).reshape(len(segs)),
        arrangement=[s.arrangement for s in segs],
        spacing_m=f([s.spacing_m for s in segs]),
        fill_unit_weight_kn_m3=f([s.fill.unit_weight_kn_m3 for s in segs]),
        fill_friction_deg=f([s.fill.friction_deg for s in segs]),
        fill_uniformity=f([s.fill.uniformity_coefficient for s in segs]),
        fill_fines_percent=f([s.fill.fines_percent for s in segs]),
        fill_plasticity_index=f([s.fill.plasticity_index for s in segs]),
        retained_unit_weight_kn_m3=f([s.retained.unit_weight_kn_m3 for s in segs]),
        retained_friction_deg=f([s.retained.friction_deg for s in segs]),
        found_unit_weight_kn_m3=f([s.foundation.unit_weight_kn_m3 for s in segs]),
        found_friction_deg=f([s.foundation.friction_deg for s in segs]),
        found_cohesion_kpa=f([s.foundation.cohesion_kpa for s in segs]),
        found_undrained_kpa=f([np.nan if v is None else v for v in cu]),
        found_water_depth_m=f([s.foundation.water_depth_m for s in segs]),
        found_firm_depth_m=f(
            [
                np.inf if s.foundation.firm_depth_m is None else s.foundation.firm_depth_m
                for s in segs
            ]
        ),
        found_rock=rock,
        material=material,
        inextensible=fam("inextensible").astype(bool),
        alpha=fam("alpha"),
        rf_total=fam("rf_total"),
        yield_strength_mpa=fam("yield"),
        zinc_um=fam("zinc"),
        transverse_bar_mm=fam("tbar"),
        transverse_spacing_mm=fam("tspacing"),
        grade_count=fam("count").astype(np.int64),
        grade_ult_kn_m=fam("ult", (0, 1)),
        grade_elements_per_m=fam("elements", (0, 1)),
        grade_width_mm=fam("width", (0, 1)),
        grade_thickness_mm=fam("thickness", (0, 1)),
        grade_bars_per_m=fam("bars", (0, 1)),
        grade_bar_diameter_mm=fam("bar_dia", (0, 1)),
        grade_coverage=fam("coverage", (0, 1)),
        grade_names=[names_by_family[k] for k in seg_family.tolist()],
        design_life_years=life.astype(np.float64),
        factor_set_id=fs.id,
        method=fs.method,
        cases=_cases(fs),
        phi_sliding=_resistance(fs, "sliding"),
        phi_bearing=_resistance(fs, "bearing"),
        phi_pullout=_resistance(fs, "pullout"),
        phi_rupture=phi_rupture_by_material[material] if len(segs) else np.zeros(0),
        eccentricity_limit=np.where(rock, fs.eccentricity_limit_rock, fs.eccentricity_limit_soil),
        resistance=dict(fs.resistance),
        rules=rules,
    )
