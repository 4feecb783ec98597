"""Reports of a screened corridor: one self-contained HTML file, Markdown or CSV.

``write_report(corridor, result, out_path)`` picks the format by the suffix of
``out_path`` (``.html``/``.htm``, ``.md``, ``.csv``). What goes in (HTML; Markdown the
same without figures; CSV one row per segment):

1. the cautions: screening only, not a design;
2. summary by verdict (count and length of wall) and why segments are not clear;
3. a long section of each wall (exposed and design height, L, verdict along the chainage);
4. a cross-section of each referred or marginal segment;
5. the check tables (every check's demand, capacity, CDR and governing case);
6. quantities and the rough cost (with the rates and whether they are placeholders);
7. sensitivity of the referred and marginal segments (and Monte Carlo when asked for);
8. the assumptions: factor set, rules, the presets in use with their values, the
   sensitivity ranges, engine version and date.

The file is written to a temporary file beside ``out_path`` and moved into place, so a
failed report never leaves a half-written file or destroys an older one.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from screening import CAUTION
from screening.corridor.quantities import Rates
from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.errors import InputError
from screening.report.data import ReportData, build_report_data
from screening.report.html_page import render_html
from screening.report.text import render_about, render_csv, render_markdown

__all__ = ["CAUTION", "FORMATS", "ReportData", "build_report_data", "write_report"]

FORMATS = {".html": "html", ".htm": "html", ".md": "md", ".csv": "csv"}


def write_report(
    corridor: Corridor,
    result: CorridorResult,
    out_path: str | os.PathLike[str],
    *,
    units: str = "si",
    rates: Rates | None = None,
    sensitivity: bool = True,
    monte_carlo_samples: int = 0,
    monte_carlo_core_only: bool = False,
    seed: int = 0,
    figures: str = "flagged",
    project: str = "",
    revision: str = "",
    source: str | os.PathLike[str] | None = None,
    rates_source: str | None = None,
) -> Path:
    """Write the report of ``corridor`` and its screen to ``out_path``; return the path.

    ``units``: ``si`` or ``us`` (display only); ``rates``: unit rates (default:
    presets/rates.toml); ``monte_carlo_samples`` > 0 adds each segment's probability of
    refer over that many seeded draws (``seed``); ``monte_carlo_core_only`` leaves the
    compound search out of those draws (tens of times faster, blind to compound stability).
    ``project``, ``revision`` and ``source`` (the corridor file, hashed) go in the hand-over
    block at the top; a CSV report also writes ``<name>-about.txt`` beside it with that
    block and the cautions, so the CSV itself is one header row and one row a segment.
    ``figures``: which segments get a cross-section in HTML: ``flagged`` (referred and
    marginal, the default), ``all`` or ``none``; a long section of each wall is always drawn.
    """
    out = Path(out_path)
    kind = FORMATS.get(out.suffix.lower())
    if kind is None:
        raise InputError(
            f"report type {out.suffix or '(none)'!r} not known; use .html, .md or .csv",
            file=str(out),
        )
    if units not in ("si", "us"):
        raise InputError(f"units {units!r}: use si or us", field="units")
    data = build_report_data(
        corridor,
        result,
        units=units,
        rates=rates,
        sensitivity=sensitivity and kind != "csv",
        monte_carlo_samples=monte_carlo_samples,
        monte_carlo_core_only=monte_carlo_core_only,
        seed=seed,
        figures=figures,
        project=project,
        revision=revision,
        source=source,
        rates_source=rates_source,
    )
    if kind == "html":
        text = render_html(data)
    elif kind == "md":
        text = render_markdown(data)
    else:
        text = render_csv(data)
        _write_atomic(about_path(out), render_about(data))
    _write_atomic(out, text)
    return out


def about_path(csv_path: Path) -> Path:
    """``screen.csv`` -> ``screen-about.txt``: the hand-over block of a CSV report."""
    return csv_path.with_name(f"{csv_path.stem}-about.txt")


def _write_atomic(path: Path, text: str) -> None:
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise InputError("the folder for the report does not exist", file=str(path))
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            fh.write(text)
        # mkstemp makes 0600; a report is for sharing: the usual mode for new files.
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except OSError as err:
        Path(tmp).unlink(missing_ok=True)
        raise InputError(f"cannot write the report ({err.strerror})", file=str(path)) from None
