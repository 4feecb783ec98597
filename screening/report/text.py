"""Markdown and CSV reports (no figures: the HTML report carries those)."""

from __future__ import annotations

import csv
import io

from screening import CAUTION
from screening.engine.result import cdr_text
from screening.report import tables
from screening.report.assumptions import assumptions
from screening.report.data import ReportData
from screening.report.tables import Table


def _md_cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def table_md(t: Table) -> str:
    lines = [f"**{t.title}**", "", "| " + " | ".join(_md_cell(h) for h in t.header) + " |"]
    lines.append("|" + "|".join("---" for _ in t.header) + "|")
    lines += ["| " + " | ".join(_md_cell(c) for c in row) + " |" for row in t.rows]
    if t.note:
        lines += ["", f"_{t.note}_"]
    return "\n".join(lines) + "\n"


def render_markdown(data: ReportData) -> str:
    c, r = data.corridor, data.result
    out = [
        f"# {c.name}",
        "",
        f"Screening report, {data.date}; wallscreen engine {r.engine_version}; factor set "
        f"{c.factor_set.id}; {len(r)} segments; units {data.display.system.upper()}.",
        "",
        f"> **{CAUTION}**",
        "",
        "## Summary",
        "",
        table_md(tables.summary(data)),
        table_md(tables.by_wall(data)),
    ]
    if data.flagged:
        out.append(table_md(tables.reasons(data)))
    out += [f"_{n}_\n" for n in data.notes]
    out += ["Figures (long sections, cross-sections) are in the HTML report.", ""]
    out += ["## Segments", "", table_md(tables.segments(data))]
    out += ["## Checks", "", table_md(tables.cdr_overview(data))]
    out += [table_md(t) for t in tables.check_tables(data)]
    out += ["## Quantities and rough cost", ""]
    out += [table_md(t) for t in tables.quantities(data)]
    out += ["## Sensitivity", ""]
    mc = tables.monte_carlo(data)
    if mc is not None:
        out.append(table_md(mc))
    out += [table_md(t) for t in tables.sensitivity(data)] or [
        (
            "No input ranking in this report (see the notes above).\n"
            if any("Sensitivity" in n for n in data.notes)
            else "No referred or marginal segment to examine.\n"
        )
    ]
    out += ["## Assumptions", ""]
    out += [table_md(t) for t in assumptions(data)]
    out += ["## Cautions", "", f"> **{CAUTION}**", ""]
    return "\n".join(out)


def render_csv(data: ReportData) -> str:
    """One row per segment, numbers in the display units named in the header.

    The first lines are ``#`` comments with the caution and the provenance (most
    spreadsheet and data tools can skip them, e.g. ``comment="#"``).
    """
    c, r, d = data.corridor, data.result, data.display
    names = tables.checks_present(data)
    m = d.label("m")
    buf = io.StringIO()
    buf.write(f"# {CAUTION}\n")
    units = {"m": d.label("m"), "m2": "ft2" if d.system == "us" else "m2"}
    units["m3"] = "yd3" if d.system == "us" else "m3"
    units["kg"] = d.label("kg")
    cost = f"; rough cost in {data.quantities.rates.currency}" if data.quantities else ""
    placeholder = (
        " (PLACEHOLDER rates)" if data.quantities and data.quantities.rates.placeholder else ""
    )
    buf.write(
        f"# {c.name}; {data.date}; engine {r.engine_version}; factor set {c.factor_set.id}{cost}{placeholder}\n"
    )
    w = csv.writer(buf, lineterminator="\n")
    header = [
        "segment",
        "wall",
        f"chainage_start_{m}",
        f"chainage_end_{m}",
        f"height_start_{m}",
        f"height_end_{m}",
        f"design_height_{m}",
        f"embedment_{m}",
        f"L_{m}",
        "L_over_H",
        f"rule_L_{m}",
        "governing",
        "min_cdr",
        "verdict",
        *(f"cdr_{n}" for n in names),
    ]
    q = data.quantities
    if q is not None:
        header += [
            f"face_area_{units['m2']}",
            f"select_fill_{units['m3']}",
            "steel_strips",
            f"steel_{units['kg']}",
            f"geosynthetic_{units['m2']}",
            "rough_cost",
        ]
    header.append("reasons")
    w.writerow(header)
    for i, s in enumerate(c.segments):
        row = [
            s.id,
            s.wall,
            *(
                f"{d.value(v, 'm'):.3f}"
                for v in (s.chainage_start_m, s.chainage_end_m, s.height_start_m, s.height_end_m)
            ),
            *(
                f"{d.value(float(v[i]), 'm'):.3f}"
                for v in (r.design_height_m, r.embedment_m, r.length_m)
            ),
            f"{float(r.length_ratio[i]):.3f}",
            f"{d.value(float(r.rule_length_m[i]), 'm'):.3f}",
            r.governing[i],
            cdr_text(r.min_cdr[i], 3),
            r.verdict[i],
            *(cdr_text(r.checks[n].cdr[i], 3) for n in names),
        ]
        if q is not None:
            sq = q.segments[i]
            row += [
                f"{d.value(sq.face_area_m2, 'm2'):.2f}",
                f"{d.value(sq.select_fill_m3, 'm3'):.2f}",
                str(sq.strip_count),
                f"{d.value(sq.steel_kg, 'kg'):.1f}",
                f"{d.value(sum(sq.geosynthetic_m2.values()), 'm2'):.2f}",
                f"{sq.cost_total:.0f}",
            ]
        row.append("; ".join(r.reasons[i]))
        w.writerow(row)
    return buf.getvalue()
