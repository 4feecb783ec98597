"""Every broken file in tests/data/invalid/ fails with exactly the message we promise.

Each entry ``<name>.<ext>`` (a file, or a folder named like one) has a sidecar
``<name>.expected`` holding what a person sees (``str(InputError)``: one line, or one line
per problem for overlaps). Corridor files are read by ``store.load`` and ``wallscreen check``;
``profile-*`` entries are road profiles read by ``wallscreen new --from-profile``. Entries
are read under their bare names (the test runs in the corpus folder) so the messages do not
depend on where the checkout lives. Every one is exit 2 and no traceback.

Source: these messages are our own contract (DESIGN.md: file, line and column or segment and
field, and what would be valid), not an engineering fact; the value ranges they enforce are
common practice, no source (friction 0-50 degrees, positive heights, chainage order).
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import pytest

from screening import store
from screening.cli import main
from screening.model.errors import InputError

CORPUS = Path(__file__).parent / "data" / "invalid"


def _entries() -> list[Path]:
    out = []
    for expected in sorted(CORPUS.glob("*.expected")):
        (entry,) = [p for p in CORPUS.glob(expected.stem + ".*") if p.suffix != ".expected"]
        out.append(entry)
    return out


ENTRIES = _entries()
PROFILES = [p for p in ENTRIES if p.name.startswith("profile-")]
CORRIDORS = [p for p in ENTRIES if p not in PROFILES]
CHECK_ONLY = {"segments-overlap", "segments-inside-another", "no-segments"}
"""Files that load (the interface opens them, marks the overlaps or says to add a segment)
but that ``check`` refuses: what they hold cannot be screened as it stands."""


def _expected(entry: Path) -> str:
    return entry.with_suffix(".expected").read_text(encoding="utf-8").strip()


def _ids(paths: list[Path]) -> list[str]:
    return [p.name for p in paths]


def test_corpus_is_there() -> None:
    """Guard against an empty glob: at least 40 broken entries, each with its message."""
    assert len(ENTRIES) >= 40, f"only {len(ENTRIES)} entries in {CORPUS}"
    assert len(PROFILES) >= 5
    assert {p.suffix for p in CORRIDORS} >= {".toml", ".json", ".csv", ".xml"}
    assert (CORPUS / "folder.toml").is_dir()


@pytest.mark.parametrize("path", CORRIDORS, ids=_ids(CORRIDORS))
def test_store_load_gives_its_message(path: Path, monkeypatch) -> None:
    monkeypatch.chdir(CORPUS)
    if path.stem in CHECK_ONLY:
        store.load(path.name)
        return
    with pytest.raises(InputError) as info:
        store.load(path.name)
    assert str(info.value) == _expected(path)


@pytest.mark.parametrize("path", CORRIDORS, ids=_ids(CORRIDORS))
def test_check_gives_exit_2_and_the_message(path: Path, monkeypatch, capsys) -> None:
    monkeypatch.chdir(CORPUS)
    assert main(["check", path.name]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    lines = _expected(path).splitlines()
    assert captured.err.strip() == "\n".join(f"wallscreen: {line}" for line in lines)
    assert all(line.startswith(f"{path.name}") for line in lines)
    assert "Traceback" not in captured.err


@pytest.mark.parametrize("path", PROFILES, ids=_ids(PROFILES))
def test_new_from_a_broken_profile_gives_exit_2_and_the_message(
    path: Path, monkeypatch, capsys, tmp_path
) -> None:
    monkeypatch.chdir(CORPUS)
    out = tmp_path / "new.toml"
    assert main(["new", str(out), "--from-profile", path.name]) == 2
    err = capsys.readouterr().err.strip()
    assert err == f"wallscreen: {_expected(path)}"
    assert not out.exists()


@pytest.mark.parametrize("path", CORRIDORS[:3], ids=_ids(CORRIDORS[:3]))
def test_load_from_disk_names_the_path(path: Path) -> None:
    with pytest.raises(InputError) as info:
        store.load(path)
    assert str(info.value).startswith(str(path))


def test_missing_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="file not found"):
        store.load(tmp_path / "nope.toml")


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() == 0, reason="root reads any file")
def test_unreadable_file_is_exit_2(tmp_path: Path, capsys) -> None:
    path = tmp_path / "locked.toml"
    shutil.copy(CORPUS / "height-negative.toml", path)
    path.chmod(0)
    try:
        assert main(["check", str(path)]) == 2
        assert capsys.readouterr().err.strip() == (
            f"wallscreen: {path}: cannot be read (permission denied)"
        )
    finally:
        path.chmod(0o644)


def test_a_permission_error_reads_as_one(tmp_path: Path, monkeypatch) -> None:
    """Where the tests run as root (which reads anything), the same message from the error
    the operating system gives anyone else."""
    path = tmp_path / "locked.toml"
    path.write_text("schema = 1\n", encoding="utf-8")

    def refuse(self):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(Path, "read_bytes", refuse)
    with pytest.raises(InputError) as info:
        store.load(path)
    assert str(info.value) == f"{path}: cannot be read (permission denied)"
