"""Build a corridor from a road profile (``wallscreen new --from-profile``).

:func:`corridor_from_profile` reads a CSV or LandXML profile (chosen by suffix), splits
every wall into segments by :func:`screening.profile.split.split_profile` and gives each
segment the corridor defaults.
"""

from __future__ import annotations

import dataclasses
import difflib
from collections.abc import Iterable
from pathlib import Path

from screening.model import Corridor, Defaults, FactorSet, Rules, Segment
from screening.model.errors import InputError
from screening.profile.split import Piece, ProfileLine, split_profile, wall_code
from screening.profile.tidy import tidy_pieces

PROFILE_SUFFIXES = {".csv": "csv", ".txt": "csv", ".xml": "landxml", ".landxml": "landxml"}


def read_profile(
    path: str | Path,
    *,
    top_profile: str | None = None,
    toe_profile: str | None = None,
    notes: list[str] | None = None,
    unit: str = "m",
) -> list[ProfileLine]:
    """Profile lines from a CSV or LandXML file, chosen by the file suffix.

    What was passed over (LandXML alignments without both profiles) goes to ``notes``.
    ``unit`` (``m`` or ``ft``) is the unit of a CSV profile; LandXML says its own.
    """
    suffix = Path(path).suffix.lower()
    kind = PROFILE_SUFFIXES.get(suffix)
    if kind is None:
        raise InputError(
            f"unknown profile type {suffix or '(no suffix)'!r}; use .csv or .xml (LandXML)",
            file=str(path),
        )
    if kind == "csv":
        from screening.profile.csv_file import read_profile_csv

        return read_profile_csv(path, unit=unit)
    from screening.profile.landxml import read_profile_xml

    return read_profile_xml(path, top_profile=top_profile, toe_profile=toe_profile, skipped=notes)


def _check_settings(
    source: str, max_step_m: float, max_length_m: float, min_height_m: float
) -> None:
    for field, value, rule in (
        ("max_step_m", max_step_m, "a height step > 0 m, e.g. 0.5"),
        ("max_length_m", max_length_m, "a length > 0 m, e.g. 30"),
    ):
        if not value > 0.0:
            raise InputError(f"{field} = {value:g}: give {rule}", file=source, field=field)
    if min_height_m < 0.0:
        raise InputError(
            f"min_height_m = {min_height_m:g}: give 0 or more", file=source, field="min_height_m"
        )


def join_low_pieces(pieces: list[Piece], spacing_m: float) -> tuple[list[Piece], list[Piece]]:
    """Join every piece lower than one layer spacing to a neighbour it touches.

    A segment must be at least one spacing high to hold a layer; where a wall tapers
    out, its last low piece joins the taller piece next to it, which is screened at its
    taller end (so the join is on the safe side). A low stretch touching no other piece
    cannot be a reinforced-soil wall and is returned as dropped.
    """
    out = list(pieces)
    dropped: list[Piece] = []
    k = 0
    while k < len(out):
        c0, c1, h0, h1 = out[k]
        if max(h0, h1) >= spacing_m:
            k += 1
            continue
        before = k > 0 and out[k - 1][1] == c0
        after = k + 1 < len(out) and out[k + 1][0] == c1
        if after and (not before or max(out[k + 1][2:]) >= max(out[k - 1][2:])):
            nxt = out.pop(k + 1)
            out[k] = (c0, nxt[1], h0, nxt[3])
        elif before:
            prev = out.pop(k - 1)
            k -= 1
            out[k] = (prev[0], c1, prev[2], h1)
        else:
            dropped.append(out.pop(k))
    return out, dropped


