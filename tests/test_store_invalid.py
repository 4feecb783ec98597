"""Every broken corridor file in tests/data/invalid/ fails with exactly the message we promise.

Each ``<name>.toml`` has a sidecar ``<name>.expected`` holding the one line a person sees
(``str(InputError)``). The file is read under its bare name so the messages do not depend
on where the checkout lives.

Source: these messages are our own contract (DESIGN.md: file, line and column or segment and
field, and what would be valid), not an engineering fact; the value ranges they enforce are
common practice, no source (friction 0-50 degrees, positive heights, chainage order).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from screening import store
from screening.cli import main
from screening.model.errors import InputError

CORPUS = Path(__file__).parent / "data" / "invalid"
FILES = sorted(CORPUS.glob("*.toml"))
CHECK_ONLY = {"segments-overlap"}
"""Files that load (the interface opens them and marks the problem) but that ``check``
refuses: what they hold cannot be screened as it stands."""


def test_corpus_is_there() -> None:
    """Guard against an empty glob: the corpus promises at least 20 broken files."""
    assert len(FILES) >= 20, f"only {len(FILES)} files in {CORPUS}"
    orphans = [p.name for p in CORPUS.glob("*.expected") if not p.with_suffix(".toml").exists()]
    assert not orphans


@pytest.mark.parametrize("path", FILES, ids=[p.stem for p in FILES])
def test_broken_file_gives_its_message(path: Path) -> None:
    expected = path.with_suffix(".expected").read_text(encoding="utf-8").strip()
    if path.stem in CHECK_ONLY:
        store.loads(path.read_text(encoding="utf-8"), path.name)
        return
    with pytest.raises(InputError) as info:
        store.loads(path.read_text(encoding="utf-8"), path.name)
    assert str(info.value) == expected
    assert "Traceback" not in str(info.value)
    # where: every message starts with the file, and names a field or a line
    assert str(info.value).startswith(path.name)


@pytest.mark.parametrize("path", FILES[:3], ids=[p.stem for p in FILES[:3]])
def test_load_from_disk_names_the_path(path: Path) -> None:
    with pytest.raises(InputError) as info:
        store.load(path)
    assert str(info.value).startswith(str(path))


def test_missing_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="file not found"):
        store.load(tmp_path / "nope.toml")


def test_binary_file_is_an_input_error(tmp_path: Path) -> None:
    path = tmp_path / "binary.toml"
    path.write_bytes(b"\xff\xfe\x00schema")
    with pytest.raises(InputError, match="not a UTF-8 text file"):
        store.load(path)


@pytest.mark.parametrize("path", FILES, ids=[p.stem for p in FILES])
def test_check_gives_exit_2_and_the_message(path: Path, monkeypatch, capsys) -> None:
    expected = path.with_suffix(".expected").read_text(encoding="utf-8").strip()
    monkeypatch.chdir(CORPUS)
    assert main(["check", path.name]) == 2
    err = capsys.readouterr().err.strip()
    assert err == "\n".join(f"wallscreen: {line}" for line in expected.splitlines())
