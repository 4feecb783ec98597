"""Read a chainage profile from CSV into :class:`~screening.profile.split.ProfileLine` objects.

Columns are found by their header (any order, case and surrounding spaces ignored):

=================  =========================================================
``chainage_m``     chainage in metres, or kilometres+metres (``1+250.000``)
``height_m``       exposed height of the wall at that chainage, m
``top_level_m``    level of the top of the wall, m  } instead of ``height_m``:
``toe_level_m``    level of the ground at the toe, m } height = top - toe
``wall``           optional: wall name, several walls in one file
``side``           optional: ``left`` / ``right`` (``L`` / ``R``)
``break``          optional: ``yes`` / ``1`` / ``x`` marks a chainage where a segment must end
=================  =========================================================

Other columns (remarks, offsets …) are ignored. Rows of one wall and side come in
chainage order; the same chainage twice is a step in the wall top. Blank lines and lines
starting with ``#`` are skipped. A file using ``;`` between fields may use a decimal comma.
Every problem raises :class:`~screening.model.errors.InputError` with the line and column.
"""

from __future__ import annotations

import csv
import difflib
import io
from dataclasses import dataclass, field
from pathlib import Path

from screening.model.errors import InputError
from screening.model.schema import RANGES
from screening.profile.split import (
    LENGTH_UNITS_M,
    ProfileLine,
    parse_chainage,
    parse_number,
    read_profile_text,
)

ALIASES = {
    "chainage_m": ("chainage_m", "chainage", "ch_m", "ch", "station", "station_m", "sta"),
    "height_m": ("height_m", "height", "exposed_height_m", "exposed_height"),
    "top_level_m": ("top_level_m", "top_level", "top_m", "top"),
    "toe_level_m": ("toe_level_m", "toe_level", "toe_m", "toe"),
    "wall": ("wall", "wall_name"),
    "side": ("side",),
    "break": ("break", "break_here"),
}
SIDES = {"left": "left", "l": "left", "right": "right", "r": "right", "": ""}
YES = {"yes", "y", "1", "x", "true", "break"}
NO = {"", "no", "n", "0", "false"}


@dataclass
class _Line:
    chainage_m: list[float] = field(default_factory=list)
    height_m: list[float] = field(default_factory=list)
    breaks_m: list[float] = field(default_factory=list)
    last_line: int = 0


def _columns(header: list[str], source: str) -> dict[str, int]:
    """Map our column names to their index in the header row."""
    names = [h.strip().lower().lstrip("\ufeff") for h in header]
    found: dict[str, int] = {}
    for key, aliases in ALIASES.items():
        for i, name in enumerate(names):
            if name in aliases:
                if key in found:
                    raise InputError(
                        f"two columns mean {key!r} ({header[found[key]]!r} and {header[i]!r}); keep one",
                        file=source,
                        line=1,
                        column=i + 1,
                    )
                found[key] = i

    def missing(key: str, also: str = "") -> InputError:
        taken = {names[i] for i in found.values()}
        near = [
            n
            for n in names
            if n not in taken and difflib.get_close_matches(n, ALIASES[key], n=1, cutoff=0.7)
        ]
        hint = f" (is {near[0]!r} meant to be it?)" if near else ""
        return InputError(
            f"no {key!r} column{also}{hint}; the header has: {', '.join(h.strip() for h in header)}",
            file=source,
            line=1,
        )

    if "chainage_m" not in found:
        raise missing("chainage_m")
    has_levels = "top_level_m" in found or "toe_level_m" in found
    if "height_m" in found and has_levels:
        raise InputError(
            "give either a height_m column or top_level_m and toe_level_m columns, not both",
            file=source,
            line=1,
            column=found["height_m"] + 1,
        )
    if "height_m" not in found:
        if not has_levels:
            raise missing("height_m", " (nor top_level_m and toe_level_m)")
        for key in ("top_level_m", "toe_level_m"):
            if key not in found:
                raise missing(key, " to go with the other level column")
    return found


def _sniff(text: str) -> str:
    first = next((ln for ln in text.splitlines() if ln.strip() and not ln.startswith("#")), "")
    counts = {d: first.count(d) for d in (",", ";", "\t")}
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] else ","


