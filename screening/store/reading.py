"""Reading corridor files (schema ``wallscreen/1``) into the model: ``load``, ``loads``,
``load_with_screen`` and the results a file carries (:class:`StoredScreen`).

Presets and ``[defaults]`` are applied, so the :class:`~screening.model.Corridor` that comes
back is complete, and any problem is one :class:`~screening.model.errors.InputError` with
file, line, segment id and field. Results in a file are ignored on load: inputs are the
only source of truth. Inline tables start from the model's defaults, or from a preset named
by ``preset``: ``fill = { preset = "granular-wellgraded", friction_deg = 32.0 }``.
"""

from __future__ import annotations

import dataclasses
import os
from pathlib import Path
from typing import Any

from screening import model
from screening.model.errors import InputError
from screening.model.presets import Presets, load_presets, parse_toml
from screening.model.schema import SourceMap, Where, build, number, suggest, table
from screening.model.schema import text as as_text
from screening.model.textfile import not_toml, read_text
from screening.model.validate import (
    DEFAULT_KEYS,
    FIELD_NAMES,
    REQUIRED,
    check_segment,
    check_unique_ids,
    parse_field,
    resolve,
)
from screening.store.safe_write import remove_stale_temps

TOP_KEYS = ("schema", "screen", "corridor", "defaults", "rules", "rates", "segment")
CORRIDOR_KEYS = ("name", "factor_set", "design_life_years", "note")
DEFAULT_FACTOR_SET = "aashto-lrfd"


def load(path: str | os.PathLike[str], presets: Presets | None = None) -> model.Corridor:
    """Read and check the corridor file at ``path``."""
    source = str(path)
    remove_stale_temps(path)
    return loads(read_text(Path(path), source), source, presets)


def load_with_screen(
    path: str | os.PathLike[str], presets: Presets | None = None
) -> tuple[model.Corridor, StoredScreen | None]:
    """The corridor at ``path`` and the results it carries from its last save, from one
    read and one parse (the results are never inputs: they are for comparison only)."""
    source = str(path)
    remove_stale_temps(path)
    text = read_text(Path(path), source)
    doc = parse_corridor_toml(text, source)
    return _corridor(doc, text, source, presets), _stored(doc)


def loads(text: str, source: str = "<input>", presets: Presets | None = None) -> model.Corridor:
    """Read and check a corridor from TOML text; ``source`` names it in messages."""
    return _corridor(parse_corridor_toml(text, source), text, source, presets)


def parse_corridor_toml(text: str, source: str) -> dict[str, Any]:
    """The TOML document of a corridor file; a file that is plainly something else (JSON,
    XML, CSV, another TOML file, nothing at all) is called what it is."""
    if not text.strip():
        raise InputError(
            f'the file is empty; a corridor file starts with schema = "{model.SCHEMA}" and a '
            "[corridor] table (wallscreen new FILE --from-profile PROFILE makes one)",
            file=source,
        )
    try:
        doc = parse_toml(text, source)
    except InputError:
        what = not_toml(text, source)
        if what is not None:
            raise InputError(what, file=source) from None
        raise
    if doc and not {"schema", "corridor", "segment"} & set(doc):
        tables = ", ".join(list(doc)[:6])
        raise InputError(
            f"this TOML file is not a corridor file: it has {tables} where a corridor file "
            f'has schema = "{model.SCHEMA}", [corridor] and [[segment]] tables',
            file=source,
        )
    return doc


def _corridor(
    doc: dict[str, Any], text: str, source: str, presets: Presets | None
) -> model.Corridor:
    presets = presets or load_presets()
    smap = SourceMap(text)
    root = Where(source, section=("", 0), smap=smap)
    for key in doc:
        if key not in TOP_KEYS:
            raise root.error(key, suggest(key, TOP_KEYS), at_value=False)
    schema = doc.get("schema")
    if schema is None:
        raise root.error("schema", f'missing: the file must start with schema = "{model.SCHEMA}"')
    if schema != model.SCHEMA:
        raise root.error(
            "schema", f'"{schema}" is not a schema this version reads (it reads "{model.SCHEMA}")'
        )

    cw = Where(source, table="corridor", section=("corridor", 0), smap=smap)
    if "corridor" not in doc:
        raise root.error(None, "missing the [corridor] table (name and factor_set)")
    cor = table(doc["corridor"], "corridor", root)
    for key in cor:
        if key not in CORRIDOR_KEYS:
            raise cw.error(key, suggest(key, CORRIDOR_KEYS), at_value=False)
    if "name" not in cor:
        raise cw.error("name", "missing: give the corridor a name")
    name = as_text(cor["name"], "name", cw, nonempty=True)
    factor_set = resolve(
        cor.get("factor_set", DEFAULT_FACTOR_SET),
        "factor_set",
        model.FactorSet,
        presets.factor_sets,
        "factor set",
        cw,
    )
    life = cor.get("design_life_years")
    if life is not None:
        life = number(life, "design_life_years", cw)
    note = parse_field("note", cor.get("note", ""), cw, presets)

    rw = Where(source, table="rules", section=("rules", 0), smap=smap)
    rules = build(model.Rules, doc.get("rules", {}), rw, base=presets.rules, inline=False)

    dw = Where(source, table="defaults", section=("defaults", 0), smap=smap)
    defaults = _defaults(table(doc.get("defaults", {}), "defaults", root), dw, presets)
    wall = defaults.wall if defaults.wall is not None else name.strip()

    raw_segments = doc.get("segment", [])
    if not isinstance(raw_segments, list):
        raise root.error("segment", "write each segment as a [[segment]] table")
    segments, wheres = [], []
    known: dict[Any, Any] = {}
    for i, raw in enumerate(raw_segments):
        seg, where = _segment(i, raw, defaults, wall, presets, source, smap, known)
        segments.append(seg)
        wheres.append(where)
    check_unique_ids(tuple(segments), wheres)
    rates = _rates(doc.get("rates"), Where(source, table="rates", section=("rates", 0), smap=smap))
    return model.Corridor(name, factor_set, defaults, tuple(segments), rules, life, note, rates)


