"""The interface's settings file: recent files that are gone are dropped, and a damaged
settings file (or none, or no home folder) never stops the app. No Pilot: config only.

Our own contract (issue 14, item 6), no engineering source.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from screening.tui import config


@pytest.fixture
def settings(private_config: Path) -> Path:
    private_config.mkdir(parents=True, exist_ok=True)
    return private_config / "interface.toml"


def test_recent_files_that_no_longer_exist_are_dropped(settings: Path, tmp_path: Path) -> None:
    kept, gone = tmp_path / "kept.toml", tmp_path / "gone.toml"
    kept.write_text("x")
    state = config.InterfaceState()
    state.remember(gone)
    state.remember(kept)
    gone.write_text("x")
    config.save_state(state)
    gone.unlink()
    assert config.load_state().recent == [str(kept.resolve())]


@pytest.mark.parametrize(
    "content",
    [
        b"recent = [\n",  # cut off
        b"\xff\xfe\x00r\x00e",  # not UTF-8
        b'recent = "one.toml"\ncautions_seen = "yes"\n',  # wrong types
        b'recent = [1, true, "a\\u0000b", ["x"]]\n',  # not paths, and a NUL in one
        b"",
    ],
    ids=["truncated", "binary", "wrong-types", "odd-entries", "empty"],
)
def test_a_damaged_settings_file_gives_fresh_settings(settings: Path, content: bytes) -> None:
    settings.write_bytes(content)
    state = config.load_state()
    assert state.recent == [] and state.cautions_seen is False
    config.save_state(state)  # and the next save writes a good file over it
    assert config.load_state() == state


def test_a_folder_where_the_file_should_be(settings: Path) -> None:
    settings.mkdir()
    assert config.load_state() == config.InterfaceState()
    config.save_state(config.InterfaceState(cautions_seen=True))  # cannot write: no error


def test_no_home_folder_is_no_settings(monkeypatch) -> None:
    monkeypatch.delenv("XDG_CONFIG_HOME")

    def no_home():
        raise RuntimeError("Could not determine home directory.")

    monkeypatch.setattr(Path, "home", staticmethod(no_home))
    assert config.load_state() == config.InterfaceState()
    config.save_state(config.InterfaceState(cautions_seen=True))


def test_settings_round_trip(settings: Path, tmp_path: Path) -> None:
    files = [tmp_path / f"c{i}.toml" for i in range(config.MAX_RECENT + 2)]
    state = config.InterfaceState(cautions_seen=True)
    for f in files:
        f.write_text("x")
        state.remember(f)
    config.save_state(state)
    again = config.load_state()
    assert again.cautions_seen is True
    assert again.recent == [str(f.resolve()) for f in reversed(files)][: config.MAX_RECENT]
