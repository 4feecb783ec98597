"""The report's assumption tables: the screen's provenance, factor set, rules, and every
fill, soil and reinforcement family in use with its values."""

from __future__ import annotations

import dataclasses

from screening.model import Fill, Reinforcement
from screening.report.data import ReportData
from screening.report.labels import field_label, shown
from screening.report.tables import Table


def assumptions(data: ReportData) -> list[Table]:
    c, r = data.corridor, data.result
    fs = c.factor_set
    general = Table(
        "Screen",
        ["item", "value"],
        [
            ["corridor", c.name],
            ["date of report", data.date],
            ["engine version", r.engine_version],
            ["factor set", f"{fs.id}: {fs.name} ({fs.method})"],
            ["factor set source", fs.source],
            [
                "eccentricity limits (fraction of L)",
                f"soil {fs.eccentricity_limit_soil:g}, rock {fs.eccentricity_limit_rock:g}",
            ],
            [
                "design life",
                f"{c.design_life_years:g} years"
                if c.design_life_years
                else "rules preset (walls / abutments)",
            ],
            ["display units", data.display.system.upper()],
        ],
    )
    d = data.display
    case_fields = [f.name for f in dataclasses.fields(fs.cases[0])] if fs.cases else []
    cases = Table(
        "Load cases of the factor set",
        [field_label(f, d) for f in case_fields],
        [[_cell(getattr(case, f)) for f in case_fields] for case in fs.cases],
    )
    asd = fs.method == "asd"
    resistance = Table(
        "Resistance factors",
        ["check", "factor of safety FS" if asd else "resistance factor φ"],
        [[k, f"{1 / v:.3g}" if asd and v > 0 else f"{v:g}"] for k, v in fs.resistance.items()],
        "Allowable stress: capacity divided by FS." if asd else "",
    )
    rules = Table(
        "Screening rules",
        ["rule", "value"],
        [
            [field_label(f.name, d), shown(f.name, getattr(c.rules, f.name), d)]
            for f in dataclasses.fields(c.rules)
        ],
    )
    return [general, cases, resistance, rules, *_materials(data)]


def _materials(data: ReportData) -> list[Table]:
    """Every distinct fill, soil and reinforcement family the segments use, with values."""
    c = data.corridor
    out = []
    for part, title in (
        ("fill", "Reinforced fills"),
        ("retained", "Retained fills"),
        ("foundation", "Foundations"),
    ):
        seen: dict[object, list[str]] = {}
        for s in c.segments:
            seen.setdefault(getattr(s, part), []).append(s.id)
        if not seen:
            continue
        sample = next(iter(seen))
        d = data.display
        names = [f.name for f in dataclasses.fields(sample) if f.name not in ("note", "name")]
        rows = [
            [*(shown(n, getattr(obj, n), d) for n in names), _ids(ids)] for obj, ids in seen.items()
        ]
        out.append(Table(title, [*(field_label(n, d) for n in names), "segments"], rows))
    fams: dict[Reinforcement, list[str]] = {}
    for s in c.segments:
        fams.setdefault(s.reinforcement, []).append(s.id)
    for fam, ids in fams.items():
        names = [f.name for f in dataclasses.fields(fam) if f.name not in ("grades", "note")]
        rows = [
            [field_label(n, data.display), shown(n, getattr(fam, n), data.display)] for n in names
        ]
        rows.append(["grades", "; ".join(_grade(g) for g in fam.grades)])
        rows.append(["segments", _ids(ids)])
        out.append(
            Table(f"Reinforcement: {fam.id or fam.name or fam.material}", ["field", "value"], rows)
        )
    ranges = Table(
        "Sensitivity ranges (±)",
        ["input", "half-range"],
        [[k, f"{v:g}"] for k, v in data.ranges.items()],
    )
    return [*out, ranges]


def _grade(g) -> str:
    values = [
        f"{f.name} {getattr(g, f.name):g}"
        for f in dataclasses.fields(g)
        if isinstance(getattr(g, f.name), float)
    ]
    return f"{g.name} ({', '.join(values)})"


def _ids(ids: list[str]) -> str:
    return ", ".join(ids) if len(ids) <= 8 else f"{', '.join(ids[:6])} … ({len(ids)} segments)"


def _cell(value: object) -> str:
    if value is None:
        return "—"
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, tuple):
        return ", ".join(str(v) for v in value)
    if isinstance(value, Fill):
        return value.id or value.name
    return str(value)
