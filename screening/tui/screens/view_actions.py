"""What the corridor table shows: grouping by wall, folding walls, filters by wall,
verdict and text, a sort by any column, and the list of overlaps and gaps.

A view never changes the corridor: it only chooses and orders lines. Every choice says
what is shown in the status line, and Esc (with nothing else to cancel) shows everything.
"""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.widgets import DataTable

from screening.tui.cells import BY_KEY, COLUMNS, column_heading
from screening.tui.placing import chainage_order
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.prompt import PromptScreen
from screening.tui.view import VERDICT_FILTERS, View, walls_in_order

CHAINAGE = "chainage-order"
"""The sort chooser's first option: chainage order along each wall (the file's order)."""


class ViewMixin:
    """For :class:`CorridorScreen`."""

    def set_view(self, view: View, segment: int | None = None) -> None:
        """Show the table through ``view``, the cursor staying on its segment."""
        keep = self.cursor_segment if segment is None else segment
        if keep is None and self.table.lines:
            wall = self.table.wall_at()
            members = self.table.members(self.session, wall) if wall else []
            keep = members[0] if members else None
        self.view = view
        self.table.load(self.session, view, keep)
        if self.anchor is not None:
            self._set_anchor(self.anchor)
        self.show_section()
        self._say_view()

    def _say_view(self) -> None:
        headings = {c.key: column_heading(c.key, self.session.display) for c in COLUMNS}
        words = self.view.words(headings)
        shown = sum(1 for r in self.table.lines if r.index is not None)
        total = len(self.session.corridor.segments)
        if words:
            self.say(f"showing {shown} of {total} segments: {words} (Esc shows every segment)")
        else:
            self.say(f"showing every segment ({total}), wall by wall in chainage order")

    # ------------------------------------------------------------------ grouping

    def action_toggle_grouping(self) -> None:
        self.set_view(self.view.replace(grouped=not self.view.grouped, collapsed=frozenset()))

    def action_fold_wall(self) -> None:
        """Fold the cursor's wall to its line, or unfold it."""
        wall = self.table.wall_at()
        if wall is None or not self.view.grouped:
            self.say("fold works on walls: g groups the table by wall first", "yellow")
            return
        folded = set(self.view.collapsed) ^ {wall}
        members = self.table.members(self.session, wall)
        self.set_view(self.view.replace(collapsed=frozenset(folded)), members[0])
        if wall in folded:
            self.table.move_cursor(row=self.table.wall_line.get(wall, 0), animate=False)

    def action_fold_all(self) -> None:
        """Fold every wall to its line (or unfold them all when all are folded)."""
        if not self.view.grouped:
            self.say("fold works on walls: g groups the table by wall first", "yellow")
            return
        walls = frozenset(walls_in_order(self.session.corridor))
        fold = frozenset() if self.view.collapsed >= walls else walls
        wall = self.table.wall_at()
        self.set_view(self.view.replace(collapsed=fold))
        if fold and wall in self.table.wall_line:
            self.table.move_cursor(row=self.table.wall_line[wall], animate=False)

    # ------------------------------------------------------------------ filters

    def action_filter_wall(self) -> None:
        c = self.session.corridor
        counts: dict[str, int] = {}
        for s in c.segments:
            counts[s.wall] = counts.get(s.wall, 0) + 1
        options = [("", f"every wall ({len(c.segments)} segments)")] + [
            (w, f"{w}  ({counts[w]} segments)") for w in walls_in_order(c)
        ]

        def done(wall: str | None) -> None:
            if wall is not None:
                self.set_view(self.view.replace(wall=wall or None))

        self.app.push_screen(
            ChooseScreen("Show one wall", options, current=self.view.wall or ""), done
        )

    def action_filter_verdict(self) -> None:
        options = [(key, words) for key, words, _ in VERDICT_FILTERS]
        current = next(k for k, _, v in VERDICT_FILTERS if v == self.view.verdicts)

        def done(key: str | None) -> None:
            if key is not None:
                verdicts = next(v for k, _, v in VERDICT_FILTERS if k == key)
                self.set_view(self.view.replace(verdicts=verdicts))

        note = "Segments not yet screened always show."
        self.app.push_screen(
            ChooseScreen("Show segments by verdict", options, current=current, note=note), done
        )

    def action_filter_text(self) -> None:
        def done(raw: str | None) -> None:
            if raw is not None:
                self.set_view(self.view.replace(text=raw.strip()))

        self.app.push_screen(
            PromptScreen(
                "Show segments containing",
                "Words to look for in the id, wall, note, fill, reinforcement, verdict and "
                "reasons (every word must match; empty shows every segment):",
                self.view.text,
            ),
            done,
        )

    # ------------------------------------------------------------------ sort

    def sort_by(self, key: str) -> None:
        """Sort by column ``key``; the same column again reverses the order."""
        if key == CHAINAGE or key == "chainage" and self.view.sort is None:
            self.set_view(self.view.replace(sort=None, descending=False))
            s = self.session
            if chainage_order(s.corridor.segments) != s.corridor.segments:
                self._run(s.sort_by_chainage)
            return
        descending = self.view.sort == key and not self.view.descending
        self.set_view(self.view.replace(sort=key, descending=descending))

    def action_sort(self) -> None:
        d = self.session.display
        options = [(CHAINAGE, "Chainage, along each wall (the file's order)")]
        for col in COLUMNS:
            arrow = ""
            if self.view.sort == col.key:
                arrow = "  (now ↓; again: ↑)" if self.view.descending else "  (now ↑; again: ↓)"
            words = f" — {col.help}" if col.help else ""
            options.append((col.key, f"{column_heading(col.key, d)}{words}{arrow}"))

        def done(key: str | None) -> None:
            if key is not None:
                self.sort_by(key)

        self.app.push_screen(
            ChooseScreen(
                "Sort the segments of each wall by",
                options,
                current=self.view.sort or CHAINAGE,
                note="A column heading clicked sorts too; the same column twice reverses.",
            ),
            done,
        )

    @on(DataTable.HeaderSelected, "#table")
    def _heading_clicked(self, event: DataTable.HeaderSelected) -> None:
        key = event.column_key.value
        if key in BY_KEY:
            self.sort_by(key)

    # ------------------------------------------------------------------ layout problems

    def action_layout_problems(self) -> None:
        problems = self.session.layout_problems()
        if not problems:
            self.say("no overlaps or gaps between the segments of any wall")
            return
        ids = {s.id: i for i, s in enumerate(self.session.corridor.segments)}
        options = [(str(ids[p.first_id]), "⚠ " + p.describe()) for p in problems]

        def done(value: str | None) -> None:
            if value is not None:
                i = int(value)
                if i not in self.table.position:
                    self.set_view(View(grouped=self.view.grouped), i)
                self.table.move_to(self.session, i)

        self.app.push_screen(
            ChooseScreen(
                f"{len(problems)} overlap(s) and gap(s) within walls",
                options,
                note="Enter goes to the first segment of the pair. Lengths, areas and costs "
                "count an overlap twice; a gap may be a structure between walls.",
            ),
            done,
        )

    def problem_words(self) -> Text:
        n = len(self.session.layout_problems())
        return Text(f"⚠ {n} overlap(s)/gap(s): ! lists them", style="bold yellow") if n else Text()
