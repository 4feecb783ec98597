"""The fast JSON of ``check --json`` against the standard library that it stands in for.

The text must be byte for byte ``json.dumps(corridor_json(...), indent=1)`` and the numbers
exactly Python's ``round`` and ``cdr_cut`` value by value (reference: CPython's ``json``
and ``round``; our own contract, no engineering source).
"""

from __future__ import annotations

import json
import math
from dataclasses import replace

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from screening import store
from screening.cli import json_indent, json_write
from screening.cli.json_numbers import cdr_column, num_column
from screening.cli.jsonout import corridor_json, segment_json
from screening.engine import screen
from screening.engine.result import cdr_cut
from screening.engine.samples import make_corridor, make_segment
from screening.model.presets import demo_corridor_path

EMPTY = 'schema = "wallscreen/1"\n[corridor]\nname = "Nothing yet"\n'


def _python_round(values, digits):
    return [round(float(x), digits) if math.isfinite(x) else None for x in values]


def _same(a: list, b: list) -> bool:
    """Equal as JSON writes them (so -0.0 and 0.0 differ)."""
    return json.dumps(a) == json.dumps(b)


def test_demo_json_text_is_the_standard_librarys() -> None:
    corridor = store.load(demo_corridor_path())
    result = screen(corridor)
    doc = corridor_json(corridor, result)
    assert json_write.dumps(corridor, result) == json.dumps(doc, indent=1)
    assert doc["segments"] == [segment_json(result.segment(i)) for i in range(len(result))]


def test_unusual_extras_and_words_are_written_as_json_writes_them() -> None:
    corridor = make_corridor([make_segment(), make_segment(id="B", note="Ä")])
    result = screen(corridor, extra_checks=())
    n = len(result)
    extras = {
        "words": ["kN·m/m \u2028 tab\there", 'quote " and \\ \x7f \x01'],
        "maybe": [None, 1.23456],
        "nested": [[1.0, float("nan")], {"k": [True, {"deep": "é"}]}],
        "rows": np.array([[0.125, -0.00004], [1e20, np.inf]]),
        "flags": np.array([True, False]),
        "counts": np.array([3, -7]),
        "big": [2**70, -(2**70)],
        "empty": [[], {}],
        "scalar_not_per_segment": 3.0,
    }
    result = replace(result, extras=extras, reasons=[("é \U0001f600",), ()], ids=["A", "B"])
    assert n == 2
    assert json_write.dumps(corridor, result) == json.dumps(
        corridor_json(corridor, result), indent=1
    )
    per_segment = [segment_json(result.segment(i)) for i in range(n)]
    assert corridor_json(corridor, result)["segments"] == per_segment


def test_empty_corridor_json_text() -> None:
    empty = store.loads(EMPTY, "empty.toml")
    result = screen(empty)
    assert json_write.dumps(empty, result) == json.dumps(corridor_json(empty, result), indent=1)


def test_ties_and_edges_round_as_python_does() -> None:
    values = [0.125, 0.375, 2.675, 1.00005, -0.00005, 0.5, -0.5, 1.5, 2.5, -0.0, 0.0, 1e-300]
    values += [1e15 + 0.5, 2.0**52 + 1, 1e20, -1e300, np.nan, np.inf, -np.inf, 123456.78905]
    for digits in (2, 3, 4):
        assert _same(num_column(values, digits), _python_round(values, digits))
    assert _same(cdr_column(values), [cdr_cut(x) if math.isfinite(x) else None for x in values])


json_values = st.recursive(
    st.none()
    | st.booleans()
    | st.integers()
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.text(),
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(), inner, max_size=4),
    max_leaves=30,
)


@settings(max_examples=300, deadline=None)
@given(json_values)
def test_indent_text_is_json_dumps(value) -> None:
    assert json_indent.dumps(value) == json.dumps(value, indent=1)
    assert json_indent.encode([value], "\n") == json.dumps([value], indent=1)


@settings(max_examples=300, deadline=None)
@given(
    st.lists(st.floats(allow_nan=True, allow_infinity=True, width=64), max_size=40),
    st.integers(min_value=0, max_value=6),
)
def test_num_column_is_round(values, digits) -> None:
    assert _same(num_column(values, digits), _python_round(values, digits))
    arr = np.array(values + values, dtype=np.float64).reshape(2, -1)
    assert _same(num_column(arr, digits), [_python_round(values, digits)] * 2)


@settings(max_examples=300, deadline=None)
@given(st.lists(st.floats(min_value=-1e6, max_value=1e6).map(lambda x: round(x, 5)), max_size=40))
def test_num_column_is_round_on_short_decimals(values) -> None:
    """Values with few decimals sit on or next to the halves where rounding is hard."""
    for digits in (2, 3, 4):
        assert _same(num_column(values, digits), _python_round(values, digits))


@settings(max_examples=200, deadline=None)
@given(st.lists(st.floats(allow_nan=True, allow_infinity=True), max_size=40))
def test_cdr_column_is_cdr_cut(values) -> None:
    want = [cdr_cut(x) if math.isfinite(x) else None for x in values]
    assert _same(cdr_column(values), want)