def segments_from_lines(
    lines: Iterable[ProfileLine],
    defaults: Defaults,
    *,
    wall_name: str = "Wall",
    max_step_m: float = 0.5,
    max_length_m: float = 30.0,
    breaks: Iterable[float] = (),
    peak_tolerance_m: float = 0.05,
    min_height_m: float = 0.0,
    notes: list[str] | None = None,
    round_m: float = 0.0,
    min_length_m: float = 0.0,
) -> tuple[Segment, ...]:
    """Segments for every profile line, ids ``<wall code><L|R>-<nn>`` in chainage order.

    What was left out (stretches too low to hold one layer) is appended to ``notes``.
    """
    breaks = tuple(float(b) for b in breaks)
    spacing = (
        defaults.spacing_m if defaults.spacing_m is not None else defaults.reinforcement.spacing_m
    )
    common = {
        f.name: getattr(defaults, f.name)
        for f in dataclasses.fields(Defaults)
        if f.name not in ("spacing_m", "wall")  # the wall comes from the profile
    }
    codes: dict[str, str] = {}
    seen: set[tuple[str, str]] = set()
    out: list[Segment] = []
    notes: list[str] = [] if notes is None else notes
    for line in lines:
        wall = line.wall or wall_name
        if (wall, line.side) in seen:  # two alignments of one name: keep them apart
            n = 2
            while (f"{wall} ({n})", line.side) in seen:
                n += 1
            wall = f"{wall} ({n})"
        seen.add((wall, line.side))
        if wall not in codes:
            codes[wall] = wall_code(wall, codes.values())
        prefix = codes[wall] + {"left": "L", "right": "R", "": ""}[line.side]
        label = f"{wall}, {line.side}" if line.side else wall
        pieces = split_profile(
            line.chainage_m,
            line.height_m,
            max_step_m=max_step_m,
            max_length_m=max_length_m,
            breaks_m=breaks + line.breaks_m,
            peak_tolerance_m=peak_tolerance_m,
            min_height_m=min_height_m,
        )
        pieces, dropped = join_low_pieces(pieces, spacing)
        pieces, short = tidy_pieces(pieces, line, round_m, min_length_m)
        if short:
            notes.append(
                f"{label}: kept {len(short)} piece(s) shorter than {min_length_m:g} m, as "
                "joining them would hide a higher point, at chainage " + ", ".join(short)
            )
        if dropped:
            notes.append(
                f"{label}: left out {len(dropped)} stretch(es) lower than one layer spacing "
                f"({spacing:g} m) at chainage "
                + ", ".join(f"{c0:g}-{c1:g}" for c0, c1, _, _ in dropped)
            )
        width = max(2, len(str(len(pieces))))
        for n, (c0, c1, h0, h1) in enumerate(pieces, start=1):
            out.append(
                Segment(
                    id=f"{prefix}-{n:0{width}d}",
                    wall=label,
                    chainage_start_m=c0,
                    chainage_end_m=c1,
                    height_start_m=h0,
                    height_end_m=h1,
                    spacing_m=spacing,
                    **common,
                )
            )
    return tuple(out)


NEW_FILL = "granular-wellgraded"
NEW_REINFORCEMENT = "steel-strip"
NEW_FACTOR_SET = "aashto-lrfd"
"""Preset ids a corridor made from a profile starts with when the caller gives none."""


def starting_defaults() -> Defaults:
    """``[defaults]`` for a new corridor: select granular fill, steel strips, firm ground.

    A starting point to edit, not a recommendation: the report and the file say so.
    """
    from screening.model import Foundation, Soil
    from screening.model.presets import load_presets

    presets = load_presets()
    return Defaults(
        fill=presets.fills[NEW_FILL],
        retained=Soil(),
        foundation=Foundation(),
        reinforcement=presets.reinforcement[NEW_REINFORCEMENT],
    )


def _factor_set(factor_set: FactorSet | None, factor_set_id: str | None) -> FactorSet:
    if factor_set is not None:
        return factor_set
    from screening.model.presets import load_presets

    sets = load_presets().factor_sets
    wanted = factor_set_id or NEW_FACTOR_SET
    if wanted not in sets:
        near = difflib.get_close_matches(wanted, sorted(sets), n=1)
        hint = f" (did you mean {near[0]!r}?)" if near else ""
        raise InputError(
            f"unknown factor set {wanted!r}{hint}; valid: {', '.join(sorted(sets))}",
            field="factor_set",
        )
    return sets[wanted]


def _check_line_range(source: str, line: ProfileLine) -> None:
    """Chainages and heights within what a corridor file takes, before splitting: a stray
    1e300 would otherwise make the split run for hours (or forever)."""
    from screening.model.schema import RANGES

    who = " ".join(x for x in (line.wall, line.side) if x) or "the profile"
    for key, values, field in (
        ("chainage_start_m", line.chainage_m, "chainage"),
        ("height_start_m", line.height_m, "exposed height"),
    ):
        rng = RANGES[key]
        bad = next((v for v in values if rng.problem(v) is not None), None)
        if bad is not None:
            at = (
                ""
                if field == "chainage"
                else f" at chainage {line.chainage_m[values.index(bad)]:g} m"
            )
            raise InputError(
                f"{who}: {field} {bad:g} m{at} is outside what a corridor file takes "
                f"({rng.lo:g} to {rng.hi:g} m)",
                file=source,
            )


