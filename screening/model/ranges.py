"""Valid ranges of the numbers in corridor and preset files, by field name.

The same name means the same quantity wherever it appears (``friction_deg`` of a soil, of a
fill ...); :data:`CLASS_RANGES` narrows a name for one model class. Used by
:mod:`screening.model.schema` for every number it reads.
"""

from __future__ import annotations

from dataclasses import dataclass

from screening.model import inputs as model


@dataclass(frozen=True)
class Range:
    """Valid interval of a number; ``*_open`` excludes the end point."""

    lo: float
    hi: float
    unit: str = ""
    lo_open: bool = False
    hi_open: bool = False

    def words(self) -> str:
        """The valid interval in words: ``between 0 and 30 m``."""
        u = f" {self.unit}" if self.unit else ""
        if not self.lo_open and not self.hi_open:
            return f"between {self.lo:g} and {self.hi:g}{u}"
        lo = f"greater than {self.lo:g}" if self.lo_open else f"at least {self.lo:g}"
        hi = f"below {self.hi:g}" if self.hi_open else f"at most {self.hi:g}"
        return f"{lo} and {hi}{u}"

    def problem(self, v: float) -> str | None:
        """Words for what is wrong with ``v``, or None when it is valid."""
        low_bad = v <= self.lo if self.lo_open else v < self.lo
        high_bad = v >= self.hi if self.hi_open else v > self.hi
        if not (low_bad or high_bad):
            return None
        u = f" {self.unit}" if self.unit else ""
        lo = f"greater than {self.lo:g}" if self.lo_open else f"at least {self.lo:g}"
        hi = f"below {self.hi:g}" if self.hi_open else f"at most {self.hi:g}"
        if not self.lo_open and not self.hi_open:
            return f"must be between {self.lo:g} and {self.hi:g}{u} (got {v:g})"
        return f"must be {lo} and {hi}{u} (got {v:g})"


_FACTOR = Range(0.0, 5.0, "", lo_open=False)
_PARTIAL = Range(0.0, 5.0, "", lo_open=True)

RANGES: dict[str, Range] = {
    # soils
    "unit_weight_kn_m3": Range(10.0, 30.0, "kN/m3"),
    "friction_deg": Range(0.0, 50.0, "degrees"),
    "cohesion_kpa": Range(0.0, 500.0, "kPa"),
    "uniformity_coefficient": Range(1.0, 1000.0),
    "fines_percent": Range(0.0, 100.0, "%"),
    "plasticity_index": Range(0.0, 100.0, "%"),
    "undrained_strength_kpa": Range(0.0, 1000.0, "kPa", lo_open=True),
    "water_depth_m": Range(0.0, 1000.0, "m"),
    "firm_depth_m": Range(0.0, 1000.0, "m"),
    # grades and families
    "coverage_ratio": Range(0.0, 1.0, lo_open=True),
    "ultimate_strength_kn_m": Range(0.0, 2000.0, "kN/m", lo_open=True),
    "elements_per_m": Range(0.0, 50.0, "per m", lo_open=True),
    "width_mm": Range(0.0, 500.0, "mm", lo_open=True),
    "thickness_mm": Range(0.0, 50.0, "mm", lo_open=True),
    "bars_per_m": Range(0.0, 50.0, "per m", lo_open=True),
    "bar_diameter_mm": Range(0.0, 100.0, "mm", lo_open=True),
    "mass_kg_m2": Range(0.0, 50.0, "kg/m2", lo_open=True),
    "spacing_m": Range(0.2, 2.0, "m"),  # the engine's closest spacing (engine.spacing)
    "scale_effect_alpha": Range(0.0, 1.5, lo_open=True),
    "rf_installation": Range(1.0, 20.0),
    "rf_creep": Range(1.0, 20.0),
    "rf_durability": Range(1.0, 20.0),
    "yield_strength_mpa": Range(0.0, 2000.0, "MPa", lo_open=True),
    "zinc_coating_um": Range(0.0, 1000.0, "um"),
    "transverse_bar_diameter_mm": Range(0.0, 100.0, "mm", lo_open=True),
    "transverse_bar_spacing_mm": Range(0.0, 5000.0, "mm", lo_open=True),
    # load cases and factor sets
    "ev": _FACTOR,
    "ev_resisting": _FACTOR,
    "eh": _FACTOR,
    "es": _FACTOR,
    "es_resisting": _FACTOR,
    "ls": _FACTOR,
    "tan_phi": _PARTIAL,
    "cohesion": _PARTIAL,
    "undrained": _PARTIAL,
    "unit_weight": _PARTIAL,
    "eccentricity_limit_soil": Range(0.0, 0.5, "of L", lo_open=True),
    "eccentricity_limit_rock": Range(0.0, 0.5, "of L", lo_open=True),
    "resistance": Range(0.0, 2.0, lo_open=True),
    # segments and corridor
    "chainage_start_m": Range(-1e7, 1e7, "m"),
    "chainage_end_m": Range(-1e7, 1e7, "m"),
    "height_start_m": Range(0.0, 30.0, "m"),
    "height_end_m": Range(0.0, 30.0, "m"),
    "surcharge_kpa": Range(0.0, 500.0, "kPa"),
    "traffic": Range(0.0, 100.0, "kPa"),
    "backslope_deg": Range(0.0, 45.0, "degrees"),
    "toe_slope_deg": Range(0.0, 45.0, "degrees"),
    "seismic_kh": Range(0.0, 1.0),
    "design_life_years": Range(0.0, 200.0, "years", lo_open=True),
}
"""Valid range of every number, by field name (the same name means the same quantity)."""

CLASS_RANGES: dict[tuple[type, str], Range] = {
    # A reinforced fill is a frictional fill: pullout's F* scales with tan(phi) of the fill,
    # so phi = 0 has no meaning there [cp: select fills are 30-40 degrees; 15 is far below
    # any fill a wall is built with, and marginal fills are referred anyway].
    (model.Fill, "friction_deg"): Range(15.0, 50.0, "degrees"),
}
"""Ranges that differ for one model class from the field name's own (by class, field)."""

DEFAULT_RANGE = Range(0.0, 1e6)
"""Numbers not listed above (the screening rules) must be non-negative."""
