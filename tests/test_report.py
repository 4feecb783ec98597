"""Reports: every segment id, the figures, the assumptions and the cautions are there.

Common practice, no source: a report handed to a checker must name every segment it
covers, show what it assumed and say it is not a design. The corridor is invented test
data: four segments, one of them 13 m high (outside screening: referred, METHOD §7).
"""

from __future__ import annotations

import csv
import io
import math
import re
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

import pytest

from screening import CAUTION, store
from screening.engine import screen
from screening.model.errors import InputError
from screening.report import build_report_data, write_report

TEXT = """
schema = "wallscreen/1"
[corridor]
name = "Report test <&> corridor"
factor_set = "aashto-lrfd"
[defaults]
fill = "granular-wellgraded"
reinforcement = "steel-strip"
traffic = "approach"
{segments}
"""
SEGMENT = """
[[segment]]
id = "{id}"
wall = "{wall}"
chainage_start_m = {c0}
chainage_end_m = {c1}
height_start_m = {h0}
height_end_m = {h1}
"""
ROWS = [
    ("N-01", "North", 0.0, 20.0, 2.0, 3.0),
    ("N-02", "North", 20.0, 40.0, 3.0, 5.0),
    ("N-03", "North", 40.0, 60.0, 5.0, 13.0),
    ("S-01", "South", 0.0, 25.0, 1.5, 4.0),
]


@pytest.fixture(scope="module")
def screened():
    segs = "".join(
        SEGMENT.format(id=i, wall=w, c0=c0, c1=c1, h0=h0, h1=h1) for i, w, c0, c1, h0, h1 in ROWS
    )
    corridor = store.loads(TEXT.format(segments=segs), "report.toml")
    return corridor, screen(corridor)


@pytest.fixture(scope="module")
def html_text(screened, tmp_path_factory):
    corridor, result = screened
    out = tmp_path_factory.mktemp("report") / "r.html"
    write_report(corridor, result, out)
    return out.read_text(encoding="utf-8")


class _Tags(HTMLParser):
    VOID = {"meta", "img", "br", "hr", "link", "input"}

    def __init__(self):
        super().__init__()
        self.stack: list[str] = []
        self.errors: list[str] = []
        self.images: list[str] = []
        self.figures: list[str] = []

    def handle_starttag(self, tag, attrs):
        if tag == "img":
            self.images.append(dict(attrs)["src"])
        if tag == "svg" and dict(attrs).get("class") == "fig":
            self.figures.append(dict(attrs)["aria-label"])
        if tag not in self.VOID:
            self.stack.append(tag)

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> closes {self.stack[-1:] or 'nothing'}")
        else:
            self.stack.pop()


def test_html_names_every_segment_and_carries_the_cautions(html_text, screened):
    _, result = screened
    for sid in result.ids:
        assert f">{sid}<" in html_text
    assert html_text.count(CAUTION) == 3  # top, in the hand-over block, and bottom
    assert "Report test &lt;&amp;&gt; corridor" in html_text  # names are escaped


def test_html_is_well_formed_and_self_contained(html_text):
    tags = _Tags()
    tags.feed(html_text)
    assert tags.errors == [] and tags.stack == []
    assert not re.search(r'(src|href)="(?!data:|#)', html_text)  # nothing fetched from outside


def test_html_embeds_a_long_section_per_wall_and_a_cross_section_per_flagged_segment(
    html_text, screened
):
    _, result = screened
    tags = _Tags()
    tags.feed(html_text)
    flagged = [sid for sid, v in zip(result.ids, result.verdict, strict=True) if v != "clear"]
    assert flagged  # N-03 is 13 m high: referred
    assert tags.images == []  # vector figures, no images
    assert tags.figures == [
        "long section of North",
        "long section of South",
        *(f"cross-section of {sid}" for sid in flagged),
    ]


def _figures(html_text: str) -> dict[str, ET.Element]:
    """Each inline figure parsed as XML (so each is well-formed on its own), by its label."""
    out = {}
    for text in re.findall(r'<svg class="fig".*?</svg>', html_text, re.S):
        element = ET.fromstring(text)
        out[element.get("aria-label")] = element
    return out


