"""Segment fields: what each means, how a value is read and checked, and the rules between them.

Used by the store when it reads a corridor file and by the terminal editor when a person
types one value (:func:`coerce_field`). Every problem is one
:class:`~screening.model.errors.InputError` naming the segment (or table) and the field, and
saying what would be valid.
"""

from __future__ import annotations

import tomllib
from collections.abc import Iterable, Mapping
from typing import Any, NamedTuple

from screening.model import inputs as model
from screening.model.errors import InputError
from screening.model.schema import Where, build, choice, describe, number, suggest, table, text


class FieldInfo(NamedTuple):
    """One editable input of a segment."""

    name: str
    description: str
    unit: str


SEGMENT_FIELDS: tuple[FieldInfo, ...] = (
    FieldInfo("id", "Unique id of the segment, e.g. E-01", ""),
    FieldInfo("wall", "Wall it belongs to; segments of one wall must not overlap", ""),
    FieldInfo("structure", "wall, or abutment (embedment H/10, 100-year life)", ""),
    FieldInfo("chainage_start_m", "Chainage where the segment starts", "m"),
    FieldInfo("chainage_end_m", "Chainage where the segment ends (after the start)", "m"),
    FieldInfo("height_start_m", "Exposed height at the start chainage", "m"),
    FieldInfo("height_end_m", "Exposed height at the end chainage", "m"),
    FieldInfo("fill", "Reinforced fill: a fill preset id or a table of values", ""),
    FieldInfo("retained", "Retained soil behind: a table of values or a fill preset id", ""),
    FieldInfo("foundation", "Foundation soil: a table of values", ""),
    FieldInfo("reinforcement", "Reinforcement: a preset id or a table of values", ""),
    FieldInfo("spacing_m", "Vertical spacing of the reinforcement layers", "m"),
    FieldInfo("surcharge_kpa", "Permanent uniform surcharge on the wall top", "kPa"),
    FieldInfo("traffic", "none, parallel, approach, or a live surcharge in kPa", "kPa"),
    FieldInfo("backslope_deg", "Slope of the ground above the wall", "deg"),
    FieldInfo("toe_slope_deg", "Slope of the ground falling away in front of the toe", "deg"),
    FieldInfo("seismic_kh", "Horizontal seismic coefficient kh0 at the site (0: static only)", ""),
    FieldInfo(
        "water_in_fill", "true when water stands in the reinforced zone or floods the face", ""
    ),
    FieldInfo("arrangement", "single, tiered or back-to-back", ""),
    FieldInfo("note", "Free text for the design team", ""),
)
"""Editable segment inputs in the order a form shows them (names are Segment fields)."""

FIELD_NAMES = tuple(f.name for f in SEGMENT_FIELDS)
REQUIRED = ("id", "chainage_start_m", "chainage_end_m", "height_start_m", "height_end_m")
"""Keys every [[segment]] must give; the rest come from [defaults] (``wall``: from
``[defaults] wall``, else the corridor's name)."""
DEFAULT_KEYS = tuple(f.name for f in model.Defaults.__dataclass_fields__.values())
"""Keys a [defaults] table may hold (and a segment may override)."""

NUMBERS = {f.name for f in SEGMENT_FIELDS if f.unit in ("m", "kPa", "deg")} | {"seismic_kh"}
NUMBERS.discard("traffic")
CHOICES = {
    "structure": ("wall", "abutment"),
    "arrangement": ("single", "tiered", "back-to-back"),
}


def unknown_id(kind: str, value: str, options: Iterable[str]) -> str:
    options = list(options)
    from difflib import get_close_matches

    close = [o for o in options if o.startswith(value)] or get_close_matches(
        value, options, n=1, cutoff=0.6
    )
    hint = f'; did you mean "{close[0]}"?' if close else ""
    return f'unknown {kind} preset "{value}"{hint} (valid: {", ".join(options)})'


def resolve(value: Any, name: str, cls: type, options: Mapping[str, Any], kind: str, where: Where):
    """A preset reference: an id, or a table of values optionally starting from ``preset``."""
    if isinstance(value, str):
        if value in options:
            return options[value]
        raise where.error(name, unknown_id(kind, value, options))
    if not isinstance(value, dict):
        raise where.error(
            name, f"expected a {kind} preset id or a table of values, got {describe(value)}"
        )
    sub = where.inline(name)
    base = None
    if "preset" in value:
        pid = value["preset"]
        if not isinstance(pid, str) or pid not in options:
            shown = pid if isinstance(pid, str) else describe(pid)
            raise sub.error("preset", unknown_id(kind, shown, options))
        base = options[pid]
    return build(cls, value, sub, base=base)


