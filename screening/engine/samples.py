"""Build corridors straight from numbers, for tests and the benchmark (no preset files needed).

The factor sets here carry the published factors the tests check against (AASHTO LRFD
Strength I [from memory, Tables 3.4.1-1/-2 and 11.5.7-1]; unfactored allowable stress with
FS as in FHWA-NHI-00-043 [from memory]). The materials are round illustrative values.
"""

from __future__ import annotations

from dataclasses import replace

from screening.model import (
    Corridor,
    Defaults,
    FactorSet,
    Fill,
    Foundation,
    Grade,
    LoadCase,
    Reinforcement,
    Rules,
    Segment,
    Soil,
)

ALL_CHECKS = ("sliding", "eccentricity", "bearing", "pullout", "rupture", "compound")

LRFD = FactorSet(
    id="aashto-lrfd",
    name="AASHTO LRFD, Strength I",
    method="lrfd",
    cases=(
        LoadCase(
            name="Strength I",
            ev=1.35,
            ev_resisting=1.0,
            eh=1.5,
            es=1.5,
            es_resisting=0.75,
            ls=1.75,
            checks=ALL_CHECKS,
        ),
    ),
    resistance={
        "sliding": 1.0,
        "bearing": 0.65,
        "pullout": 0.90,
        "rupture_steel_strip": 0.75,
        "rupture_steel_grid": 0.65,
        "rupture_geosynthetic": 0.90,
        "compound": 0.65,
        "compound_abutment": 0.65,
    },
    eccentricity_limit_soil=0.25,
    eccentricity_limit_rock=0.375,
)

ASD = FactorSet(
    id="asd",
    name="Allowable stress",
    method="asd",
    cases=(LoadCase(name="Service", checks=ALL_CHECKS),),
    resistance={
        "sliding": 1 / 1.5,
        "bearing": 1 / 2.5,
        "pullout": 1 / 1.5,
        "rupture_steel_strip": 0.55,
        "rupture_steel_grid": 0.48,
        "rupture_geosynthetic": 1 / 1.5,
        "compound": 1 / 1.3,
        "compound_abutment": 1 / 1.5,
    },
    eccentricity_limit_soil=1 / 6,
    eccentricity_limit_rock=0.25,
)

DA1 = FactorSet(
    id="en1997-da1",
    name="EN 1997-1 DA1",
    method="partial-factor",
    cases=(
        LoadCase("DA1-C1", ev=1.35, ev_resisting=1.0, eh=1.35, es=1.35, ls=1.5, checks=ALL_CHECKS),
        LoadCase("DA1-C2", ls=1.3, tan_phi=1.25, cohesion=1.25, undrained=1.4, checks=ALL_CHECKS),
    ),
    resistance={
        "sliding": 1.0,
        "bearing": 1.0,
        "pullout": 1.0,
        "rupture_steel_strip": 1 / 1.15,
        "rupture_steel_grid": 1 / 1.15,
        "rupture_geosynthetic": 1.0,
        "compound": 1.0,
        "compound_abutment": 1.0,
    },
    eccentricity_limit_soil=1 / 3,
    eccentricity_limit_rock=1 / 3,
)

STRIP = Reinforcement(
    material="steel-strip",
    kind="inextensible",
    grades=tuple(
        Grade(
            f"{k:g} strips/m",
            coverage_ratio=0.05 * k,
            elements_per_m=k,
            width_mm=50.0,
            thickness_mm=4.0,
        )
        for k in (2.0, 3.0, 4.0, 5.0, 6.0)
    ),
    spacing_m=0.75,
    yield_strength_mpa=450.0,
    zinc_coating_um=86.0,
    id="steel-strip",
)

