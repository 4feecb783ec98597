"""Corridor operations from the keyboard: add, copy, split, delete, order, bulk edit,
factor set, undo and redo. Each asks what it needs in a small dialog, calls the session
and lets the corridor screen redraw."""

from __future__ import annotations

from screening.model.errors import InputError, WallscreenError
from screening.tui.fields import BY_NAME, FIELDS, display
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

    def action_add_segment(self) -> None:
        self._run(self.session.add_after, self.cursor)

    def action_duplicate_segment(self) -> None:
        self._run(self.session.duplicate, self.cursor)

    def action_delete_segment(self) -> None:
        self._run(self.session.delete, self.selected_rows())

    def action_sort_chainage(self) -> None:
        self._run(self.session.sort_by_chainage)

    def action_undo(self) -> None:
        self._run(self.session.undo)

    def action_redo(self) -> None:
        self._run(self.session.redo)

    def action_split_segment(self) -> None:
        row = self.cursor
        seg = self.session.corridor.segments[row]
        middle = round((seg.chainage_start_m + seg.chainage_end_m) / 2, 1)

        def check(raw: str) -> None:
            try:
                at = float(raw)
            except ValueError:
                at = None
            if at is None or not seg.chainage_start_m < at < seg.chainage_end_m:
                raise InputError(
                    f"give a chainage between {seg.chainage_start_m:g} and "
                    f"{seg.chainage_end_m:g} m",
                    segment=seg.id,
                    field="chainage",
                )

        def done(raw: str | None) -> None:
            if raw is not None:
                self._run(self.session.split, row, raw)

        self.app.push_screen(
            PromptScreen(
                f"Split {seg.id}",
                f"Chainage to split at (m), between "
                f"{seg.chainage_start_m:g} and {seg.chainage_end_m:g}:",
                f"{middle:g}",
                check,
            ),
            done,
        )

    def action_bulk_edit(self) -> None:
        rows = self.selected_rows()
        options = [(f.name, f"{f.label} ({f.hint})") for f in FIELDS if f.name not in NOT_IN_BULK]
        first = self.session.corridor.segments[rows[0]]
        what = (
            f"{len(rows)} segments ({first.id} … {self.session.corridor.segments[rows[-1]].id})"
            if len(rows) > 1
            else first.id
        )

        def picked(name: str | None) -> None:
            if name is None:
                return
            spec = BY_NAME[name]

            def done(raw: str | None) -> None:
                if raw is not None and self._run(self.session.bulk_edit, rows, name, raw):
                    self._set_anchor(None)

            self.app.push_screen(
                PromptScreen(
                    f"Set {spec.label} on {what}",
                    f"{spec.label} {spec.unit} — {spec.hint}:",
                    display(first, name),
                    lambda raw: self.session.parse(name, raw),
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
