"""Corridor files (schema ``wallscreen/1``) to and from the model (``reading``); the TOML
layout of the text (``toml_layout``)."""

from screening.store.reading import (
    SEGMENT_FIELDS,
    StoredScreen,
    check_segment,
    coerce_field,
    dumps,
    load,
    load_with_screen,
    loads,
    save,
    stored_screen,
)

__all__ = [
    "SEGMENT_FIELDS",
    "StoredScreen",
    "check_segment",
    "coerce_field",
    "dumps",
    "load",
    "loads",
    "save",
    "stored_screen",
    "load_with_screen",
]