def _rates(value: Any, where: Where) -> dict[str, Any] | None:
    """The file's own ``[rates]`` table, checked key by key over the shipped rates (the
    corridor keeps it as written, so a save writes it back unchanged)."""
    if value is None:
        return None
    from screening.corridor.quantities import load_rates, rates_from_table

    rates_from_table(value, where, load_rates())
    return dict(value)


def _defaults(tab: dict[str, Any], where: Where, presets: Presets) -> model.Defaults:
    for key in tab:
        if key not in DEFAULT_KEYS:
            raise where.error(key, suggest(key, DEFAULT_KEYS), at_value=False)
    values = {k: parse_field(k, v, where, presets) for k, v in tab.items()}
    values.setdefault("fill", presets.fills["granular-wellgraded"])
    values.setdefault("retained", model.Soil())
    values.setdefault("foundation", model.Foundation())
    values.setdefault("reinforcement", presets.reinforcement["steel-strip"])
    return model.Defaults(**values)


def _segment(
    i: int,
    raw: Any,
    defaults: model.Defaults,
    wall: str,
    presets: Presets,
    source: str,
    smap: SourceMap,
    known: dict[Any, Any] | None = None,
) -> tuple[model.Segment, Where]:
    """Segment number ``i + 1``; ``known`` keeps the values read from tables already met in
    this file (a corridor repeats the same fill or reinforcement table on many segments)."""
    first = Where(source, segment=f"number {i + 1}", section=("segment", i), smap=smap)
    tab = table(raw, None, first)
    sid = tab.get("id")
    label = sid.strip() if isinstance(sid, str) and sid.strip() else f"number {i + 1}"
    where = dataclasses.replace(first, segment=label)
    for key in tab:
        if key not in FIELD_NAMES and key != "result":
            raise where.error(key, suggest(key, FIELD_NAMES), at_value=False)
    for key in REQUIRED:
        if key not in tab:
            raise where.error(key, f"missing (every segment needs {', '.join(REQUIRED)})")
    known = {} if known is None else known
    values = {}
    for key, raw_value in tab.items():
        if key == "result":
            continue
        if isinstance(raw_value, dict):
            # A table that read without a problem once reads the same again: only where a
            # message points differs, and a table met before raised none. repr tells TOML's
            # values apart (true from 1, 1 from 1.0, -0.0 from 0.0, "1" from 1).
            memo = (key, repr(raw_value))
            if memo not in known:
                known[memo] = parse_field(key, raw_value, where, presets)
            values[key] = known[memo]
        else:
            values[key] = parse_field(key, raw_value, where, presets)
    for key in DEFAULT_KEYS:
        if key not in values and key not in ("spacing_m", "wall"):
            values[key] = getattr(defaults, key)
    values.setdefault("wall", wall)
    given = "spacing_m" in values
    if not given:
        values["spacing_m"] = default_spacing(defaults, values["reinforcement"])
    seg = model.Segment(**values)
    check_segment(seg, where, spacing_given=given)
    return seg, where


def default_spacing(defaults: model.Defaults, reinforcement: model.Reinforcement) -> float:
    return defaults.spacing_m if defaults.spacing_m is not None else reinforcement.spacing_m


@dataclasses.dataclass(frozen=True)
class StoredScreen:
    """The outcome a file carries from its last save (never an input)."""

    screen: dict[str, Any]
    """The [screen] table: engine_version, factor_set, date, counts."""
    results: dict[str, dict[str, Any]]
    """Each segment's [segment.result] table, by segment id."""


def stored_screen(text: str, source: str = "<input>") -> StoredScreen | None:
    """The results written in a corridor file, to compare with a fresh screen; None when
    the file has no [screen] table. Only the TOML syntax is checked here."""
    return _stored(parse_toml(text, source))


def _stored(doc: dict[str, Any]) -> StoredScreen | None:
    if not isinstance(doc.get("screen"), dict):
        return None
    results = {
        seg["id"]: seg["result"]
        for seg in doc.get("segment", [])
        if isinstance(seg, dict)
        and isinstance(seg.get("id"), str)
        and isinstance(seg.get("result"), dict)
    }
    return StoredScreen(doc["screen"], results)