def test_figures_draw_each_segment_and_each_layer(html_text, screened):
    _, result = screened
    figures = _figures(html_text)
    north = figures["long section of North"]
    shaded = [e.get("class") for e in north.iter("rect") if e.get("class", "").startswith("v-")]
    # a band per segment in verdict order, then the three legend swatches
    assert shaded[:3] == [f"v-{result.verdict[i]}" for i in range(3)]
    assert shaded[3:] == ["v-clear", "v-marginal", "v-refer"]
    for i, sid in enumerate(result.ids):
        if result.verdict[i] == "clear":
            assert f"cross-section of {sid}" not in figures
            continue
        xs = figures[f"cross-section of {sid}"]
        layers = next(e for e in xs.iter("path") if e.get("class") == "lay")
        assert layers.get("d").count("M") == int(result.layers.mask[i].sum())
        assert any(sid in (e.text or "") for e in xs.iter("text"))  # the title names it


def test_html_cross_sections_all_or_none(screened, tmp_path):
    corridor, result = screened
    every = write_report(corridor, result, tmp_path / "all.html", figures="all")
    labels = [k for k in _figures(every.read_text(encoding="utf-8")) if k.startswith("cross")]
    assert labels == [f"cross-section of {sid}" for sid in result.ids]
    none = write_report(corridor, result, tmp_path / "none.html", figures="none")
    text = none.read_text(encoding="utf-8")
    assert [k for k in _figures(text) if k.startswith("cross")] == []
    assert "long section of North" in _figures(text) and "asked for none" in text
    with pytest.raises(InputError, match="figures 'some'"):
        write_report(corridor, result, tmp_path / "x.html", figures="some")


def test_html_shows_assumptions_quantities_and_sensitivity(html_text, screened):
    _, result = screened
    assert "aashto-lrfd" in html_text and f"engine {result.engine_version}" in html_text
    assert "Screening rules" in html_text and "Rule-of-thumb L / Hd" in html_text  # in words
    assert "granular-wellgraded" in html_text and "2 strips/m" in html_text  # presets with values
    assert "Quantities and rough cost" in html_text and "PLACEHOLDER RATES" in html_text
    for i, v in enumerate(result.verdict):
        if v != "clear":
            assert f"Sensitivity of {result.ids[i]}" in html_text


def test_markdown_report(screened, tmp_path):
    corridor, result = screened
    out = write_report(corridor, result, tmp_path / "r.md")
    text = out.read_text(encoding="utf-8")
    assert text.startswith("# Report test")
    assert text.count(CAUTION) == 3  # top, hand-over block, bottom
    for sid in result.ids:
        assert f"| {sid} |" in text


def test_csv_report_one_row_per_segment_in_chosen_units(screened, tmp_path):
    corridor, result = screened
    si = write_report(corridor, result, tmp_path / "si.csv").read_text(encoding="utf-8")
    us = write_report(corridor, result, tmp_path / "us.csv", units="us").read_text(encoding="utf-8")
    assert si.startswith("segment,wall,")  # the first row is the header
    rows_si = _rows(si)
    rows_us = _rows(us)
    assert [r["segment"] for r in rows_si] == list(result.ids)
    assert {r["caution"] for r in rows_si} == {CAUTION}  # on every row, in its own column
    about = (tmp_path / "si-about.txt").read_text(encoding="utf-8")
    assert CAUTION in about and "engine version:" in about
    # 1 ft = 0.3048 m exactly (NIST SP 811)
    for a, b in zip(rows_si, rows_us, strict=True):
        assert float(b["L_ft"]) == pytest.approx(float(a["L_m"]) / 0.3048, abs=2e-3)
        assert a["verdict"] == b["verdict"]


def _rows(text: str) -> list[dict[str, str]]:
    """What any CSV reader gets from the report: no lines to skip."""
    return list(csv.DictReader(io.StringIO(text)))


def test_bad_output_paths_are_input_errors_and_old_reports_survive(screened, tmp_path):
    corridor, result = screened
    with pytest.raises(InputError, match="use .html, .md or .csv"):
        write_report(corridor, result, tmp_path / "r.pdf")
    with pytest.raises(InputError, match="folder for the report does not exist"):
        write_report(corridor, result, tmp_path / "missing" / "r.csv")
    target = tmp_path / "keep.csv"
    target.write_text("old report")
    with pytest.raises(InputError):
        write_report(corridor, result, target, units="cubits")
    assert target.read_text() == "old report"
    write_report(corridor, result, target)
    assert target.read_text().startswith("segment,") and list(tmp_path.glob(".keep.csv.*")) == []


