"""The wallscreen terminal interface: ``run_app(path)`` is what ``wallscreen [FILE]`` calls.

With no path the shipped demo corridor opens as an unsaved copy (saving asks for a path).
The cautions show on the very first start and stay on every screen as one line.
"""

from __future__ import annotations

import sys
from collections.abc import Iterable
from pathlib import Path

from textual.app import App, SystemCommand
from textual.screen import Screen

from screening import store
from screening.model import presets as presets_module
from screening.model.errors import WallscreenError
from screening.model.units import Display
from screening.tui.config import load_state, save_state
from screening.tui.keys import ACTIONS, all_keys
from screening.tui.screens.about import AboutScreen
from screening.tui.screens.corridor import CorridorScreen
from screening.tui.session import Session


def open_session(path: Path | None) -> Session:
    """Load a corridor file (or the demo) into a session; InputError if it is bad."""
    presets = presets_module.load_presets()
    if path is None:
        corridor = store.load(presets_module.demo_corridor_path())
        return Session(corridor, None, presets)
    return Session(store.load(path), Path(path), presets)


class WallscreenApp(App[int]):
    """Screen a corridor of reinforced-soil walls from the keyboard."""

    CSS_PATH = "app.tcss"
    TITLE = "wallscreen"
    ENABLE_COMMAND_PALETTE = True

    def __init__(self, session: Session, *, show_cautions: bool | None = None) -> None:
        super().__init__()
        self.session = session
        self._show_cautions = show_cautions
        self.corridor_screen: CorridorScreen | None = None

    def on_mount(self) -> None:
        self.theme = "textual-dark"
        state = load_state()
        self.session.display = Display(state.units)  # the units chosen last time
        self.corridor_screen = CorridorScreen(self.session)
        self.push_screen(self.corridor_screen)
        if self.session.path is not None:
            state.remember(self.session.path)
            save_state(state)
        show = (not state.cautions_seen) if self._show_cautions is None else self._show_cautions
        if show:
            self.push_screen(AboutScreen(first_start=True), self._cautions_seen)

    def _cautions_seen(self, _: object) -> None:
        state = load_state()
        state.cautions_seen = True
        save_state(state)

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        """Every action of the corridor screen, by name, in the command palette."""
        target = self.corridor_screen
        if target is not None:
            for a in ACTIONS:
                yield SystemCommand(
                    f"{a.title}  ({all_keys(a.keys)})",
                    a.help,
                    lambda name=a.action: self._palette_run(name),
                )
        yield SystemCommand("Theme", "Change the colours", self.action_change_theme)

    async def _palette_run(self, name: str) -> None:
        if self.corridor_screen is not None:
            if self.screen is not self.corridor_screen:
                if name in getattr(self.screen, "PALETTE_ACTIONS", ()):
                    await self.screen.run_action(name)  # e.g. sensitivity in the detail view
                return
            await self.corridor_screen.run_action(name)

    async def action_quit(self) -> None:
        """Quit through the unsaved-changes guard of the corridor screen."""
        if self.corridor_screen is not None and self.screen is self.corridor_screen:
            self.corridor_screen.action_quit()
        elif self.corridor_screen is not None:
            self.pop_screen()
        else:
            self.exit(0)


def run_app(path: Path | None, rates: Path | None = None) -> int:
    """Open the interface on ``path`` (None: the demo), with the unit rates of ``rates``
    (None: the corridor's own and the shipped ones); the exit code for the shell."""
    try:
        session = open_session(path)
        if rates is not None:
            from screening.corridor.quantities import load_rates

            session.rates_override, session.rates_path = load_rates(rates), rates
    except WallscreenError as err:
        print(f"wallscreen: {err}", file=sys.stderr)
        return 2
    app = WallscreenApp(session)
    code = app.run()
    return int(code or 0) if app.return_code in (None, 0) else int(app.return_code)