def parse_field(name: str, value: Any, where: Where, presets: Any) -> Any:
    """The model value of segment (or defaults) field ``name`` from a TOML value."""
    if name in NUMBERS:
        return number(value, name, where)
    if name in CHOICES:
        return choice(value, name, CHOICES[name], where)
    if name in ("id", "wall"):
        return text(value, name, where, nonempty=True).strip()
    if name == "note":
        return text(value, name, where)
    if name == "water_in_fill":
        if not isinstance(value, bool):
            raise where.error(name, f"expected true or false, got {describe(value)}")
        return value
    if name == "traffic":
        if isinstance(value, str):
            if value in model.TRAFFIC_CLASSES:
                return value
            raise where.error(
                name,
                f'must be {", ".join(model.TRAFFIC_CLASSES)} or a number in kPa (got "{value}")',
            )
        return number(value, name, where)
    if name == "fill":
        return resolve(value, name, model.Fill, presets.fills, "fill", where)
    if name == "reinforcement":
        return resolve(
            value, name, model.Reinforcement, presets.reinforcement, "reinforcement", where
        )
    if name == "retained":
        if isinstance(value, str):
            fill = resolve(value, name, model.Fill, presets.fills, "fill", where)
            return model.Soil(fill.unit_weight_kn_m3, fill.friction_deg, fill.cohesion_kpa)
        return build(model.Soil, table(value, name, where), where.inline(name))
    if name == "foundation":
        return build(model.Foundation, table(value, name, where), where.inline(name))
    raise where.error(name, suggest(name, FIELD_NAMES), at_value=False)


# ------------------------------------------------------------------ rules between fields


def check_segment(
    seg: model.Segment, where: Where | None = None, *, spacing_given: bool = True
) -> None:
    """Rules between the fields of one segment; InputError on the first broken one."""
    where = where or Where("", segment=seg.id)
    if seg.chainage_end_m <= seg.chainage_start_m:
        raise where.error(
            "chainage_end_m",
            f"must be greater than chainage_start_m "
            f"({seg.chainage_start_m:g} m), got "
            f"{seg.chainage_end_m:g} m",
        )
    if seg.exposed_height_m <= 0.0:
        raise where.error(
            "height_end_m", "the segment has no height: at least one end must be above 0 m"
        )
    if seg.spacing_m > seg.exposed_height_m:
        whence = "" if spacing_given else " (from [defaults] or the reinforcement preset)"
        raise where.error(
            "spacing_m",
            f"{seg.spacing_m:g} m{whence} is larger than the "
            f"segment's height ({seg.exposed_height_m:g} m); "
            f"give a smaller spacing_m",
        )


def check_unique_ids(segments: tuple[model.Segment, ...], wheres: list[Where]) -> None:
    """Every segment id used once (what a corridor file must hold to load)."""
    seen: dict[str, int] = {}
    for i, seg in enumerate(segments):
        if seg.id in seen:
            raise wheres[i].error(
                "id",
                f'"{seg.id}" is already the id of segment number '
                f"{seen[seg.id] + 1}; ids must be unique",
            )
        seen[seg.id] = i


def check_corridor(segments: tuple[model.Segment, ...], wheres: list[Where]) -> None:
    """Unique ids, and no two segments of one wall overlapping in chainage (for an edit;
    a file with overlaps still loads: ``screening.corridor.layout`` finds them all)."""
    check_unique_ids(segments, wheres)
    by_wall: dict[str, list[int]] = {}
    for i, seg in enumerate(segments):
        by_wall.setdefault(seg.wall, []).append(i)
    clashes = []
    for rows in by_wall.values():
        rows.sort(key=lambda i: (segments[i].chainage_start_m, segments[i].chainage_end_m, i))
        for a, b in zip(rows, rows[1:], strict=False):
            if segments[b].chainage_start_m < segments[a].chainage_end_m - 1e-9:
                clashes.append((max(a, b), min(a, b)))
    if clashes:
        late, early = min(clashes)
        other = segments[early]
        raise wheres[late].error(
            "chainage_start_m",
            f'overlaps segment {other.id} of the same wall "{other.wall}" '
            f"({other.chainage_start_m:g}-{other.chainage_end_m:g} m); segments of one wall "
            f"must not overlap",
        )


# ------------------------------------------------------------------ one value typed by a person

_TRUE = ("true", "yes", "y", "1", "on")
_FALSE = ("false", "no", "n", "0", "off")


def _from_text(field: str, raw: str, where: Where) -> Any:
    s = raw.strip()
    if field in NUMBERS or (field == "traffic" and s not in model.TRAFFIC_CLASSES):
        try:
            return float(s)
        except ValueError:
            if field == "traffic":
                return s
            unit = next(f.unit for f in SEGMENT_FIELDS if f.name == field)
            raise where.error(
                field, f'expected a number{" in " + unit if unit else ""}, got "{s}"'
            ) from None
    if field == "water_in_fill":
        if s.lower() in _TRUE:
            return True
        if s.lower() in _FALSE:
            return False
        raise where.error(field, f'expected true or false, got "{s}"')
    if field in ("fill", "reinforcement", "retained", "foundation") and s.startswith("{"):
        try:
            return tomllib.loads(f"v = {s}")["v"]
        except tomllib.TOMLDecodeError as err:
            raise where.error(field, f"not a valid table of values ({err})") from None
    return raw if field == "note" else s


def coerce_field(field: str, raw: str | float | int | bool, presets: Any = None) -> Any:
    """The value of segment field ``field`` that the user typed as ``raw``.

    Text is read as the field needs it: a number, true/false, a preset id or an inline
    table in TOML (``{ preset = "geogrid", spacing_m = 0.4 }``). Raises InputError naming
    the field and what would be valid. Rules between fields (chainage end after start,
    spacing within the height) are :func:`check_segment`'s.
    """
    if presets is None:
        from screening.model.presets import load_presets

        presets = load_presets()
    where = Where(None)  # type: ignore[arg-type]
    if field not in FIELD_NAMES:
        raise InputError(suggest(field, FIELD_NAMES), field=field)
    value = _from_text(field, raw, where) if isinstance(raw, str) else raw
    return parse_field(field, value, where, presets)
