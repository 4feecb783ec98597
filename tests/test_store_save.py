"""Saving never loses the user's file: atomic replace, one backup, clear refusals.

No engineering source: the contract is our own (RULES.md, a save never loses the user's
file). The kill test is the real thing: a child process saving a 50,000-segment corridor is
killed with SIGKILL at random moments, and the file on disk must be, byte for byte, one of
the complete versions every time, with no temporary file left once the next save or load
has run.
"""

from __future__ import annotations

import os
import random
import signal
import sys
import time
from pathlib import Path

import pytest

from screening import store
from screening.engine.samples import make_corridor, make_segment
from screening.model.errors import InputError
from screening.store.safe_write import TEMP_SUFFIX, remove_stale_temps, write_atomic

KILLS = 24


def _temps(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(TEMP_SUFFIX))


@pytest.mark.skipif(not hasattr(os, "fork"), reason="needs fork and SIGKILL")
def test_a_save_killed_at_any_moment_leaves_a_whole_file(tmp_path: Path) -> None:
    corridor = make_corridor([make_segment(i) for i in range(50_000)])
    text_a = store.dumps(corridor)
    text_b = text_a.replace('name = "Sample corridor"', 'name = "Sample corridor, B"', 1)
    assert text_a != text_b and len(text_a) > 5_000_000
    whole = {text_a, text_b}
    path = tmp_path / "corridor.toml"
    write_atomic(path, text_a)
    rng = random.Random(14)
    caught_mid_write = 0
    for k in range(KILLS):
        full_save = k % 6 == 5  # now and then the whole save, text made in the child
        pid = os.fork()
        if pid == 0:  # the child: save until killed
            try:
                n = 0
                while True:
                    if full_save:
                        store.save(path, corridor)
                    else:
                        write_atomic(path, (text_a, text_b)[n % 2])
                    n += 1
            finally:
                os._exit(0)
        time.sleep(rng.uniform(2.0, 4.0) if full_save else rng.uniform(0.0, 0.15))
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        assert path.read_text(encoding="utf-8") in whole, f"kill {k}: the file is not whole"
        backup = path.with_name(path.name + ".bak")
        if backup.exists():
            assert backup.read_text(encoding="utf-8") in whole, f"kill {k}: broken backup"
        left = _temps(tmp_path)
        caught_mid_write += bool(left)
        assert all(name.startswith(".corridor.toml.") for name in left)
        remove_stale_temps(path)  # what the next save or load does first
        remove_stale_temps(backup)
        assert _temps(tmp_path) == [], f"kill {k}: temporary files left"
        assert {p.name for p in tmp_path.iterdir()} <= {"corridor.toml", "corridor.toml.bak"}
    assert caught_mid_write >= 3, "the kills should land inside a write now and then"


def test_load_and_save_remove_the_temporary_files_of_a_dead_process(tmp_path: Path) -> None:
    corridor = make_corridor([make_segment(i) for i in range(3)])
    path = tmp_path / "c.toml"
    store.save(path, corridor)
    pid = os.fork() if hasattr(os, "fork") else None
    if pid == 0:
        os._exit(0)
    if pid is None:
        pytest.skip("needs fork for a pid that is surely gone")
    os.waitpid(pid, 0)
    dead = tmp_path / f".c.toml.{pid}-0123abcd{TEMP_SUFFIX}"
    alive = tmp_path / f".c.toml.{os.getppid()}-0123abcd{TEMP_SUFFIX}"
    other = tmp_path / f".other.toml.{pid}-0123abcd{TEMP_SUFFIX}"
    for p in (dead, alive, other):
        p.write_text("half a file")
    assert len(store.load(path).segments) == 3
    assert not dead.exists() and alive.exists() and other.exists()
    dead.write_text("half a file")
    store.save(path, corridor)
    assert not dead.exists() and alive.exists() and other.exists()


def test_a_missing_folder_is_named(tmp_path: Path) -> None:
    corridor = make_corridor([make_segment()])
    target = tmp_path / "no" / "c.toml"
    with pytest.raises(InputError) as info:
        store.save(target, corridor)
    assert str(info.value) == (
        f"{target}: the folder {target.parent} does not exist; create it first or save "
        "somewhere else"
    )


def test_a_folder_is_not_a_file_name(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="is a folder; give a file name"):
        store.save(tmp_path, make_corridor([make_segment()]))


@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() == 0, reason="root writes anywhere")
def test_a_read_only_folder_is_named(tmp_path: Path) -> None:
    folder = tmp_path / "locked"
    folder.mkdir()
    path = folder / "c.toml"
    store.save(path, make_corridor([make_segment()]))
    before = path.read_bytes()
    folder.chmod(0o555)
    try:
        with pytest.raises(
            InputError, match=r"cannot write in the folder .* \(permission denied\)"
        ):
            store.save(path, make_corridor([make_segment(1)]))
        assert path.read_bytes() == before
    finally:
        folder.chmod(0o755)


def test_a_refused_write_reads_as_a_read_only_folder(tmp_path: Path, monkeypatch) -> None:
    """Where tests run as root (who writes anywhere): the error the system gives others."""
    path = tmp_path / "c.toml"
    store.save(path, make_corridor([make_segment()]))
    before = path.read_bytes()
    real_open = os.open

    def refuse(name, flags, *args):
        if str(name).endswith(TEMP_SUFFIX):
            raise PermissionError(13, "Permission denied")
        return real_open(name, flags, *args)

    monkeypatch.setattr(os, "open", refuse)
    with pytest.raises(InputError) as info:
        store.save(path, make_corridor([make_segment(1)]))
    assert str(info.value) == (
        f"{path}: cannot write in the folder {tmp_path} (permission denied); save somewhere else"
    )
    assert path.read_bytes() == before


def test_a_full_disk_leaves_the_old_file_and_no_temporary_file(tmp_path: Path, monkeypatch):
    path = tmp_path / "c.toml"
    store.save(path, make_corridor([make_segment()]))
    before = path.read_bytes()

    def full(fd):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    with pytest.raises(InputError, match=r"cannot save \(No space left on device\)"):
        store.save(path, make_corridor([make_segment(1)]))
    assert path.read_bytes() == before
    assert _temps(tmp_path) == []


@pytest.mark.skipif(sys.platform == "win32", reason="symbolic links need privileges there")
def test_a_symbolic_link_is_followed_and_kept(tmp_path: Path) -> None:
    real = tmp_path / "real.toml"
    link = tmp_path / "link.toml"
    store.save(real, make_corridor([make_segment()]))
    link.symlink_to(real)
    changed = make_corridor([make_segment(7)])
    store.save(link, changed)
    assert link.is_symlink() and store.load(real).segments[0].id == changed.segments[0].id
    assert (tmp_path / "real.toml.bak").exists()
