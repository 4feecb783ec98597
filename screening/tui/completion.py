"""Completion for what people type: file paths in the open, save and report dialogs, and
the values a field may take (preset ids, wall | abutment, ...) in the editor.

``path_matches`` is plain Python (tested on its own); ``PathSuggester`` feeds Textual's
``Input`` its grey completion, which Tab or the right arrow accepts.
"""

from __future__ import annotations

import os
from pathlib import Path

from textual.suggester import Suggester

CHOICES = {
    "structure": ("wall", "abutment"),
    "traffic": ("none", "parallel", "approach"),
    "arrangement": ("single", "tiered", "back-to-back"),
    "water_in_fill": ("no", "yes"),
}
"""Fields with a fixed list of words (fill and reinforcement take the preset ids)."""


def field_choices(name: str, presets: object) -> list[tuple[str, str]]:
    """(value, words) a field may take, for a pick list; empty for free fields."""
    if name == "fill":
        return [(k, f"{k} — {v.name}") for k, v in presets.fills.items()]
    if name == "reinforcement":
        return [(k, f"{k} — {v.name}") for k, v in presets.reinforcement.items()]
    if name == "traffic":
        return [(v, v) for v in CHOICES["traffic"]]
    return [(v, v) for v in CHOICES.get(name, ())]


def path_matches(typed: str, suffixes: tuple[str, ...] = ()) -> list[str]:
    """Paths that complete ``typed``: folders (ending in ``/``) and files with one of
    ``suffixes`` (any file when empty), sorted, hidden ones only when asked for."""
    text = os.path.expanduser(typed)
    folder, _, stem = text.rpartition("/")
    base = Path(folder + "/" if folder or text.startswith("/") else ".")
    try:
        entries = list(os.scandir(base))
    except OSError:
        return []
    out = []
    for entry in entries:
        if not entry.name.startswith(stem) or (entry.name.startswith(".") and not stem):
            continue
        try:
            is_dir = entry.is_dir()
        except OSError:
            continue
        if not is_dir and suffixes and not entry.name.lower().endswith(suffixes):
            continue
        prefix = typed[: len(typed) - len(stem)]
        out.append(prefix + entry.name + ("/" if is_dir else ""))
    return sorted(out)


def common_prefix(items: list[str]) -> str:
    return os.path.commonprefix(items) if items else ""


class PathSuggester(Suggester):
    """Completes a path as far as every match agrees (the one match, whole)."""

    def __init__(self, suffixes: tuple[str, ...] = ()) -> None:
        super().__init__(use_cache=False, case_sensitive=True)
        self.suffixes = suffixes

    async def get_suggestion(self, value: str) -> str | None:
        matches = path_matches(value, self.suffixes)
        best = common_prefix(matches)
        return best if len(best) > len(value) else None