GRID = Reinforcement(
    material="steel-grid",
    kind="inextensible",
    grades=(
        Grade("3 bars, 9.5", coverage_ratio=0.4, bars_per_m=3.0, bar_diameter_mm=9.5),
        Grade("4 bars, 11", coverage_ratio=0.5, bars_per_m=4.0, bar_diameter_mm=11.0),
        Grade("6 bars, 13", coverage_ratio=0.6, bars_per_m=6.0, bar_diameter_mm=13.0),
    ),
    spacing_m=0.6,
    yield_strength_mpa=450.0,
    zinc_coating_um=86.0,
    transverse_bar_diameter_mm=9.5,
    transverse_bar_spacing_mm=300.0,
    id="steel-grid",
)

GEOGRID = Reinforcement(
    material="geogrid",
    kind="extensible",
    grades=tuple(
        Grade(f"G{t:.0f}", ultimate_strength_kn_m=t)
        for t in (35.0, 55.0, 80.0, 110.0, 150.0, 200.0)
    ),
    spacing_m=0.6,
    scale_effect_alpha=0.8,
    rf_installation=1.2,
    rf_creep=1.6,
    rf_durability=1.15,
    id="geogrid",
)

SELECT_FILL = Fill(
    unit_weight_kn_m3=20.0, friction_deg=34.0, uniformity_coefficient=10.0, id="select"
)
RETAINED = Soil(unit_weight_kn_m3=19.0, friction_deg=30.0)
FOUNDATION = Foundation(unit_weight_kn_m3=19.0, friction_deg=30.0, water_depth_m=20.0)


def make_segment(i: int = 0, **overrides) -> Segment:
    """A plain 6 m wall on steel strips, level ground, no traffic; any field overridable."""
    base = dict(
        id=f"S-{i:05d}",
        wall="Sample wall",
        chainage_start_m=10.0 * i,
        chainage_end_m=10.0 * i + 10.0,
        height_start_m=6.0,
        height_end_m=6.0,
        fill=SELECT_FILL,
        retained=RETAINED,
        foundation=FOUNDATION,
        reinforcement=STRIP,
        spacing_m=STRIP.spacing_m,
    )
    if "reinforcement" in overrides and "spacing_m" not in overrides:
        base["spacing_m"] = overrides["reinforcement"].spacing_m
    base.update(overrides)
    return Segment(**base)


def make_defaults(**overrides) -> Defaults:
    """A ``[defaults]`` table of the sample soils and steel strips; any field overridable."""
    base = dict(fill=SELECT_FILL, retained=RETAINED, foundation=FOUNDATION, reinforcement=STRIP)
    base.update(overrides)
    return Defaults(**base)


def make_corridor(
    segments: tuple[Segment, ...] | list[Segment],
    factor_set: FactorSet = LRFD,
    rules: Rules | None = None,
    design_life_years: float | None = None,
) -> Corridor:
    """A corridor around ``segments`` with defaults taken from the first one."""
    segs = tuple(segments)
    first = segs[0] if segs else make_segment()
    defaults = make_defaults(
        fill=first.fill,
        retained=first.retained,
        foundation=first.foundation,
        reinforcement=first.reinforcement,
    )
    return Corridor(
        name="Sample corridor",
        factor_set=factor_set,
        defaults=defaults,
        segments=segs,
        rules=rules or Rules(),
        design_life_years=design_life_years,
    )


def with_segment(corridor: Corridor, i: int, **changes) -> Corridor:
    """The corridor with segment ``i`` changed (``dataclasses.replace``)."""
    segs = list(corridor.segments)
    segs[i] = replace(segs[i], **changes)
    return replace(corridor, segments=tuple(segs))


def repeated(corridor: Corridor, n: int, *, shift_m: float = 2000.0) -> Corridor:
    """``corridor`` repeated along the chainage to ``n`` segments: each copy is moved by
    ``shift_m`` and its ids get ``.k``, so walls never overlap (large-corridor tests, benches)."""
    base, segments, k = corridor.segments, [], 0
    while len(segments) < n:
        segments += [
            replace(
                s,
                id=f"{s.id}.{k}",
                chainage_start_m=s.chainage_start_m + shift_m * k,
                chainage_end_m=s.chainage_end_m + shift_m * k,
            )
            for s in base
        ]
        k += 1
    return replace(corridor, segments=tuple(segments[:n]))
