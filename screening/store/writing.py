"""Writing corridor files: ``dumps`` (the text) and ``save`` (atomic, keeps ``<name>.bak``).

Preset ids where a value is a preset, per segment only what differs from ``[defaults]``,
and, given a screen, a ``[screen]`` table at the top and a ``[segment.result]`` under each
segment. ``save`` serialises first, then replaces the file atomically, so a failure never
truncates it. ``loads(dumps(x)) == x``.
"""

from __future__ import annotations

import dataclasses
import datetime
import math
import os
from pathlib import Path
from typing import Any

from screening import model
from screening.engine.result import cdr_cut
from screening.model.errors import InputError
from screening.model.presets import Presets, load_presets
from screening.model.schema import SINGULARS, differences
from screening.model.textfile import read_text
from screening.model.validate import DEFAULT_KEYS, FIELD_NAMES, REQUIRED
from screening.store.comments import carry_comments
from screening.store.reading import default_spacing
from screening.store.safe_write import write_atomic
from screening.store.toml_layout import dumps_document, to_builtin

HEADER = (
    "# wallscreen corridor file (schema wallscreen/1).\n"
    "# Screening only, not a design: verify every segment with a licensed engineer under\n"
    "# the governing local code. [screen] and [segment.result] are rewritten on every save\n"
    "# and ignored when the file is read.\n"
)


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


def _value_once(name: str, value: Any, presets: Presets, known: dict[Any, Any] | None) -> Any:
    """``_value``, made once per distinct value. Segments then share one table: nothing
    writes into it (``to_builtin`` copies the whole document before it is laid out)."""
    if known is None or not dataclasses.is_dataclass(value):
        return _value(name, value, presets)
    try:
        memo = (name, value)
        made = known.get(memo)
    except TypeError:  # a value holding a dict is not hashable
        return _value(name, value, presets)
    if made is None:
        made = known[memo] = _value(name, value, presets)
    return made


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
    if getattr(corridor, "rates", None):
        doc["rates"] = dict(corridor.rates)  # the file's own unit rates, as written
    ratios = result.length_ratio if result is not None else None  # a property: once
    known: dict[Any, Any] = {}
    doc["segment"] = [
        _segment_table(s, d, corridor.default_wall, presets, result, rows.get(s.id), ratios, known)
        for s in corridor.segments
    ]
    if result is not None:
        # Quantities travel with the outcome so the design team sees them in the file.
        from screening.corridor.quantities import corridor_quantities

        quantities = corridor_quantities(corridor, result).segments
        for table, q in zip(doc["segment"], quantities, strict=True):
            table["result"]["quantities"] = q.as_result()
    return doc


def _segment_table(
    seg: model.Segment,
    d: model.Defaults,
    wall: str,
    presets: Presets,
    result: Any,
    row: int | None,
    ratios: Any = None,
    known: dict[Any, Any] | None = None,
) -> dict[str, Any]:
    """The table of one segment; ``known`` keeps the tables already made for values met on
    earlier segments (many segments share a fill or a reinforcement)."""
    out: dict[str, Any] = {}
    for name in FIELD_NAMES:
        value = getattr(seg, name)
        if name in REQUIRED:
            out[name] = value
        elif name == "wall":
            if value != wall:
                out[name] = value
        elif name == "spacing_m":
            if value != default_spacing(d, seg.reinforcement):
                out[name] = value
        elif name == "note":
            if value:
                out[name] = value
        elif value != getattr(d, name):
            out[name] = _value_once(name, value, presets, known)
    if row is not None:
        out["result"] = {
            "verdict": result.verdict[row],
            "governing": result.governing[row],
            "length_m": round(float(result.length_m[row]), 2),
            "length_ratio": round(
                float((result.length_ratio if ratios is None else ratios)[row]), 3
            ),
            "min_cdr": cdr_cut(float(result.min_cdr[row]), 3),
            "length_set_by": result.length_set_by[row],
            "reasons": list(result.reasons[row]),
            **_mechanism_values(result, row),
        }
    return out


def _mechanism_values(result: Any, row: int) -> dict[str, Any]:
    """The mechanism check's values of a row, only where it ran (an upper bound: the words
    say so); nothing when the screen carries none."""
    factor = result.extras.get("mechanism_factor")
    if factor is None or not math.isfinite(float(factor[row])):
        return {}
    ex = result.extras
    return {
        "mechanism_factor": cdr_cut(float(factor[row]), 3),
        "mechanism_target": round(float(ex["mechanism_target"][row]), 3),
        "mechanism_nodes": int(ex["mechanism_nodes"][row]),
        "mechanism_flag": bool(ex["mechanism_flag"][row]),
        "mechanism_words": str(ex["mechanism_words"][row]),
    }


def dumps(
    corridor: model.Corridor,
    result: Any = None,
    presets: Presets | None = None,
    *,
    comments_from: str | None = None,
) -> str:
    """The corridor (and, given, its screen) as the text of a corridor file.

    ``comments_from``: the text of an earlier version of the file, whose comments are carried
    into the new text beside the same keys (:mod:`screening.store.comments`).
    """
    presets = presets or load_presets()
    text = HEADER + "\n" + dumps_document(to_builtin(_document(corridor, result, presets)))
    if comments_from:
        text = carry_comments(comments_from, text, HEADER)
    return text


def save(
    path: str | os.PathLike[str],
    corridor: model.Corridor,
    result: Any = None,
    presets: Presets | None = None,
    *,
    backup: bool = True,
    comments_from: str | os.PathLike[str] | None = None,
    keep_comments: bool = True,
) -> Path:
    """Write the corridor file atomically; the previous file is kept as ``<name>.bak``.

    The comments of the file being replaced are kept (or those of ``comments_from``, a
    corridor file's path: for a "save as" from the file that was opened; ``keep_comments=False``
    when a different corridor replaces the file). The text is made
    before the file is touched, so a failure never truncates it; a crash at any moment
    leaves the old file or the new one (:mod:`screening.store.safe_write`).
    """
    source = Path(comments_from if comments_from is not None else path)
    old = _old_text(source) if keep_comments else None
    text = dumps(corridor, result, presets, comments_from=old)
    return write_atomic(path, text, backup=backup)


def _old_text(path: Path) -> str | None:
    """The text of the file a save replaces, for its comments; None when there is none."""
    try:
        if not path.is_file():
            return None
        return read_text(path)
    except (InputError, OSError):
        return None  # unreadable or not text: nothing to carry, the save goes on
