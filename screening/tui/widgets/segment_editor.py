"""The segment editor: every input of the selected segment, checked as you type.

Each field is an ``Input`` with its label, unit and a line under it. The screen that owns
the editor listens to ``Input.Changed`` from it, tries the value through the session and
calls :meth:`SegmentEditor.show_problem` with the reason when the value is refused: the
field turns red and the value is not applied.
"""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal, VerticalScroll
from textual.widgets import Input, Label, Static

from screening.model import Segment
from screening.tui.fields import FIELDS, display


def input_id(name: str) -> str:
    return "field-" + name.replace(".", "--")


def field_of(widget_id: str) -> str:
    return widget_id.removeprefix("field-").replace("--", ".")


class SegmentEditor(VerticalScroll):
    """Form for one segment; hidden until the user asks to edit."""

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self.segment_id: str | None = None
        self.problems: dict[str, str] = {}
        """Field -> reason its typed value was refused."""

    def compose(self) -> ComposeResult:
        yield Static("", id="editor-title")

    async def build(self) -> None:
        """Mount the fields on first use: a quicker first frame for the corridor screen."""
        if self.query(".field-row"):
            return
        widgets = []
        for spec in FIELDS:
            widgets.append(
                Horizontal(
                    Label(spec.label, classes="field-label"),
                    Input(
                        id=input_id(spec.name),
                        placeholder=spec.hint,
                        classes="field-input",
                        select_on_focus=False,
                    ),
                    Label(spec.unit, classes="field-unit"),
                    classes="field-row",
                )
            )
            why = Static("", id=input_id(spec.name) + "-why", classes="field-why")
            why.display = False
            widgets.append(why)
        widgets.append(
            Static(
                "Enter / Esc: back to the table · every valid value is applied as you type",
                classes="editor-help",
            )
        )
        await self.mount_all(widgets)

    def load(self, segment: Segment) -> None:
        """Fill the form from ``segment`` without treating it as an edit."""
        self.segment_id = segment.id
        self.query_one("#editor-title", Static).update(Text(f"Segment {segment.id}", style="bold"))
        for spec in FIELDS:
            box = self.query_one("#" + input_id(spec.name), Input)
            with box.prevent(Input.Changed):
                box.value = display(segment, spec.name)
            self.show_problem(spec.name, None)

    def refresh_values(self, segment: Segment, skip: str | None = None) -> None:
        """Show the segment's values again, except in the field being typed in."""
        self.segment_id = segment.id
        for spec in FIELDS:
            if spec.name == skip:
                continue
            box = self.query_one("#" + input_id(spec.name), Input)
            text = display(segment, spec.name)
            if box.value != text:
                with box.prevent(Input.Changed):
                    box.value = text

    def show_problem(self, name: str, message: str | None) -> None:
        """Under field ``name``: why the value was refused (None: clear it)."""
        box = self.query_one("#" + input_id(name), Input)
        why = self.query_one("#" + input_id(name) + "-why", Static)
        if message is None:
            self.problems.pop(name, None)
        else:
            self.problems[name] = message
        box.set_class(message is not None, "refused")
        why.update(Text(message or "", style="red"))
        why.display = message is not None
