"""The text of ``wallscreen check --json``, written column by column over all segments.

Byte for byte ``json.dumps(corridor_json(corridor, result), indent=1)`` (a test holds the
two together), without building a dict per segment and walking it in Python: each column of
values becomes its JSON tokens in one call of the C encoder
(:func:`screening.cli.json_indent.tokens`), and each segment, check and layer is one
``%`` of a template with the indent of its depth.
"""

from __future__ import annotations

from typing import IO

import numpy as np

from screening.cli import jsonout
from screening.cli.json_indent import _LEAVES, encode, tokens
from screening.cli.json_numbers import cdr_column, num_column
from screening.engine.result import CorridorResult, _unit
from screening.model import Corridor

SEGMENT_KEYS = (
    "id",
    "verdict",
    "exposed_height_m",
    "design_height_m",
    "embedment_m",
    "length_m",
    "length_ratio",
    "rule_length_m",
    "governing",
    "min_cdr",
    "length_set_by",
    "margin_check",
    "margin_cdr",
    "grade_steps_added",
    "traffic_kpa",
    "reasons",
    "checks",
    "layers",
)
CHECK_KEYS = ("demand", "capacity", "cdr", "unit", "case", "where")
LAYER_KEYS = ("depth_m", "tension_kn_m", "pullout_capacity_kn_m", "rupture_capacity_kn_m", "grade")


def _template(keys: tuple[str, ...] | list[str], depth: int) -> str:
    """``{"key": %s, ...}`` as ``json.dumps(indent=1)`` lays out a dict at ``depth``."""
    inner = "\n" + " " * (depth + 1)
    items = ",".join(f"{inner}{tokens([k])[0].replace('%', '%%')}: %s" for k in keys)
    return "{" + items + "\n" + " " * depth + "}"


def _lists(items: list[str], counts: list[int], depth: int) -> list[str]:
    """Consecutive runs of ``items`` (``counts`` long) as JSON arrays at ``depth``."""
    inner = ",\n" + " " * (depth + 1)
    open_, close = "[\n" + " " * (depth + 1), "\n" + " " * depth + "]"
    out, start = [], 0
    for count in counts:
        if count:
            out.append(open_ + inner.join(items[start : start + count]) + close)
        else:
            out.append("[]")
        start += count
    return out


def dump(corridor: Corridor, result: CorridorResult, fp: IO[str]) -> None:
    """``json.dump(corridor_json(corridor, result), fp, indent=1)``, in pieces (the text of
    10,000 segments is 57 MB: one copy fewer)."""
    for piece in _pieces(corridor, result):
        fp.write(piece)


def dumps(corridor: Corridor, result: CorridorResult) -> str:
    """``json.dumps(corridor_json(corridor, result), indent=1)``."""
    return "".join(_pieces(corridor, result))


def _pieces(corridor: Corridor, result: CorridorResult) -> list[str]:
    head_text = encode({**jsonout.corridor_head(corridor, result), "segments": []}, "\n")
    if len(result) == 0:
        return [head_text]
    body = ",\n  ".join(_segment_texts(result))
    return [head_text[: -len("[]\n}")], "[\n  ", body, "\n ]\n}"]


def _segment_texts(result: CorridorResult) -> list[str]:
    n = len(result)
    h = np.asarray(result.design_height_m, dtype=np.float64)
    length = np.asarray(result.length_m, dtype=np.float64)
    ratio = np.zeros(n)
    np.divide(length, h, out=ratio, where=h > 0)
    reasons = [list(r) for r in result.reasons]
    columns = [
        tokens(list(result.ids)),
        tokens(list(result.verdict)),
        tokens(num_column(result.exposed_height_m, 3)),
        tokens(num_column(h, 3)),
        tokens(num_column(result.embedment_m, 3)),
        tokens(num_column(length, 2)),
        tokens(num_column(ratio, 3)),
        tokens(num_column(result.rule_length_m, 2)),
        tokens(list(result.governing)),
        tokens(cdr_column(result.min_cdr)),
        tokens(list(result.length_set_by)),
        tokens(list(result.margin_check)),
        tokens(cdr_column(result.margin_cdr)),
        tokens(np.asarray(result.grade_boost).astype(np.int64).tolist()),
        tokens(num_column(result.traffic_kpa, 2)),
        _lists(tokens([x for r in reasons for x in r]), [len(r) for r in reasons], 3),
        _check_texts(result),
        _layer_texts(result),
    ]
    keys = list(SEGMENT_KEYS)
    extras = _extra_texts(result)
    if extras is not None:
        keys.append("extras")
        columns.append(extras)
    return list(map(_template(keys, 2).__mod__, zip(*columns, strict=True)))


def _check_texts(result: CorridorResult) -> list[str]:
    n = len(result)
    if not result.checks:
        return ["{}"] * n
    one = _template(CHECK_KEYS, 4)
    per_check = []
    for name, c in result.checks.items():
        detail = list(c.detail)
        units = [_unit(name, d) for d in detail] if name == "seismic" else [_unit(name, "")] * n
        cols = (
            tokens(num_column(c.demand)),
            tokens(num_column(c.capacity)),
            tokens(cdr_column(c.cdr)),
            tokens(units),
            tokens(list(c.case)),
            tokens(detail),
        )
        per_check.append(list(map(one.__mod__, zip(*cols, strict=True))))
    return list(map(_template(list(result.checks), 3).__mod__, zip(*per_check, strict=True)))


def _layer_texts(result: CorridorResult) -> list[str]:
    lay = result.layers
    mask = np.asarray(lay.mask, dtype=bool)
    if mask.size == 0:
        return ["[]"] * len(result)
    rows, cols = np.nonzero(mask)  # row-major: each segment's layers in order
    grade_index = np.asarray(lay.grade_index)[rows, cols].tolist()
    names = result.grade_names
    grades = [
        names[i][g] if g >= 0 else "none strong enough"
        for i, g in zip(rows.tolist(), grade_index, strict=True)
    ]
    columns = (
        tokens(num_column(np.asarray(lay.depth_m)[mask], 3)),
        tokens(num_column(np.asarray(lay.tension_kn_m)[mask], 2)),
        tokens(num_column(np.asarray(lay.pullout_capacity_kn_m)[mask], 2)),
        tokens(num_column(np.asarray(lay.rupture_capacity_kn_m)[mask], 2)),
        tokens(grades),
    )
    texts = list(map(_template(LAYER_KEYS, 4).__mod__, zip(*columns, strict=True)))
    return _lists(texts, mask.sum(axis=1).tolist(), 3)


def _extra_texts(result: CorridorResult) -> list[str] | None:
    """Each segment's extras as text, None when there are none (the key is then left out)."""
    columns = jsonout._extra_columns(result)
    if not columns:
        return None
    texts = []
    for _key, values in columns:
        if all(type(v) in _LEAVES for v in values):
            texts.append(tokens(values))
        else:
            texts.append([encode(v, "\n    ") for v in values])
    keys = [key for key, _ in columns]
    return list(map(_template(keys, 3).__mod__, zip(*texts, strict=True)))
