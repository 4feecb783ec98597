"""Command line: ``wallscreen [FILE]`` opens the terminal interface; sub-commands screen,
report, build and compare corridors without it.

Exit codes: 0 the command ran (whatever the verdicts); 1 with ``check --strict`` when any
segment is referred; 2 bad input (one clear message on stderr, never a traceback).
Textual is imported only when the terminal interface starts.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from pathlib import Path

from screening import __version__
from screening.cli import commands
from screening.cli.commands import EXIT_BAD_INPUT, EXIT_OK
from screening.model.errors import WallscreenError

__all__ = ["COMMANDS", "main"]

COMMANDS = ("check", "report", "new", "presets", "diff")


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="wallscreen",
        description=(
            "Screen the reinforced-soil (MSE) walls of a road corridor. "
            "Screening only, not a design: a licensed engineer and the governing local code decide."
        ),
    )
    p.add_argument("--version", action="version", version=f"wallscreen {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    c = sub.add_parser("check", help="screen a corridor file and print the outcome")
    c.add_argument("file", type=Path, help="corridor file (.toml)")
    c.add_argument("--json", action="store_true", help="print JSON instead of a table")
    c.add_argument("--factor-set", metavar="ID", help="screen under this factor set instead")
    c.add_argument("--strict", action="store_true", help="exit 1 when any segment is referred")
    c.add_argument(
        "--mechanism",
        nargs="?",
        const="flagged",
        choices=("flagged", "all"),
        help="also run the mechanism check (limit analysis, an upper bound: unsafe side) on "
        "the referred and marginal segments, or =all on every segment",
    )

    r = sub.add_parser("report", help="write a report (.html, .md or .csv)")
    r.add_argument("file", type=Path)
    r.add_argument("-o", "--output", type=Path, required=True, help="OUT.html | OUT.md | OUT.csv")
    r.add_argument("--factor-set", metavar="ID")
    r.add_argument("--units", choices=("si", "us"), default="si", help="display units")
    r.add_argument(
        "--monte-carlo",
        type=int,
        default=0,
        metavar="N",
        help="add each segment's probability of refer over N seeded samples",
    )
    r.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo samples")
    r.add_argument(
        "--figures",
        choices=("flagged", "all", "none"),
        default="flagged",
        help="cross-sections in an HTML report: of the referred and marginal segments "
        "(default), of every segment, or none; a long section of each wall is always drawn",
    )
    r.add_argument(
        "--mechanism",
        nargs="?",
        const="flagged",
        choices=("flagged", "all"),
        help="add the mechanism check (an upper bound: unsafe side) and its drawings for the "
        "referred and marginal segments, or =all",
    )
    r.add_argument(
        "--no-sensitivity",
        action="store_true",
        help="leave out the ranked sensitivity of marginal and referred segments",
    )
    r.add_argument(
        "--rates",
        type=Path,
        metavar="FILE",
        help="unit rates ([rates] table) instead of the corridor's own and the shipped ones",
    )
    r.add_argument("--project", help="project name in the hand-over block (default: corridor)")
    r.add_argument("--revision", help="revision of the corridor file, e.g. P02")

    n = sub.add_parser("new", help="start a corridor file: empty, or built from a chainage profile")
    n.add_argument("file", type=Path, help="corridor file to write")
    n.add_argument(
        "--from-profile",
        type=Path,
        metavar="PROFILE",
        help="CSV (chainage + levels or height) or LandXML profile (none: an empty corridor)",
    )
    n.add_argument("--name", help="corridor name (default: the profile's file name)")
    n.add_argument(
        "--max-step",
        type=float,
        default=0.5,
        metavar="M",
        help="new segment when the height changes by more than this (m)",
    )
    n.add_argument(
        "--max-length", type=float, default=30.0, metavar="M", help="longest segment (m)"
    )
    n.add_argument(
        "--min-length",
        type=float,
        default=5.0,
        metavar="M",
        help="shortest segment (m): shorter pieces join a neighbour of the same wall",
    )
    n.add_argument(
        "--round",
        dest="round_m",
        type=float,
        default=0.1,
        metavar="M",
        help="round the chainages of the cuts to this step (m); 0 keeps them as computed",
    )
    n.add_argument(
        "--break",
        dest="breaks",
        type=float,
        action="append",
        default=[],
        metavar="CHAINAGE",
        help="also split at this chainage (repeatable)",
    )
    n.add_argument("--factor-set", metavar="ID", default="aashto-lrfd")
    n.add_argument(
        "--profile-unit",
        choices=("m", "ft"),
        default="m",
        help="unit of a CSV profile's chainages and levels (the file is always SI)",
    )
    n.add_argument("--force", action="store_true", help="overwrite FILE if it exists")

    s = sub.add_parser("presets", help="list every preset with its values")
    s.add_argument("--json", action="store_true")

    d = sub.add_parser("diff", help="compare two versions of a corridor")
    d.add_argument("old", type=Path)
    d.add_argument("new", type=Path)
    d.add_argument("--json", action="store_true")
    return p


def _tui_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="wallscreen",
        description="Open the terminal interface on FILE (no FILE: the shipped demo corridor). "
        f"Other commands: {', '.join(COMMANDS)} (wallscreen COMMAND --help).",
    )
    p.add_argument("--version", action="version", version=f"wallscreen {__version__}")
    p.add_argument("file", type=Path, nargs="?", help="corridor file (.toml)")
    p.add_argument(
        "--rates",
        type=Path,
        metavar="FILE",
        help="unit rates ([rates] table) instead of the corridor's own and the shipped ones",
    )
    return p


def main(argv: Sequence[str] | None = None) -> int:
    args_list = list(sys.argv[1:] if argv is None else argv)
    try:
        if args_list and args_list[0] in COMMANDS:
            args = _parser().parse_args(args_list)
            return _run(args)
        if args_list and args_list[0] in ("-h", "--help"):
            _parser().print_help()
            print("\nwallscreen [FILE] opens the terminal interface.")
            return EXIT_OK
        args = _tui_parser().parse_args(args_list)
        return commands.open_tui(args.file, args.rates)
    except WallscreenError as err:
        for line in str(err).splitlines() or [""]:
            print(f"wallscreen: {line}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:  # output piped into `head` and the like: not an error
        import os

        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return EXIT_OK


def _run(args: argparse.Namespace) -> int:
    handler = {
        "check": commands.cmd_check,
        "report": commands.cmd_report,
        "new": commands.cmd_new,
        "presets": commands.cmd_presets,
        "diff": commands.cmd_diff,
    }[args.command]
    return handler(args)
