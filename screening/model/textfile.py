"""Reading a file as text, and naming what it is when it is not a TOML corridor file.

:func:`read_text` gives the file's UTF-8 text or one :class:`InputError` saying why not: not
found, a folder, no permission, UTF-16, a byte-order mark, binary data, bytes that are not
UTF-8. :func:`not_toml` looks at a text that failed to parse as TOML and says what it is
instead (JSON, XML such as a LandXML profile, a CSV table, a spreadsheet), so a person who
gave the wrong file is told so rather than shown a syntax error on line 1.
"""

from __future__ import annotations

import json
import re
from importlib.resources.abc import Traversable
from pathlib import Path

from screening.model.errors import InputError

SAVE_AS_UTF8 = "save it as UTF-8 text"

_MAGIC = (
    (b"PK\x03\x04", "a ZIP archive (a spreadsheet such as .xlsx or .ods?)"),
    (b"%PDF", "a PDF document"),
    (b"\x89PNG", "a PNG picture"),
    (b"\xff\xd8\xff", "a JPEG picture"),
    (b"\x1f\x8b", "a gzip archive"),
    (b"\xd0\xcf\x11\xe0", "an old Office document (.xls or .doc?)"),
)
"""Start of a few binary formats a person might pick by mistake."""

NOT_A_CORRIDOR = 'not a TOML corridor file (a corridor file starts with schema = "wallscreen/1")'
FROM_PROFILE = "to build a corridor from a profile: wallscreen new FILE --from-profile PROFILE"


def decode(data: bytes, source: str) -> str:
    """``data`` as UTF-8 text, or the InputError that names what it is."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")) or (
        len(data) >= 4 and (data[1:4:2] == b"\x00\x00" or data[0:4:2] == b"\x00\x00")
    ):
        raise InputError(f"is UTF-16 text, not UTF-8: {SAVE_AS_UTF8}", file=source)
    if data.startswith(b"\xef\xbb\xbf"):
        raise InputError(
            "starts with a byte-order mark (BOM), which TOML readers refuse: save it as "
            'UTF-8 without BOM (editors often call it plain "UTF-8")',
            file=source,
        )
    for magic, what in _MAGIC:
        if data.startswith(magic):
            raise InputError(f"is {what}, {NOT_A_CORRIDOR}", file=source)
    nul = data.find(b"\x00", 0, 8192)
    if nul >= 0:
        raise InputError(
            f"is not a text file (a NUL byte at byte {nul}); {NOT_A_CORRIDOR}", file=source
        )
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as err:
        line = data.count(b"\n", 0, err.start) + 1
        raise InputError(
            f"not a UTF-8 text file (byte {err.start}, on line {line}, is not UTF-8): "
            f"{SAVE_AS_UTF8}",
            file=source,
        ) from None


def read_text(path: Path | Traversable, source: str | None = None) -> str:
    """The file's text, or an InputError saying why it cannot be read."""
    source = source or str(path)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        raise InputError("file not found", file=source) from None
    except IsADirectoryError:
        raise InputError("is a folder, not a file", file=source) from None
    except PermissionError:
        raise InputError("cannot be read (permission denied)", file=source) from None
    except OSError as err:
        raise InputError(f"cannot be read ({err.strerror or err})", file=source) from None
    return decode(data, source)


_SUFFIX = {
    ".json": "a JSON file",
    ".csv": "a CSV table (a profile?)",
    ".txt": None,
    ".xml": "an XML file (a LandXML profile?)",
    ".landxml": "an XML file (a LandXML profile?)",
    ".yaml": "a YAML file",
    ".yml": "a YAML file",
    ".xlsx": "a spreadsheet",
    ".ods": "a spreadsheet",
}
_PROFILES = (".csv", ".xml", ".landxml")


def not_toml(text: str, source: str) -> str | None:
    """What ``text`` is when it is plainly not TOML (called once TOML parsing has failed),
    in words for an error message; None when it looks like TOML with a mistake in it."""
    head = text.lstrip()
    if head.startswith("{") or (head.startswith("[") and _is_json(head)):
        return f"this is JSON, {NOT_A_CORRIDOR}"
    if head.startswith("<"):
        return f"this is XML (a LandXML profile?), {NOT_A_CORRIDOR}; {FROM_PROFILE}"
    first = head.split("\n", 1)[0]
    if "=" not in first and not first.startswith(("[", "#")) and re.search(r"[,;\t]", first):
        return f"this looks like a CSV table (a profile?), {NOT_A_CORRIDOR}; {FROM_PROFILE}"
    suffix = Path(source).suffix.lower()
    what = _SUFFIX.get(suffix)
    if what is not None:
        hint = f"; {FROM_PROFILE}" if suffix in _PROFILES else ""
        return f"this is {what}, {NOT_A_CORRIDOR}{hint}"
    return None


def _is_json(text: str) -> bool:
    try:
        json.loads(text)
    except ValueError:
        return False
    return True
