"""Markdown and CSV reports (no figures: the HTML report carries those)."""

from __future__ import annotations

import csv
import io

from screening import CAUTION
from screening.engine.result import cdr_text
from screening.model.units import in_words
from screening.report import tables
from screening.report.assumptions import assumptions
from screening.report.data import ReportData
from screening.report.handover import handover, inputs_table
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
        table_md(handover(data)),
        "## Summary",
        "",
        table_md(tables.summary(data)),
        table_md(tables.by_wall(data)),
    ]
    if data.flagged:
        out.append(table_md(tables.reasons(data)))
    out += [f"_{n}_\n" for n in data.notes]
    out += ["Figures (long sections, cross-sections) are in the HTML report.", ""]
    out += ["## Segments", "", table_md(tables.segments(data)), table_md(inputs_table(data))]
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


def render_about(data: ReportData) -> str:
    """The hand-over block and the cautions of a CSV report, as plain text beside it."""
    lines = ["wallscreen screening report (CSV): what it is and where it comes from", ""]
    for item, value in handover(data).rows:
        lines.append(f"{item + ':':<28} {value}")
    lines += ["", "Cautions", *(f"- {c}" for c in CAUTIONS), ""]
    return "\n".join(lines)


CAUTIONS = (
    CAUTION,
    "Verdicts come from simplified checks and rules of thumb at option or preliminary "
    "stage; a clear segment still needs a full design by the designer of record.",
    "Quantities and costs are rough; placeholder rates are invented figures.",
)


def render_csv(data: ReportData) -> str:
    """One header row, then one row per segment; numbers in the display units named in
    the header; the caution in the last column of every row (readable by any CSV reader,
    e.g. ``csv.DictReader``). The hand-over block goes in ``<name>-about.txt`` beside it."""
    c, r, d = data.corridor, data.result, data.display
    names = tables.checks_present(data)
    m = d.label("m")
    buf = io.StringIO()
    units = {"m": d.label("m"), "m2": "ft2" if d.system == "us" else "m2"}
    units["m3"] = "yd3" if d.system == "us" else "m3"
    units["kg"] = d.label("kg")
    w = csv.writer(buf, lineterminator="\n")
    header = [
        "segment",
        "wall",
        f"chainage_start_{m}",
        f"chainage_end_{m}",
        f"exposed_height_start_{m}",
        f"exposed_height_end_{m}",
        f"design_height_{m}",
        f"embedment_{m}",
        f"L_{m}",
        "L_over_Hd",
        f"rule_L_{m}",
        "L_set_by",
        "least_margin_check",
        "least_margin_cdr",
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
            f"rough_cost_{q.rates.currency.replace(' ', '_')}",
            "placeholder_rates",
        ]
    header += ["reasons", "caution"]
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
            r.length_set_by[i],
            r.margin_check[i],
            cdr_text(r.margin_cdr[i], 3) if r.margin_check[i] else "",
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
                "yes" if q.rates.placeholder else "no",
            ]
        row += ["; ".join(in_words(x, d) for x in r.reasons[i]), CAUTION]
        w.writerow(row)
    return buf.getvalue()
