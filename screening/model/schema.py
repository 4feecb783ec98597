"""From parsed TOML tables to model objects, with one clear error per problem.

Shared by the preset loader and the corridor store. A :class:`Where` says where a table
came from (file, segment or table, the key path so far, and the source text's line map)
so every :class:`~screening.model.errors.InputError` names the file, the line when it can be
found, the segment id or table, and the field.

TOML keys are the field names of :mod:`screening.model`, except that arrays of tables
take the singular: ``grade`` for ``Reinforcement.grades`` and ``case`` for
``FactorSet.cases`` (like ``[[segment]]``).
"""

from __future__ import annotations

import dataclasses
import datetime
import difflib
import math
import types
import typing
from typing import Any

from screening.model import inputs as model
from screening.model.location import SourceMap, Where
from screening.model.ranges import CLASS_RANGES, DEFAULT_RANGE, RANGES, Range

__all__ = [
    "RANGES",
    "RESISTANCE_KEYS",
    "Range",
    "SourceMap",
    "Where",
    "build",
    "choice",
    "describe",
    "differences",
    "number",
    "suggest",
    "table",
    "text",
]

RESISTANCE_KEYS = (
    "sliding",
    "bearing",
    "pullout",
    "rupture_steel_strip",
    "rupture_steel_grid",
    "rupture_geosynthetic",
    "compound",
    "compound_abutment",
)
"""Keys of ``FactorSet.resistance``."""

PLURALS = {"grade": "grades", "case": "cases"}
"""TOML key -> field name for arrays of tables."""
SINGULARS = {v: k for k, v in PLURALS.items()}

STEEL = ("steel-strip", "steel-grid")

CHECK_NAMES = (*model.CHECKS, "compound", "global", "seismic")
"""Checks a load case may name."""

# ------------------------------------------------------------------ values


def describe(value: Any) -> str:
    """A value as a user wrote it, with its TOML type, for "got ..." messages."""
    if isinstance(value, bool):
        return f"true or false ({str(value).lower()})"
    if isinstance(value, int | float):
        return f"a number ({value:g})"
    if isinstance(value, str):
        return f'text ("{value}")'
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "an array"
    if isinstance(value, datetime.date | datetime.time):
        return f"a date or time ({value.isoformat()})"
    return type(value).__name__


def suggest(key: str, valid: typing.Iterable[str]) -> str:
    """``unknown key "x"; did you mean "y"?`` or the list of valid keys."""
    valid = list(valid)
    close = difflib.get_close_matches(key, valid, n=1, cutoff=0.6)
    if close:
        return f'unknown key "{key}"; did you mean "{close[0]}"?'
    return f'unknown key "{key}"; valid keys: {", ".join(valid)}'


def number(value: Any, name: str, where: Where, rng: Range | None = None) -> float:
    """A finite float within the range of ``name`` (or ``rng``)."""
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise where.error(name, f"expected a number, got {describe(value)}")
    v = float(value)
    rng = rng or RANGES.get(name, DEFAULT_RANGE)
    if not math.isfinite(v):
        raise where.error(name, f"expected a finite number {rng.words()}, got {value}")
    problem = rng.problem(v)
    if problem:
        raise where.error(name, problem)
    return v


def text(value: Any, name: str, where: Where, *, nonempty: bool = False) -> str:
    if not isinstance(value, str):
        raise where.error(name, f"expected text, got {describe(value)}")
    if nonempty and not value.strip():
        raise where.error(name, "must not be empty")
    return value


def choice(value: Any, name: str, options: typing.Sequence[str], where: Where) -> str:
    if not isinstance(value, str) or value not in options:
        got = f'"{value}"' if isinstance(value, str) else describe(value)
        raise where.error(name, f"must be one of {', '.join(options)} (got {got})")
    return value


def table(value: Any, name: str | None, where: Where) -> dict[str, Any]:
    if not isinstance(value, dict):
        raise where.error(name, f"expected a table, got {describe(value)}")
    return value


# ------------------------------------------------------------------ dataclasses

_HINTS: dict[type, dict[str, Any]] = {}


def hints(cls: type) -> dict[str, Any]:
    if cls not in _HINTS:
        _HINTS[cls] = typing.get_type_hints(cls)
    return _HINTS[cls]


def toml_keys(cls: type, *, inline: bool) -> list[str]:
    """Keys a TOML table for ``cls`` may hold, in field order."""
    keys = [SINGULARS.get(f.name, f.name) for f in dataclasses.fields(cls)]
    if cls is not model.FactorSet and "id" in keys:
        keys.remove("id")
    if cls is model.FactorSet and not inline:
        keys.remove("id")
    if inline and cls in (model.Fill, model.Reinforcement, model.FactorSet):
        keys.insert(0, "preset")
    return keys


