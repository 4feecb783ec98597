"""Where a value sits in a TOML text, and where a table sits in the model: for messages.

:class:`SourceMap` is a light scan of the text (not a parser) that finds the line and
column of each key, and the keys or tables given twice. :class:`Where` carries the file,
the segment or table, the field path and the source map, and makes the one
:class:`~screening.model.errors.InputError` a problem deserves.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass

from screening.model.errors import InputError

# ------------------------------------------------------------------ source map

_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]]+?)\s*\]\]?")
_KEY = re.compile(r"""^(\s*)([A-Za-z0-9_\-]+|"[^"]*"|'[^']*')\s*(\.[^=]*)?=\s*""")


class SourceMap:
    """Where each key of a TOML text is: ``(section, index, key) -> (line, key col, value col)``.

    ``section`` is the dotted header path (``"segment"``, ``"fill.cohesive"``; ``""`` for
    the keys before any header), ``index`` counts repeats of an ``[[array]]`` header.
    A light scan, not a parser: it only places messages, so a miss just drops the line.
    The scan runs on first use, so a file without problems never pays for it.
    """

    def __init__(self, text: str) -> None:
        self._text = text
        self._scanned = False

    def __getattr__(self, name: str):
        if name in ("keys", "headers", "repeats") and not self.__dict__.get("_scanned"):
            self._scan(self._text)
            self._scanned = True
            return self.__dict__[name]
        raise AttributeError(name)

    def _scan(self, text: str) -> None:
        self.keys: dict[tuple[str, int, str], tuple[int, int, int]] = {}
        self.headers: dict[tuple[str, int], int] = {("", 0): 1}
        self.repeats: list[tuple[str, int, int, int]] = []
        """Keys or tables given twice: (words naming it, line, column, first line)."""
        counts: dict[str, int] = {}
        declared: dict[str, int] = {}  # [table] -> line, forgotten when its [[parent]] repeats
        block: dict[str, int] = {}  # key -> line, within the current header
        section, index = "", 0
        fence: str | None = None
        for lineno, line in enumerate(text.split("\n"), start=1):  # LF, not U+2028 &c.
            if fence is not None:
                if line.count(fence) % 2 == 1:
                    fence = None
                continue
            head = _HEADER.match(line)
            if head:
                section = ".".join(p.strip().strip("\"'") for p in head.group(2).split("."))
                block = {}
                if head.group(1) == "[[":
                    index = counts.get(section, 0)
                    counts[section] = index + 1
                    for path in [p for p in declared if p.startswith(section + ".")]:
                        del declared[path]
                else:
                    index = 0
                    if section in declared:
                        what = f"the table [{section}]"
                        self.repeats.append((what, lineno, 1, declared[section]))
                    declared.setdefault(section, lineno)
                self.headers.setdefault((section, index), lineno)
                continue
            key = _KEY.match(line)
            if key:
                name = key.group(2).strip("\"'")
                col = len(key.group(1)) + 1
                if name in block:
                    self.repeats.append((f'the key "{name}"', lineno, col, block[name]))
                block.setdefault(name, lineno)
                self.keys.setdefault((section, index, name), (lineno, col, key.end() + 1))
                rest = line[key.end() :]
                for q in ('"""', "'''"):
                    if rest.count(q) % 2 == 1:
                        fence = q

    def find(
        self, section: str, index: int, key: str | None, *, at_value: bool = True
    ) -> tuple[int | None, int | None]:
        """(line, column) of ``key`` in that section, else of the section header."""
        if key is not None and (section, index, key) in self.keys:
            line, kcol, vcol = self.keys[(section, index, key)]
            return line, vcol if at_value else kcol
        if section == "" and key is not None and (key, 0) in self.headers:
            return self.headers[(key, 0)], 1
        if (section, index) in self.headers:
            return self.headers[(section, index)], 1
        return None, None


# ------------------------------------------------------------------ where


@dataclass(frozen=True)
class Where:
    """Where a table sits: enough to write one precise error message."""

    file: str
    segment: str | None = None
    table: str | None = None
    prefix: str = ""
    """Field path so far, e.g. ``"fill."``."""
    section: tuple[str, int] | None = None
    """Source-map section whose keys are this table's keys."""
    anchor: str | None = None
    """Key of ``section`` that holds this (inline) table: its line places everything inside."""
    smap: SourceMap | None = None

    def inline(self, key: str) -> Where:
        """The inline table (or array) under ``key``."""
        return dataclasses.replace(self, prefix=f"{self.prefix}{key}.", anchor=self.anchor or key)

    def item(self, key: str, i: int, section: tuple[str, int] | None) -> Where:
        """Item ``i`` of the array under ``key``; ``section`` when it has its own header."""
        prefix = f"{self.prefix}{key}[{i + 1}]."
        if section is not None:
            return dataclasses.replace(self, prefix=prefix, section=section, anchor=None)
        return dataclasses.replace(self, prefix=prefix, anchor=self.anchor or key)

    def error(self, key: str | None, message: str, *, at_value: bool = True) -> InputError:
        field = f"{self.prefix}{key}" if key is not None else (self.prefix.rstrip(".") or None)
        line = column = None
        if self.smap is not None and self.section is not None:
            look = self.anchor or key
            line, column = self.smap.find(*self.section, look, at_value=at_value)
        return InputError(
            message,
            file=self.file,
            line=line,
            column=column,
            segment=self.segment,
            table=None if self.segment is not None else self.table,
            field=field,
        )
