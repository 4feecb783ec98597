"""Comments a person typed into a corridor file, carried across a save.

The store writes the whole file from the inputs (``writing.dumps``), which would drop every
comment. :func:`carry_comments` takes the old text and the new one and puts each comment of
the old text back beside what it was written against: a comment on its own lines goes above
the same key (or table header) of the same table, a comment after a value goes after the
same key's value. Tables are matched by name and segments by id (so a comment follows its
segment when segments are reordered; a segment whose id changed keeps its comments when it
is at the same place). A comment whose key is no longer written (a value that now equals
``[defaults]``) goes under its table's header; one whose table is gone goes to the end of the
file; only the comments of a deleted segment go with it.

This is a line scan (strings, brackets and multi-line strings are followed so a ``#`` inside
text is not taken for a comment), O(lines); the new text's values are never touched, so what
a load reads is exactly what ``dumps`` wrote. Blank lines of the old text are not kept, except one after a comment that stood apart.
"""

from __future__ import annotations

import re
import tomllib
from array import array
from dataclasses import dataclass

_TOKEN = re.compile(r'"""|\'\'\'|"(?:[^"\\\n]|\\.)*"|\'[^\'\n]*\'|#|[\[\]{}]')
_HEADER = re.compile(r"^\s*(\[\[?)\s*([^\]#]+?)\s*\]\]?")
_KEY = re.compile(r"""^\s*([A-Za-z0-9_\-]+|"[^"]*"|'[^']*')\s*(?:\.[^=]*)?=""")
_CORRIDOR = re.compile(r'^\s*schema\s*=\s*"wallscreen/', re.MULTILINE)


@dataclass(slots=True)
class _Block:
    """Lines from one table header to the next (the keys before any header: section "")."""

    section: str
    segment: int
    """Index of the [[segment]] the block belongs to (-1: none)."""
    repeat: int
    """Count of this header before it, within its segment or the file."""
    before: list[str] | None = None
    """Comment lines just above the header."""
    trail: str | None = None
    """Comment after the header on its line."""
    keys: dict[str, list[str]] | None = None
    """Comment lines above each key (and inside its multi-line value)."""
    trails: dict[str, str] | None = None
    """Comment after each key's value."""
    seg_id: str | None = None


class _Lines:
    """Per line of a text: its block, its key (or None) and whether it holds the key's
    whole value, in compact arrays (a tuple per line costs six times more: 100,000
    segments are millions of lines)."""

    __slots__ = ("block", "key", "whole")

    def __init__(self) -> None:
        self.block = array("i")
        self.key: list[str | None] = []
        self.whole = bytearray()

    def append(self, item: tuple[int, str | None, bool]) -> None:
        self.block.append(item[0])
        self.key.append(item[1])
        self.whole.append(item[2])

    def __iter__(self):
        return zip(self.block, self.key, map(bool, self.whole), strict=True)

    def __len__(self) -> int:
        return len(self.key)


@dataclass
class _Scan:
    blocks: list[_Block]
    end: list[str]
    """Comment lines after the last key of the file."""
    lines: _Lines
    """Per line: block index, key (None for a header or any other line), and whether the
    line holds the key's whole value (a comment may follow it on the line)."""
    heads: set[int]
    """Line numbers (0-based) of the table headers."""
    segment_ids: list[str | None]


def _lex(line: str, state: str | None, depth: int) -> tuple[str | None, int, int | None]:
    """Follow strings and brackets along ``line``: (multi-line string still open, bracket
    depth, column of a comment ``#`` or None)."""
    pos = 0
    if state is not None:
        close = line.find(state)
        if close < 0:
            return state, depth, None
        pos = close + 3
        state = None
    while True:
        m = _TOKEN.search(line, pos)
        if m is None:
            return None, depth, None
        tok = m.group()
        if tok in ('"""', "'''"):
            close = line.find(tok, m.end())
            if close < 0:
                return tok, depth, None
            pos = close + 3
            continue
        if tok == "#":
            return None, depth, m.start()
        if tok in "[{":
            depth += 1
        elif tok in "]}":
            depth = max(depth - 1, 0)
        pos = m.end()


