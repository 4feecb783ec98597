"""One self-contained HTML report: one stylesheet, figures as inline SVG sharing its styles
and symbols (no images, nothing fetched)."""

from __future__ import annotations

from html import escape

from screening import CAUTION
from screening.report import tables
from screening.report.assumptions import assumptions
from screening.report.data import ReportData
from screening.report.figures import VERDICT_COLOUR, cross_section_svg, long_section_svg, walls
from screening.report.handover import handover, inputs_table
from screening.report.mechanism_figure import mechanism_figure_html
from screening.report.svg import FIGURE_CSS, shared_defs
from screening.report.tables import Table

STYLE = """
body { font: 14px/1.45 system-ui, sans-serif; color: #222; margin: 0 auto; max-width: 1200px; padding: 0 1.5em 3em; }
h1 { margin-bottom: 0.2em; } h2 { border-bottom: 2px solid #ccc; margin-top: 2em; }
.caution { border: 2px solid #a33; background: #fbeeea; padding: 0.6em 1em; font-weight: 600; }
table { border-collapse: collapse; margin: 0.6em 0 1.2em; font-size: 12.5px; }
th, td { border: 1px solid #ccc; padding: 2px 6px; text-align: left; vertical-align: top; }
th { background: #f1efe9; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
caption { text-align: left; font-weight: 600; padding: 0.3em 0; }
.note { color: #555; font-size: 12px; margin-top: -0.8em; }
figure { margin: 1em 0; }
figcaption { color: #555; font-size: 12px; }
nav ul { columns: 2; } .meta { color: #555; }
td.v-clear { background: #5b9e7a55; } td.v-marginal { background: #e0b04a55; } td.v-refer { background: #c4563f55; }
"""


def _cell(text: str, header: str) -> str:
    cls = ""
    if text in VERDICT_COLOUR:
        cls = f' class="v-{text}"'
    elif _numeric(text):
        cls = ' class="num"'
    return f"<td{cls}>{escape(text)}</td>"


def _numeric(text: str) -> bool:
    t = text.replace(",", "").replace(" *", "").replace("–", "").replace(" / ", "").replace(".", "")
    return bool(t) and t.lstrip("-").isdigit()


def table_html(t: Table) -> str:
    head = "".join(f"<th>{escape(h)}</th>" for h in t.header)
    body = "\n".join(
        "<tr>" + "".join(_cell(c, h) for c, h in zip(row, t.header, strict=False)) + "</tr>"
        for row in t.rows
    )
    note = f'<p class="note">{escape(t.note)}</p>' if t.note else ""
    return f"<table><caption>{escape(t.title)}</caption><thead><tr>{head}</tr></thead><tbody>\n{body}\n</tbody></table>{note}"


def _figure(svg: str, caption: str) -> str:
    return f"<figure>{svg}<figcaption>{escape(caption)}</figcaption></figure>"


def _cross_section_heading(data: ReportData) -> str:
    if data.figures == "all":
        return "Cross-sections of every segment"
    return "Cross-sections of referred and marginal segments"


def render_html(data: ReportData) -> str:
    c, r = data.corridor, data.result
    parts: list[str] = []
    add = parts.append
    add(f"<h1>{escape(c.name)}</h1>")
    add(
        f'<p class="meta">Screening report, {escape(data.date)}; wallscreen engine {escape(r.engine_version)}; '
        f"factor set {escape(c.factor_set.id)}; {len(r)} segments; units {data.display.system.upper()}.</p>"
    )
    add(f'<p class="caution">{escape(CAUTION)}</p>')
    add(table_html(handover(data)))
    sections = [
        ("summary", "Summary"),
        ("long-section", "Long sections"),
        ("cross-sections", _cross_section_heading(data)),
        ("segments", "Segments"),
        ("checks", "Checks"),
        ("quantities", "Quantities and rough cost"),
        ("sensitivity", "Sensitivity"),
        ("assumptions", "Assumptions"),
        ("cautions", "Cautions"),
    ]
    add(
        "<nav><ul>"
        + "".join(f'<li><a href="#{a}">{escape(t)}</a></li>' for a, t in sections)
        + "</ul></nav>"
    )

    add('<h2 id="summary">Summary</h2>')
    add(table_html(tables.summary(data)))
    add(table_html(tables.by_wall(data)))
    if data.flagged:
        add(table_html(tables.reasons(data)))
    for note in data.notes:
        add(f'<p class="note">{escape(note)}</p>')
    if c.note:
        add(f"<p>{escape(c.note)}</p>")

    add('<h2 id="long-section">Long sections</h2>')
    add(shared_defs())
    for wall, rows in walls(c).items():
        add(
            _figure(
                long_section_svg(c, r, rows, wall, data.display),
                f"{wall}: exposed and design height, screened L, verdict by segment.",
            )
        )

    add(f'<h2 id="cross-sections">{escape(_cross_section_heading(data))}</h2>')
    if data.figures == "none":
        add("<p>No cross-sections in this report (asked for none).</p>")
    elif not data.flagged and data.figures == "flagged":
        add("<p>Every segment is clear.</p>")
    for i in data.cross_sections:
        svg = cross_section_svg(c, r, i, data.display)
        add(_figure(svg, f"{r.ids[i]}: {'; '.join(r.reasons[i])}"))
        add(mechanism_figure_html(c, r, i))

    add('<h2 id="segments">Segments</h2>')
    add(table_html(tables.segments(data)))
    add(table_html(inputs_table(data)))

    add('<h2 id="checks">Checks</h2>')
    add(table_html(tables.cdr_overview(data)))
    for t in tables.check_tables(data):
        add(table_html(t))

    add('<h2 id="quantities">Quantities and rough cost</h2>')
    qt = tables.quantities(data)
    add("".join(table_html(t) for t in qt) if qt else "<p>No quantities.</p>")

    add('<h2 id="sensitivity">Sensitivity</h2>')
    add(
        "<p>Each input moved alone to the ends of its range (presets/sensitivity.toml); inputs that flip "
        "the verdict first, then by how far they move L, then the smallest CDR.</p>"
    )
    mc = tables.monte_carlo(data)
    if mc is not None:
        add(table_html(mc))
    st = tables.sensitivity(data)
    add(
        "".join(table_html(t) for t in st)
        if st
        else "<p>No input ranking in this report (see the notes above).</p>"
        if data.notes and any("Sensitivity" in n for n in data.notes)
        else "<p>No referred or marginal segment to examine.</p>"
    )

    add('<h2 id="assumptions">Assumptions</h2>')
    for t in assumptions(data):
        add(table_html(t))

    add('<h2 id="cautions">Cautions</h2>')
    add(f'<p class="caution">{escape(CAUTION)}</p>')
    add(
        "<ul><li>Screening uses simplified methods (Rankine/Coulomb pressures, the Simplified Method for "
        "internal stability, Vesic bearing, Bishop circles where present) on one cross-section per segment "
        "at its tallest end.</li><li>Soil values are those in the corridor file; the sensitivity section "
        "shows what they hang on.</li><li>Quantities and costs are rough; the shipped unit rates are "
        "placeholders.</li><li>A licensed engineer and the governing local code decide the design.</li></ul>"
    )
    body = "\n".join(parts)
    return (
        '<!doctype html>\n<html lang="en"><head><meta charset="utf-8">'
        f"<title>{escape(c.name)}: screening report</title><style>{STYLE}{FIGURE_CSS}</style></head>"
        f"<body>\n{body}\n</body></html>\n"
    )
