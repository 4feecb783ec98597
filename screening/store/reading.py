"""Corridor files (schema ``wallscreen/1``) to and from the model.

``load``/``loads`` read and check a corridor file: presets and ``[defaults]`` are applied,
so the :class:`~screening.model.Corridor` that comes back is complete, and any problem is
one :class:`~screening.model.errors.InputError` with file, line, segment id and field.
``save``/``dumps`` write it back: preset ids where a value is a preset, per segment only
what differs from ``[defaults]``, and, given a screen, a ``[screen]`` table at the top and
a ``[segment.result]`` under each segment. Results in a file are ignored on load: inputs
are the only source of truth. ``save`` serialises first, then replaces the file
atomically and keeps the old one as ``<name>.bak``. ``load(save(x)) == x``.

Inline tables start from the model's defaults, or from a preset named by ``preset``:
``fill = { preset = "granular-wellgraded", friction_deg = 32.0 }``.
"""

from __future__ import annotations

import contextlib
import dataclasses
import datetime
import os
import shutil
import tempfile
from pathlib import Path
from typing import Any

from screening import model
from screening.model.errors import InputError
from screening.model.presets import Presets, load_presets, parse_toml, read_text
from screening.model.schema import (
    SINGULARS,
    SourceMap,
    Where,
    build,
    differences,
    number,
    suggest,
    table,
)
from screening.model.schema import text as as_text
from screening.model.validate import (
    DEFAULT_KEYS,
    FIELD_NAMES,
    REQUIRED,
    SEGMENT_FIELDS,
    check_corridor,
    check_segment,
    coerce_field,
    parse_field,
    resolve,
)
from screening.store.toml_layout import dumps_document, to_builtin

__all__ = [
    "SEGMENT_FIELDS",
    "StoredScreen",
    "check_segment",
    "coerce_field",
    "dumps",
    "load",
    "loads",
    "save",
    "stored_screen",
    "load_with_screen",
]

TOP_KEYS = ("schema", "screen", "corridor", "defaults", "rules", "segment")
CORRIDOR_KEYS = ("name", "factor_set", "design_life_years", "note")
DEFAULT_FACTOR_SET = "aashto-lrfd"
HEADER = (
    "# wallscreen corridor file (schema wallscreen/1).\n"
    "# Screening only, not a design: verify every segment with a licensed engineer under\n"
    "# the governing local code. [screen] and [segment.result] are rewritten on every save\n"
    "# and ignored when the file is read.\n"
)


# ------------------------------------------------------------------ reading


def load(path: str | os.PathLike[str], presets: Presets | None = None) -> model.Corridor:
    """Read and check the corridor file at ``path``."""
    source = str(path)
    return loads(read_text(Path(path), source), source, presets)


def load_with_screen(
    path: str | os.PathLike[str], presets: Presets | None = None
) -> tuple[model.Corridor, StoredScreen | None]:
    """The corridor at ``path`` and the results it carries from its last save, from one
    read and one parse (the results are never inputs: they are for comparison only)."""
    source = str(path)
    text = read_text(Path(path), source)
    doc = parse_toml(text, source)
    return _corridor(doc, text, source, presets), _stored(doc)


def loads(text: str, source: str = "<input>", presets: Presets | None = None) -> model.Corridor:
    """Read and check a corridor from TOML text; ``source`` names it in messages."""
    return _corridor(parse_toml(text, source), text, source, presets)


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

    raw_segments = doc.get("segment", [])
    if not isinstance(raw_segments, list):
        raise root.error("segment", "write each segment as a [[segment]] table")
    segments, wheres = [], []
    for i, raw in enumerate(raw_segments):
        seg, where = _segment(i, raw, defaults, presets, source, smap)
        segments.append(seg)
        wheres.append(where)
    check_corridor(tuple(segments), wheres)
    return model.Corridor(name, factor_set, defaults, tuple(segments), rules, life, note)


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
    i: int, raw: Any, defaults: model.Defaults, presets: Presets, source: str, smap: SourceMap
) -> tuple[model.Segment, Where]:
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
    values = {k: parse_field(k, v, where, presets) for k, v in tab.items() if k != "result"}
    for key in DEFAULT_KEYS:
        if key not in values and key != "spacing_m":
            values[key] = getattr(defaults, key)
    given = "spacing_m" in values
    if not given:
        values["spacing_m"] = _default_spacing(defaults, values["reinforcement"])
    seg = model.Segment(**values)
    check_segment(seg, where, spacing_given=given)
    return seg, where


def _default_spacing(defaults: model.Defaults, reinforcement: model.Reinforcement) -> float:
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


# ------------------------------------------------------------------ writing


def _fields(obj: Any, names: list[str] | None = None) -> dict[str, Any]:
    """Fields of a model object as TOML values (None dropped, arrays of tables singular)."""
    out: dict[str, Any] = {}
    for f in dataclasses.fields(obj):
        if names is not None and f.name not in names:
            continue
        v = getattr(obj, f.name)
        if v is None:
            continue
        if isinstance(v, tuple) and v and dataclasses.is_dataclass(v[0]):
            v = [_fields(x) for x in v]
        out[SINGULARS.get(f.name, f.name)] = v
    return out


