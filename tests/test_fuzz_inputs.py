"""A small seeded slice of the fuzzing in bench/fuzz_corridors.py: mutated corridor files
either load or fail with InputError, and what loads screens to finite numbers and saves.

Our own contract (issue 14: nothing crashes on bad input; no NaN or inf in any result), no
engineering source. The bench script runs 10,000 documents with every check; this slice
runs the built-in checks only, so it takes a few seconds.
"""

from __future__ import annotations

import dataclasses
import math
import tomllib

import numpy as np
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from screening import store
from screening.engine import screen
from screening.model.errors import InputError
from screening.model.presets import load_presets

P = load_presets()

BASE = """schema = "wallscreen/1"

[corridor]
name = "Fuzz slice"
factor_set = "aashto-lrfd"

[defaults]
fill = { preset = "gravel-sandy", friction_deg = 36.0 }
foundation = { unit_weight_kn_m3 = 18.0, friction_deg = 28.0, cohesion_kpa = 5.0, water_depth_m = 2.0 }
reinforcement = "geogrid"
traffic = 12.5
seismic_kh = 0.1

[[segment]]
id = "F-1"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = 1.0
height_end_m = 3.0
backslope_deg = 10.0

[[segment]]
id = "F-2"
structure = "abutment"
chainage_start_m = 20.0
chainage_end_m = 30.0
height_start_m = 3.0
height_end_m = 6.5
reinforcement = "steel-strip"
"""

VALUES = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(-(2**63), 2**63 - 1),
    st.sampled_from([0.0, -0.0, 1e-300, 0.2, 30.0, 1e7, -1.0]),
    st.text(max_size=12),
    st.booleans(),
    st.lists(st.floats(-10, 10), max_size=2),
    st.just({}),
)


def _leaves(doc, path=()):
    if isinstance(doc, dict):
        for k, v in doc.items():
            yield (*path, k)
            yield from _leaves(v, (*path, k))


@st.composite
def mutated(draw) -> str:
    text = BASE
    for _ in range(draw(st.integers(1, 3))):
        if draw(st.booleans()):
            doc = tomllib.loads(text) if _valid(text) else None
            if doc is not None:
                path = draw(st.sampled_from(sorted(_leaves(doc), key=str)))
                parent = doc
                for p in path[:-1]:
                    parent = parent[p]
                if draw(st.integers(0, 9)) == 0:
                    del parent[path[-1]]
                else:
                    parent[path[-1]] = draw(VALUES)
                text = tomli_w.dumps(doc)
                continue
        lines = text.split("\n")
        i = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["delete", "duplicate", "swap", "char", "truncate"]))
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        elif op == "char":
            k = draw(st.integers(0, len(lines[i])))
            lines[i] = lines[i][:k] + draw(st.sampled_from('"[]{}=#.,-e0 \\\u2028')) + lines[i][k:]
        else:
            lines = lines[: i + 1]
        text = "\n".join(lines)
    return text


def _valid(text: str) -> bool:
    try:
        tomllib.loads(text)
    except tomllib.TOMLDecodeError:
        return False
    return True


def _finite(result) -> None:
    for f in dataclasses.fields(result):
        value = getattr(result, f.name)
        if isinstance(value, np.ndarray) and value.dtype.kind == "f":
            assert np.isfinite(value).all(), f.name
    for name, check in result.checks.items():
        for arr in (check.demand, check.capacity, check.cdr):
            assert np.isfinite(arr).all(), name
    for f in dataclasses.fields(result.layers):
        assert np.isfinite(getattr(result.layers, f.name)).all(), f.name
    assert all(math.isfinite(v) for v in result.length_ratio.tolist())


@settings(
    max_examples=120,
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(mutated())
def test_a_mutated_file_loads_or_says_why(text: str) -> None:
    try:
        corridor = store.loads(text, "fuzz.toml", P)
    except InputError as err:
        assert str(err).startswith("fuzz.toml")
        assert "\n" not in str(err) or "overlaps" in str(err)
        return
    if not corridor.segments:
        return
    result = screen(corridor, extra_checks=())
    _finite(result)
    assert store.loads(store.dumps(corridor, result, P), "saved.toml", P) == corridor
