"""Pictures of the main views at a fixed size, on the shipped demo corridor.

Deterministic: a private config folder (no recent files, cautions set per test), the demo
opened as an unsaved copy (no path or date on screen), a fixed 160 x 45 terminal, and
every background screen landed before keys are pressed and again before the picture.
When the engine's numbers change on purpose, refresh with
``pytest tests/tui/test_snapshots.py --snapshot-update`` and look at the pictures first.
"""

from __future__ import annotations

from .conftest import make_app

SIZE = (160, 45)


def picture(snap_compare, keys: list[str], *, cautions: bool = False, size=SIZE, path=None) -> bool:
    app = make_app(path, show_cautions=cautions)

    async def settle_then_press(pilot) -> None:
        from .test_workflows import settle

        await settle(pilot, app)
        app.corridor_screen.say("")  # it reports how long the screen took: not repeatable
        await pilot.press(*keys)
        await settle(pilot, app)

    return snap_compare(app, run_before=settle_then_press, terminal_size=size)


def test_corridor_view(snap_compare):
    assert picture(snap_compare, ["down", "down", "down"])


def test_marked_range(snap_compare):
    assert picture(snap_compare, ["down", "space", "down", "down"])


def test_editor_refusing_a_value(snap_compare):
    assert picture(snap_compare, ["down", "e", *["tab"] * 6, "home", "ctrl+k", *"9..5"])


def test_detail_view(snap_compare):
    assert picture(snap_compare, ["down", "down", "enter"])


def test_help(snap_compare):
    assert picture(snap_compare, ["question_mark"])


def test_presets_browser(snap_compare):
    assert picture(snap_compare, ["p", "down"])


def test_first_start_cautions(snap_compare):
    assert picture(snap_compare, [], cautions=True)


# The layouts a practitioner meets on a laptop and in a split terminal: Id, Verdict and
# CDR stay in sight at 80 x 24; the editor takes the table's place there.
SMALL, MEDIUM = (80, 24), (120, 40)


def test_corridor_view_80x24(snap_compare):
    assert picture(snap_compare, ["down", "down"], size=SMALL)


def test_corridor_view_120x40(snap_compare):
    assert picture(snap_compare, ["down", "down"], size=MEDIUM)


def test_folded_walls_120x40(snap_compare):
    assert picture(snap_compare, ["Z"], size=MEDIUM)


def test_editor_80x24(snap_compare):
    assert picture(snap_compare, ["down", "e"], size=SMALL)


def test_detail_view_80x24(snap_compare):
    assert picture(snap_compare, ["down", "enter"], size=SMALL)


def test_detail_view_120x40(snap_compare):
    assert picture(snap_compare, ["down", "down", "enter"], size=MEDIUM)


def test_us_units_120x40(snap_compare):
    assert picture(snap_compare, ["t", "down", "down"], size=MEDIUM)


def test_empty_corridor_80x24(snap_compare, tmp_path):
    from screening import store
    from screening.profile.build import empty_corridor

    path = tmp_path / "empty.toml"
    store.save(path, empty_corridor("Brook widening"))
    assert picture(snap_compare, [], size=SMALL, path=path)
