"""Round trip as a property: ``loads(dumps(c)) == c`` for any valid corridor.

Corridors are generated from the shipped presets (as they are, changed, or replaced by
inline values), with every [defaults] key overridden per segment at random, so each
branch of the writer (preset id, ``preset`` + differences, full table, omitted because
equal to [defaults]) meets the reader. Floats are written with ``repr``, so equality is
exact, not approximate. Comments put at random places of a file are kept across a save.
"""

from __future__ import annotations

import tomllib
from dataclasses import replace

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from screening import model, store
from screening.model.presets import load_presets

P = load_presets()


def num(lo: float, hi: float, *, open_lo: bool = False) -> st.SearchStrategy[float]:
    return st.floats(lo, hi, exclude_min=open_lo, allow_nan=False, allow_infinity=False)


words = st.text(max_size=30)
names = st.text(min_size=1, max_size=30).map(str.strip).filter(bool)

fills = st.one_of(
    st.sampled_from(list(P.fills.values())),
    st.builds(
        lambda f, phi, cu: replace(f, friction_deg=phi, uniformity_coefficient=cu),
        st.sampled_from(list(P.fills.values())),
        num(15, 50),
        num(1, 1000),
    ),
    st.builds(
        model.Fill,
        num(10, 30),
        num(15, 50),
        num(0, 500),
        num(1, 1000),
        num(0, 100),
        num(0, 100),
        st.none(),
        words,
        words,
    ),
)
soils = st.builds(model.Soil, num(10, 30), num(0, 50), num(0, 500))
foundations = st.builds(
    model.Foundation,
    num(10, 30),
    num(0, 50),
    num(0, 500),
    st.none() | num(0, 1000, open_lo=True),
    num(0, 1000),
    st.booleans(),
)
reinforcements = st.one_of(
    st.sampled_from(list(P.reinforcement.values())),
    st.builds(
        lambda r, sv, k: replace(r, spacing_m=sv, grades=r.grades[: max(1, k)]),
        st.sampled_from(list(P.reinforcement.values())),
        num(0.2, 2),
        st.integers(1, 6),
    ),
)
factor_sets = st.one_of(
    st.sampled_from(list(P.factor_sets.values())),
    st.builds(
        lambda fs, e, phi: replace(
            fs, eccentricity_limit_soil=e, resistance={**fs.resistance, "bearing": phi}
        ),
        st.sampled_from(list(P.factor_sets.values())),
        num(0, 0.5, open_lo=True),
        num(0.2, 2),
    ),
)
rules = st.builds(
    lambda h, cdr: replace(P.rules, max_height_m=h, marginal_cdr=cdr),
    num(0, 100),
    num(0, 5),
) | st.just(P.rules)
traffic = st.sampled_from(model.TRAFFIC_CLASSES) | num(0, 100)

OPTIONAL = {
    "fill": fills,
    "retained": soils,
    "foundation": foundations,
    "reinforcement": reinforcements,
    "structure": st.sampled_from(["wall", "abutment"]),
    "surcharge_kpa": num(0, 500),
    "traffic": traffic,
    "backslope_deg": num(0, 45),
    "toe_slope_deg": num(0, 45),
    "seismic_kh": num(0, 1),
    "water_in_fill": st.booleans(),
    "arrangement": st.sampled_from(["single", "tiered", "back-to-back"]),
}
defaults = st.builds(
    model.Defaults,
    spacing_m=st.none() | num(0.2, 2),
    wall=st.none() | names,
    **OPTIONAL,
)


@st.composite
def corridors(draw) -> model.Corridor:
    d = draw(defaults)
    name = draw(names)
    ids = draw(st.lists(names, max_size=6, unique=True))
    # the wall a segment that names none is on ([defaults] wall, else the corridor's name)
    walls = [*draw(st.lists(names, min_size=1, max_size=3)), d.wall or name]
    start = draw(num(-1e4, 1e4))
    segments = []
    for sid in ids:
        values = {k: getattr(d, k) for k in OPTIONAL}
        for key in draw(st.sets(st.sampled_from(sorted(OPTIONAL)))):
            values[key] = draw(OPTIONAL[key])
        spacing = draw(st.none() | num(0.2, 2))
        if spacing is None:
            spacing = d.spacing_m if d.spacing_m is not None else values["reinforcement"].spacing_m
        end = start + draw(num(0.5, 200))
        heights = [draw(num(0, 30)), draw(num(2, 30))]
        if draw(st.booleans()):
            heights.reverse()
        segments.append(
            model.Segment(
                id=sid,
                wall=draw(st.sampled_from(walls)),
                chainage_start_m=start,
                chainage_end_m=end,
                height_start_m=heights[0],
                height_end_m=heights[1],
                spacing_m=spacing,
                note=draw(words),
                **values,
            )
        )
        start = end
    return model.Corridor(
        name=name,
        factor_set=draw(factor_sets),
        defaults=d,
        segments=tuple(segments),
        rules=draw(rules),
        design_life_years=draw(st.none() | num(0, 200, open_lo=True)),
        note=draw(words),
    )


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(corridors())
def test_load_of_dumps_is_identity(corridor: model.Corridor) -> None:
    text = store.dumps(corridor, presets=P)
    assert store.loads(text, "generated.toml", P) == corridor


@settings(max_examples=30, deadline=None)
@given(corridors())
def test_dumps_is_stable(corridor: model.Corridor) -> None:
    """Writing what was read gives the same text: saving an unchanged file changes nothing."""
    text = store.dumps(corridor, presets=P)
    assert store.dumps(store.loads(text, "generated.toml", P), presets=P) == text


@st.composite
def commented(draw) -> tuple[model.Corridor, str, list[str]]:
    """A generated corridor's text with comments on their own lines and after values, at
    places drawn at random (kept only where TOML allows them: the parse must not change)."""
    corridor = draw(corridors())
    lines = store.dumps(corridor, presets=P).split("\n")[:-1]  # not at U+2028 &c.
    notes: list[str] = []
    for k in draw(st.lists(st.integers(0, max(len(lines) - 1, 0)), max_size=8, unique=True)):
        note = f"# note {k} ü #"
        if draw(st.booleans()) and "=" in lines[k] and not lines[k].rstrip().endswith("["):
            candidate = [*lines[:k], f"{lines[k]}  {note}", *lines[k + 1 :]]
        else:
            candidate = [*lines[:k], note, *lines[k:]]
        try:
            if tomllib.loads("\n".join(candidate)) != tomllib.loads("\n".join(lines)):
                continue
        except tomllib.TOMLDecodeError:
            continue
        lines = candidate
        notes.append(note)
    return corridor, "\n".join(lines) + "\n", notes


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(commented(), st.randoms(use_true_random=False))
def test_comments_survive_a_save_of_the_same_or_reordered_segments(case, rnd) -> None:
    """load(save(x)) == x with comments in the old file, and every comment is kept once,
    when the segments are saved in a new order (their comments travel with their ids)."""
    corridor, text, notes = case
    assert store.loads(text, "commented.toml", P) == corridor
    segments = list(corridor.segments)
    rnd.shuffle(segments)
    moved = replace(corridor, segments=tuple(segments))
    out = store.dumps(moved, presets=P, comments_from=text)
    assert store.loads(out, "saved.toml", P) == moved
    for note in notes:
        assert out.count(note) == 1, note
