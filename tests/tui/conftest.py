"""Fixtures for the terminal interface: a private config folder, a corridor file to edit,
and an app built around them (cautions already acknowledged unless a test says not)."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from screening.model.presets import demo_corridor_path


@pytest.fixture(autouse=True)
def private_config(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """Recent files and the cautions flag go to a temporary folder, never the user's."""
    folder = tmp_path / "config"
    monkeypatch.setenv("XDG_CONFIG_HOME", str(folder))
    monkeypatch.delenv("NO_COLOR", raising=False)
    monkeypatch.setenv("WALLSCREEN_MECHANISM", "off")  # its own tests turn it on
    return folder / "wallscreen"


@pytest.fixture
def corridor_file(tmp_path: Path) -> Path:
    """A copy of the shipped demo corridor that a test may edit and save."""
    target = tmp_path / "approach.toml"
    shutil.copyfile(demo_corridor_path(), target)
    return target


def make_app(path: Path | None, *, show_cautions: bool = False):
    from screening.tui.app import WallscreenApp, open_session

    return WallscreenApp(open_session(path), show_cautions=show_cautions)