def corridor_from_profile(
    path: str | Path,
    *,
    name: str,
    defaults: Defaults | None = None,
    factor_set: FactorSet | None = None,
    factor_set_id: str | None = None,
    rules: Rules | None = None,
    max_step_m: float = 0.5,
    max_length_m: float = 30.0,
    breaks: Iterable[float] = (),
    peak_tolerance_m: float = 0.05,
    min_height_m: float = 0.0,
    wall_name: str | None = None,
    top_profile: str | None = None,
    toe_profile: str | None = None,
    design_life_years: float | None = None,
    profile_unit: str = "m",
    round_m: float = 0.1,
    min_length_m: float = 5.0,
) -> Corridor:
    """A new corridor whose segments come from a chainage profile.

    ``path``: ``.csv`` (see :mod:`screening.profile.csv_file`) or ``.xml`` LandXML (see
    :mod:`screening.profile.landxml`; ``top_profile`` / ``toe_profile`` pick profiles by name).
    A new segment starts where the exposed height would vary by more than
    ``max_step_m`` within it, where it would exceed ``max_length_m`` (long runs are cut
    into equal parts), at every chainage in ``breaks`` and at breaks marked in the
    profile. Walls without a name in the profile are called ``wall_name`` (default: the
    corridor ``name``). Every segment takes ``defaults`` (None: :func:`starting_defaults`);
    edit them afterwards with :func:`edit_segments`. ``factor_set`` (or the preset
    ``factor_set_id``; neither: aashto-lrfd) and ``rules`` (None: the rules preset).
    ``profile_unit``: ``ft`` for a CSV profile in feet (the corridor is always in metres);
    ``max_step_m``, ``max_length_m`` and ``breaks`` are in metres whatever the profile.
    Cuts between segments are rounded to ``round_m`` (0.1 m: no 16.667 m chainages) and a
    piece shorter than ``min_length_m`` joins a neighbour (see :func:`tidy_pieces`).
    """
    source = str(path)
    _check_settings(source, max_step_m, max_length_m, min_height_m)
    for field, value in (("round_m", round_m), ("min_length_m", min_length_m)):
        if value < 0.0:
            raise InputError(f"{field} = {value:g}: give 0 or more", file=source, field=field)
    factor_set = _factor_set(factor_set, factor_set_id)
    if defaults is None:
        defaults = starting_defaults()
    if rules is None:
        from screening.model.presets import load_presets

        rules = load_presets().rules
    notes: list[str] = []
    lines = read_profile(
        path, top_profile=top_profile, toe_profile=toe_profile, notes=notes, unit=profile_unit
    )
    for line in lines:
        _check_line_range(source, line)
    segments = segments_from_lines(
        lines,
        defaults,
        wall_name=wall_name or name,
        max_step_m=max_step_m,
        max_length_m=max_length_m,
        breaks=breaks,
        peak_tolerance_m=peak_tolerance_m,
        min_height_m=min_height_m,
        notes=notes,
        round_m=round_m,
        min_length_m=min_length_m,
    )
    if not segments:
        raise InputError(
            f"the profile has no stretch of wall higher than {min_height_m:g} m", file=source
        )
    return Corridor(
        name=name,
        factor_set=factor_set,
        defaults=defaults,
        segments=segments,
        rules=rules,
        design_life_years=design_life_years,
        note=" ".join(
            [
                f"Segments made from the profile {Path(path).name}: new segment at a height "
                f"change over {max_step_m:g} m or a length of {max_length_m:g} m, cuts "
                f"rounded to {round_m:g} m, none shorter than {min_length_m:g} m.",
                *(n + "." for n in notes),
            ]
        ),
    )


def empty_corridor(name: str = "New corridor", factor_set_id: str | None = None) -> Corridor:
    """A corridor with no segments yet: the starting defaults, a preset factor set (None:
    aashto-lrfd) and the rules preset; ``wallscreen new FILE`` and the interface's new
    corridor start here."""
    from screening.model.presets import load_presets

    return Corridor(
        name=name,
        factor_set=_factor_set(None, factor_set_id),
        defaults=starting_defaults(),
        segments=(),
        rules=load_presets().rules,
    )


def defaults_used(corridor: Corridor) -> list[str]:
    """The corridor's defaults in words: what a new segment takes unless told otherwise."""
    d = corridor.defaults
    f, r = d.foundation, d.retained
    spacing = d.spacing_m if d.spacing_m is not None else d.reinforcement.spacing_m
    traffic = f"{d.traffic:g} kPa" if isinstance(d.traffic, int | float) else d.traffic
    ground = f"foundation γ {f.unit_weight_kn_m3:g} kN/m³, φ′ {f.friction_deg:g}°, "
    ground += f"c′ {f.cohesion_kpa:g} kPa, water {f.water_depth_m:g} m below the base"
    return [
        f"factor set {corridor.factor_set.id}; structure {d.structure}",
        f"reinforced fill {getattr(d.fill, 'id', None) or 'inline'}; reinforcement "
        f"{getattr(d.reinforcement, 'id', None) or 'inline'} at Sv {spacing:g} m",
        f"retained soil γ {r.unit_weight_kn_m3:g} kN/m³, φ′ {r.friction_deg:g}°",
        ground + (" (no firm layer given)" if f.firm_depth_m is None else ""),
        f"traffic {traffic}; permanent surcharge {d.surcharge_kpa:g} kPa",
        f"backslope {d.backslope_deg:g}°, toe slope {d.toe_slope_deg:g}°, seismic kh0 "
        f"{d.seismic_kh:g} (0: static only)",
        "a starting point to check against the site, not a recommendation",
    ]