def toml_lines(text: str) -> list[str]:
    """The lines of a TOML text. TOML ends lines with LF or CRLF only: ``str.splitlines``
    would also split at characters a string may hold (U+0085, U+2028, form feed ...)."""
    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    return [line[:-1] if line.endswith("\r") else line for line in lines]


def _section(raw: str) -> str:
    return ".".join(p.strip().strip("\"'") for p in raw.split("."))


def _scan(text: str, skip: frozenset[str] = frozenset()) -> _Scan:
    blocks = [_Block("", -1, 0)]
    lines = _Lines()
    heads: set[int] = set()
    segment_ids: list[str | None] = []
    repeats: dict[tuple[str, int], int] = {}
    pending: list[str] = []
    state: str | None = None
    depth = 0
    key: str | None = None  # the key whose multi-line value we are inside
    for line in toml_lines(text):
        block = blocks[-1]
        if state is not None or depth > 0:  # inside a value that started on an earlier line
            state, depth, col = _lex(line, state, depth)
            if col is not None and key is not None:
                block.keys = block.keys or {}
                block.keys.setdefault(key, []).append(line[col:].rstrip())
            lines.append((len(blocks) - 1, None, False))
            continue
        stripped = line.strip()
        if not stripped:
            if pending and pending[-1]:
                pending.append("")  # a blank line between a comment and what follows
            lines.append((len(blocks) - 1, None, False))
            continue
        if stripped.startswith("#"):
            if stripped not in skip:
                pending.append(stripped)
            lines.append((len(blocks) - 1, None, False))
            continue
        head = _HEADER.match(line) if stripped.startswith("[") else None
        if head is not None:
            section = _section(head.group(2))
            if section == "segment" and head.group(1) == "[[":
                segment_ids.append(None)
            seg = len(segment_ids) - 1 if section.split(".")[0] == "segment" else -1
            count = repeats.get((section, seg), 0)
            repeats[(section, seg)] = count + 1
            block = _Block(section, seg, count, before=pending or None)
            blocks.append(block)
            pending = []
            _, _, col = _lex(line[head.end() :], None, 0)
            if col is not None:
                block.trail = line[head.end() + col :].rstrip()
            heads.add(len(lines))
            lines.append((len(blocks) - 1, None, False))
            continue
        km = _KEY.match(line)
        key = km.group(1).strip("\"'") if km else None
        state, depth, col = _lex(line, None, 0)
        if key is None:
            lines.append((len(blocks) - 1, None, False))
            continue
        if pending:
            block.keys = block.keys or {}
            block.keys.setdefault(key, []).extend(pending)
            pending = []
        if col is not None:
            block.trails = block.trails or {}
            block.trails[key] = line[col:].rstrip()
        if key == "id" and block.section == "segment" and block.segment >= 0:
            try:
                value = tomllib.loads(line[: col if col is not None else len(line)])
                segment_ids[block.segment] = str(value["id"])
            except (tomllib.TOMLDecodeError, KeyError):
                pass
        whole = state is None and depth == 0 and col is None
        lines.append((len(blocks) - 1, key, whole))
    for block in blocks:
        if block.segment >= 0:
            block.seg_id = segment_ids[block.segment]
    return _Scan(blocks, pending, lines, heads, segment_ids)


def _identity(block: _Block, seg_id: str | None) -> tuple[str, str | None, int]:
    return (block.section, seg_id, block.repeat)


def has_comments(text: str, header: str = "") -> bool:
    """Whether ``text`` may hold comments beyond ``header`` (a quick test: any ``#``)."""
    start = len(header) if text.startswith(header) else 0
    return "#" in text[start:]


