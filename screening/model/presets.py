"""The presets shipped in ``presets/``: fills, reinforcement, factor sets, rules, demo.

``load_presets()`` reads the four preset files once and caches them; a bad preset file
raises :class:`~screening.model.errors.InputError` with its file, line and column like any
corridor file. The folder is found both in a checkout (editable install) and in an
installed wheel, where ``presets/`` is packaged as ``screening/presets``.
"""

from __future__ import annotations

import functools
import importlib.resources
import re
import tomllib
from dataclasses import dataclass
from importlib.resources.abc import Traversable
from pathlib import Path
from typing import Any

from screening.model import inputs as model
from screening.model.errors import InputError
from screening.model.schema import SourceMap, Where, build, suggest, table
from screening.model.textfile import read_text

try:  # the same parser as tomllib (its upstream), compiled: about twice as fast
    import tomli as _fast_toml
except ImportError:  # pragma: no cover - a plain install of the standard library's only
    _fast_toml = tomllib

FILES = {
    "fills": "fills.toml",
    "reinforcement": "reinforcement.toml",
    "factor_sets": "factor-sets.toml",
    "rules": "rules.toml",
}
DEMO_CORRIDOR = "demo-corridor.toml"

_ID = re.compile(r"^[a-z0-9][a-z0-9\-]*$")


@dataclass(frozen=True)
class Presets:
    """Everything in the presets folder, by id."""

    fills: dict[str, model.Fill]
    reinforcement: dict[str, model.Reinforcement]
    factor_sets: dict[str, model.FactorSet]
    rules: model.Rules
    root: str = ""
    """Folder they were read from (for messages and the presets browser)."""

    def __hash__(self) -> int:
        return hash(self.root)


def presets_root() -> Traversable:
    """The presets folder: ``screening/presets`` in a wheel, ``presets/`` in a checkout."""
    packaged = importlib.resources.files("screening") / "presets"
    if packaged.is_dir():
        return packaged
    checkout = Path(__file__).resolve().parents[2] / "presets"
    if checkout.is_dir():
        return checkout
    raise InputError("the presets folder is missing from this installation; reinstall wallscreen")


def demo_corridor_path() -> Path:
    """Path of the shipped demo corridor (read it; never save over it)."""
    return Path(str(presets_root() / DEMO_CORRIDOR))


FRIENDLY = {
    "Illegal character '\\n'": "a line ends inside a string: is a closing quote missing?",
    "Invalid value": (
        'not a valid value: text needs quotes ("..."), numbers a dot (1.5), '
        "true/false are lower case"
    ),
    "Unclosed array": "an array [ ... ] is not closed with ]",
    "Unclosed inline table": "an inline table { ... } must close with } on the same line",
}
"""tomllib messages that read better in our words."""


def parse_toml(text: str, source: str) -> dict[str, Any]:
    """``tomllib.loads`` with its error turned into ``file:line:column: TOML syntax: ...``.

    The text is parsed by ``tomli`` (TOML 1.0 up to 2.3, the code tomllib was taken from)
    when it is installed; a text it refuses is parsed again by ``tomllib``, so every
    message is the standard library's, whichever parser is installed."""
    try:
        return _fast_toml.loads(text)
    except _fast_toml.TOMLDecodeError:
        pass
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        msg = str(err)
        line: int | None = text.count("\n") + 1
        column: int | None = None
        m = re.search(r"\s*\(at line (\d+), column (\d+)\)$", msg)
        if m:
            line, column = int(m.group(1)), int(m.group(2))
        m = m or re.search(r"\s*\(at end of document\)$", msg)
        msg = msg[: m.start()] if m else msg
        if msg.startswith(("Cannot overwrite", "Cannot declare")):
            repeat = SourceMap(text).repeats[:1]
            if repeat:
                name, line, column, first = repeat[0]
                msg = f"{name} is given twice (first on line {first})"
        lines = text.split("\n")  # TOML's line ends, not str.splitlines's
        here = lines[line - 1] if line is not None and 0 < line <= len(lines) else ""
        if here.count("{") > here.count("}"):
            msg = "Unclosed inline table"
        msg = FRIENDLY.get(msg, msg[:1].lower() + msg[1:])
        raise InputError(f"TOML syntax: {msg}", file=source, line=line, column=column) from None


def _families(doc: dict[str, Any], key: str, cls: type, where: Where) -> dict[str, Any]:
    if set(doc) != {key}:
        bad = next((k for k in doc if k != key), None)
        if bad is None:
            raise where.error(None, f"no [{key}.<id>] table in this file")
        raise where.error(bad, suggest(bad, [key]), at_value=False)
    out = {}
    for pid, tab in table(doc[key], key, where).items():
        here = Where(where.file, table=f"{key}.{pid}", section=(f"{key}.{pid}", 0), smap=where.smap)
        if not _ID.match(pid):
            raise here.error(None, "preset ids use lower-case letters, digits and hyphens")
        extra: dict[str, Any] = {"id": pid}
        out[pid] = build(cls, tab, here, inline=False, extra=extra)
    return out


def _load_one(root: Path | Traversable, name: str) -> tuple[dict[str, Any], Where]:
    path = root / name
    source = str(path)
    text = read_text(path, source)
    return parse_toml(text, source), Where(source, section=("", 0), smap=SourceMap(text))


@functools.lru_cache(maxsize=8)
def _load_cached(root_str: str | None) -> Presets:
    root = presets_root() if root_str is None else Path(root_str)
    doc, where = _load_one(root, FILES["fills"])
    fills = _families(doc, "fill", model.Fill, where)
    doc, where = _load_one(root, FILES["reinforcement"])
    reinforcement = _families(doc, "reinforcement", model.Reinforcement, where)
    doc, where = _load_one(root, FILES["factor_sets"])
    factor_sets = _families(doc, "factor_set", model.FactorSet, where)
    doc, where = _load_one(root, FILES["rules"])
    for key in doc:
        if key != "rules":
            raise where.error(key, suggest(key, ["rules"]), at_value=False)
    rules_where = Where(where.file, table="rules", section=("rules", 0), smap=where.smap)
    rules = build(model.Rules, doc.get("rules", {}), rules_where, inline=False)
    return Presets(fills, reinforcement, factor_sets, rules, root=str(root))


def load_presets(root: str | Path | None = None) -> Presets:
    """The presets in ``root`` (default: the shipped folder), read once and cached."""
    return _load_cached(None if root is None else str(Path(root).resolve()))
