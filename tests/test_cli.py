"""The command line as scripts use it: exit codes, JSON shape, clear errors on bad input.

The shapes checked here are DESIGN.md's stable interfaces (our own contract, not an
engineering fact), so these tests check behaviour, not numbers.
"""

import json
import subprocess
import sys
from pathlib import Path

import pytest

from screening.cli import main
from screening.model.presets import demo_corridor_path

DEMO = demo_corridor_path()


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "screening", *args], capture_output=True, text=True
    )


def test_check_json_has_design_shape(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(DEMO), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["schema"] == "wallscreen/1"
    assert data["factor_set"] == "aashto-lrfd"
    assert data["segments"], "demo corridor has segments"
    for seg in data["segments"]:
        assert seg["verdict"] in ("clear", "marginal", "refer")
        assert seg["reasons"], seg["id"]
        for name in ("sliding", "eccentricity", "bearing", "pullout", "rupture"):
            row = seg["checks"][name]
            assert row["cdr"] is not None and row["cdr"] > 0
            assert set(row) >= {"demand", "capacity", "cdr"}
    verdicts = {s["verdict"] for s in data["segments"]}
    assert verdicts == {"clear", "marginal", "refer"}, "the demo shows all three verdicts"


def test_check_table_and_strict_exit_code() -> None:
    plain = run("check", str(DEMO))
    assert plain.returncode == 0, plain.stderr
    assert "Screening only, not a design" in plain.stdout
    strict = run("check", str(DEMO), "--strict")
    assert strict.returncode == 1  # the demo has referred segments


@pytest.mark.parametrize("factor_set", ["aashto-lrfd", "asd", "en1997-da1", "bs8006"])
def test_every_factor_set_screens_the_demo(
    factor_set: str, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["check", str(DEMO), "--json", "--factor-set", factor_set]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["factor_set"] == factor_set


def test_unknown_factor_set_is_bad_input() -> None:
    out = run("check", str(DEMO), "--factor-set", "nope")
    assert out.returncode == 2
    assert "unknown factor set 'nope'" in out.stderr and "aashto-lrfd" in out.stderr
    assert "Traceback" not in out.stderr


def test_bad_file_gives_one_line_and_exit_2(tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text('schema = "wallscreen/1"\n[corridor\nname = "x"\n', encoding="utf-8")
    out = run("check", str(bad))
    assert out.returncode == 2
    assert "Traceback" not in out.stderr
    assert "bad.toml:2:" in out.stderr


def test_missing_file_is_bad_input(tmp_path: Path) -> None:
    out = run("check", str(tmp_path / "none.toml"))
    assert out.returncode == 2 and "Traceback" not in out.stderr


def test_presets_json_lists_every_kind(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["presets", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    kinds = {row["kind"] for row in data}
    assert kinds == {"fill", "reinforcement", "factor-set", "rules"}
    ids = {row["id"] for row in data}
    assert {"aashto-lrfd", "asd", "en1997-da1", "bs8006"} <= ids


def test_stale_results_in_a_file_are_warned_about(tmp_path: Path) -> None:
    """Results in a file are ignored on load, but a disagreement with a fresh screen is
    reported (DESIGN.md: 'a warning if they disagree with a fresh run')."""
    from screening import store
    from screening.engine import screen

    corridor = store.load(DEMO)
    path = tmp_path / "c.toml"
    store.save(path, corridor, screen(corridor))
    text = path.read_text(encoding="utf-8")
    first = corridor.segments[0].id
    marker = f'id = "{first}"'
    head, tail = text.split(marker, 1)
    tail = tail.replace('verdict = "', 'verdict = "x', 1)
    path.write_text(head + marker + tail, encoding="utf-8")
    out = run("check", str(path))
    assert out.returncode == 0
    assert f"segment {first}: the file says x" in out.stderr
    fresh = tmp_path / "fresh.toml"
    store.save(fresh, corridor, screen(corridor))
    assert "warning" not in run("check", str(fresh)).stderr
