"""The report's tables as plain rows of strings, shared by the HTML and Markdown writers.

Numbers are shown in the report's display units (:class:`screening.model.units.Display`);
capacity/demand ratios and angles are unit-free.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from screening.corridor.quantities import amount
from screening.engine.result import UNITS, cdr_text
from screening.model import VERDICTS
from screening.model.units import in_words
from screening.report.data import ReportData
from screening.report.labels import field_label, margin_of

CHECK_ORDER = (
    "sliding",
    "eccentricity",
    "bearing",
    "pullout",
    "rupture",
    "compound",
    "global",
    "seismic",
)


@dataclass(frozen=True)
class Table:
    title: str
    header: list[str]
    rows: list[list[str]]
    note: str = ""


def _num(data: ReportData, value: float, unit: str, digits: int | None = None) -> str:
    return f"{data.display.value(value, unit):.{_digits(unit) if digits is None else digits}f}"


def _digits(unit: str) -> int:
    return {"m": 2, "kPa": 1, "kN/m": 1, "kN·m/m": 0, "m2": 1, "m3": 1, "kg": 0}.get(unit, 2)


def _g(data: ReportData, value: float, unit: str) -> str:
    """An input value in display units, to 4 significant figures."""
    return f"{data.display.value(value, unit):.4g}"


def _u(data: ReportData, unit: str) -> str:
    return data.display.label(unit)


def checks_present(data: ReportData) -> list[str]:
    names = list(data.result.checks)
    return [c for c in CHECK_ORDER if c in names] + [c for c in names if c not in CHECK_ORDER]


def summary(data: ReportData) -> Table:
    r, c = data.result, data.corridor
    total = sum(s.length_along_m for s in c.segments) or 1.0
    rows = []
    for v in VERDICTS:
        idx = [i for i, x in enumerate(r.verdict) if x == v]
        run = sum(c.segments[i].length_along_m for i in idx)
        rows.append([v, str(len(idx)), _num(data, run, "m", 1), f"{100 * run / total:.0f} %"])
    rows.append(["all", str(len(r)), _num(data, total, "m", 1), "100 %"])
    return Table(
        "Summary by verdict",
        ["verdict", "segments", f"length of wall ({_u(data, 'm')})", "share"],
        rows,
    )


def by_wall(data: ReportData) -> Table:
    """Per wall: chainage range, tallest exposed height, segments per verdict, face, cost."""
    r, c, q = data.result, data.corridor, data.quantities
    groups: dict[str, list[int]] = {}
    for i, s in enumerate(c.segments):
        groups.setdefault(s.wall, []).append(i)
    rows = []
    for wall, idx in groups.items():
        segs = [c.segments[i] for i in idx]
        counts = [sum(r.verdict[i] == v for i in idx) for v in VERDICTS]
        row = [
            wall,
            f"{_num(data, min(s.chainage_start_m for s in segs), 'm', 1)}–"
            f"{_num(data, max(s.chainage_end_m for s in segs), 'm', 1)}",
            _num(data, max(s.exposed_height_m for s in segs), "m"),
            *(str(n) for n in counts),
            _num(data, sum(s.face_area_m2 for s in segs), "m2"),
        ]
        if q is not None:
            row.append(amount(sum(q.segments[i].cost_total for i in idx)))
        rows.append(row)
    m = _u(data, "m")
    header = [
        "wall",
        f"chainage ({m})",
        f"tallest exposed ({m})",
        *VERDICTS,
        f"exposed face ({_u(data, 'm2')})",
    ]
    if q is not None:
        header.append(f"rough cost ({q.rates.currency})")
    return Table("Summary by wall", header, rows)


def reasons(data: ReportData) -> Table:
    r = data.result
    d = data.display
    rows = [
        [r.ids[i], r.verdict[i], "; ".join(in_words(x, d) for x in r.reasons[i])]
        for i in data.flagged
    ]
    return Table("Why segments are not clear", ["segment", "verdict", "reasons"], rows)


def segments(data: ReportData) -> Table:
    r, c, m = data.result, data.corridor, _u(data, "m")
    rows = []
    for i, s in enumerate(c.segments):
        rows.append(
            [
                s.id,
                s.wall,
                f"{_num(data, s.chainage_start_m, 'm', 1)}–{_num(data, s.chainage_end_m, 'm', 1)}",
                f"{_num(data, s.height_start_m, 'm')} / {_num(data, s.height_end_m, 'm')}",
                _num(data, float(r.design_height_m[i]), "m"),
                _num(data, float(r.embedment_m[i]), "m"),
                _num(data, float(r.length_m[i]), "m"),
                f"{float(r.length_ratio[i]):.2f}",
                _num(data, float(r.rule_length_m[i]), "m"),
                r.length_set_by[i],
                _margin(r, i),
                r.verdict[i],
            ]
        )
    header = [
        "segment",
        "wall",
        f"chainage ({m})",
        f"exposed height start / end ({m})",
        f"design height Hd ({m})",
        f"embedment ({m})",
        f"L ({m})",
        "L/Hd",
        f"rule L ({m})",
        "L set by",
        "least margin",
        "verdict",
    ]
    return Table(
        "Segments",
        header,
        rows,
        "L set by: the check whose shortest passing length is L, or the rule that sets it. "
        "Least margin: the smallest CDR of the other checks (for a referred segment, the "
        "failing check or the rule that refers it).",
    )


def _margin(r, i: int) -> str:
    check, cdr = margin_of(r, i)
    return "-" if not check else (check if cdr is None else f"{check} {cdr_text(cdr)}")


def cdr_overview(data: ReportData) -> Table:
    names = checks_present(data)
    r = data.result
    rows = [
        [r.ids[i], *(cdr_text(r.checks[n].cdr[i]) for n in names), r.verdict[i]]
        for i in range(len(r))
    ]
    return Table(
        "Capacity/demand ratio of every check (>= 1.00 passes)",
        ["segment", *names, "verdict"],
        rows,
        "Each check at its governing load case, worst layer and worst surface.",
    )


def check_tables(data: ReportData) -> list[Table]:
    r = data.result
    out = []
    for name in checks_present(data):
        ch = r.checks[name]
        unit = UNITS.get(name, "")
        shown = _u(data, unit) if unit else ""
        rows = [
            [
                r.ids[i],
                _num(data, float(ch.demand[i]), unit),
                _num(data, float(ch.capacity[i]), unit),
                cdr_text(ch.cdr[i]),
                ch.case[i],
                ch.detail[i],
            ]
            for i in range(len(r))
        ]
        out.append(
            Table(
                f"Check: {name}",
                ["segment", f"demand ({shown})", f"capacity ({shown})", "CDR", "case", "where"],
                rows,
            )
        )
    return out


def quantities(data: ReportData) -> list[Table]:
    q = data.quantities
    if q is None:
        return []
    m, m2, m3, kg = (_u(data, u) for u in ("m", "m2", "m3", "kg"))
    cur = q.rates.currency
    rows = []
    for s in q.segments:
        geo = sum(s.geosynthetic_m2.values())
        rows.append(
            [
                s.id,
                _num(data, s.length_along_m, "m", 1),
                _num(data, s.face_area_m2, "m2"),
                _num(data, s.facing_area_m2, "m2"),
                _num(data, s.select_fill_m3, "m3"),
                _num(data, s.reinforcement_length_m, "m"),
                str(s.layers),
                str(s.strip_count) if s.strip_count else "",
                _num(data, s.steel_kg, "kg") if s.steel_kg else "",
                _num(data, geo, "m2") if geo else "",
                amount(s.cost_total) + (" *" if s.short_grade else ""),
            ]
        )
    total = [
        "total",
        _num(data, q.total("length_along_m"), "m", 1),
        _num(data, q.total("face_area_m2"), "m2"),
        _num(data, q.total("facing_area_m2"), "m2"),
        _num(data, q.total("select_fill_m3"), "m3"),
        "",
        "",
        str(int(q.total("strip_count"))),
        _num(data, q.total("steel_kg"), "kg"),
        _num(data, sum(q.geosynthetic_m2().values()), "m2"),
        amount(q.total("cost_total")),
    ]
    header = [
        "segment",
        f"length ({m})",
        f"exposed face ({m2})",
        f"facing incl. embedment ({m2})",
        f"select fill ({m3})",
        f"L ({m})",
        "layers",
        "steel strips",
        f"steel ({kg})",
        f"geosynthetic ({m2})",
        f"rough cost ({cur})",
    ]
    placeholder = (
        " PLACEHOLDER RATES: replace presets/rates.toml before using any cost."
        if q.rates.placeholder
        else ""
    )
    main = Table(
        "Quantities and rough cost",
        header,
        [*rows, total],
        "Levelling pad length = length along the wall. * a layer with no passing grade, "
        "counted at the heaviest grade." + placeholder,
    )
    grades = Table(
        "Geosynthetic by grade",
        ["grade", f"area ({m2})"],
        [[g, _num(data, a, "m2")] for g, a in sorted(q.geosynthetic_m2().items())],
    )
    cost = Table(
        "Rough cost by item",
        ["item", f"cost ({cur})"],
        [[k, amount(v)] for k, v in q.cost().items()] + [["total", amount(q.total("cost_total"))]],
        placeholder.strip(),
    )
    rates = Table(
        "Unit rates used",
        ["rate", "value"],
        [
            [field_label(f.name), _rate(getattr(q.rates, f.name))]
            for f in dataclasses.fields(q.rates)
        ],
        data.rates_source,
    )
    return [main, grades, cost, rates]


def _rate(value: object) -> str:
    if isinstance(value, dict):
        return ", ".join(f"{k} {v:g}" for k, v in value.items()) or "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return f"{value:g}" if isinstance(value, float) else str(value)


def sensitivity(data: ReportData) -> list[Table]:
    out = []
    for i, items in sorted(data.sensitivity.items()):
        r = data.result
        rows = [
            [
                str(k + 1),
                s.label,
                f"{_g(data, s.base, s.unit)} {_u(data, s.unit)}",
                f"{_g(data, s.low, s.unit)} … {_g(data, s.high, s.unit)}",
                f"{s.verdict_low} / {s.verdict_high}",
                f"{_num(data, s.length_low_m, 'm')} / {_num(data, s.length_high_m, 'm')}",
                f"{s.min_cdr_low:.2f} / {s.min_cdr_high:.2f}",
                "yes" if s.flips else "",
            ]
            for k, s in enumerate(items)
        ]
        out.append(
            Table(
                f"Sensitivity of {r.ids[i]} ({r.verdict[i]}, L {_num(data, float(r.length_m[i]), 'm')} "
                f"{_u(data, 'm')}, min CDR {cdr_text(r.min_cdr[i])})",
                [
                    "rank",
                    "input",
                    "value",
                    "range",
                    "verdict low / high",
                    f"L low / high ({_u(data, 'm')})",
                    "min CDR low / high",
                    "flips verdict",
                ],
                rows,
            )
        )
    return out


def monte_carlo(data: ReportData) -> Table | None:
    mc = data.monte_carlo
    if mc is None:
        return None
    rows = [
        [
            sid,
            mc.base_verdict[j],
            f"{mc.p_refer[j]:.2f}",
            f"{mc.p_marginal[j]:.2f}",
            f"{mc.p_clear[j]:.2f}",
            _num(data, float(mc.length_mean_m[j]), "m"),
            _num(data, float(mc.length_p90_m[j]), "m"),
            "robust" if mc.robust()[j] else "hangs on the inputs",
        ]
        for j, sid in enumerate(mc.ids)
    ]
    m = _u(data, "m")
    return Table(
        f"Monte Carlo: {mc.samples} draws, seed {mc.seed}"
        + (", core checks only (compound search left out)" if mc.core_only else ""),
        [
            "segment",
            "verdict",
            "P(refer)",
            "P(marginal)",
            "P(clear)",
            f"mean L ({m})",
            f"90 % L ({m})",
            "verdict is",
        ],
        rows,
        "Each input drawn from a normal distribution: mean = the file's value, "
        "standard deviation = half the sensitivity range; robust = the verdict holds in 90 % of draws.",
    )
