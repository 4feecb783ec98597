"""JSON text with one space of indent, byte for byte what ``json.dumps(obj, indent=1)``
writes, several times faster.

The standard library encodes with C only without an indent; with one it walks the document
in Python generators. This walk appends to one list; a container that holds only text,
numbers, booleans and None (most of a screen's: a check, a layer, the reasons) is encoded in
one call of ``json``'s own C encoder with the item separator of its depth (``",\n"`` and
the indent), so every string and number is written by the same code as ``json.dumps``; the
other leaves use the functions ``json`` uses (``encode_basestring_ascii``,
``float.__repr__``, ``int.__repr__``). Anything but dicts with text keys, lists, tuples,
text, numbers, booleans and None goes to ``json.dumps`` itself, as does everything when
the C encoder is missing.
"""

from __future__ import annotations

import json
from json.encoder import c_make_encoder, encode_basestring_ascii
from typing import IO, Any


class _Unusual(Exception):
    """A value this walk does not encode; ``json`` then encodes the whole document."""


def _float(value: float) -> str:
    if value != value:
        return "NaN"
    if value == float("inf"):
        return "Infinity"
    if value == float("-inf"):
        return "-Infinity"
    return float.__repr__(value)


def _bool(value: bool) -> str:
    return "true" if value else "false"


def _null(value: None) -> str:
    return "null"


_LEAVES = {
    str: encode_basestring_ascii,
    float: _float,
    int: int.__repr__,
    bool: _bool,
    type(None): _null,
}


_FLAT: dict[str, Any] = {}
"""The C encoder for each item separator."""


def _flat(separator: str):
    """The C encoder writing items apart by ``separator`` (markers, default, strings,
    indent, key and item separators, sort_keys, skipkeys, allow_nan)."""
    enc = _FLAT.get(separator)
    if enc is None:
        enc = _FLAT[separator] = c_make_encoder(
            None, None, encode_basestring_ascii, None, ": ", separator, False, False, True
        )
    return enc


def dumps(obj: Any) -> str:
    """``json.dumps(obj, indent=1)``."""
    return encode(obj, "\n")


def encode(obj: Any, newline: str) -> str:
    """``obj`` as it reads inside ``json.dumps(..., indent=1)`` at the depth whose lines
    start with ``newline`` (``"\n"`` plus one space per level)."""
    leaf = _LEAVES.get(type(obj))
    if leaf is not None:
        return leaf(obj)
    parts: list[str] = []
    try:
        if c_make_encoder is None:
            raise _Unusual
        _container(obj, parts, newline, {})
    except _Unusual:
        text = json.dumps(obj, indent=1)
        return text.replace("\n", newline)  # JSON text holds no raw line break but these
    return "".join(parts)


def tokens(values: list[Any]) -> list[str]:
    """The JSON text of each item of ``values`` (text, numbers, booleans, None only: the
    caller makes sure), as ``json.dumps`` writes it, from one call of the C encoder."""
    if not values:
        return []
    if c_make_encoder is None:
        return [json.dumps(v) for v in values]
    text = "".join(_flat("\0")(values, 0))  # a raw NUL never appears in JSON text
    return text[1:-1].split("\0")


def dump(obj: Any, fp: IO[str]) -> None:
    """``json.dump(obj, fp, indent=1)``."""
    fp.write(dumps(obj))


def _container(obj: Any, parts: list[str], newline: str, keys: dict[str, str]) -> None:
    inner = newline + " "
    kind = type(obj)
    leaves = _LEAVES
    if kind is dict:
        if not obj:
            parts.append("{}")
            return
        if all(type(k) is str for k in obj) and all(type(v) in leaves for v in obj.values()):
            text = "".join(_flat("," + inner)(obj, 0))
            parts.append("{" + inner + text[1:-1] + newline + "}")
            return
        parts.append("{")
        sep = inner
        for key, value in obj.items():
            head = keys.get(key)
            if head is None:
                if type(key) is not str:
                    raise _Unusual
                head = keys[key] = encode_basestring_ascii(key) + ": "
            leaf = leaves.get(type(value))
            if leaf is not None:
                parts.append(sep + head + leaf(value))
            else:
                parts.append(sep + head)
                _container(value, parts, inner, keys)
            sep = "," + inner
        parts.append(newline + "}")
    elif kind is list or kind is tuple:
        if not obj:
            parts.append("[]")
            return
        if all(type(v) in leaves for v in obj):
            text = "".join(_flat("," + inner)(obj, 0))
            parts.append("[" + inner + text[1:-1] + newline + "]")
            return
        parts.append("[")
        sep = inner
        for value in obj:
            leaf = leaves.get(type(value))
            if leaf is not None:
                parts.append(sep + leaf(value))
            else:
                parts.append(sep)
                _container(value, parts, inner, keys)
            sep = "," + inner
        parts.append(newline + "]")
    else:
        raise _Unusual
