"""A corridor with no segments: it loads, screens to an empty result with every key a screen
of one segment has, saves, and ``check`` refuses it in words (exit 2, no traceback).

Our own contract (issue 13 item 4, issue 14), no engineering source.
"""

from __future__ import annotations

from screening import store
from screening.cli import main
from screening.cli.jsonout import corridor_json
from screening.engine import screen, screen_iter
from screening.engine.samples import make_corridor, make_segment

EMPTY = 'schema = "wallscreen/1"\n[corridor]\nname = "Nothing yet"\n'


def test_empty_screen_has_every_key_of_a_screen_of_one() -> None:
    empty = store.loads(EMPTY, "empty.toml")
    result = screen(empty)
    one = screen(make_corridor([make_segment()], factor_set=empty.factor_set))
    assert len(result) == 0 and result.counts() == {"clear": 0, "marginal": 0, "refer": 0}
    assert result.factor_set == empty.factor_set.id
    assert set(result.checks) == set(one.checks)
    assert set(result.extras) == set(one.extras)
    for key, value in result.extras.items():
        assert len(value) == 0, key
    assert result.layers.mask.shape[0] == 0


def test_empty_screen_in_chunks_and_with_the_core_checks_only() -> None:
    empty = store.loads(EMPTY, "empty.toml")
    steps = screen_iter(empty)
    try:
        while True:
            assert next(steps) == (0, 0)
    except StopIteration as stop:
        assert len(stop.value) == 0
    assert len(screen(empty, extra_checks=())) == 0


def test_empty_corridor_saves_with_its_screen_and_reads_back(tmp_path) -> None:
    empty = store.loads(EMPTY, "empty.toml")
    path = tmp_path / "empty.toml"
    store.save(path, empty, screen(empty))
    assert store.load(path) == empty
    assert corridor_json(empty, screen(empty))["segments"] == []


def test_check_says_what_to_do(tmp_path, capsys) -> None:
    path = tmp_path / "empty.toml"
    path.write_text(EMPTY, encoding="utf-8")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"wallscreen: {path}: no segments to screen: add a [[segment]]")
    assert "Traceback" not in err
