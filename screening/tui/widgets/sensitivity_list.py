"""Which inputs a segment's outcome hangs on: the ranked list of its detail view.

The ranking runs the engine (every input at both ends of its range, about a second with
the slip-circle search), so it is made on demand in a thread worker and kept for the same
inputs; stepping to another segment and back shows it again without a new run.
"""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import work
from textual.widgets import Static
from textual.worker import get_current_worker

from screening.corridor.sensitivity import Sensitivity
from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.errors import WallscreenError
from screening.model.units import Display
from screening.tui.cells import VERDICT_MARK, VERDICT_STYLE
from screening.tui.corridor_tools import cached_sensitivity, run_sensitivity, sensitivity_key

SHOWN = 8
"""Inputs listed (the rest move the outcome less)."""


def _value(value: float, unit: str, display: Display) -> str:
    if unit == "deg":
        return f"{value:.1f}°"
    return f"{display.value(value, unit):.1f}"


def _mark(verdict: str) -> Text:
    return Text(VERDICT_MARK.get(verdict, "?"), style=VERDICT_STYLE.get(verdict, ""))


def sensitivity_table(ranking: list[Sensitivity], base_verdict: str, display: Display) -> Table:
    """Inputs ranked: verdict flips first, then how far L moves, then the smallest CDR.
    Verdicts at the two ends show as their marks (○ clear, ◑ marginal, ● refer)."""
    table = Table(box=None, header_style="bold", pad_edge=False, expand=True)
    table.add_column("#", justify="right", width=2)
    table.add_column("Input", no_wrap=True, min_width=20)
    table.add_column("Range low–high", no_wrap=True)
    table.add_column("Verdict", no_wrap=True)
    table.add_column(f"L {display.label('m')}", justify="right", no_wrap=True)
    table.add_column("ΔCDR", justify="right", no_wrap=True)
    m = display.value
    for k, s in enumerate(ranking[:SHOWN], start=1):
        unit = "" if s.unit == "deg" else f" {display.label(s.unit)}"
        verdicts = Text()
        verdicts.append_text(_mark(s.verdict_low))
        verdicts.append(" ")
        verdicts.append_text(_mark(s.verdict_high))
        if s.flips:
            verdicts.append(" flips", style="bold red")
        table.add_row(
            str(k),
            Text(s.label, style="bold" if s.flips else ""),
            f"{_value(s.low, s.unit, display)}–{_value(s.high, s.unit, display)}{unit}",
            verdicts,
            f"{m(s.length_low_m, 'm'):.1f}–{m(s.length_high_m, 'm'):.1f}",
            f"{s.cdr_shift:.3f}",
        )
    return table


def ranking_text(ranking: list[Sensitivity], base_verdict: str, display: Display) -> Group:
    flips = [s.label for s in ranking if s.flips]
    head = Text("Sensitivity", style="bold")
    if flips:
        head.append(f"  verdict ({base_verdict}) flips within the range of: ", style="")
        head.append(", ".join(flips), style="bold red")
    else:
        head.append(f"  no single input flips the verdict ({base_verdict}) within its range")
    note = Text(
        "each input alone at the low and high end of its range (presets/sensitivity.toml); "
        "verdict and L at the low / high end",
        style="dim",
    )
    return Group(head, sensitivity_table(ranking, base_verdict, display), note)


class SensitivityList(Static):
    """Ranked inputs of one segment; ``start`` computes them off the UI thread."""

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self._key: tuple[int, int, int] | None = None
        self._verdict = ""
        self.running = False

    def show_for(self, corridor: Corridor, i: int, verdict: str, display: Display) -> None:
        """Show the ranking of segment ``i`` if one was made for its inputs, else the hint."""
        self._key, self._verdict = sensitivity_key(corridor, i), verdict
        ranking = cached_sensitivity(corridor, i)
        if ranking is not None:
            self.update(ranking_text(ranking, verdict, display))
        else:
            self.update(
                Text(
                    "Sensitivity: press v to rank the inputs that move this verdict or L most",
                    style="dim",
                )
            )

    def start(self, corridor: Corridor, i: int, result: CorridorResult, display: Display) -> None:
        """Rank the inputs of segment ``i`` (kept for the same inputs)."""
        verdict = result.verdict[i]
        self.show_for(corridor, i, verdict, display)
        if cached_sensitivity(corridor, i) is not None:
            return
        self.running = True
        self.update(
            Text(
                f"Sensitivity: screening {corridor.segments[i].id} with each input at both "
                "ends of its range…",
                style="italic",
            )
        )
        self._rank(corridor, i, result, display)

    @work(thread=True, exclusive=True, group="sensitivity", exit_on_error=False)
    def _rank(self, corridor: Corridor, i: int, result: CorridorResult, display: Display) -> None:
        worker = get_current_worker()
        key = sensitivity_key(corridor, i)
        try:
            ranking = run_sensitivity(corridor, i, result)
        except WallscreenError as err:
            if not worker.is_cancelled:
                self.app.call_from_thread(self._failed, key, str(err))
            return
        if not worker.is_cancelled:
            self.app.call_from_thread(self._done, key, ranking, display)

    def _done(
        self, key: tuple[int, int, int], ranking: list[Sensitivity], display: Display
    ) -> None:
        self.running = False
        if key == self._key:  # still showing that segment
            self.update(ranking_text(ranking, self._verdict, display))

    def _failed(self, key: tuple[int, int, int], message: str) -> None:
        self.running = False
        if key == self._key:
            self.update(Text(f"Sensitivity could not run: {message}", style="red"))