def read_profile_csv(
    path: str | Path, *, text: str | None = None, unit: str = "m"
) -> list[ProfileLine]:
    """Every wall and side in the file, in the order they first appear, in metres.

    ``text`` lets a caller pass the file contents (tests, the TUI); ``path`` then only
    names the source in messages. ``unit``: ``m`` (default) or ``ft`` for a profile
    whose chainages, heights and levels are in feet (stations like ``12+50.00``).
    """
    if unit not in LENGTH_UNITS_M:
        raise InputError(f"profile unit {unit!r}: use m or ft", file=str(path), field="unit")
    source = str(path)
    if text is None:
        text = read_profile_text(path)
    delimiter = _sniff(text)
    decimal_comma = delimiter == ";"
    reader = csv.reader(io.StringIO(text), delimiter=delimiter)
    cols: dict[str, int] | None = None
    lines: dict[tuple[str, str], _Line] = {}
    for row in reader:
        line_no = reader.line_num
        if not row or all(not c.strip() for c in row) or row[0].lstrip().startswith("#"):
            continue
        if cols is None:
            cols = _columns(row, source)
            header = [h.strip() for h in row]
            continue
        if len(row) > len(header) and any(c.strip() for c in row[len(header) :]):
            raise InputError(
                f"this row has {len(row)} fields but the header has {len(header)}"
                + (
                    " (a decimal comma? separate fields with ';' to use one)"
                    if delimiter == ","
                    else ""
                ),
                file=source,
                line=line_no,
                column=len(header) + 1,
            )
        _read_row(row, line_no, cols, header, source, decimal_comma, lines, unit)
    if cols is None:
        raise InputError(
            "the profile is empty: a header row and at least two rows are needed", file=source
        )
    if not lines:
        raise InputError("the profile has a header but no rows", file=source)
    out = []
    for (wall, side), line in lines.items():
        if len(line.chainage_m) < 2:
            who = " ".join(x for x in (wall, side) if x) or "the wall"
            raise InputError(
                f"{who} has a single row; a profile needs at least two chainages",
                file=source,
                line=line.last_line,
            )
        out.append(
            ProfileLine(
                wall, side, tuple(line.chainage_m), tuple(line.height_m), tuple(line.breaks_m)
            )
        )
    return out


def _read_row(
    row: list[str],
    line_no: int,
    cols: dict[str, int],
    header: list[str],
    source: str,
    decimal_comma: bool,
    lines: dict[tuple[str, str], _Line],
    unit: str = "m",
) -> None:
    def cell(key: str) -> str:
        i = cols[key]
        return row[i].strip() if i < len(row) else ""

    def fail(key: str, message: str) -> InputError:
        return InputError(
            f"{header[cols[key]]}: {message}", file=source, line=line_no, column=cols[key] + 1
        )

    to_m = LENGTH_UNITS_M[unit]

    def number(key: str, what: str) -> float:
        raw = cell(key)
        if not raw:
            raise fail(key, f"empty; give the {what}")
        try:
            if key == "chainage_m":
                return parse_chainage(raw, decimal_comma=decimal_comma, unit=unit) * to_m
            return parse_number(raw, decimal_comma=decimal_comma) * to_m
        except ValueError as err:
            if key == "chainage_m" and "+" in raw[1:]:
                raise fail(key, f"{raw!r}: {err}") from None
            if unit == "ft":
                example = (
                    "feet, e.g. 1250.0 or 12+50.00" if key == "chainage_m" else "feet, e.g. 14.5"
                )
            else:
                example = (
                    "metres, e.g. 1250.0 or 1+250.000"
                    if key == "chainage_m"
                    else "metres, e.g. 4.25"
                )
            raise fail(key, f"{raw!r} is not a number; write {example}") from None

    u = "ft" if unit == "ft" else "m"
    chainage = number("chainage_m", f"chainage in {u}")
    if "height_m" in cols:
        height = number("height_m", f"exposed height in {u}")
        if height < 0.0:
            raise fail(
                "height_m",
                f"exposed height {cell('height_m')} {u} is negative; use 0 where there is no wall",
            )
    else:
        top = number("top_level_m", f"level of the wall top in {u}")
        toe = number("toe_level_m", f"ground level at the toe in {u}")
        height = top - toe
        if height < -1e-9:
            raise fail(
                "toe_level_m",
                f"toe level {cell('toe_level_m')} {u} is above the top level {cell('top_level_m')} {u}; "
                "the top of the wall must be at or above the toe",
            )
        height = max(height, 0.0)
    for key, value in (("chainage_m", chainage), ("height_m", height)):
        rng = RANGES["chainage_start_m" if key == "chainage_m" else "height_start_m"]
        if rng.problem(value) is not None:
            shown = key if key in cols else "top_level_m"
            raise fail(
                shown,
                f"{value:g} m is outside what a corridor file takes ({rng.lo:g} to {rng.hi:g} m)",
            )
    wall = cell("wall") if "wall" in cols else ""
    side = ""
    if "side" in cols:
        raw = cell("side")
        if raw.lower() not in SIDES:
            raise fail("side", f"{raw!r} is not a side; write left or right (or L / R)")
        side = SIDES[raw.lower()]
    is_break = False
    if "break" in cols:
        raw = cell("break").lower()
        if raw not in YES | NO:
            raise fail(
                "break", f"{raw!r}: write yes to end a segment at this chainage, or leave empty"
            )
        is_break = raw in YES
    line = lines.setdefault((wall, side), _Line())
    if line.chainage_m and chainage < line.chainage_m[-1] - 1e-9:
        who = " ".join(x for x in (wall, side) if x) or "the wall"
        raise fail(
            "chainage_m",
            f"chainage {chainage:g} comes after {line.chainage_m[-1]:g} on line {line.last_line} "
            f"of {who}; sort each wall's rows by chainage",
        )
    if len(line.chainage_m) >= 2 and chainage == line.chainage_m[-1] == line.chainage_m[-2]:
        raise fail(
            "chainage_m", f"chainage {chainage:g} appears three times; a step needs two rows"
        )
    line.chainage_m.append(chainage)
    line.height_m.append(height)
    line.last_line = line_no
    if is_break:
        line.breaks_m.append(chainage)
