"""The interface's own bookkeeping: new ids, the recent-files list, undo depth."""

from __future__ import annotations

from pathlib import Path

from screening.tui.config import MAX_RECENT, InterfaceState, load_state, save_state
from screening.tui.placing import fresh_id, lettered_id


def test_fresh_id_counts_on_and_keeps_the_width():
    assert fresh_id("E-04", {"E-04"}) == "E-05"
    assert fresh_id("E-09", {"E-09"}) == "E-10"
    assert fresh_id("E-04", {"E-04", "E-05"}) == "E-04b"
    assert fresh_id("ramp", {"ramp"}) == "rampb"


def test_lettered_id_skips_taken_letters():
    taken = {"A1", "A1b", "A1c"}
    assert lettered_id("A1", taken) == "A1d"
    taken = {"A"} | {f"A{c}" for c in "bcdefghijklmnopqrstuvwxyz"}
    assert lettered_id("A", taken) == "A-2"


def test_recent_list_is_deduplicated_most_recent_first_and_short(tmp_path: Path):
    state = InterfaceState()
    for k in range(MAX_RECENT + 3):
        (tmp_path / f"c{k}.toml").write_text("x")  # recent files that are gone are dropped
        state.remember(tmp_path / f"c{k}.toml")
    state.remember(tmp_path / "c5.toml")
    assert len(state.recent) == MAX_RECENT
    assert state.recent[0] == str((tmp_path / "c5.toml").resolve())
    assert state.recent.count(state.recent[0]) == 1
    save_state(state)
    assert load_state() == state


def test_a_damaged_state_file_is_ignored(private_config: Path):
    private_config.mkdir(parents=True)
    (private_config / "interface.toml").write_text("recent = [1, 2\n", encoding="utf-8")
    assert load_state() == InterfaceState()


def test_a_bad_file_gives_one_line_and_exit_2(tmp_path: Path):
    """``wallscreen FILE`` on a broken file: the store's located message, no traceback."""
    import subprocess
    import sys

    bad = tmp_path / "bad.toml"
    bad.write_text('schema = "wallscreen/1"\n[corridor\n', encoding="utf-8")
    run = subprocess.run(
        [sys.executable, "-m", "screening", str(bad)],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=Path(__file__).resolve().parents[2],
    )
    assert run.returncode == 2
    assert run.stderr.startswith("wallscreen: ") and "bad.toml:2:" in run.stderr
    assert "Traceback" not in run.stderr
