"""The segment editor: every input of the selected segment, checked as you type.

Each field is an ``Input`` with its label, unit and a line under it. The screen that owns
the editor listens to ``Input.Changed`` from it, tries the value through the session and
calls :meth:`SegmentEditor.show_problem` with the reason when the value is refused: the
field turns red and the value is not applied.
"""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.suggester import SuggestFromList
from textual.widgets import Input, Label, Static

from screening.engine.result import cdr_text
from screening.model import Segment
from screening.model.units import Display
from screening.tui.cells import PENDING, verdict_text
from screening.tui.completion import field_choices
from screening.tui.fields import FIELDS, SI, display
from screening.tui.view import margin_of


def input_id(name: str) -> str:
    return "field-" + name.replace(".", "--")


def field_of(widget_id: str) -> str:
    return widget_id.removeprefix("field-").replace("--", ".")


class SegmentEditor(VerticalScroll):
    """Form for one segment; hidden until the user asks to edit. F4 in a field with a
    list of values (presets, wall | abutment, ...) picks one from the list."""

    BINDINGS = [Binding("f4", "pick", "Pick a value", tooltip="Pick from the list of values")]

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self.segment_id: str | None = None
        self.problems: dict[str, str] = {}
        """Field -> reason its typed value was refused."""
        self.presets: object = None

    def compose(self) -> ComposeResult:
        yield Static("", id="editor-title")
        yield Static("", id="editor-outcome")

    async def build(self, presets: object = None) -> None:
        """Mount the fields on first use: a quicker first frame for the corridor screen."""
        if self.query(".field-row"):
            return
        self.presets = presets
        widgets = []
        for spec in FIELDS:
            choices = field_choices(spec.name, presets) if presets is not None else []
            suggester = (
                SuggestFromList([v for v, _ in choices], case_sensitive=False) if choices else None
            )
            hint = f"{spec.hint} (F4: list)" if choices else spec.hint
            widgets.append(
                Horizontal(
                    Label(spec.label, classes="field-label"),
                    Input(
                        id=input_id(spec.name),
                        placeholder=hint,
                        classes="field-input",
                        select_on_focus=False,
                        suggester=suggester,
                    ),
                    Label(spec.unit, id=input_id(spec.name) + "-unit", classes="field-unit"),
                    classes="field-row",
                )
            )
            why = Static("", id=input_id(spec.name) + "-why", classes="field-why")
            why.display = False
            widgets.append(why)
        widgets.append(
            Static(
                "Enter / Esc: back to the table · every valid value is applied as you type · "
                "F4: pick a preset or a word from a list",
                classes="editor-help",
            )
        )
        await self.mount_all(widgets)

    def load(self, segment: Segment, units: Display = SI) -> None:
        """Fill the form from ``segment`` (in ``units``) without treating it as an edit."""
        self.segment_id = segment.id
        self.query_one("#editor-title", Static).update(
            Text(f"Segment {segment.id}  ·  {segment.wall}", style="bold")
        )
        for spec in FIELDS:
            box = self.query_one("#" + input_id(spec.name), Input)
            with box.prevent(Input.Changed):
                box.value = display(segment, spec.name, units)
            unit = units.label(spec.unit) if spec.unit else ""
            self.query_one("#" + input_id(spec.name) + "-unit", Label).update(unit)
            self.show_problem(spec.name, None)

    def refresh_values(
        self, segment: Segment, skip: str | None = None, units: Display = SI
    ) -> None:
        """Show the segment's values again, except in the field being typed in."""
        self.segment_id = segment.id
        for spec in FIELDS:
            if spec.name == skip:
                continue
            box = self.query_one("#" + input_id(spec.name), Input)
            text = display(segment, spec.name, units)
            if box.value != text:
                with box.prevent(Input.Changed):
                    box.value = text

    def show_outcome(self, session, i: int) -> None:
        """Verdict, L, Hd and least margin of segment ``i`` as screened now (or pending),
        so a narrow terminal that hides the table still shows what an edit does."""
        out = Text()
        if session.pending(i):
            quick = session.provisional(i)
            if quick is None:
                out.append(f"{PENDING} screening", style="dim")
                self.query_one("#editor-outcome", Static).update(out)
                return
            result, k = quick
            out.append(f"{PENDING} checking  ", style="dim italic")
        else:
            result, k = session.result, i
            out.append_text(verdict_text(result.verdict[k]))
            out.append("  ")
        d = session.display
        check, cdr = margin_of(result, k)
        out.append(
            f"L {d.format(float(result.length_m[k]), 'm', 1)}  Hd "
            f"{d.format(float(result.design_height_m[k]), 'm', 1)}  "
        )
        if cdr is not None:
            out.append(f"CDR {cdr_text(cdr)} {check}", style="bold red" if cdr < 1 else "")
        elif check:
            out.append(check, style="bold red")
        self.query_one("#editor-outcome", Static).update(out)

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

    def action_pick(self) -> None:
        """Offer the values of the focused field; the one chosen is typed into it."""
        from screening.tui.screens.choose import ChooseScreen

        box = self.app.focused
        if not isinstance(box, Input) or not (box.id or "").startswith("field-"):
            return
        name = field_of(box.id)
        choices = field_choices(name, getattr(self, "presets", None)) if self.presets else []
        if not choices:
            self.app.bell()
            return

        def chosen(value: str | None) -> None:
            box.focus()
            if value is not None:
                box.value = value  # Input.Changed: checked and applied like typing
                box.cursor_position = len(value)

        self.app.push_screen(ChooseScreen(f"{name}: pick a value", choices, box.value), chosen)
