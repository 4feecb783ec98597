"""Frozen input model: a corridor of wall segments and the presets they refer to.

Every quantity carries its unit in its name. Nothing here is mutated: an edit makes a new
object with :func:`dataclasses.replace`. TOML keys in corridor and preset files are the
field names below, so the store can map files to objects field by field.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

SCHEMA = "wallscreen/1"

Kind = Literal["inextensible", "extensible"]
Material = Literal["steel-strip", "steel-grid", "geogrid", "geotextile"]
Structure = Literal["wall", "abutment"]
Arrangement = Literal["single", "tiered", "back-to-back"]
TRAFFIC_CLASSES = ("none", "parallel", "approach")
CHECKS = ("sliding", "eccentricity", "bearing", "pullout", "rupture")
VERDICTS = ("clear", "marginal", "refer")


# --------------------------------------------------------------------------- soils


@dataclass(frozen=True)
class Fill:
    """Fill of the reinforced zone (a preset from presets/fills.toml or an inline table)."""

    unit_weight_kn_m3: float
    """Bulk unit weight, kN/m3."""
    friction_deg: float
    """Effective friction angle phi', degrees."""
    cohesion_kpa: float = 0.0
    """Effective cohesion c', kPa (ignored by the Simplified Method; kept for compound)."""
    uniformity_coefficient: float = 4.0
    """Cu = D60/D10, used by the F* rule of ribbed strips."""
    fines_percent: float = 5.0
    """Passing 75 um, percent by mass."""
    plasticity_index: float = 0.0
    """PI of the fines, percent."""
    id: str | None = None
    """Preset id this fill came from; None when given inline in the corridor file."""
    name: str = ""
    """Human name of the category."""
    note: str = ""
    """One line on where such a fill fits."""


@dataclass(frozen=True)
class Soil:
    """Retained fill behind the reinforced zone."""

    unit_weight_kn_m3: float = 19.0
    """Bulk unit weight, kN/m3."""
    friction_deg: float = 30.0
    """Effective friction angle phi', degrees."""
    cohesion_kpa: float = 0.0
    """Effective cohesion c', kPa (not used in active thrust: conservative)."""


@dataclass(frozen=True)
class Foundation:
    """Foundation soil under the wall."""

    unit_weight_kn_m3: float = 19.0
    """Bulk unit weight, kN/m3."""
    friction_deg: float = 30.0
    """Effective friction angle phi', degrees."""
    cohesion_kpa: float = 0.0
    """Effective cohesion c', kPa."""
    undrained_strength_kpa: float | None = None
    """Undrained shear strength cu, kPa; None for a free-draining (drained) foundation."""
    water_depth_m: float = 20.0
    """Depth of the water table below the base of the wall, m (0 = at the base)."""
    rock: bool = False
    """True on rock: the eccentricity limit for rock applies."""
    firm_depth_m: float | None = None
    """Depth below the base of a firm stratum that no slip circle passes, m; None: no firm
    layer known (circles then reach at most 2H below the base; on rock, none goes below it)."""


# ------------------------------------------------------------------ reinforcement


@dataclass(frozen=True)
class Grade:
    """One strength grade of a reinforcement family; screening picks the lightest that passes.

    Steel strips use ``elements_per_m``, ``width_mm`` and ``thickness_mm``; steel grids
    ``bars_per_m`` and ``bar_diameter_mm``; geosynthetics ``ultimate_strength_kn_m``.
    """

    name: str
    """Short name shown in tables, e.g. ``"PET 55 kN/m"`` or ``"4 strips/m"``."""
    coverage_ratio: float = 1.0
    """Rc = b/Sh: fraction of the wall width covered (1.0 = full-width sheet)."""
    ultimate_strength_kn_m: float | None = None
    """Geosynthetic ultimate tensile strength T_ult per metre of product width, kN/m."""
    elements_per_m: float | None = None
    """Steel strips per metre run of wall."""
    width_mm: float | None = None
    """Steel strip width b, mm."""
    thickness_mm: float | None = None
    """Steel strip thickness t before corrosion, mm."""
    bars_per_m: float | None = None
    """Longitudinal bars per metre run of wall (steel grids)."""
    bar_diameter_mm: float | None = None
    """Longitudinal bar diameter before corrosion, mm (steel grids)."""
    mass_kg_m2: float | None = None
    """Mass per square metre of product (geosynthetics), kg/m2, for quantities."""