def _reference(obj: Any, options: dict[str, Any], keep_id: bool = False) -> Any:
    """A preset id, a ``preset`` table with the differences, or a full table of values."""
    pid = getattr(obj, "id", None)
    if pid is not None and pid in options:
        if obj == options[pid]:
            return pid
        return {"preset": pid, **_fields(obj, list(differences(obj, options[pid])))}
    names = [f.name for f in dataclasses.fields(obj) if keep_id or f.name != "id"]
    return _fields(obj, names)


def _soil(soil: model.Soil | model.Foundation) -> dict[str, Any]:
    keep = {"unit_weight_kn_m3", "friction_deg", "cohesion_kpa", "water_depth_m"}
    base = type(soil)()
    return {k: v for k, v in _fields(soil).items() if k in keep or v != getattr(base, k)}


def _value(name: str, value: Any, presets: Presets) -> Any:
    if name == "fill":
        return _reference(value, presets.fills)
    if name == "reinforcement":
        return _reference(value, presets.reinforcement)
    if name in ("retained", "foundation"):
        return _soil(value)
    return value


def _document(corridor: model.Corridor, result: Any, presets: Presets) -> dict[str, Any]:
    doc: dict[str, Any] = {"schema": model.SCHEMA}
    rows: dict[str, int] = {}
    if result is not None:
        ids = [s.id for s in corridor.segments]
        if list(result.ids) != ids:
            raise ValueError(
                "the screen result does not match the corridor's segments; "
                "screen it again before saving"
            )
        rows = {sid: i for i, sid in enumerate(ids)}
        doc["screen"] = {
            "engine_version": result.engine_version,
            "factor_set": result.factor_set,
            "date": datetime.date.today(),
            **result.counts(),
        }
    cor: dict[str, Any] = {
        "name": corridor.name,
        "factor_set": _reference(corridor.factor_set, presets.factor_sets, keep_id=True),
    }
    if corridor.design_life_years is not None:
        cor["design_life_years"] = corridor.design_life_years
    if corridor.note:
        cor["note"] = corridor.note
    doc["corridor"] = cor
    d = corridor.defaults
    doc["defaults"] = {
        k: _value(k, getattr(d, k), presets) for k in DEFAULT_KEYS if getattr(d, k) is not None
    }
    rules = differences(corridor.rules, presets.rules)
    if rules:
        doc["rules"] = rules
    doc["segment"] = [
        _segment_table(s, d, presets, result, rows.get(s.id)) for s in corridor.segments
    ]
    if result is not None:
        # Quantities travel with the outcome so the design team sees them in the file.
        from screening.corridor.quantities import corridor_quantities

        quantities = corridor_quantities(corridor, result).segments
        for table, q in zip(doc["segment"], quantities, strict=True):
            table["result"]["quantities"] = q.as_result()
    return doc


def _segment_table(
    seg: model.Segment, d: model.Defaults, presets: Presets, result: Any, row: int | None
) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for name in FIELD_NAMES:
        value = getattr(seg, name)
        if name in REQUIRED:
            out[name] = value
        elif name == "spacing_m":
            if value != _default_spacing(d, seg.reinforcement):
                out[name] = value
        elif name == "note":
            if value:
                out[name] = value
        elif value != getattr(d, name):
            out[name] = _value(name, value, presets)
    if row is not None:
        out["result"] = {
            "verdict": result.verdict[row],
            "governing": result.governing[row],
            "length_m": round(float(result.length_m[row]), 2),
            "length_ratio": round(float(result.length_ratio[row]), 3),
            "min_cdr": round(float(result.min_cdr[row]), 3),
            "reasons": list(result.reasons[row]),
        }
    return out


def dumps(corridor: model.Corridor, result: Any = None, presets: Presets | None = None) -> str:
    """The corridor (and, given, its screen) as the text of a corridor file."""
    presets = presets or load_presets()
    return HEADER + "\n" + dumps_document(to_builtin(_document(corridor, result, presets)))


def save(
    path: str | os.PathLike[str],
    corridor: model.Corridor,
    result: Any = None,
    presets: Presets | None = None,
    *,
    backup: bool = True,
) -> Path:
    """Write the corridor file atomically; the previous file is kept as ``<name>.bak``.

    The text is made before the file is touched, so a failure never truncates it.
    """
    path = Path(path)
    text = dumps(corridor, result, presets)
    try:
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    except OSError as err:
        raise InputError(f"cannot write here ({err.strerror})", file=str(path)) from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as f:
            f.write(text)
            f.flush()
            os.fsync(f.fileno())
        if path.exists():
            os.chmod(tmp, path.stat().st_mode & 0o777)
            if backup:
                shutil.copy2(path, path.with_name(path.name + ".bak"))
        else:
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException as err:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)
        if isinstance(err, OSError):
            raise InputError(f"cannot save ({err.strerror or err})", file=str(path)) from None
        raise
    with contextlib.suppress(OSError):
        dfd = os.open(path.parent, os.O_DIRECTORY)
        os.fsync(dfd)
        os.close(dfd)
    return path
