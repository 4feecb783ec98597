"""The interface's own small state on disk: recent files and whether the cautions were seen.

Kept in ``$XDG_CONFIG_HOME/wallscreen/interface.toml`` (``~/.config/wallscreen`` when the
variable is unset). A damaged file is ignored rather than stopping the app: it only holds
conveniences.
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
        text = str(Path(path).resolve())
        self.recent = [text] + [p for p in self.recent if p != text]
        del self.recent[MAX_RECENT:]


def load_state() -> InterfaceState:
    """Read the state; a missing or unreadable file gives a fresh one."""
    try:
        data = tomllib.loads(config_path().read_text(encoding="utf-8"))
    except (OSError, tomllib.TOMLDecodeError, UnicodeDecodeError):
        return InterfaceState()
    recent = data.get("recent", [])
    if not isinstance(recent, list):
        recent = []
    return InterfaceState(
        recent=[str(p) for p in recent if isinstance(p, str)][:MAX_RECENT],
        cautions_seen=bool(data.get("cautions_seen", False)),
        units=data.get("units") if data.get("units") in ("si", "us") else "si",
    )


def save_state(state: InterfaceState) -> None:
    """Write the state atomically; failure to write is not worth stopping for."""
    folder = config_dir()
    text = tomli_w.dumps(
        {"cautions_seen": state.cautions_seen, "units": state.units, "recent": state.recent}
    )
    with contextlib.suppress(OSError):
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
