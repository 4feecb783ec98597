"""Writing corridor files: ``dumps`` (the text) and ``save`` (atomic, keeps ``<name>.bak``).

Preset ids where a value is a preset, per segment only what differs from ``[defaults]``,
and, given a screen, a ``[screen]`` table at the top and a ``[segment.result]`` under each
segment. ``save`` serialises first, then replaces the file atomically, so a failure never
truncates it. ``loads(dumps(x)) == x``.
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
from screening.engine.result import cdr_cut
from screening.model.errors import InputError
from screening.model.presets import Presets, load_presets
from screening.model.schema import SINGULARS, differences
from screening.model.validate import DEFAULT_KEYS, FIELD_NAMES, REQUIRED
from screening.store.reading import default_spacing
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
            if value != default_spacing(d, seg.reinforcement):
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
            "min_cdr": cdr_cut(float(result.min_cdr[row]), 3),
            "length_set_by": result.length_set_by[row],
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
