"""The checks of one segment: demand, capacity and CDR each, the governing one marked."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text

from screening.engine.result import SegmentResult, cdr_text
from screening.model.units import Display

SI = Display("si")


def _num(value: float) -> str:
    """Two decimals for small values (eccentricity in m), one otherwise."""
    return f"{value:.2f}" if abs(value) < 10 else f"{value:.1f}"


def checks_table(res: SegmentResult, display: Display = SI) -> Table:
    """A Rich table of every check (governing case of each), weakest marked; demand and
    capacity in the display units (CDRs are ratios: the same in any units)."""
    table = Table(expand=True, box=None, header_style="bold", pad_edge=False)
    for heading, justify, least in (
        ("Check", "left", 14),
        ("CDR", "right", 4),
        ("", "left", 1),
        ("Demand", "right", 7),
        ("Capacity", "right", 8),
        ("Unit", "left", 6),
        ("Case", "left", 4),
    ):
        table.add_column(heading, justify=justify, no_wrap=True, min_width=least)
    for name, check in res.checks.items():
        if check.demand == 0.0 and check.capacity == 0.0 and check.passes:
            # Nothing to check here (no seismic load, no circle of this family in range):
            # dashes and "n/a", not a capped CDR of 99 that reads like a result.
            table.add_row(
                Text("  " + name, style="dim"),
                Text("-", style="dim"),
                Text("n/a", style="dim"),  # the reason is in the check's detail
                "-",
                "-",
                Text(""),
                Text(""),
            )
            continue
        governs = name == res.governing
        status = "✗" if not check.passes else ""  # failing: ✗ and red; governing: ▸ and bold
        style = "bold red" if not check.passes else ("bold" if governs else "")
        table.add_row(
            Text(("▸ " if governs else "  ") + name, style=style),
            Text(cdr_text(check.cdr), style=style),
            Text(status, style=style),
            _num(display.value(check.demand, check.unit)),
            _num(display.value(check.capacity, check.unit)),
            Text(display.label(check.unit), style="dim"),
            Text(check.case, overflow="ellipsis"),
        )
    return table


def layers_table(res: SegmentResult, display: Display = SI) -> Table:
    """Layer by layer: depth, T_max, pullout and rupture capacity, grade chosen."""
    table = Table(box=None, header_style="bold", pad_edge=False)
    m, f = display.label("m"), display.label("kN/m")
    for heading in (
        "#",
        f"Depth {m}",
        f"T_max {f}",
        f"Pullout {f}",
        f"Rupture {f}",
        "Grade",
        f"La {m}",
    ):
        table.add_column(heading, justify="left" if heading == "Grade" else "right", no_wrap=True)
    for k, layer in enumerate(res.layers, start=1):
        short = layer.pullout_capacity_kn_m < layer.tension_kn_m or (
            layer.rupture_capacity_kn_m < layer.tension_kn_m
        )
        table.add_row(
            str(k),
            f"{display.value(layer.depth_m, 'm'):.2f}",
            _force(display, layer.tension_kn_m),
            _force(display, layer.pullout_capacity_kn_m),
            _force(display, layer.rupture_capacity_kn_m),
            Text(layer.grade or "none passes", style="bold red" if short else ""),
            f"{display.value(layer.active_length_m, 'm'):.2f}",
        )
    return table


def _force(display: Display, kn_m: float) -> str:
    """kN/m to one decimal; kip/ft (about 15 times smaller) to two."""
    return f"{display.value(kn_m, 'kN/m'):.{1 if display.system == 'si' else 2}f}"