@dataclass(frozen=True)
class Reinforcement:
    """A reinforcement family (presets/reinforcement.toml) with its grades."""

    material: Material
    """steel-strip | steel-grid | geogrid | geotextile."""
    kind: Kind
    """inextensible (steel) or extensible (geosynthetic): sets Kr/Ka and the line of maximum tension."""
    grades: tuple[Grade, ...]
    """Grades from lightest to heaviest."""
    spacing_m: float = 0.75
    """Default vertical spacing Sv, m."""
    scale_effect_alpha: float = 1.0
    """Scale-effect correction alpha in pullout."""
    rf_installation: float = 1.0
    """RF_ID, installation damage reduction factor (geosynthetics)."""
    rf_creep: float = 1.0
    """RF_CR, creep reduction factor (geosynthetics)."""
    rf_durability: float = 1.0
    """RF_D, durability reduction factor (geosynthetics)."""
    yield_strength_mpa: float | None = None
    """Steel yield strength Fy, MPa."""
    zinc_coating_um: float | None = None
    """Zinc (galvanising) thickness per side, micrometres (steel)."""
    transverse_bar_diameter_mm: float | None = None
    """Transverse bar diameter t for the F* rule of grids, mm."""
    transverse_bar_spacing_mm: float | None = None
    """Transverse bar spacing St for the F* rule of grids, mm."""
    id: str | None = None
    """Preset id; None when given inline."""
    name: str = ""
    """Human name."""
    note: str = ""
    """One line on where it fits."""


# ------------------------------------------------------------------ factor sets


@dataclass(frozen=True)
class LoadCase:
    """One combination of load factors and partial material factors.

    Each check uses the role of a load that makes it worse: a weight that resists (sliding,
    eccentricity, pullout) takes ``*_resisting``; a weight that drives (bearing, layer
    tension) takes the plain factor. Live load never resists.
    """

    name: str
    """e.g. ``"Strength I"`` or ``"DA1-C2"``."""
    ev: float = 1.0
    """Vertical earth load (soil weight) where it drives."""
    ev_resisting: float = 1.0
    """Vertical earth load where it resists."""
    eh: float = 1.0
    """Horizontal earth pressure (active thrust)."""
    es: float = 1.0
    """Permanent surcharge where it drives."""
    es_resisting: float = 1.0
    """Permanent surcharge where it resists."""
    ls: float = 1.0
    """Live (traffic) surcharge."""
    tan_phi: float = 1.0
    """Partial factor dividing tan(phi') of every soil."""
    cohesion: float = 1.0
    """Partial factor dividing c'."""
    undrained: float = 1.0
    """Partial factor dividing cu."""
    unit_weight: float = 1.0
    """Partial factor dividing (>1 makes soil lighter) or multiplying unit weight: kept 1.0."""
    checks: tuple[str, ...] = (
        "sliding",
        "eccentricity",
        "bearing",
        "pullout",
        "rupture",
        "compound",
    )
    """Checks this case applies to."""


@dataclass(frozen=True)
class FactorSet:
    """A code's load cases and resistance factors (presets/factor-sets.toml).

    ``resistance`` maps a check to the factor that multiplies its capacity: LRFD phi, or
    1/FS for allowable stress, so that capacity/demand >= 1.0 passes in every set.
    Keys: sliding, bearing, pullout, rupture_steel_strip, rupture_steel_grid,
    rupture_geosynthetic, compound, compound_abutment.
    """

    id: str
    name: str
    method: Literal["lrfd", "asd", "partial-factor"]
    cases: tuple[LoadCase, ...]
    resistance: dict[str, float]
    eccentricity_limit_soil: float = 0.25
    """Largest e as a fraction of L on soil."""
    eccentricity_limit_rock: float = 0.375
    """Largest e as a fraction of L on rock."""
    source: str = ""
    """Where the numbers come from, with the [pub]/[mem]/[cp] tag."""

    def __hash__(self) -> int:  # dict field: hash by id
        return hash(self.id)


# ------------------------------------------------------------------ screening rules


