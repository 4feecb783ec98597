"""Corridor files (schema ``wallscreen/1``) to and from the model.

``load``/``loads`` read and check a corridor file (``reading``); ``save``/``dumps`` write
it back with the screen's outcome, atomically, keeping the old file as ``<name>.bak``
(``writing``); ``toml_layout`` is how the text is laid out. ``load(save(x)) == x``.
"""

from screening.model.validate import SEGMENT_FIELDS, check_segment, coerce_field
from screening.store.reading import StoredScreen, load, load_with_screen, loads, stored_screen
from screening.store.writing import dumps, save

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
