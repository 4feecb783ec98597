"""Join and splice corridor results: chunks of a long screen, one re-screened segment.

Layer arrays of different results may have different widths (the tallest wall sets m); they
are padded with the mask off, so a joined result reads exactly like a single screen.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import fields, replace

import numpy as np

from screening.engine.result import CheckArrays, CorridorResult, LayerArrays
from screening.model.errors import EngineError

_PAD = {"mask": False, "grade_index": -1}


def _pad_layers(layers: LayerArrays, m: int) -> LayerArrays:
    extra = m - layers.mask.shape[1]
    if extra <= 0:
        return layers
    out = {}
    for f in fields(LayerArrays):
        arr = getattr(layers, f.name)
        out[f.name] = np.pad(arr, ((0, 0), (0, extra)), constant_values=_PAD.get(f.name, 0))
    return LayerArrays(**out)


def _join_layers(parts: Sequence[LayerArrays]) -> LayerArrays:
    m = max((p.mask.shape[1] for p in parts), default=1)
    padded = [_pad_layers(p, m) for p in parts]
    return LayerArrays(
        **{
            f.name: np.concatenate([getattr(p, f.name) for p in padded])
            for f in fields(LayerArrays)
        }
    )


def _join_values(values: list) -> object:
    if isinstance(values[0], np.ndarray):
        return np.concatenate(values)
    if isinstance(values[0], list):
        return [x for v in values for x in v]
    return values[0]


def concat(results: Sequence[CorridorResult]) -> CorridorResult:
    """Results of consecutive chunks of one corridor, as one result in their order."""
    if not results:
        raise EngineError("nothing to join: no results")
    first = results[0]
    if len(results) == 1:
        return first
    checks = {
        name: CheckArrays(
            demand=np.concatenate([r.checks[name].demand for r in results]),
            capacity=np.concatenate([r.checks[name].capacity for r in results]),
            cdr=np.concatenate([r.checks[name].cdr for r in results]),
            case=[x for r in results for x in r.checks[name].case],
            detail=[x for r in results for x in r.checks[name].detail],
        )
        for name in first.checks
    }
    extras = {key: _join_values([r.extras[key] for r in results]) for key in first.extras}
    simple = {}
    for f in fields(CorridorResult):
        if f.name in ("checks", "layers", "extras", "factor_set", "engine_version"):
            continue
        simple[f.name] = _join_values([getattr(r, f.name) for r in results])
    return replace(
        first,
        **simple,
        checks=checks,
        layers=_join_layers([r.layers for r in results]),
        extras=extras,
    )


def merge(
    result: CorridorResult, indices: Sequence[int], sub_result: CorridorResult
) -> CorridorResult:
    """``result`` with rows ``indices`` replaced by the rows of ``sub_result``, in order.

    For the TUI: re-screen the edited segments only and splice them in. ``sub_result`` must
    have one row per index and come from the same factor set.
    """
    idx = np.asarray(list(indices), dtype=np.int64)
    n = len(result)
    if len(idx) != len(sub_result):
        raise EngineError(f"merge: {len(idx)} indices for {len(sub_result)} re-screened segments")
    if idx.size and (idx.min() < -n or idx.max() >= n):
        raise EngineError(f"merge: index out of range for {n} segments")
    if sub_result.factor_set != result.factor_set:
        raise EngineError(
            f"merge: factor set {sub_result.factor_set!r} differs from {result.factor_set!r}"
        )
    idx %= max(n, 1)
    m = max(result.layers.mask.shape[1], sub_result.layers.mask.shape[1])
    base_layers, sub_layers = _pad_layers(result.layers, m), _pad_layers(sub_result.layers, m)

    def splice(old, new):
        if isinstance(old, np.ndarray):
            out = old.copy()
            out[idx] = new
            return out
        if isinstance(old, list):
            out = list(old)
            for k, i in enumerate(idx.tolist()):
                out[i] = new[k]
            return out
        return old

    layers = LayerArrays(
        **{
            f.name: splice(getattr(base_layers, f.name), getattr(sub_layers, f.name))
            for f in fields(LayerArrays)
        }
    )
    checks = {
        name: CheckArrays(
            **{
                f.name: splice(getattr(c, f.name), getattr(sub_result.checks[name], f.name))
                for f in fields(CheckArrays)
            }
        )
        for name, c in result.checks.items()
        if name in sub_result.checks
    }
    extras = {
        key: splice(value, sub_result.extras[key]) if key in sub_result.extras else value
        for key, value in result.extras.items()
    }
    simple = {
        f.name: splice(getattr(result, f.name), getattr(sub_result, f.name))
        for f in fields(CorridorResult)
        if f.name not in ("checks", "layers", "extras", "factor_set", "engine_version")
    }
    return replace(result, **simple, checks=checks, layers=layers, extras=extras)


def take(result: CorridorResult, indices: Sequence[int]) -> CorridorResult:
    """The rows ``indices`` of ``result``, in that order, as a result of their own."""
    idx = np.asarray(list(indices), dtype=np.int64)

    def rows(value):
        if isinstance(value, np.ndarray) and value.ndim >= 1 and value.shape[0] == len(result):
            return value[idx]
        if isinstance(value, list) and len(value) == len(result):
            return [value[i] for i in idx.tolist()]
        return value

    checks = {
        name: CheckArrays(**{f.name: rows(getattr(c, f.name)) for f in fields(CheckArrays)})
        for name, c in result.checks.items()
    }
    layers = LayerArrays(
        **{f.name: rows(getattr(result.layers, f.name)) for f in fields(LayerArrays)}
    )
    simple = {
        f.name: rows(getattr(result, f.name))
        for f in fields(CorridorResult)
        if f.name not in ("checks", "layers", "extras", "factor_set", "engine_version")
    }
    extras = {key: rows(value) for key, value in result.extras.items()}
    return replace(result, **simple, checks=checks, layers=layers, extras=extras)
