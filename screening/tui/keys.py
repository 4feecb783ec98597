"""Every key of the corridor screen as data: the bindings, the help screen and the
command palette are all built from this one table, so they cannot drift apart."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class KeyAction:
    """One thing the user can do from the corridor screen."""

    action: str
    """Textual action name (``action_<name>`` on the app or the screen)."""
    keys: str
    """Comma-separated Textual key names; the first is the one shown."""
    title: str
    """Short label for the footer and the command palette."""
    help: str
    """One sentence for the help screen and the palette."""
    group: str
    """Heading it is listed under in the help screen."""
    footer: bool = False
    """Shown in the footer."""


ACTIONS: tuple[KeyAction, ...] = (
    # -- looking
    KeyAction(
        "open_detail",
        "enter",
        "Detail",
        "Open the selected segment's checks, layers and sketch.",
        "Look",
        True,
    ),
    KeyAction(
        "edit_segment",
        "e",
        "Edit",
        "Edit the selected segment; valid values re-screen it at once.",
        "Look",
        True,
    ),
    KeyAction(
        "mark_range",
        "space",
        "Mark",
        "Start (or clear) a range at the cursor; the range runs to the cursor.",
        "Look",
    ),
    KeyAction(
        "next_referred",
        "n",
        "Next refer",
        "Move the cursor to the next segment referred to full design.",
        "Look",
    ),
    # -- what the table shows
    KeyAction(
        "fold_wall",
        "z",
        "Fold",
        "Fold the cursor's wall to its summary line, or unfold it (Enter on a wall's line too).",
        "Show",
    ),
    KeyAction("fold_all", "Z", "Fold all", "Fold every wall, or unfold them all.", "Show"),
    KeyAction(
        "toggle_grouping",
        "g",
        "Group",
        "Group the table by wall with a summary line each, or show one flat list.",
        "Show",
    ),
    KeyAction(
        "sort",
        "o",
        "Sort",
        "Sort the segments of each wall by any column (the same column again reverses).",
        "Show",
    ),
    KeyAction("filter_wall", "w", "Wall", "Show one wall only, or every wall.", "Show"),
    KeyAction(
        "filter_verdict",
        "V",
        "Verdicts",
        "Show only referred, flagged (refer and marginal), marginal or clear segments.",
        "Show",
    ),
    KeyAction(
        "filter_text",
        "slash",
        "Find",
        "Show only segments whose id, wall, note, presets or reasons contain some words.",
        "Show",
    ),
    KeyAction(
        "layout_problems",
        "exclamation_mark",
        "Gaps",
        "List the overlaps and gaps between segments of one wall, and go to one.",
        "Show",
    ),
    # -- corridor operations
    KeyAction(
        "add_segment",
        "a",
        "Add",
        "Add a segment after the selected one, continuing its chainage.",
        "Corridor",
        True,
    ),
    KeyAction(
        "duplicate_segment",
        "c",
        "Copy",
        "Duplicate the selected segment (placed right after it).",
        "Corridor",
    ),
    KeyAction(
        "split_segment",
        "s",
        "Split",
        "Split the selected segment at a chainage you type.",
        "Corridor",
    ),
    KeyAction(
        "delete_segment",
        "x,delete",
        "Delete",
        "Delete the selected segment, or the marked range.",
        "Corridor",
    ),
    KeyAction(
        "bulk_edit",
        "b",
        "Bulk edit",
        "Set one field for every segment of the marked range (on a wall's line: the wall).",
        "Corridor",
        True,
    ),
    KeyAction(
        "switch_factor_set",
        "f",
        "Factor set",
        "Switch the factor set of the whole corridor and re-screen.",
        "Corridor",
        True,
    ),
    KeyAction(
        "rescreen",
        "ctrl+r",
        "Re-screen",
        "Screen the whole corridor again (in the background).",
        "Corridor",
    ),
    KeyAction(
        "cancel_screen",
        "escape",
        "Cancel",
        "Cancel a running screen, or clear the marked range, or show every segment again.",
        "Corridor",
    ),
    KeyAction("undo", "u,ctrl+z", "Undo", "Undo the last change.", "Corridor", True),
    KeyAction("redo", "ctrl+y,U", "Redo", "Redo the change just undone.", "Corridor"),
    # -- files
    KeyAction(
        "new_corridor",
        "ctrl+n",
        "New",
        "Start an empty corridor (asks first if there are unsaved changes).",
        "Files",
    ),
    KeyAction(
        "open_file",
        "ctrl+o",
        "Open",
        "Open a corridor file (asks first if there are unsaved changes).",
        "Files",
    ),
    KeyAction(
        "save",
        "ctrl+s",
        "Save",
        "Save the corridor and its results (atomic; keeps a .bak).",
        "Files",
        True,
    ),
    KeyAction("save_as", "S", "Save as", "Save the corridor under a new path.", "Files"),
    KeyAction(
        "recent_files", "r", "Recent", "Choose one of the recently opened corridor files.", "Files"
    ),
    # -- corridor tools
    KeyAction(
        "quantities",
        "m",
        "Quantities",
        "Quantities and rough cost of the corridor, segment by segment (placeholder rates).",
        "Tools",
    ),
    KeyAction(
        "sensitivity",
        "v",
        "Sensitivity",
        "Which inputs move the selected segment's verdict or L most (opens its detail).",
        "Tools",
    ),
    KeyAction(
        "export_report",
        "E",
        "Export report",
        "Write a report of the corridor (.html, .md or .csv) to a path you type.",
        "Tools",
    ),
    KeyAction(
        "compare_file",
        "d",
        "Compare",
        "Compare the corridor with another corridor file: inputs and outcomes that moved.",
        "Tools",
    ),
    KeyAction(
        "toggle_units",
        "t",
        "Units",
        "Show lengths, pressures and weights in SI or US customary units (files stay SI).",
        "Tools",
    ),
    # -- help
    KeyAction(
        "presets",
        "p",
        "Presets",
        "Browse the fills, reinforcement and factor sets with their values and sources.",
        "Help",
    ),
    KeyAction("help", "question_mark,f1", "Keys", "List every key.", "Help", True),
    KeyAction(
        "about",
        "i",
        "About",
        "About wallscreen, and the cautions that go with every screen.",
        "Help",
    ),
    KeyAction(
        "quit", "q,ctrl+q", "Quit", "Quit (asks first if there are unsaved changes).", "Help", True
    ),
)


def shown_key(keys: str) -> str:
    """The key as a person reads it: ``question_mark`` -> ``?``, ``ctrl+r`` -> ``^r``."""
    first = keys.split(",")[0]
    names = {
        "question_mark": "?",
        "enter": "Enter",
        "escape": "Esc",
        "space": "Space",
        "delete": "Del",
        "slash": "/",
        "exclamation_mark": "!",
    }
    if first in names:
        return names[first]
    if first.startswith("ctrl+"):
        return "^" + first[5:]
    return first


def all_keys(keys: str) -> str:
    """Every key of an action, readable, joined by ' / '."""
    return " / ".join(shown_key(k) for k in keys.split(","))


def binding_for(action: str, *, show: bool | None = None):
    """The Textual binding of one action of the table, for a screen that offers it too
    (the detail view's sensitivity and units keys)."""
    from textual.binding import Binding

    a = next(a for a in ACTIONS if a.action == action)
    return Binding(
        a.keys, a.action, a.title, show=a.footer if show is None else show, tooltip=a.help
    )
