"""What each ``wallscreen`` command does, once its arguments are parsed (``screening.cli``).

Heavy modules (the engine, the store, reports, Textual) are imported inside the commands,
so ``wallscreen --help`` stays quick and never loads the terminal interface.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

EXIT_OK, EXIT_REFER, EXIT_BAD_INPUT = 0, 1, 2

VERDICT_MARK = {"clear": "○", "marginal": "◑", "refer": "●"}  # as in the TUI


def _load_and_screen(path: Path, factor_set_id: str | None):
    from dataclasses import replace

    from screening import store
    from screening.cli.corridor_checks import layout_warnings, require_segments
    from screening.engine import screen
    from screening.model.errors import InputError
    from screening.model.presets import load_presets

    corridor, stored = store.load_with_screen(path)
    require_segments(path, corridor)
    for line in layout_warnings(path, corridor):
        print(f"wallscreen: warning: {line}", file=sys.stderr)
    if factor_set_id:
        sets = load_presets().factor_sets
        if factor_set_id not in sets:
            raise InputError(
                f"unknown factor set {factor_set_id!r}; valid: {', '.join(sorted(sets))}",
                file="--factor-set",
            )
        corridor = replace(corridor, factor_set=sets[factor_set_id])
    return corridor, screen(corridor), stored


def _with_mechanism(corridor, result, which: str | None):
    """``result`` with the mechanism check's values in its extras (``which``: flagged |
    all | None for none); progress on stderr when it is a terminal."""
    if not which:
        return result
    from screening.engine.mechanism.check import run_mechanism, with_mechanism

    def progress(done: int, total: int) -> None:
        print(f"\rmechanism check: {done}/{total} segments", end="", file=sys.stderr)
        if done == total:
            print(file=sys.stderr)

    tell = progress if sys.stderr.isatty() else None
    return with_mechanism(result, run_mechanism(corridor, result, which, progress=tell))


def cmd_check(args: argparse.Namespace) -> int:
    corridor, result, stored = _load_and_screen(args.file, args.factor_set)
    for line in stale_results(args.file, stored, result):
        print(f"wallscreen: warning: {line}", file=sys.stderr)
    result = _with_mechanism(corridor, result, args.mechanism)
    if args.json:
        from screening.cli.json_write import dump

        dump(corridor, result, sys.stdout)  # the bytes of json.dump(corridor_json(...), indent=1)
        sys.stdout.write("\n")
    else:
        print(_table(corridor, result))
    if args.strict and "refer" in result.verdict:
        return EXIT_REFER
    return EXIT_OK


def stale_results(path: Path, stored, result) -> list[str]:
    """Where the results a file carries from its last save (``stored``, a
    ``store.StoredScreen`` or None) disagree with a fresh screen.

    Results in a file are never inputs; a disagreement means the engine, the presets or the
    factor set changed since the file was saved, which the design team should know.
    """
    if stored is None or stored.screen.get("factor_set") != result.factor_set:
        return []
    out = []
    for i, sid in enumerate(result.ids):
        old = stored.results.get(sid)
        if old is None:
            continue
        was, now = old.get("verdict"), result.verdict[i]
        old_length = old.get("length_m")
        moved = isinstance(old_length, int | float) and abs(old_length - result.length_m[i]) > 0.05
        if was != now or moved:
            out.append(
                f"{path}: segment {sid}: the file says {was}, L = {old_length} m; a fresh screen "
                f"gives {now}, L = {result.length_m[i]:.1f} m (engine "
                f"{stored.screen.get('engine_version')} -> {result.engine_version}); "
                "save again to update the file"
            )
    return out


def _margin_words(result, i: int, cdr_text) -> str:
    """The check and CDR a reader should look at first: the failing one when a check fails,
    else the least margin among the checks that did not set the reinforcement."""
    if result.verdict[i] == "refer" and result.governing[i] not in result.checks:
        return result.governing[i]  # outside the scope of screening: the rule's key
    if result.min_cdr[i] < 1.0 - 1e-9:
        return f"{result.governing[i]} {cdr_text(result.min_cdr[i])}"
    if not result.margin_check[i]:
        return "-"
    return f"{result.margin_check[i]} {cdr_text(result.margin_cdr[i])}"


def _table(corridor, result) -> str:
    """A plain-text table of the screen, readable without colour."""
    from screening import CAUTION
    from screening.engine.result import cdr_text

    mech = result.extras.get("mechanism_factor")
    head = (
        f"{'segment':<10} {'chainage m':>17} {'Hd m':>6} {'L m':>6} {'L/H':>5} "
        f"{'L set by':<16} {'least margin':<20}  verdict     "
    )
    if mech is not None:
        head += f"{'mech. F':>7} {'target':>6}"
    lines = [
        f"{corridor.name}  —  factor set {result.factor_set}, engine {result.engine_version}",
        head,
        "-" * len(head) + "---------",
    ]
    for i, seg in enumerate(corridor.segments):
        v = result.verdict[i]
        ch = f"{seg.chainage_start_m:8.1f}–{seg.chainage_end_m:<8.1f}"
        margin = _margin_words(result, i, cdr_text)
        row = (
            f"{seg.id:<10} {ch:>17} {result.design_height_m[i]:6.2f} {result.length_m[i]:6.1f} "
            f"{result.length_ratio[i]:5.2f} {result.length_set_by[i]:<16} {margin:<20}  "
            f"{VERDICT_MARK[v]} {v:<8}  "
        )
        if mech is not None:
            row += _mechanism_cells(result, i)
        lines.append(row.rstrip())
    counts = result.counts()
    lines.append("")
    lines.append(
        "Hd: design height (exposed + embedment). L set by: the check whose shortest passing "
        "length is L (its CDR is 1.00 by construction) or the rule that sets it. Least margin: "
        "the smallest CDR of the other checks (for a referred segment, the failing check)."
    )
    lines.append(
        f"{len(result)} segments: {counts['clear']} clear, {counts['marginal']} marginal, "
        f"{counts['refer']} refer (full design needed)"
    )
    refer_reasons = [
        f"  {result.ids[i]}: {'; '.join(result.reasons[i])}"
        for i in range(len(result))
        if result.verdict[i] != "clear"
    ]
    if refer_reasons:
        lines.append("Why:")
        lines.extend(refer_reasons)
    if mech is not None:
        lines.extend(_mechanism_notes(result))
    lines.append("")
    lines.append(CAUTION)
    return "\n".join(lines)


def _mechanism_cells(result, i: int) -> str:
    """Mechanism factor, target and flag mark ("!" flagged) of one row; "-" not run."""
    import math

    from screening.engine.result import cdr_text

    factor = float(result.extras["mechanism_factor"][i])
    if not math.isfinite(factor):
        return f"{'-':>7}"
    target = float(result.extras["mechanism_target"][i])
    mark = " !" if result.extras["mechanism_flag"][i] else ""
    return f"{cdr_text(factor):>7} {target:6.2f}{mark}"


def _mechanism_notes(result) -> list[str]:
    """What the mechanism columns mean, and the words of every segment it flagged."""
    from screening.engine.mechanism.flags import UPPER_BOUND_WORDS

    words = result.extras["mechanism_words"]
    flagged = [i for i, f in enumerate(result.extras["mechanism_flag"]) if f]
    out = [
        "",
        f"mech. F: mechanism check (limit analysis, DLO), an {UPPER_BOUND_WORDS}: the true "
        "factor may be lower. A cross-check, never the design number; it changes no verdict. "
        "target: the strength factor the factor set asks for (1/phi or FS). !: flagged.",
        f"Mechanism check flags {len(flagged)} segment(s):" if flagged else "No segment flagged.",
    ]
    out.extend(f"  {result.ids[i]}: {words[i]}" for i in flagged)
    not_run = [i for i, w in enumerate(words) if w.startswith("not run")]
    out.extend(f"  {result.ids[i]}: mechanism check {words[i]}" for i in not_run)
    return out


def cmd_report(args: argparse.Namespace) -> int:
    from screening.model.errors import InputError
    from screening.report import write_report

    suffix = args.output.suffix.lower()
    if suffix not in (".html", ".md", ".csv"):
        raise InputError(
            f"report type {suffix or '(none)'!r} not known; use .html, .md or .csv",
            file=str(args.output),
        )
    from screening.corridor.quantities import load_rates, rates_words

    rates = load_rates(args.rates) if args.rates is not None else None
    corridor, result, _ = _load_and_screen(args.file, args.factor_set)
    result = _with_mechanism(corridor, result, args.mechanism)
    if args.monte_carlo < 0:
        raise InputError(
            "--monte-carlo must be 0 or a positive number of samples", file="--monte-carlo"
        )
    write_report(
        corridor,
        result,
        args.output,
        units=args.units,
        rates=rates,
        sensitivity=not args.no_sensitivity,
        monte_carlo_samples=args.monte_carlo,
        seed=args.seed,
        figures=args.figures,
        project=args.project or "",
        revision=args.revision or "",
        source=args.file,
        rates_source=rates_words(corridor, args.rates),
    )
    print(f"wrote {args.output}")
    if suffix == ".csv":
        from screening.report import about_path

        print(f"wrote {about_path(args.output)} (what the CSV is, where it comes from, cautions)")
    return EXIT_OK


def cmd_new(args: argparse.Namespace) -> int:
    from screening import store
    from screening.model.errors import InputError
    from screening.profile.build import corridor_from_profile

    if args.file.exists() and not args.force:
        raise InputError(
            "file exists; choose another name or pass --force to overwrite it", file=str(args.file)
        )
    if args.file.suffix != ".toml":
        raise InputError("a corridor file ends in .toml", file=str(args.file))
    if args.from_profile is None:
        from screening.profile.build import empty_corridor

        corridor = empty_corridor(args.name or args.file.stem, args.factor_set)
        store.save(args.file, corridor)
        print(
            f"wrote {args.file}: an empty corridor. Open it with `wallscreen {args.file}` and "
            "press a to add the first segment."
        )
        print(defaults_words(corridor))
        return EXIT_OK
    corridor = corridor_from_profile(
        args.from_profile,
        name=args.name or args.from_profile.stem,
        factor_set_id=args.factor_set,
        max_step_m=args.max_step,
        max_length_m=args.max_length,
        min_length_m=args.min_length,
        round_m=args.round_m,
        breaks=tuple(args.breaks),
        profile_unit=args.profile_unit,
    )
    store.save(args.file, corridor, keep_comments=False)  # a new corridor: not the old notes
    walls = len({s.wall for s in corridor.segments})
    print(f"wrote {args.file}: {len(corridor.segments)} segments in {walls} wall(s)")
    print(
        f"cuts at height steps over {args.max_step:g} m and lengths over {args.max_length:g} m, "
        f"rounded to {args.round_m:g} m; no segment under {args.min_length:g} m"
    )
    print(defaults_words(corridor))
    return EXIT_OK


def defaults_words(corridor) -> str:
    """Which inputs every new segment took without being told, so none is a surprise."""
    from screening.profile.build import defaults_used

    lines = ["Every segment starts with these defaults (edit the [defaults] table or segments):"]
    lines += [f"  {line}" for line in defaults_used(corridor)]
    return "\n".join(lines)


def cmd_presets(args: argparse.Namespace) -> int:
    from dataclasses import asdict

    from screening.model.presets import load_presets

    presets = load_presets()
    groups = {
        "fill": presets.fills,
        "reinforcement": presets.reinforcement,
        "factor-set": presets.factor_sets,
    }
    if args.json:
        out = [
            {"id": pid, "kind": kind, "values": asdict(obj)}
            for kind, group in groups.items()
            for pid, obj in group.items()
        ]
        out.append({"id": "rules", "kind": "rules", "values": asdict(presets.rules)})
        json.dump(out, sys.stdout, indent=1)
        sys.stdout.write("\n")
        return EXIT_OK
    for kind, group in groups.items():
        print(f"{kind}:")
        for pid, obj in group.items():
            print(f"  {pid:<24} {_preset_line(obj)}")
    print("rules:")
    for k, v in asdict(presets.rules).items():
        print(f"  {k:<36} {v}")
    return EXIT_OK


def _preset_line(obj) -> str:
    from screening.model import FactorSet, Fill, Reinforcement

    if isinstance(obj, Fill):
        return (
            f"γ {obj.unit_weight_kn_m3:g} kN/m³, φ {obj.friction_deg:g}°, c {obj.cohesion_kpa:g} kPa, "
            f"Cu {obj.uniformity_coefficient:g}, fines {obj.fines_percent:g} %, "
            f"PI {obj.plasticity_index:g} — {obj.name}"
        )
    if isinstance(obj, Reinforcement):
        grades = ", ".join(g.name for g in obj.grades)
        return f"{obj.material}, {obj.kind}, Sv {obj.spacing_m:g} m; grades: {grades}"
    if isinstance(obj, FactorSet):
        cases = ", ".join(c.name for c in obj.cases)
        return f"{obj.method}: {obj.name}; cases: {cases}"
    return repr(obj)


def cmd_diff(args: argparse.Namespace) -> int:
    from screening import store
    from screening.corridor.diff import diff_corridors, diff_json, diff_text
    from screening.engine import screen

    old, new = store.load(args.old), store.load(args.new)
    changes = diff_corridors(old, new, screen(old), screen(new))
    if args.json:
        json.dump(diff_json(changes), sys.stdout, indent=1)
        sys.stdout.write("\n")
    else:
        print(diff_text(changes))
    return EXIT_OK


def open_tui(path: Path | None, rates: Path | None = None) -> int:
    from screening.model.errors import InputError

    if path is not None and not path.exists():
        raise InputError(
            f"no such file; give an existing corridor file, or start one: `wallscreen new "
            f"{path}` (empty) or `wallscreen new {path} --from-profile PROFILE.csv`",
            file=str(path),
        )
    from screening.tui.app import run_app

    return run_app(path, rates)
