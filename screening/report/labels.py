"""Words for the inputs' field names, so a report (and the presets browser) says
"Unit weight γ (kN/m³)" rather than ``unit_weight_kn_m3``.

The unit comes from the name's ending (the project's units-in-names rule) and is shown in
the display units; a few names get the symbol the trade writes beside them.
"""

from __future__ import annotations

from screening.model.units import Display

SI = Display("si")

UNIT_SUFFIXES = (
    ("_kn_m3", "kN/m3"),
    ("_kn_m", "kN/m"),
    ("_kpa", "kPa"),
    ("_mpa", "MPa"),
    ("_mm", "mm"),
    ("_um", "µm"),
    ("_m2", "m2"),
    ("_m", "m"),
    ("_deg", "°"),
    ("_years", "years"),
    ("_percent", "%"),
)
"""Field-name endings and the SI unit they stand for."""

WORDS = {
    "unit_weight_kn_m3": "Unit weight γ",
    "friction_deg": "Friction angle φ′",
    "cohesion_kpa": "Cohesion c′",
    "undrained_strength_kpa": "Undrained strength cu",
    "water_depth_m": "Water below the base",
    "firm_depth_m": "Firm layer below the base",
    "rock": "Founded on rock",
    "uniformity_coefficient": "Uniformity coefficient Cu",
    "fines_percent": "Fines passing 0.075 mm",
    "plasticity_index": "Plasticity index PI",
    "material": "Material",
    "kind": "Kind (extensible or not)",
    "spacing_m": "Layer spacing Sv",
    "scale_effect_alpha": "Scale-effect correction α",
    "rf_installation": "Reduction factor, installation damage RF_ID",
    "rf_creep": "Reduction factor, creep RF_CR",
    "rf_durability": "Reduction factor, durability RF_D",
    "yield_strength_mpa": "Yield strength Fy",
    "zinc_coating_um": "Zinc coating",
    "transverse_bar_diameter_mm": "Transverse bar diameter",
    "transverse_bar_spacing_mm": "Transverse bar spacing St",
    "coverage_ratio": "Coverage ratio Rc",
    "ultimate_strength_kn_m": "Ultimate strength T_ult",
    "elements_per_m": "Elements per metre of wall",
    "width_mm": "Width",
    "thickness_mm": "Thickness",
    "bars_per_m": "Bars per metre of wall",
    "bar_diameter_mm": "Bar diameter",
    "ev": "γ EV, vertical earth (driving)",
    "ev_resisting": "γ EV, vertical earth (resisting)",
    "eh": "γ EH, horizontal earth",
    "es": "γ ES, surcharge (driving)",
    "es_resisting": "γ ES, surcharge (resisting)",
    "ls": "γ LS, live surcharge",
    "tan_phi": "Material factor on tan φ′",
    "cohesion": "Material factor on c′",
    "undrained": "Material factor on cu",
    "unit_weight": "Material factor on γ",
    "checks": "Checks it applies to",
    "eccentricity_limit_soil": "Eccentricity limit on soil (fraction of L)",
    "eccentricity_limit_rock": "Eccentricity limit on rock (fraction of L)",
    "method": "Method",
    "resistance": "Resistance",
    "rule_length_ratio": "Rule-of-thumb L / Hd",
    "rule_length_min_m": "Rule-of-thumb shortest L",
    "rule_length_ratio_steep_backslope": "Rule-of-thumb L / Hd under a steep backslope",
    "max_screen_length_ratio": "Longest L screened / Hd",
    "max_height_m": "Tallest design height screened",
    "marginal_height_m": "Design height above which marginal",
    "marginal_cdr": "CDR below which marginal",
    "marginal_length_ratio": "L / Hd above which marginal",
    "min_embedment_m": "Least embedment",
    "min_anchorage_m": "Least anchorage Le beyond the line of maximum tension",
    "length_step_m": "Step of L",
    "design_life_wall_years": "Design life of a wall",
    "design_life_abutment_years": "Design life of an abutment",
    "face_m2": "Facing, per m²",
    "levelling_pad_m": "Levelling pad, per m",
    "select_fill_m3": "Select fill, per m³",
    "steel_kg": "Steel, per kg",
    "geosynthetic_m2": "Geosynthetic, per m²",
    "geosynthetic_m2_per_kn_m": "Geosynthetic, extra per m² for each kN/m of T_ult",
    "currency": "Currency",
    "placeholder": "Placeholder rates",
    "grade_m2": "Rate per m² by grade",
}


def unit_of(name: str) -> str | None:
    """SI unit a field name ends in (``unit_weight_kn_m3`` -> ``kN/m3``), or None."""
    leaf = name.rsplit(".", 1)[-1]
    for suffix, unit in UNIT_SUFFIXES:
        if leaf.endswith(suffix):
            return unit
    return None


def _plain(name: str) -> str:
    leaf = name.rsplit(".", 1)[-1]
    for suffix, _ in UNIT_SUFFIXES:
        if leaf.endswith(suffix):
            leaf = leaf[: -len(suffix)]
            break
    words = leaf.replace("_", " ").strip()
    return words[:1].upper() + words[1:]


def field_label(name: str, display: Display = SI) -> str:
    """Words for a field name, with its unit in the display units:
    ``Unit weight γ (kN/m³)`` / ``Unit weight γ (pcf)``."""
    leaf = name.rsplit(".", 1)[-1]
    words = WORDS.get(leaf) or _plain(leaf)
    unit = unit_of(leaf)
    if unit is None or unit in ("years",):
        return words if unit is None else f"{words} ({unit})"
    return f"{words} ({display.label(unit)})"


def shown(name: str, value: object, display: Display = SI) -> str:
    """A field's value for a table: numbers in the display units, 4 significant figures."""
    unit = unit_of(name)
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        v = display.value(value, unit) if unit else value
        return f"{v:.4g}"
    if isinstance(value, tuple):
        return ", ".join(str(v) for v in value)
    return str(getattr(value, "id", None) or getattr(value, "name", None) or value)


def margin_of(result, i: int) -> tuple[str, float | None]:
    """(check, CDR) a reader should look at first, as ``wallscreen check`` prints it: the
    failing check when one fails, else the least margin among the checks that did not set
    the reinforcement; a rule outside screening gives (its name, None)."""
    if result.verdict[i] == "refer" and result.governing[i] not in result.checks:
        return result.governing[i], None
    if result.min_cdr[i] < 1.0 - 1e-9:
        return result.governing[i], float(result.min_cdr[i])
    if not result.margin_check[i]:
        return "", None
    return result.margin_check[i], float(result.margin_cdr[i])
