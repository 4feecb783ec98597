"""The inputs of a segment the editor shows, in the order an engineer reads a wall.

Parsing and range checks belong to the store (``store.coerce_field``); this module only
says which fields there are, how they are labelled and how a value is shown as text.
Nested soil values use dotted names (``foundation.friction_deg``).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from screening.model import Segment
from screening.model.units import Display

SI = Display("si")


@dataclass(frozen=True)
class FieldSpec:
    name: str
    """Segment field, dotted for a soil's value (``retained.friction_deg``)."""
    label: str
    unit: str
    """SI unit of the stored value (``m``, ``kPa``, ``kN/m3``, ``°``; "" for none): shown
    and typed in the display units (:meth:`screening.model.units.Display.label`)."""
    hint: str
    """What may be typed."""


FIELDS: tuple[FieldSpec, ...] = (
    FieldSpec("id", "Id", "", "unique text"),
    FieldSpec("wall", "Wall", "", "name of the wall"),
    FieldSpec("structure", "Structure", "", "wall | abutment"),
    FieldSpec("chainage_start_m", "Chainage from", "m", "number"),
    FieldSpec("chainage_end_m", "Chainage to", "m", "number > from"),
    FieldSpec("height_start_m", "Exposed at from", "m", "exposed height > 0"),
    FieldSpec("height_end_m", "Exposed at to", "m", "exposed height > 0"),
    FieldSpec("fill", "Reinforced fill", "", "fill preset id"),
    FieldSpec("reinforcement", "Reinforcement", "", "reinforcement preset id"),
    FieldSpec("spacing_m", "Layer spacing", "m", "vertical spacing Sv"),
    FieldSpec("surcharge_kpa", "Surcharge", "kPa", "permanent, on top"),
    FieldSpec("traffic", "Traffic", "", "none | parallel | approach | kPa"),
    FieldSpec("backslope_deg", "Backslope", "°", "slope above the wall"),
    FieldSpec("toe_slope_deg", "Toe slope", "°", "ground falling in front"),
    FieldSpec("seismic_kh", "Seismic kh", "", "0 = static only"),
    FieldSpec("retained.unit_weight_kn_m3", "Retained γ", "kN/m3", "unit weight"),
    FieldSpec("retained.friction_deg", "Retained φ′", "°", "friction angle"),
    FieldSpec("foundation.unit_weight_kn_m3", "Foundation γ", "kN/m3", "unit weight"),
    FieldSpec("foundation.friction_deg", "Foundation φ′", "°", "friction angle"),
    FieldSpec("foundation.cohesion_kpa", "Foundation c′", "kPa", "effective cohesion"),
    FieldSpec("foundation.undrained_strength_kpa", "Foundation cu", "kPa", "blank = drained"),
    FieldSpec("foundation.water_depth_m", "Water below base", "m", "0 = at the base"),
    FieldSpec("foundation.firm_depth_m", "Firm layer below base", "m", "blank = none known"),
    FieldSpec("water_in_fill", "Water in fill", "", "yes | no"),
    FieldSpec("arrangement", "Arrangement", "", "single | tiered | back-to-back"),
    FieldSpec("note", "Note", "", "free text"),
)

BY_NAME = {f.name: f for f in FIELDS}


def value_of(segment: Segment, name: str) -> object:
    """The segment's value of a (possibly dotted) field."""
    obj: object = segment
    for part in name.split("."):
        obj = getattr(obj, part)
    return obj


def unit_of(name: str) -> str:
    """SI unit of a field ("" for none); traffic given as a number is in kPa."""
    spec = BY_NAME.get(name)
    if name == "traffic":
        return "kPa"
    return spec.unit if spec is not None else ""


def display(segment: Segment, name: str, units: Display = SI) -> str:
    """The value as the editor shows it (in ``units``), so typing it back changes nothing."""
    value = value_of(segment, name)
    if name in ("fill", "reinforcement"):
        return getattr(value, "id", None) or "inline"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if value is None:
        return ""
    if isinstance(value, float):
        return f"{units.value(value, unit_of(name)):.6g}"
    return str(value)


def to_si(raw: str, name: str, units: Display = SI) -> str:
    """What the user typed, with a number in the display units turned into SI text (the
    store parses SI); anything else is passed on unchanged for the store to judge."""
    if units.system == "si":
        return raw
    unit = unit_of(name)
    try:
        value = float(raw.strip())
    except ValueError:
        return raw
    factor = units.value(1.0, unit)
    return repr(round(value / factor, 4)) if factor != 1.0 else raw


def with_value(segment: Segment, name: str, value: object) -> Segment:
    """A new segment with the (possibly dotted) field set to ``value``."""
    head, _, rest = name.partition(".")
    if not rest:
        return dataclasses.replace(segment, **{head: value})
    inner = getattr(segment, head)
    return dataclasses.replace(segment, **{head: dataclasses.replace(inner, **{rest: value})})


def _sub_value(raw: str) -> object:
    """A soil value typed in a box: a number, nothing (None), or the text to complain about."""
    s = raw.strip()
    if not s:
        return None
    try:
        return float(s)
    except ValueError:
        return s


def parse_value(
    segment: Segment, name: str, raw: str, presets: object, units: Display = SI
) -> object:
    """The value ``raw`` stands for in field ``name`` of ``segment``; InputError says why not.

    Plain fields go straight to the store's ``coerce_field``. A soil value
    (``foundation.friction_deg``) is checked as the whole soil table the store would read:
    the segment's soil with that one value changed.
    """
    from screening.model.validate import coerce_field

    raw = to_si(raw, name, units)
    head, _, sub = name.partition(".")
    if not sub:
        return coerce_field(name, raw, presets)
    soil = getattr(segment, head)
    table = {k: v for k, v in dataclasses.asdict(soil).items() if v is not None}
    value = _sub_value(raw)
    if value is None:
        table.pop(sub, None)
    else:
        table[sub] = value
    return getattr(coerce_field(head, table, presets), sub)
