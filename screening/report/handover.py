"""What the design team needs to take a report over: which project and revision, which
file (and its hash, so they can tell it is the same file), which engine, factor set and
rates; and every segment's inputs, in words and the report's units."""

from __future__ import annotations

from screening import CAUTION
from screening.report.data import ReportData
from screening.report.tables import Table


def handover(data: ReportData) -> Table:
    c, r, d = data.corridor, data.result, data.display
    q = data.quantities
    if data.source:
        source = data.source
        digest = data.source_sha256
    else:
        source = "not from a saved file (unsaved edits or a copy): save, then report again"
        digest = "—"
    rows = [
        ["project", data.project],
        ["revision", data.revision or "not given (wallscreen report --revision)"],
        ["corridor", c.name],
        ["source file", source],
        ["SHA-256 of the source file", digest],
        ["engine version", r.engine_version],
        ["factor set", f"{c.factor_set.id}: {c.factor_set.name}"],
        ["segments", f"{len(r)} in {len({s.wall for s in c.segments})} wall(s)"],
        ["units", "US customary" if d.system == "us" else "SI"],
        ["date of report", data.date],
        [
            "rates",
            data.rates_source + (", PLACEHOLDER values" if q and q.rates.placeholder else ""),
        ],
        ["currency", q.rates.currency if q is not None else "—"],
        ["caution", CAUTION],
    ]
    return Table("Hand-over", ["item", "value"], rows)


def _soil(obj, display) -> str:
    parts = [f"γ {display.format(obj.unit_weight_kn_m3, 'kN/m3')}", f"φ′ {obj.friction_deg:g}°"]
    if obj.cohesion_kpa:
        parts.append(f"c′ {display.format(obj.cohesion_kpa, 'kPa')}")
    return ", ".join(parts)


def _traffic(value, display) -> str:
    if isinstance(value, int | float):
        return display.format(float(value), "kPa")
    return str(value)


def inputs_table(data: ReportData) -> Table:
    """One row per segment: every input that decides its screen."""
    d = data.display
    m = d.label("m")
    rows = []
    for s in data.corridor.segments:
        f = s.foundation
        ground = _soil(f, d)
        if f.undrained_strength_kpa is not None:
            ground += f", cu {d.format(f.undrained_strength_kpa, 'kPa')}"
        ground += f", water {d.format(f.water_depth_m, 'm')} below base"
        if f.firm_depth_m is not None:
            ground += f", firm at {d.format(f.firm_depth_m, 'm')}"
        if f.rock:
            ground += ", rock"
        rows.append(
            [
                s.id,
                s.wall,
                s.structure,
                f"{d.value(s.chainage_start_m, 'm'):.1f}–{d.value(s.chainage_end_m, 'm'):.1f}",
                f"{d.value(s.height_start_m, 'm'):.2f} / {d.value(s.height_end_m, 'm'):.2f}",
                getattr(s.fill, "id", None) or "inline",
                getattr(s.reinforcement, "id", None) or "inline",
                f"{d.value(s.spacing_m, 'm'):.2f}",
                d.format(s.surcharge_kpa, "kPa"),
                _traffic(s.traffic, d),
                f"{s.backslope_deg:g}° / {s.toe_slope_deg:g}°",
                f"{s.seismic_kh:g}",
                _soil(s.retained, d),
                ground,
                "yes" if s.water_in_fill else "no",
                s.arrangement,
                s.note,
            ]
        )
    header = [
        "segment",
        "wall",
        "structure",
        f"chainage ({m})",
        f"exposed height start / end ({m})",
        "reinforced fill",
        "reinforcement",
        f"layer spacing Sv ({m})",
        "permanent surcharge",
        "traffic",
        "backslope / toe slope",
        "seismic kh0",
        "retained soil",
        "foundation",
        "water in fill",
        "arrangement",
        "note",
    ]
    return Table(
        "Inputs of every segment",
        header,
        rows,
        "As the corridor file gives them, defaults and presets applied; the presets' own "
        "values are under Assumptions.",
    )
