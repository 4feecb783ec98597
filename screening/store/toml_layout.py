"""A small TOML writer shaped for people reading diffs of corridor files.

``tomli_w`` writes every nested table as its own ``[a.b]`` section. Corridor files read
better with short tables inline (``retained = { unit_weight_kn_m3 = 19.0, ... }``), so
this module lays out the document and leaves every scalar to ``tomli_w`` (strings are
escaped, floats written with ``repr`` so they read back exactly). A table goes inline
when it fits on one line and holds no array of tables; otherwise it becomes a section.
"""

from __future__ import annotations

import datetime
import math
import re
from typing import Any

import numpy as np
import tomli_w

INLINE_MAX = 100
"""Longest inline table written on one line, characters."""

_BARE = re.compile(r"^[A-Za-z0-9_\-]+$")


def to_builtin(value: Any) -> Any:
    """numpy scalars and arrays, tuples and nested containers as plain TOML-able values.

    Keys whose value is None are dropped; None inside an array is refused. A table met
    twice in the document (the same object: segments sharing a fill or a reinforcement)
    comes out as one table too, so the layout can write it once (:func:`dumps_document`).
    """
    return _builtin(value, {})


def _builtin(value: Any, seen: dict[int, tuple[Any, Any]]) -> Any:
    kind = type(value)
    if kind is str or kind is float or kind is int or kind is bool:
        return value  # the common leaves first (exact types: numpy's float64 goes below)
    if isinstance(value, dict):
        hit = seen.get(id(value))
        if hit is not None:
            return hit[1]
        out = {str(k): _builtin(v, seen) for k, v in value.items() if v is not None}
        seen[id(value)] = (value, out)  # the source kept alive: its id is not reused
        return out
    if isinstance(value, list | tuple):
        if any(v is None for v in value):
            raise TypeError("None cannot be written in a TOML array")
        return [_builtin(v, seen) for v in value]
    if isinstance(value, np.ndarray):
        return _builtin(value.tolist(), seen)
    if isinstance(value, np.generic):
        return value.item()
    return value


_KEYS: dict[str, str] = {}
"""Keys as written, by name (a file repeats the same few dozen keys)."""


def key(name: str) -> str:
    written = _KEYS.get(name)
    if written is None:
        written = name if _BARE.match(name) else tomli_w.dumps({"k": name})[4:].strip()
        if len(_KEYS) < 10_000:
            _KEYS[name] = written
    return written


_PLAIN = re.compile(r"[ -!#-\[\]-~]*")
"""Printable ASCII without quote or backslash: written between quotes as it is."""


def scalar(value: Any) -> str:
    """One scalar in TOML: the common cases directly, the rest by tomli_w."""
    kind = type(value)
    if kind is float and math.isfinite(value):
        return repr(value)
    if kind is str and _PLAIN.fullmatch(value):
        return f'"{value}"'
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float) and math.isfinite(value):
        return repr(value)  # what tomli_w writes too; reads back exactly
    if isinstance(value, str) and _PLAIN.fullmatch(value):
        return f'"{value}"'
    if isinstance(value, int | float | str | datetime.date | datetime.time):
        return tomli_w.dumps({"v": value})[4:].rstrip("\n")
    raise TypeError(f"cannot write {type(value).__name__} to TOML")


def _is_tables(value: Any) -> bool:
    return isinstance(value, list) and bool(value) and all(isinstance(v, dict) for v in value)


def inline(value: Any) -> str:
    """A value on one line: inline tables and arrays nest."""
    if isinstance(value, dict):
        if not value:
            return "{}"
        return "{ " + ", ".join(f"{key(k)} = {inline(v)}" for k, v in value.items()) + " }"
    if isinstance(value, list):
        return "[" + ", ".join(inline(v) for v in value) + "]"
    return scalar(value)


ALWAYS_INLINE = frozenset({"fill", "retained", "foundation"})
"""Soil tables stay on one line however long: a corridor file reads like a table of soils."""


def _fits(name: str, value: dict[str, Any]) -> str | None:
    """The table on one line when it goes inline, else None."""
    if any(_is_tables(v) for v in value.values()):
        return None
    one = inline(value)
    return one if name in ALWAYS_INLINE or len(f"{name} = {one}") <= INLINE_MAX else None


def _array(value: list[Any]) -> str:
    one = inline(value)
    if len(one) <= INLINE_MAX - 20 or not value:
        return one
    return "[\n" + "".join(f"    {inline(v)},\n" for v in value) + "]"


def _section(
    path: list[str],
    body: dict[str, Any],
    out: list[str],
    *,
    array: bool = False,
    force: frozenset[str] = frozenset(),
    done: dict[tuple[Any, ...], tuple[Any, list[str]]] | None = None,
) -> None:
    """Lines of the table ``body`` at ``path``; ``done`` keeps the lines of tables already
    laid out, by path and object (segments sharing one reinforcement table: it is laid out
    once and its lines copied)."""
    if done is None or not path:
        _layout(path, body, out, array, force, done)
        return
    memo = (tuple(path), id(body), array)
    hit = done.get(memo)
    if hit is not None:
        out.extend(hit[1])
        return
    start = len(out)
    _layout(path, body, out, array, force, done)
    done[memo] = (body, out[start:])  # the table kept alive: its id is not reused


def _layout(
    path: list[str],
    body: dict[str, Any],
    out: list[str],
    array: bool,
    force: frozenset[str],
    done: dict[tuple[Any, ...], tuple[Any, list[str]]] | None,
) -> None:
    if path:
        dotted = ".".join(key(p) for p in path)
        out.append(f"\n[[{dotted}]]" if array else f"\n[{dotted}]")
    later: list[tuple[str, Any, bool]] = []
    for k, v in body.items():
        if isinstance(v, dict):
            if k in force:
                one = None
            elif done is not None:  # a shared inline table (a fill) is written out once
                hit = done.get(("inline", k, id(v)))
                if hit is None:
                    hit = done[("inline", k, id(v))] = (v, _fits(k, v))
                one = hit[1]
            else:
                one = _fits(k, v)
            if one is None:
                later.append((k, v, False))
            else:
                out.append(f"{key(k)} = {one}")
        elif _is_tables(v) and (k in force or len(inline(v)) > INLINE_MAX - 20):
            later.append((k, v, True))
        elif isinstance(v, list):
            out.append(f"{key(k)} = {_array(v)}")
        else:
            out.append(f"{key(k)} = {scalar(v)}")
    for k, v, is_array in later:
        if is_array:
            for item in v:
                _section([*path, k], item, out, array=True, force=force, done=done)
        else:
            _section([*path, k], v, out, force=force, done=done)


def dumps_document(doc: dict[str, Any]) -> str:
    """The document as TOML text: top-level scalars, then tables in the order given.

    ``screen``, ``corridor``, ``defaults``, ``rules``, ``segment`` and ``result`` are
    always sections, so the file keeps the same shape whatever their size.
    """
    out: list[str] = []
    force = frozenset({"screen", "corridor", "defaults", "rules", "rates", "segment", "result"})
    _section([], doc, out, force=force, done={})
    return "\n".join(out).lstrip("\n") + "\n"
