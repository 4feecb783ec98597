"""Replacing a file so that a crash at any moment leaves either the old file or the new one.

:func:`write_atomic` writes the text to a temporary file in the same folder, flushes it to
the disk (``fsync``), keeps the previous file as ``<name>.bak`` (a hard link swapped in by
an atomic rename, so the backup is never half written either), renames the temporary file
over the target (atomic on one file system) and syncs the folder. A process killed part
way leaves at most its temporary file, named ``.<name>.<pid>-<random>.wallscreen-tmp``;
the next save or load of that file removes the ones whose process is gone
(:func:`remove_stale_temps`).
"""

from __future__ import annotations

import contextlib
import os
import re
import secrets
import shutil
import time
from pathlib import Path

from screening.model.errors import InputError

TEMP_SUFFIX = ".wallscreen-tmp"
STALE_AFTER_S = 3600.0
"""A temporary file whose process still seems alive is left alone for this long (the pid
may have been reused, or the file written from another machine on a shared folder)."""


def temp_name(path: Path) -> Path:
    return path.with_name(f".{path.name}.{os.getpid()}-{secrets.token_hex(4)}{TEMP_SUFFIX}")


def _temp_pattern(path: Path) -> re.Pattern[str]:
    return re.compile(rf"^\.{re.escape(path.name)}\.(\d+)-[0-9a-f]{{8}}{re.escape(TEMP_SUFFIX)}$")


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OSError):
        return True  # someone else's process, or no way to tell: assume alive
    return True


def stale_temps(path: str | os.PathLike[str]) -> list[Path]:
    """Temporary files of ``path`` left by saves that did not finish."""
    path = Path(path)
    pattern = _temp_pattern(path)
    out = []
    try:
        names = os.listdir(path.parent or ".")
    except OSError:
        return []
    now = time.time()
    for name in names:
        m = pattern.match(name)
        if not m:
            continue
        temp = path.with_name(name)
        try:
            age = now - temp.stat().st_mtime
        except OSError:
            continue
        if not _alive(int(m.group(1))) or age > STALE_AFTER_S:
            out.append(temp)
    return out


def remove_stale_temps(path: str | os.PathLike[str]) -> int:
    """Remove what :func:`stale_temps` finds; the number removed (never raises)."""
    removed = 0
    for temp in stale_temps(path):
        with contextlib.suppress(OSError):
            temp.unlink()
            removed += 1
    return removed


def _folder_problem(path: Path) -> InputError | None:
    folder = path.parent
    if not folder.exists():
        return InputError(
            f"the folder {folder} does not exist; create it first or save somewhere else",
            file=str(path),
        )
    if not folder.is_dir():
        return InputError(f"{folder} is a file, not a folder", file=str(path))
    if path.is_dir():
        return InputError("is a folder; give a file name to save to", file=str(path))
    return None


def _keep_backup(path: Path, backup: Path) -> None:
    """``backup`` becomes the current ``path`` by an atomic rename, never half written."""
    link = temp_name(backup)
    try:
        os.link(path, link)
    except OSError:  # no hard links here (some network or FAT folders): a copy instead
        shutil.copy2(path, link)
    os.replace(link, backup)


def write_atomic(path: str | os.PathLike[str], text: str, *, backup: bool = True) -> Path:
    """Replace the file at ``path`` with ``text`` (UTF-8); the old one becomes ``<name>.bak``.

    A symbolic link is followed: the file it points to is replaced, the link kept. Any
    problem is an InputError naming the file; the old file is then untouched.
    """
    shown = Path(path)
    path = Path(os.path.realpath(shown))
    problem = _folder_problem(path)
    if problem is not None:
        raise problem
    if path.exists() and not os.access(path, os.W_OK):
        raise InputError(
            "the file is read-only; save under another name or make it writable",
            file=str(shown),
        )
    remove_stale_temps(path)
    remove_stale_temps(path.with_name(path.name + ".bak"))
    tmp = temp_name(path)
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
    except PermissionError:
        raise InputError(
            f"cannot write in the folder {path.parent} (permission denied); save somewhere else",
            file=str(shown),
        ) from None
    except OSError as err:
        raise InputError(f"cannot save ({err.strerror or err})", file=str(shown)) from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as f:
            f.write(text)
            f.flush()
            os.fsync(f.fileno())
        if path.exists():
            os.chmod(tmp, path.stat().st_mode & 0o777)
            if backup:
                _keep_backup(path, path.with_name(path.name + ".bak"))
        os.replace(tmp, path)
    except BaseException as err:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        if isinstance(err, OSError):
            raise InputError(f"cannot save ({err.strerror or err})", file=str(shown)) from None
        raise
    with contextlib.suppress(OSError):
        dfd = os.open(path.parent, os.O_DIRECTORY)
        try:
            os.fsync(dfd)
        finally:
            os.close(dfd)
    return shown
