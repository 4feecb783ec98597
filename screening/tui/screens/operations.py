"""Corridor operations from the keyboard: add, copy, split, delete, order, bulk edit,
factor set, undo and redo. Each asks what it needs in a small dialog, calls the session
and lets the corridor screen redraw."""

from __future__ import annotations

from screening.model.errors import WallscreenError
from screening.tui.completion import field_choices
from screening.tui.fields import BY_NAME, FIELDS, display
from screening.tui.placing import split_chainage
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.prompt import PromptScreen

NOT_IN_BULK = {"id", "chainage_start_m", "chainage_end_m", "note"}
"""Fields that make no sense set to one value over a range."""


class OperationsMixin:
    """For :class:`CorridorScreen`."""

    def _run(self, operation, *args) -> bool:
        """Call a session operation; show a refusal as a notice."""
        try:
            change = operation(*args)
        except WallscreenError as err:
            self.app.notify(getattr(err, "message", str(err)), title=err.title, severity="error")
            return False
        self.apply(change)
        return True

    def _needs_segment(self, what: str) -> bool:
        """False (and says why) when the cursor is on a wall's line or there is nothing."""
        if not self.session.corridor.segments:
            self.say(f"no segment to {what} yet: a adds the first one", "yellow")
            return False
        if self.on_wall_line and self.anchor is None:
            self.say(f"on a wall's line: move to a segment to {what} it", "yellow")
            return False
        return True

    async def action_add_segment(self) -> None:
        s = self.session
        if not s.corridor.segments:
            if self._run(s.add_after, 0):
                await self.action_edit_segment()
                self.say(
                    "first segment added: type its id, wall, chainage and heights here; "
                    "Esc returns to the table"
                )
            return
        row = self.cursor
        if self.on_wall_line:  # the wall's line: after the wall's last segment
            members = self.table.members(s, self.table.wall_at())
            row = max(members, key=lambda i: s.corridor.segments[i].chainage_end_m)
        self._run(s.add_after, row)

    def action_duplicate_segment(self) -> None:
        if self._needs_segment("copy"):
            self._run(self.session.duplicate, self.cursor)

    def action_delete_segment(self) -> None:
        if self._needs_segment("delete"):
            self._run(self.session.delete, self.selected_rows())

    def action_undo(self) -> None:
        self._run(self.session.undo)

    def action_redo(self) -> None:
        self._run(self.session.redo)

    def action_split_segment(self) -> None:
        if not self._needs_segment("split"):
            return
        row = self.cursor
        seg = self.session.corridor.segments[row]
        d = self.session.display
        lo, hi = d.value(seg.chainage_start_m, "m"), d.value(seg.chainage_end_m, "m")
        middle = round((lo + hi) / 2, 1)

        def done(raw: str | None) -> None:
            if raw is not None:
                self._run(self.session.split, row, raw)

        self.app.push_screen(
            PromptScreen(
                f"Split {seg.id}",
                f"Chainage to split at ({d.label('m')}), between {lo:.6g} and {hi:.6g}:",
                f"{middle:g}",
                lambda raw: split_chainage(seg, raw, d),
            ),
            done,
        )

    def action_bulk_edit(self) -> None:
        if not self.session.corridor.segments:
            self.say("no segment to edit yet: a adds the first one", "yellow")
            return
        rows = self.selected_rows()
        options = [(f.name, f"{f.label} ({f.hint})") for f in FIELDS if f.name not in NOT_IN_BULK]
        first = self.session.corridor.segments[rows[0]]
        what = (
            f"{len(rows)} segments ({first.id} … {self.session.corridor.segments[rows[-1]].id})"
            if len(rows) > 1
            else first.id
        )
        if self.on_wall_line and self.anchor is None:
            what = f"wall {first.wall}, {len(rows)} segments"

        def picked(name: str | None) -> None:
            if name is None:
                return
            spec = BY_NAME[name]

            def done(raw: str | None) -> None:
                if raw is not None and self._run(self.session.bulk_edit, rows, name, raw):
                    self._set_anchor(None)

            units = self.session.display
            unit = units.label(spec.unit) if spec.unit else ""
            choices = field_choices(name, self.session.presets)
            if choices and name != "traffic":  # a list of words: pick one
                self.app.push_screen(
                    ChooseScreen(
                        f"Set {spec.label} on {what}", choices, current=display(first, name)
                    ),
                    done,
                )
                return
            self.app.push_screen(
                PromptScreen(
                    f"Set {spec.label} on {what}",
                    f"{spec.label} {unit} — {spec.hint}:",
                    display(first, name, units),
                    lambda raw: self.session.parse(name, raw, rows[0]),
                    words=[v for v, _ in choices] or None,
                ),
                done,
            )

        note = "Mark a range first with Space to change several segments." if len(rows) == 1 else ""
        self.app.push_screen(
            ChooseScreen(f"Bulk edit {what}: which field?", options, note=note), picked
        )

    def action_switch_factor_set(self) -> None:
        sets = self.session.presets.factor_sets
        options = [(fid, f"{fid} — {fs.name}") for fid, fs in sets.items()]

        def done(fid: str | None) -> None:
            if fid is not None and fid != self.session.corridor.factor_set.id:
                self._run(self.session.set_factor_set, fid)

        self.app.push_screen(
            ChooseScreen(
                "Factor set for the whole corridor",
                options,
                current=self.session.corridor.factor_set.id,
            ),
            done,
        )

    def action_rescreen(self) -> None:
        if self.screening:
            return
        self.session.result = None
        self.session.stale = set()
        self.table.update_all_gradually(self.session)
        self.redraw_around()
        self.start_screen()
