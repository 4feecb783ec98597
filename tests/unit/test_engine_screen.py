"""screen / screen_iter / merge / segment views: the engine's public API behaves as promised."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from screening.engine import ExtraCheck, merge, screen, screen_iter
from screening.engine.result import CDR_CAP, CorridorResult, SegmentResult
from screening.engine.samples import (
    ASD,
    DA1,
    GEOGRID,
    GRID,
    make_corridor,
    make_segment,
    with_segment,
)
from screening.model import CHECKS, VERDICTS, Fill, Foundation


def _mixed(n: int = 12):
    fams = (None, GRID, GEOGRID)
    segs = []
    for i in range(n):
        kw = {
            "height_start_m": 2.0 + i * 0.9,
            "height_end_m": 2.5 + i * 0.9,
            "traffic": ("none", "parallel", "approach")[i % 3],
        }
        if fams[i % 3] is not None:
            kw["reinforcement"] = fams[i % 3]
        segs.append(make_segment(i, **kw))
    return make_corridor(segs)


def _drive(gen):
    progress = []
    while True:
        try:
            progress.append(next(gen))
        except StopIteration as stop:
            return progress, stop.value


def test_screen_shapes_and_ranges() -> None:
    r = screen(_mixed(), extra_checks=())
    assert isinstance(r, CorridorResult) and len(r) == 12
    assert set(r.verdict) <= set(VERDICTS)
    assert set(CHECKS) <= set(r.checks)
    for c in r.checks.values():
        assert np.all(np.isfinite(c.cdr)) and np.all(c.cdr >= 0) and np.all(c.cdr <= CDR_CAP)
        assert len(c.case) == len(c.detail) == 12
    assert np.all(r.length_m >= r.rule_length_m - 1e-9)
    assert np.allclose(np.round(r.length_m / 0.1), r.length_m / 0.1)
    assert r.factor_set == "aashto-lrfd"


def test_screen_iter_yields_progress_and_returns_the_same_result() -> None:
    corridor = _mixed(12)
    progress, chunked = _drive(screen_iter(corridor, chunk_size=5, extra_checks=()))
    assert progress == [(5, 12), (10, 12), (12, 12)]
    whole = screen(corridor, extra_checks=())
    assert chunked.ids == whole.ids and chunked.verdict == whole.verdict
    np.testing.assert_allclose(chunked.length_m, whole.length_m)
    for name in whole.checks:
        np.testing.assert_allclose(chunked.checks[name].cdr, whole.checks[name].cdr)
    assert chunked.layers.mask.shape == whole.layers.mask.shape
    assert chunked.segment(11) == whole.segment(11)


def test_merge_splices_a_rescreened_segment() -> None:
    corridor = _mixed(6)
    before = screen(corridor, extra_checks=())
    edited = with_segment(corridor, 3, height_start_m=11.0, height_end_m=11.0)
    sub = screen(replace(edited, segments=(edited.segments[3],)), extra_checks=())
    merged = merge(before, [3], sub)
    fresh = screen(edited, extra_checks=())
    assert merged.segment(3) == fresh.segment(3)
    assert merged.segment(2) == before.segment(2)
    np.testing.assert_allclose(merged.length_m, fresh.length_m)
    assert merged.layers.mask.shape[1] >= before.layers.mask.shape[1]


def test_segment_view_is_frozen_and_complete() -> None:
    r = screen(_mixed(3), extra_checks=())
    s = r.segment(1)
    assert isinstance(s, SegmentResult)
    assert s.checks["bearing"].unit == "kPa" and s.checks["eccentricity"].unit == "m"
    assert s.layers and all(layer.grade for layer in s.layers)
    assert s.length_ratio == pytest.approx(s.length_m / s.design_height_m)
    assert s.governing in s.checks
    assert s.min_cdr == pytest.approx(min(c.cdr for c in s.checks.values()))
    with pytest.raises(AttributeError):
        s.verdict = "clear"  # type: ignore[misc]
    with pytest.raises(IndexError):
        r.segment(3)


def test_factor_set_override_and_two_case_sets() -> None:
    corridor = _mixed(4)
    asd = screen(corridor, ASD, extra_checks=())
    da1 = screen(corridor, DA1, extra_checks=())
    assert asd.factor_set == "asd" and da1.factor_set == "en1997-da1"
    assert set(da1.checks["sliding"].case) <= {"DA1-C1", "DA1-C2"}


def test_out_of_scope_reasons_in_words() -> None:
    segs = [
        make_segment(0, fill=Fill(unit_weight_kn_m3=19.0, friction_deg=28.0, fines_percent=22.0)),
        make_segment(1, foundation=Foundation(undrained_strength_kpa=18.0)),
        make_segment(2, height_start_m=12.5, height_end_m=12.5),
        make_segment(3, water_in_fill=True),
        make_segment(4, arrangement="tiered"),
    ]
    r = screen(make_corridor(segs), extra_checks=())
    assert r.verdict == ["refer"] * 5
    text = [" | ".join(x) for x in r.reasons]
    assert "fines 22 % > 15 %: marginal fill, outside screening" in text[0]
    assert "fill friction 28° < 30°" in text[0]
    assert "cu 18 kPa < 25 kPa" in text[1]
    assert "design height 13.2 m > 12 m" in text[2]
    assert "water in the reinforced zone" in text[3]
    assert "tiered walls" in text[4]
    assert r.governing[0] == "fill" and r.governing[1] == "soft-foundation"


def test_a_failing_check_refers_with_numbers() -> None:
    # a very weak retained soil behind a tall wall on a low-friction base cannot slide-pass at 1.2H
    weak = make_segment(
        0,
        height_start_m=9.0,
        height_end_m=9.0,
        foundation=Foundation(friction_deg=12.0),
        surcharge_kpa=40.0,
    )
    r = screen(make_corridor([weak]), extra_checks=())
    assert r.verdict[0] == "refer"
    assert bool(r.extras["search_exhausted"][0])
    reason = [x for x in r.reasons[0] if x.startswith("sliding CDR")]
    length, h = r.length_m[0], r.design_height_m[0]
    assert length <= 1.2 * h and length > 1.2 * h - 0.1
    assert reason and f"< 1.00 at L = {length:.1f} m ({length / h:.2f}H)" in reason[0]


def test_extra_check_hook_sizes_the_length() -> None:
    """A plug-in check that needs L >= 0.9H makes L grow to exactly the first step there."""

    def needs_long(ctx, length_m):
        demand = 0.9 * ctx.geom.design_height_m
        return demand, length_m, length_m / demand

    corridor = make_corridor([make_segment(0)])
    base = screen(corridor, extra_checks=())
    r = screen(corridor, extra_checks=[ExtraCheck("compound", needs_long)])
    h = r.design_height_m[0]
    assert r.length_m[0] == pytest.approx(np.ceil(0.9 * h / 0.1 - 1e-9) * 0.1)
    assert r.length_m[0] > base.length_m[0]
    assert "compound" in r.checks and r.segment(0).checks["compound"].cdr >= 1.0


def test_empty_corridor() -> None:
    r = screen(replace(make_corridor([make_segment(0)]), segments=()), extra_checks=())
    assert len(r) == 0 and r.counts() == {"clear": 0, "marginal": 0, "refer": 0}


def test_demo_corridor_screens_under_every_shipped_factor_set() -> None:
    """presets/demo-corridor.toml through the store, then every factor set of the presets."""
    store = pytest.importorskip("screening.store")
    presets = pytest.importorskip("screening.model.presets")
    corridor = store.load(presets.demo_corridor_path())
    for fs in presets.load_presets().factor_sets.values():
        r = screen(corridor, fs, extra_checks=())  # the built-in checks; plug-ins once below
        assert len(r) == len(corridor.segments) and r.factor_set == fs.id
        assert set(r.verdict) <= set(VERDICTS)
        for c in r.checks.values():
            assert np.all(np.isfinite(c.cdr)) and np.all(c.cdr > 0)
    r = screen(corridor)  # with whatever plug-in checks are installed
    assert set(r.verdict) == set(VERDICTS)  # the demo shows all three outcomes
    assert all(np.all(np.isfinite(c.cdr)) for c in r.checks.values())


def test_nominal_layer_strengths_for_plug_ins() -> None:
    """The unfactored strengths a slip-circle check reads: factored ones divided by phi."""
    from screening.engine.arrays import build_arrays
    from screening.engine.checks.internal import choose_grades, nominal_layer_strengths, prepare
    from screening.engine.context import build_context

    ctx = build_context(
        build_arrays(make_corridor([make_segment(0), make_segment(1, reinforcement=GEOGRID)]))
    )
    ctx = replace(ctx, internal=prepare(ctx))
    length = np.array([4.7, 4.7])
    out = nominal_layer_strengths(ctx, length)
    grades = choose_grades(ctx, ctx.internal, length)
    mask = out["mask"]
    np.testing.assert_allclose(
        out["rupture_kn_m"][0][mask[0]], grades.rupture_capacity[0][mask[0]] / 0.75
    )
    np.testing.assert_allclose(
        out["rupture_kn_m"][1][mask[1]], grades.rupture_capacity[1][mask[1]] / 0.90
    )
    np.testing.assert_allclose(
        out["level_m"][0][mask[0]][-1], 0.375
    )  # bottom layer Sv/2 above the pad
    assert np.all(out["pullout_kn_m2"][mask] > 0)


def test_incomplete_reinforcement_gets_a_clear_message() -> None:
    from screening.engine.samples import STRIP
    from screening.model.errors import EngineError

    bad = replace(STRIP, yield_strength_mpa=None)
    with pytest.raises(EngineError, match="steel needs yield_strength_mpa"):
        screen(make_corridor([make_segment(0, reinforcement=bad)]), extra_checks=())


def test_costly_extra_check_searched_only_where_it_fails() -> None:
    """The added check runs once on every segment, then only on the rows it fails."""
    seen: list[int] = []

    def picky(ctx, length_m):
        seen.append(ctx.n)
        demand = np.where(
            np.array([i.endswith("1") for i in ctx.a.ids]), 0.95 * ctx.geom.design_height_m, 0.1
        )
        return demand, length_m, length_m / demand

    segs = [make_segment(i) for i in range(4)]
    r = screen(make_corridor(segs), extra_checks=[ExtraCheck("compound", picky)])
    assert seen[0] == 4 and set(seen[1:-1]) == {1} and seen[-1] == 4
    assert r.length_m[1] > r.length_m[0] == r.length_m[2] == r.length_m[3]
    assert r.length_m[1] >= 0.95 * r.design_height_m[1]
