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

import datetime
import os
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from screening import CAUTION
from screening.corridor.quantities import CorridorQuantities, Rates, corridor_quantities, load_rates
from screening.corridor.sensitivity import (
    MonteCarlo,
    Sensitivity,
    corridor_sensitivity,
    load_ranges,
    monte_carlo,
)
from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.errors import InputError
from screening.model.units import Display

FORMATS = {".html": "html", ".htm": "html", ".md": "md", ".csv": "csv"}
SENSITIVITY_LIMIT = 60
"""Most segments given a sensitivity table (referred first, then marginal by CDR)."""
CROSS_SECTION_LIMIT = 200
"""Most cross-section figures (about 0.3 s and 40 kB each), chosen the same way."""


@dataclass
class ReportData:
    """Everything a report shows, computed once for every format."""

    corridor: Corridor
    result: CorridorResult
    display: Display
    date: str
    quantities: CorridorQuantities | None
    ranges: dict[str, float]
    sensitivity: dict[int, list[Sensitivity]] = field(default_factory=dict)
    monte_carlo: MonteCarlo | None = None
    notes: list[str] = field(default_factory=list)
    """Things the reader should know about the report itself (what was left out)."""
    cross_sections: list[int] = field(default_factory=list)
    """Segments drawn across the wall, in corridor order."""

    @property
    def flagged(self) -> list[int]:
        """Referred and marginal segments, in corridor order."""
        return [i for i, v in enumerate(self.result.verdict) if v != "clear"]


def build_report_data(
    corridor: Corridor,
    result: CorridorResult,
    *,
    units: str = "si",
    rates: Rates | None = None,
    sensitivity: bool = True,
    sensitivity_limit: int = SENSITIVITY_LIMIT,
    cross_section_limit: int = CROSS_SECTION_LIMIT,
    monte_carlo_samples: int = 0,
    monte_carlo_core_only: bool = False,
    seed: int = 0,
    today: datetime.date | None = None,
) -> ReportData:
    """Compute quantities, sensitivity and (optionally) Monte Carlo for a report."""
    if list(result.ids) != [s.id for s in corridor.segments]:
        raise InputError("the screen does not belong to this corridor; screen it again")
    notes: list[str] = []
    try:
        quantities = corridor_quantities(
            corridor, result, rates if rates is not None else load_rates()
        )
    except InputError as err:
        quantities = None
        notes.append(f"Quantities left out: {err}")
    ranges = load_ranges()
    data = ReportData(
        corridor=corridor,
        result=result,
        display=Display(units),
        date=(today or datetime.date.today()).isoformat(),
        quantities=quantities,
        ranges=ranges,
        notes=notes,
    )
    flagged = data.flagged
    order = sorted(flagged, key=lambda i: (result.verdict[i] != "refer", float(result.min_cdr[i])))
    data.cross_sections = sorted(order[:cross_section_limit])
    if len(order) > cross_section_limit:
        notes.append(
            f"Cross-sections drawn for {cross_section_limit} of {len(order)} referred or marginal "
            "segments (referred first, then the lowest CDR)."
        )
    if not sensitivity:
        notes.append("Sensitivity of the inputs was not computed for this report.")
    if sensitivity and flagged:
        chosen = sorted(order[:sensitivity_limit])
        if len(order) > sensitivity_limit:
            notes.append(
                f"Sensitivity shown for {sensitivity_limit} of {len(order)} referred or marginal "
                "segments (referred first, then the lowest CDR)."
            )
        data.sensitivity = corridor_sensitivity(corridor, chosen, ranges=ranges, result=result)
    if monte_carlo_samples > 0:
        data.monte_carlo = monte_carlo(
            corridor,
            monte_carlo_samples,
            seed,
            ranges=ranges,
            extra_checks=() if monte_carlo_core_only else None,
        )
    return data


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
) -> Path:
    """Write the report of ``corridor`` and its screen to ``out_path``; return the path.

    ``units``: ``si`` or ``us`` (display only); ``rates``: unit rates (default:
    presets/rates.toml); ``monte_carlo_samples`` > 0 adds each segment's probability of
    refer over that many seeded draws (``seed``); ``monte_carlo_core_only`` leaves the
    compound search out of those draws (tens of times faster, blind to compound stability).
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
    )
    if kind == "html":
        from screening.report.html_page import render_html

        text = render_html(data)
    elif kind == "md":
        from screening.report.text import render_markdown

        text = render_markdown(data)
    else:
        from screening.report.text import render_csv

        text = render_csv(data)
    _write_atomic(out, text)
    return out


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


__all__ = ["CAUTION", "ReportData", "build_report_data", "write_report"]
