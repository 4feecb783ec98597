"""The interface's own small state on disk: recent files and whether the cautions were seen.

Kept in ``$XDG_CONFIG_HOME/wallscreen/interface.toml`` (``~/.config/wallscreen`` when the
variable is unset). A damaged file is ignored rather than stopping the app: it only holds
conveniences. Recent files that no longer exist are dropped when the state is read.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import tomli_w

MAX_RECENT = 10


def config_dir() -> Path:
    """Folder of the interface state (XDG base-directory rule)."""
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "wallscreen"


def config_path() -> Path:
    return config_dir() / "interface.toml"


@dataclass
class InterfaceState:
    """What the interface remembers between runs."""

    recent: list[str] = field(default_factory=list)
    """Absolute paths of corridor files, most recent first."""
    cautions_seen: bool = False
    """True once the cautions were acknowledged on a first start."""
    units: str = "si"
    """Display units last chosen: ``si`` or ``us`` (files stay SI)."""

    def remember(self, path: Path) -> None:
        """Put ``path`` at the top of the recent list (once), keeping the list short."""
        try:
            text = str(Path(path).resolve())
        except (OSError, RuntimeError):  # a link loop and the like: keep it as given
            text = str(Path(path).absolute())
        self.recent = [text] + [p for p in self.recent if p != text]
        del self.recent[MAX_RECENT:]


def _exists(path: str) -> bool:
    try:
        return Path(path).is_file()
    except (OSError, ValueError):  # e.g. a NUL byte in a hand-edited path
        return False


def load_state() -> InterfaceState:
    """Read the state; a missing, unreadable or damaged file gives a fresh one, and recent
    files that no longer exist are dropped."""
    try:
        data = tomllib.loads(config_path().read_text(encoding="utf-8"))
    except (OSError, ValueError, RuntimeError):  # TOML and UTF-8 errors are ValueErrors;
        return InterfaceState()  # RuntimeError: no home folder to look in
    recent = data.get("recent", [])
    if not isinstance(recent, list):
        recent = []
    seen = data.get("cautions_seen", False)
    return InterfaceState(
        recent=[p for p in recent if isinstance(p, str) and _exists(p)][:MAX_RECENT],
        cautions_seen=seen if isinstance(seen, bool) else False,
        units=data.get("units") if data.get("units") in ("si", "us") else "si",
    )


def save_state(state: InterfaceState) -> None:
    """Write the state atomically; failure to write is not worth stopping for."""
    text = tomli_w.dumps(
        {"cautions_seen": state.cautions_seen, "units": state.units, "recent": state.recent}
    )
    with contextlib.suppress(OSError, RuntimeError):
        folder = config_dir()
        folder.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(dir=folder, prefix=".interface.", suffix=".tmp")
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as handle:
                handle.write(text)
            os.replace(tmp, config_path())
        finally:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(tmp)


def remember_units(system: str) -> None:
    """Keep the display units chosen for the next start."""
    state = load_state()
    state.units = system
    save_state(state)
