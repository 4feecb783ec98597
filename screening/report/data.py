"""What a report shows, computed once for every format: :class:`ReportData` and
:func:`build_report_data` (quantities, sensitivity, Monte Carlo, which segments get a
cross-section, and notes on what was left out)."""

from __future__ import annotations

import datetime
import hashlib
from dataclasses import dataclass, field
from pathlib import Path

from screening.corridor.quantities import (
    CorridorQuantities,
    Rates,
    corridor_quantities,
    corridor_rates,
    rates_words,
)
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

SENSITIVITY_LIMIT = 60
"""Most segments given a sensitivity table (referred first, then marginal by CDR)."""
CROSS_SECTION_LIMIT = 200
"""Most cross-section figures of referred and marginal segments (a few ms and about 5 kB
each as SVG), chosen the same way; ``figures="all"`` draws every segment."""
FIGURE_CHOICES = ("flagged", "all", "none")
"""Which segments get a cross-section: referred and marginal (up to the limit), every
segment, or none."""


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
    figures: str = "flagged"
    """Which segments were to be drawn across: one of FIGURE_CHOICES."""
    project: str = ""
    revision: str = ""
    source: str = ""
    """The corridor file the report was made from ("" when unsaved edits were reported)."""
    source_sha256: str = ""
    """SHA-256 of that file's bytes, so the reader can tell it is the same file."""
    rates_source: str = "shipped rates (presets/rates.toml)"

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
    figures: str = "flagged",
    monte_carlo_samples: int = 0,
    monte_carlo_core_only: bool = False,
    seed: int = 0,
    today: datetime.date | None = None,
    project: str = "",
    revision: str = "",
    source: str | Path | None = None,
    rates_source: str | None = None,
) -> ReportData:
    """Compute quantities, sensitivity and (optionally) Monte Carlo for a report."""
    if figures not in FIGURE_CHOICES:
        raise InputError(f"figures {figures!r}: use {', '.join(FIGURE_CHOICES)}", field="figures")
    if list(result.ids) != [s.id for s in corridor.segments]:
        raise InputError("the screen does not belong to this corridor; screen it again")
    notes: list[str] = []
    try:
        quantities = corridor_quantities(corridor, result, corridor_rates(corridor, rates))
    except InputError as err:
        quantities = None
        notes.append(f"Quantities left out: {err}")
    ranges = load_ranges()
    digest = ""
    if source is not None:
        try:
            digest = hashlib.sha256(Path(source).read_bytes()).hexdigest()
        except OSError as err:
            raise InputError(
                f"cannot read the corridor file ({err.strerror})", file=str(source)
            ) from None
    data = ReportData(
        project=project or corridor.name,
        revision=revision,
        source=str(source) if source is not None else "",
        source_sha256=digest,
        rates_source=rates_source or rates_words(corridor),
        corridor=corridor,
        result=result,
        display=Display(units),
        date=(today or datetime.date.today()).isoformat(),
        quantities=quantities,
        ranges=ranges,
        notes=notes,
        figures=figures,
    )
    flagged = data.flagged
    order = sorted(flagged, key=lambda i: (result.verdict[i] != "refer", float(result.min_cdr[i])))
    if figures == "all":
        data.cross_sections = list(range(len(result)))
    elif figures == "flagged":
        data.cross_sections = sorted(order[:cross_section_limit])
    if figures == "flagged" and len(order) > cross_section_limit:
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