def carry_comments(old: str, new: str, header: str = "") -> str:
    """``new`` with the comments of ``old`` put back beside what they were written against.

    ``header``: comment lines the writer puts at the top of every file (not carried twice).
    ``old`` that is not a corridor file gives ``new`` unchanged.
    """
    if not has_comments(old, header) or not _CORRIDOR.search(old):
        return new
    skip = frozenset(line.strip() for line in header.splitlines() if line.strip())
    was = _scan(old, skip)
    now = _scan(new)
    now_ids = now.segment_ids
    new_set = set(now_ids)
    old_set = set(was.segment_ids)

    def matched(seg: int, seg_id: str | None) -> str | None:
        """The id, in the new text, of the old text's segment ``seg``."""
        if seg_id in new_set:
            return seg_id
        if seg < len(now_ids) and now_ids[seg] not in old_set:
            return now_ids[seg]  # renamed in place
        return None

    by_identity = {_identity(b, b.seg_id): i for i, b in enumerate(now.blocks)}
    segment_head = {
        b.seg_id: i for i, b in enumerate(now.blocks) if b.section == "segment" and b.repeat == 0
    }
    above_key: dict[tuple[int, str], list[str]] = {}
    after_key: dict[tuple[int, str], str] = {}
    above_head: dict[int, list[str]] = {}
    under_head: dict[int, list[str]] = {}
    after_head: dict[int, str] = {}
    end = list(was.end)
    for block in was.blocks:
        if not (block.before or block.trail or block.keys or block.trails):
            continue
        block.before, block.keys, block.trails = (
            block.before or [],
            block.keys or {},
            block.trails or {},
        )
        seg_id = block.seg_id
        if block.segment >= 0:
            seg_id = matched(block.segment, seg_id)
            if seg_id is None:
                continue  # a deleted segment: its comments go with it
        target = by_identity.get(_identity(block, seg_id))
        if target is None:  # the table is no longer written as a section
            parent = segment_head.get(seg_id) if block.segment >= 0 else None
            lines = [*block.before, *([block.trail] if block.trail else [])]
            for key, notes in block.keys.items():
                lines.extend(notes)
                if key in block.trails:
                    lines.append(block.trails[key])
            lines.extend(t for k, t in block.trails.items() if k not in block.keys)
            if parent is None:
                end.extend(lines)
            else:
                under_head.setdefault(parent, []).extend(lines)
            continue
        if block.before:
            above_head.setdefault(target, []).extend(block.before)
        if block.trail:
            after_head[target] = block.trail
        for key, notes in block.keys.items():
            above_key.setdefault((target, key), []).extend(notes)
        for key, note in block.trails.items():
            after_key[(target, key)] = note

    present = {(b, k) for b, k, _ in now.lines if k is not None}
    for (target, key), notes in list(above_key.items()):
        if (target, key) not in present:
            under_head.setdefault(target, []).extend(notes)
            del above_key[(target, key)]
    for (target, key), note in list(after_key.items()):
        if (target, key) not in present:
            under_head.setdefault(target, []).append(note)
            del after_key[(target, key)]

    out: list[str] = []
    pairs = zip(toml_lines(new), now.lines, strict=True)
    for n, (line, (b, key, whole)) in enumerate(pairs):
        if n in now.heads:
            out.extend(above_head.get(b, ()))
            trail = after_head.get(b)
            out.append(f"{line}  {trail}" if trail else line)
            out.extend(under_head.get(b, ()))
            continue
        if key is not None and (b, key) in above_key:
            out.extend(above_key.pop((b, key)))
        note = after_key.pop((b, key), None) if key is not None else None
        if note is not None and not whole:
            out.append(note)
            note = None
        out.append(f"{line}  {note}" if note else line)
    # keys before any header whose key vanished, and the old file's last comments
    out.extend(under_head.get(0, ()))
    out.extend(end)
    return "\n".join(out) + "\n"
