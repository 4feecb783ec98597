"""The corridor tools behind the interface, without Textual: one segment's quantities,
report paths, the other file of a comparison, a cache of sensitivity runs, and how an
input that changed reads in the display units.

The engine work itself lives in ``screening.corridor.quantities``, ``screening.report``,
``screening.corridor.diff`` and ``screening.corridor.sensitivity``; this module only shapes their inputs
and outputs for the screens.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

import numpy as np

from screening import engine, store
from screening.corridor.diff import CorridorDiff, diff_corridors
from screening.corridor.quantities import (
    Rates,
    SegmentQuantities,
    amount,
    corridor_quantities,
    corridor_rates,
)
from screening.corridor.sensitivity import Sensitivity, segment_sensitivity
from screening.engine.context import take_rows
from screening.engine.result import CorridorResult
from screening.model import Corridor, Segment
from screening.model.errors import InputError
from screening.model.units import Display
from screening.report import FORMATS
from screening.report.labels import unit_of

# ------------------------------------------------------------------ quantities


def row_result(result: CorridorResult, i: int) -> CorridorResult:
    """The screen of segment ``i`` alone, as a one-row corridor result."""
    n = len(result)
    rows = np.array([i], dtype=np.int64)
    one = take_rows(result, rows, n)
    return dataclasses.replace(
        one,
        checks={k: take_rows(v, rows, n) for k, v in result.checks.items()},
        extras={k: take_rows(v, rows, n) for k, v in result.extras.items()},
    )


_rates: dict[object, tuple[object, Rates]] = {}


def rates_for(corridor: Corridor, override: Rates | None = None) -> Rates:
    """The rates of ``corridor`` (its ``[rates]`` table over the shipped ones), or
    ``override`` (``--rates FILE``); worked out once per table."""
    if override is not None:
        return override
    table = getattr(corridor, "rates", None)
    key = id(table)
    hit = _rates.get(key)
    if hit is None or hit[0] is not table:
        _rates[key] = (table, corridor_rates(corridor))
    return _rates[key][1]


def segment_quantities(
    corridor: Corridor, result: CorridorResult, i: int, override: Rates | None = None
) -> SegmentQuantities:
    """Quantities and rough cost of segment ``i`` (its own screen only: cheap, and right
    even while other rows wait for a re-screen)."""
    one = dataclasses.replace(corridor, segments=(corridor.segments[i],))
    rates = rates_for(corridor, override)
    return corridor_quantities(one, row_result(result, i), rates).segments[0]


def reinforcement_words(q: SegmentQuantities, display: Display) -> str:
    """``400 strips, 1960 m, 3077 kg`` or ``PET 35 kN/m 120 m², PET 55 kN/m 40 m²``."""
    if q.geosynthetic_m2:
        return ", ".join(
            f"{name} {display.format(area, 'm2', 0)}" for name, area in q.geosynthetic_m2.items()
        )
    parts = []
    if q.strip_count:
        parts.append(f"{q.strip_count} strips, {display.format(q.strip_length_m, 'm', 0)}")
    if q.steel_kg:
        parts.append(f"{display.format(q.steel_kg, 'kg', 0)} steel")
    return ", ".join(parts) or "none"


def money(value: float) -> str:
    return amount(value)


# ------------------------------------------------------------------ report


def check_report_path(raw: str) -> Path:
    """The report path typed, or InputError saying what would do."""
    path = Path(raw.strip()).expanduser()
    if not raw.strip() or path.is_dir():
        raise InputError("type a file path ending in .html, .md or .csv")
    if path.suffix.lower() not in FORMATS:
        raise InputError(
            f"a report ends in .html, .md or .csv (not {path.suffix or 'nothing'})", file=raw
        )
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError("that folder does not exist", file=str(folder))
    return path


def default_report_path(corridor_path: Path | None) -> str:
    """Beside the corridor file, same stem: ``approach.toml`` -> ``approach-report.html``."""
    if corridor_path is None:
        return str(Path.cwd() / "corridor-report.html")
    return str(corridor_path.with_name(f"{corridor_path.stem}-report.html"))


# ------------------------------------------------------------------ compare


def check_corridor_path(raw: str) -> Path:
    path = Path(raw.strip()).expanduser()
    if not raw.strip():
        raise InputError("type the path of a corridor file (.toml) to compare with")
    if not path.is_file():
        raise InputError("no such file: give the path of an existing corridor file", file=raw)
    return path


def compare_with(
    other_path: Path, corridor: Corridor, result: CorridorResult, presets: object = None
) -> CorridorDiff:
    """Load and screen the other file (the older version), then diff it against the open
    corridor (the newer). Runs the engine: call it off the UI thread."""
    other = store.load(other_path, presets) if presets is not None else store.load(other_path)
    other_result = engine.screen(other)
    return diff_corridors(other, corridor, other_result, result)


def field_unit(path: str) -> str | None:
    """SI unit named by a field's ending (``_kn_m3``, ``_m``, ``_deg`` ...), or None."""
    return unit_of(path)


def show_value(value: Any, path: str, display: Display) -> str:
    """An input's value for people, in the display units when its name carries a unit."""
    unit = field_unit(path)
    if isinstance(value, bool) or value is None:
        return "none" if value is None else str(value).lower()
    if isinstance(value, int | float) and unit is not None:
        if unit == "°":
            return f"{float(value):g}°"
        v = display.value(float(value), unit)
        return f"{v:.4g} {display.label(unit)}"
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, tuple) and value and dataclasses.is_dataclass(value[0]):
        return "(" + ", ".join(getattr(v, "name", "") for v in value) + ")"
    return str(value)


# ------------------------------------------------------------------ sensitivity

_sensitivity: dict[tuple[int, int, int], tuple[Segment, object, object, list[Sensitivity]]] = {}
CACHE_SIZE = 64


def sensitivity_key(corridor: Corridor, i: int) -> tuple[int, int, int]:
    return (id(corridor.segments[i]), id(corridor.factor_set), id(corridor.rules))


def cached_sensitivity(corridor: Corridor, i: int) -> list[Sensitivity] | None:
    """A ranking already made for these exact inputs (same segment, factor set, rules)."""
    hit = _sensitivity.get(sensitivity_key(corridor, i))
    if hit is None:
        return None
    seg, fs, rules, ranking = hit
    same = seg is corridor.segments[i] and fs is corridor.factor_set and rules is corridor.rules
    return ranking if same else None


def run_sensitivity(corridor: Corridor, i: int, result: CorridorResult) -> list[Sensitivity]:
    """Rank the inputs of segment ``i`` (the engine: a second or so; off the UI thread)."""
    ranking = segment_sensitivity(corridor, i, result=result)
    if len(_sensitivity) >= CACHE_SIZE:
        _sensitivity.pop(next(iter(_sensitivity)))
    seg = corridor.segments[i]
    _sensitivity[sensitivity_key(corridor, i)] = (seg, corridor.factor_set, corridor.rules, ranking)
    return ranking