@dataclass(frozen=True)
class Rules:
    """Verdict thresholds (presets/rules.toml); see METHOD §7."""

    rule_length_ratio: float = 0.7
    rule_length_min_m: float = 2.4
    rule_length_ratio_steep_backslope: float = 0.8
    rule_length_ratio_2h1v: float = 1.0
    max_screen_length_ratio: float = 1.2
    max_height_m: float = 12.0
    marginal_height_m: float = 10.0
    marginal_cdr: float = 1.10
    margin_checks: tuple[str, ...] = ("bearing", "global")
    """Checks whose CDR below marginal_cdr makes a passing segment marginal: those that
    more or stronger reinforcement hardly helps (the foundation decides them). The others set
    L or the grade, so a CDR near 1.0 on them is met by a standard design [cp]."""
    marginal_length_ratio: float = 0.9
    min_undrained_strength_kpa: float = 25.0
    max_fines_percent: float = 15.0
    max_plasticity_index: float = 6.0
    min_fill_friction_deg: float = 30.0
    max_backslope_deg: float = 26.57
    max_seismic_kh: float = 0.3
    min_embedment_m: float = 0.6
    min_anchorage_m: float = 0.9
    length_step_m: float = 0.1
    design_life_wall_years: float = 75.0
    design_life_abutment_years: float = 100.0


# ------------------------------------------------------------------ corridor

Traffic = str | float
"""``none`` | ``parallel`` | ``approach`` or a uniform live surcharge in kPa."""


@dataclass(frozen=True)
class Segment:
    """One wall segment between two chainages, fully resolved (defaults and presets applied)."""

    id: str
    """Unique id within the corridor, e.g. ``"E-01"``."""
    wall: str
    """Name of the wall it belongs to; segments of one wall must not overlap in chainage."""
    chainage_start_m: float
    chainage_end_m: float
    height_start_m: float
    """Exposed height at the start chainage, m (design height adds embedment)."""
    height_end_m: float
    """Exposed height at the end chainage, m."""
    fill: Fill
    retained: Soil
    foundation: Foundation
    reinforcement: Reinforcement
    spacing_m: float
    """Vertical spacing of layers Sv, m."""
    structure: Structure = "wall"
    """wall | abutment (abutment: embedment H/10, 100-year life)."""
    surcharge_kpa: float = 0.0
    """Permanent uniform surcharge on the wall top, kPa."""
    traffic: Traffic = "none"
    backslope_deg: float = 0.0
    """Slope of the ground above the wall, degrees from horizontal."""
    toe_slope_deg: float = 0.0
    """Slope of the ground in front of the toe (falling away), degrees."""
    seismic_kh: float = 0.0
    """Horizontal seismic coefficient at the site kh0 (0 = static only)."""
    water_in_fill: bool = False
    """Water in the reinforced zone or a flood level against the face: outside screening."""
    arrangement: Arrangement = "single"
    """single | tiered | back-to-back (the last two are outside screening)."""
    note: str = ""
    """Free text for the design team."""

    @property
    def length_along_m(self) -> float:
        """Chainage length of the segment, m."""
        return self.chainage_end_m - self.chainage_start_m

    @property
    def exposed_height_m(self) -> float:
        """Largest exposed height of the segment: it is screened there."""
        return max(self.height_start_m, self.height_end_m)

    @property
    def face_area_m2(self) -> float:
        """Exposed face area (trapezoid between the two ends), m2."""
        return 0.5 * (self.height_start_m + self.height_end_m) * self.length_along_m


@dataclass(frozen=True)
class Defaults:
    """The ``[defaults]`` table: every key a segment may set, resolved."""

    fill: Fill
    retained: Soil
    foundation: Foundation
    reinforcement: Reinforcement
    spacing_m: float | None = None
    """None: the reinforcement preset's default spacing."""
    structure: Structure = "wall"
    surcharge_kpa: float = 0.0
    traffic: Traffic = "none"
    backslope_deg: float = 0.0
    toe_slope_deg: float = 0.0
    seismic_kh: float = 0.0
    water_in_fill: bool = False
    arrangement: Arrangement = "single"
    wall: str | None = None
    """Wall of the segments that name none; None: the corridor's name."""


@dataclass(frozen=True)
class Corridor:
    """A whole corridor: inputs only (results are computed, never stored here)."""

    name: str
    factor_set: FactorSet
    defaults: Defaults
    segments: tuple[Segment, ...]
    rules: Rules = field(default_factory=Rules)
    design_life_years: float | None = None
    """None: 75 years for walls, 100 for abutments (rules preset)."""
    note: str = ""
    rates: dict[str, Any] | None = field(default=None, compare=False, hash=False)
    """The corridor file's own ``[rates]`` table (unit rates over the shipped ones), as
    written; None: the shipped rates. Read by ``screening.corridor.quantities``."""

    @property
    def default_wall(self) -> str:
        """Wall of a segment that names none: ``[defaults] wall``, else the corridor's name."""
        return self.defaults.wall if self.defaults.wall is not None else self.name.strip()