def test_report_data_refuses_a_screen_of_another_corridor(screened):
    corridor, result = screened
    import dataclasses

    shorter = dataclasses.replace(corridor, segments=corridor.segments[:2])
    with pytest.raises(InputError, match="does not belong"):
        build_report_data(shorter, result)


def test_monte_carlo_section_when_asked(screened, tmp_path):
    corridor, result = screened
    text = write_report(
        corridor, result, tmp_path / "mc.md", monte_carlo_samples=10, seed=3
    ).read_text()
    assert "Monte Carlo: 10 draws, seed 3" in text
    quick = write_report(
        corridor, result, tmp_path / "q.md", monte_carlo_samples=10, monte_carlo_core_only=True
    ).read_text()
    assert "core checks only (compound search left out)" in quick


def test_cross_sections_find_the_critical_circles_the_screen_reports(screened):
    """Whatever slip families the engine checks, the figure finds their circles."""
    from screening.report.figures import slip_circles

    _, result = screened
    families = [n for n in ("compound", "global") if n in result.checks]
    for i in range(len(result)):
        found = [c[0] for c in slip_circles(result, i)]
        for name in families:
            if float(result.checks[name].demand[i]) > 0:
                assert name in found


def test_a_drawn_slip_surface_runs_from_its_exit_to_its_entry(screened):
    """The slip surface is the arc between the two points where the circle meets the ground
    (common practice, no source): the rest of the circle is no part of the mechanism, and
    drawing it showed compound surfaces running tens of metres in front of the wall."""
    from screening.report.figures import _circle_runs, slip_circles, slip_ends

    corridor, result = screened
    drawn = 0
    for i in range(len(result)):
        big_h = float(result.design_height_m[i])
        d = float(result.embedment_m[i])
        seg = corridor.segments[i]
        beta = math.tan(math.radians(seg.backslope_deg))
        toe = math.tan(math.radians(seg.toe_slope_deg))
        for name, xc, yc, r in slip_circles(result, i):
            ends = slip_ends(result, i, name)
            if ends is None:
                continue
            (run,) = _circle_runs(xc, yc, r, big_h, d, beta, toe, ends)
            xs = [p[0] for p in run]
            assert xs[0] == pytest.approx(ends[0], abs=1e-6)
            assert xs[-1] == pytest.approx(ends[1], abs=1e-6)
            assert all(b >= a for a, b in zip(xs, xs[1:], strict=False))
            for x, y in run:  # each point on the circle
                assert math.hypot(x - xc, y - yc) == pytest.approx(r, rel=1e-9)
            drawn += 1
    assert drawn > 0


def test_cross_sections_beyond_the_limit_are_left_out_with_a_note(screened):
    corridor, result = screened
    flagged = [i for i, v in enumerate(result.verdict) if v != "clear"]
    data = build_report_data(corridor, result, sensitivity=False, cross_section_limit=1)
    assert len(data.cross_sections) == 1
    assert result.verdict[data.cross_sections[0]] == "refer" or "refer" not in result.verdict
    if len(flagged) > 1:
        assert any(
            n.startswith(f"Cross-sections drawn for 1 of {len(flagged)}") for n in data.notes
        )


def test_summary_by_wall_counts_every_segment_once(screened, tmp_path):
    from screening.report.tables import by_wall

    corridor, result = screened
    data = build_report_data(corridor, result, sensitivity=False)
    table = by_wall(data)
    assert [row[0] for row in table.rows] == ["North", "South"]
    assert sum(int(x) for row in table.rows for x in row[3:6]) == len(result)
    # exposed face of North by hand: trapezoids 0.5(h0 + h1) x 20 m
    assert float(table.rows[0][6]) == pytest.approx(0.5 * (5 + 8 + 18) * 20.0, abs=0.05)


def test_us_units_report_labels(screened, tmp_path):
    corridor, result = screened
    text = write_report(corridor, result, tmp_path / "us.md", units="us").read_text(
        encoding="utf-8"
    )
    assert "units US" in text and "L (ft)" in text and "length of wall (ft)" in text
    assert "L (m)" not in text
