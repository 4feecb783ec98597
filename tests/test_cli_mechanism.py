"""``wallscreen check --mechanism``: which segments it runs on, the table's columns, the JSON
keys, the corridor file's values and a stdout that JSON readers can parse (no solver banner,
from this process or from its workers). Shapes are our own contract (DESIGN.md), not an
engineering fact; the factor itself is checked in tests/validation/test_mechanism_*.py."""

from __future__ import annotations

import dataclasses
import json
import subprocess
import sys
from pathlib import Path

import pytest

from screening import store
from screening.model.presets import demo_corridor_path

UB = "upper bound (unsafe side)"


def _file(tmp_path: Path, ids: tuple[str, ...]) -> Path:
    demo = store.load(demo_corridor_path())
    small = dataclasses.replace(demo, segments=tuple(s for s in demo.segments if s.id in ids))
    path = tmp_path / "few.toml"
    store.save(path, small)
    return path


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "screening", *args], capture_output=True, text=True, timeout=600
    )


@pytest.fixture(scope="module")
def three(tmp_path_factory) -> Path:
    """One marginal (WL-01), one clear (WL-02) and one referred (R-06) demo segment."""
    return _file(tmp_path_factory.mktemp("mech"), ("WL-01", "WL-02", "R-06"))


def test_json_keys_on_referred_and_marginal_only(three: Path) -> None:
    out = run("check", str(three), "--mechanism", "--json")
    assert out.returncode == 0, out.stderr
    assert out.stdout.lstrip().startswith("{")  # nothing printed before the JSON
    data = json.loads(out.stdout)
    by_id = {s["id"]: s for s in data["segments"]}
    for sid in ("WL-01", "R-06"):
        ex = by_id[sid]["extras"]
        assert isinstance(ex["mechanism_factor"], float) and ex["mechanism_factor"] > 0
        assert isinstance(ex["mechanism_nodes"], int) and 200 <= ex["mechanism_nodes"] <= 400
        assert isinstance(ex["mechanism_flag"], bool)
        assert UB in ex["mechanism_words"]
        assert ex["mechanism_lines"] and len(ex["mechanism_lines"][0]) == 5
    clear = by_id["WL-02"]["extras"]
    assert clear["mechanism_factor"] is None and clear["mechanism_flag"] is None
    assert clear["mechanism_words"] == ""
    assert [s["verdict"] for s in data["segments"]] == [
        s["verdict"] for s in json.loads(run("check", str(three), "--json").stdout)["segments"]
    ]


def test_table_shows_factor_flag_and_caution_with_all(three: Path) -> None:
    out = run("check", str(three), "--mechanism=all")
    assert out.returncode == 0, out.stderr
    assert "mech. F" in out.stdout and "target" in out.stdout
    assert UB in out.stdout
    rows = [line for line in out.stdout.splitlines() if line.startswith(("WL-01", "WL-02", "R-06"))]
    assert len(rows) == 3 and all(" - " not in r[-20:] for r in rows[:3])


def test_one_segment_in_this_process_keeps_stdout_clean(tmp_path: Path) -> None:
    """One referred segment is solved in the command's own process (no workers): HiGHS
    must print nothing there either."""
    path = _file(tmp_path, ("R-06",))
    out = run("check", str(path), "--mechanism", "--json")
    assert out.returncode == 0, out.stderr
    assert "HiGHS" not in out.stdout and "Running" not in out.stdout
    assert json.loads(out.stdout)["segments"][0]["extras"]["mechanism_factor"] > 0


def test_unknown_mechanism_choice_is_a_clear_error(three: Path) -> None:
    out = run("check", str(three), "--mechanism=some")
    assert out.returncode == 2
    assert "invalid choice" in out.stderr and "flagged" in out.stderr
    assert "Traceback" not in out.stderr


def test_the_file_keeps_the_values_it_was_saved_with(three: Path, tmp_path: Path) -> None:
    """[segment.result] carries the mechanism values where they were computed (and the file
    still reads back)."""
    from screening.engine import screen
    from screening.engine.mechanism.check import run_mechanism, with_mechanism

    corridor = store.load(three)
    result = screen(corridor)
    mech = run_mechanism(corridor, result, workers=1, nodes=80, coarse_nodes=40)
    target = tmp_path / "saved.toml"
    store.save(target, corridor, with_mechanism(result, mech))
    text = target.read_text()
    assert text.count("mechanism_factor = ") == 2
    assert text.count("mechanism_flag = ") == 2 and UB in text
    assert len(store.load(target).segments) == 3
