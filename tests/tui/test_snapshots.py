"""Pictures of the main views at a fixed size, on the shipped demo corridor.

Deterministic: a private config folder (no recent files, cautions set per test), the demo
opened as an unsaved copy (no path or date on screen), a fixed 160 x 45 terminal. When the
engine's numbers change on purpose, refresh with ``pytest tests/tui --snapshot-update``
and look at the pictures before committing them.
"""

from __future__ import annotations

from .conftest import make_app

SIZE = (160, 45)


def test_corridor_view(snap_compare):
    assert snap_compare(make_app(None), press=["down", "down", "down"], terminal_size=SIZE)


def test_marked_range(snap_compare):
    assert snap_compare(make_app(None), press=["down", "space", "down", "down"], terminal_size=SIZE)


def test_editor_refusing_a_value(snap_compare):
    keys = ["down", "e", *["tab"] * 6, "home", "ctrl+k", *"9..5"]
    assert snap_compare(make_app(None), press=keys, terminal_size=SIZE)


def test_detail_view(snap_compare):
    assert snap_compare(make_app(None), press=["down", "down", "enter"], terminal_size=SIZE)


def test_help(snap_compare):
    assert snap_compare(make_app(None), press=["question_mark"], terminal_size=SIZE)


def test_presets_browser(snap_compare):
    assert snap_compare(make_app(None), press=["p", "down"], terminal_size=SIZE)


def test_first_start_cautions(snap_compare):
    assert snap_compare(make_app(None, show_cautions=True), terminal_size=SIZE)