def convert(value: Any, tp: Any, name: str, where: Where) -> Any:
    """One TOML value to the Python value of a field typed ``tp``."""
    origin = typing.get_origin(tp)
    if origin in (typing.Union, types.UnionType):
        args = [a for a in typing.get_args(tp) if a is not type(None)]
        if args == [str, float] or args == [float, str]:  # traffic-like
            return value if isinstance(value, str) else number(value, name, where)
        return convert(value, args[0], name, where)
    if origin is typing.Literal:
        return choice(value, name, typing.get_args(tp), where)
    if tp is float:
        return number(value, name, where)
    if tp is str:
        return text(value, name, where)
    if tp is bool:
        if not isinstance(value, bool):
            raise where.error(name, f"expected true or false, got {describe(value)}")
        return value
    if origin is tuple:
        item = typing.get_args(tp)[0]
        if not isinstance(value, list):
            raise where.error(name, f"expected an array, got {describe(value)}")
        if dataclasses.is_dataclass(item):
            own = where.section is not None and where.anchor is None
            return tuple(
                build(
                    item, v, where.item(name, i, (f"{where.section[0]}.{name}", i) if own else None)
                )
                for i, v in enumerate(value)
            )
        if name in ("checks", "margin_checks"):
            return tuple(choice(v, name, CHECK_NAMES, where) for v in value)
        return tuple(convert(v, item, name, where) for v in value)
    if origin is dict:
        return resistance(value, name, where)
    if dataclasses.is_dataclass(tp):
        return build(tp, value, where.inline(name))
    raise TypeError(f"no TOML conversion for {tp!r}")  # a model change the schema missed


def resistance(value: Any, name: str, where: Where, base: dict[str, float] | None = None):
    tab = table(value, name, where)
    sub = where.inline(name)
    out = dict(base or {})
    for key, v in tab.items():
        if key not in RESISTANCE_KEYS:
            raise sub.error(key, suggest(key, RESISTANCE_KEYS), at_value=False)
        out[key] = number(v, key, sub, RANGES["resistance"])
    missing = [k for k in RESISTANCE_KEYS if k not in out]
    if missing:
        raise where.error(name, f"missing {', '.join(missing)}")
    return {k: out[k] for k in RESISTANCE_KEYS}


def build(
    cls: type,
    value: Any,
    where: Where,
    *,
    base: Any = None,
    inline: bool = True,
    extra: dict[str, Any] | None = None,
):
    """An instance of the model dataclass ``cls`` from a TOML table.

    ``base``: an instance whose values fill the keys the table leaves out (a preset the
    table refers to with ``preset = "<id>"``, or a defaults object); otherwise the model's
    own defaults apply and fields without one are required. ``extra`` sets fields that
    are not read from the table (the preset ``id``).
    """
    tab = table(value, where.prefix.rstrip(".") or None, where)
    valid = toml_keys(cls, inline=inline)
    for key in tab:
        if key not in valid:
            raise where.error(key, suggest(key, valid), at_value=False)
    kinds = hints(cls)
    out: dict[str, Any] = {}
    for key, raw in tab.items():
        if key == "preset":
            continue
        name = PLURALS.get(key, key)
        if name == "resistance" and base is not None:
            out[name] = resistance(raw, name, where, base.resistance)
        elif name == "id":
            out[name] = text(raw, name, where, nonempty=True)
        elif (cls, name) in CLASS_RANGES:
            out[name] = number(raw, key, where, CLASS_RANGES[(cls, name)])
        else:
            out[name] = convert(raw, kinds[name], key, where)
    out.update(extra or {})
    if base is not None:
        merged = dataclasses.replace(base, **out)
    else:
        missing = [
            SINGULARS.get(f.name, f.name)
            for f in dataclasses.fields(cls)
            if f.name not in out
            and f.default is dataclasses.MISSING
            and f.default_factory is dataclasses.MISSING
        ]
        if missing:
            what = ", ".join(missing)
            raise where.error(
                None,
                f'missing {what} (give them, or start from a preset with preset = "<id>")'
                if inline
                else f"missing {what}",
            )
        merged = cls(**out)
    check_consistent(merged, where)
    return merged


def check_consistent(obj: Any, where: Where) -> None:
    """Rules between the fields of one object."""
    if isinstance(obj, model.Reinforcement):
        want = "inextensible" if obj.material in STEEL else "extensible"
        if obj.kind != want:
            raise where.error("kind", f"a {obj.material} reinforcement is {want}")
        if not obj.grades:
            raise where.error("grade", "at least one grade is needed")
        need = {
            "steel-strip": ("elements_per_m", "width_mm", "thickness_mm"),
            "steel-grid": ("bars_per_m", "bar_diameter_mm"),
        }.get(obj.material, ("ultimate_strength_kn_m",))
        for i, grade in enumerate(obj.grades):
            lacking = [k for k in need if getattr(grade, k) is None]
            if lacking:
                raise where.error(
                    f"grade[{i + 1}]", f"a {obj.material} grade needs {', '.join(lacking)}"
                )
        if obj.material in STEEL and obj.yield_strength_mpa is None:
            raise where.error("yield_strength_mpa", "steel reinforcement needs its yield strength")
    if isinstance(obj, model.FactorSet) and not obj.cases:
        raise where.error("case", "at least one load case is needed")


def differences(obj: Any, base: Any) -> dict[str, Any]:
    """Fields of ``obj`` whose value differs from ``base`` (same class), in field order."""
    return {
        f.name: getattr(obj, f.name)
        for f in dataclasses.fields(obj)
        if getattr(obj, f.name) != getattr(base, f.name)
    }
