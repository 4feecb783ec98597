"""Open, save, save as, recent files and the unsaved-changes guard (corridor screen)."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from screening import store
from screening.model.errors import InputError, WallscreenError
from screening.tui.config import load_state, save_state
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.prompt import PromptScreen
from screening.tui.screens.unsaved import UnsavedScreen
from screening.tui.session import Session


def _existing(raw: str) -> None:
    path = Path(raw).expanduser()
    if not raw.strip():
        raise InputError("type the path of a corridor file (.toml)")
    if not path.is_file():
        raise InputError("no such file: give the path of an existing corridor file", file=raw)


def _writable(raw: str) -> None:
    path = Path(raw).expanduser()
    if not raw.strip() or path.is_dir():
        raise InputError("type a file path ending in .toml")
    if path.suffix != ".toml":
        raise InputError("a corridor file ends in .toml", file=raw)
    if not path.parent.is_dir():
        raise InputError("that folder does not exist", file=str(path.parent))


class FilesMixin:
    """For :class:`CorridorScreen`."""

    _pending_save: tuple[Path | None, Callable[[], None] | None] | None = None

    def remember(self, path: Path) -> None:
        state = load_state()
        state.remember(path)
        save_state(state)

    # ------------------------------------------------------------------ guard

    def guard(self, doing: str, then: Callable[[], None]) -> None:
        """Run ``then`` now if nothing is unsaved; otherwise ask save / discard / stay."""
        if not self.session.dirty:
            then()
            return
        name = self.session.path.name if self.session.path else "The demo corridor"

        def answered(answer: str | None) -> None:
            if answer == "discard":
                then()
            elif answer == "save":
                self.save_then(then)

        self.app.push_screen(UnsavedScreen(name, doing), answered)

    # ------------------------------------------------------------------ save

    def _write(self, path: Path | None = None, then: Callable[[], None] | None = None) -> None:
        """Save now, or as soon as the screen in progress lands, so the file never
        carries results that do not match its inputs; then run ``then``."""
        if self.results_pending:
            if self.session.result is None and not self.screening:
                self.start_screen()  # a cancelled screen: results are needed to save
            self._pending_save = (path, then)
            self.say("saving as soon as the screen in progress lands…", "yellow")
            return
        self._pending_save = None
        try:
            target = self.session.save(path)
        except (WallscreenError, OSError) as err:
            title = getattr(err, "title", "Could not save")
            self.app.notify(str(err), title=title, severity="error", timeout=10)
            return
        self.remember(target)
        self.redraw_around()
        self.say(f"saved {target}")
        if then is not None:
            then()

    def flush_pending_save(self) -> None:
        """Called whenever a screen lands: do a save that was waiting for it."""
        pending = getattr(self, "_pending_save", None)
        if pending is not None and not self.results_pending:
            self._write(*pending)

    def save_then(self, then: Callable[[], None] | None = None) -> None:
        if self.session.path is None:
            self.action_save_as(then)
        else:
            self._write(None, then)

    def action_save(self) -> None:
        self.save_then(None)

    def action_save_as(self, then: Callable[[], None] | None = None) -> None:
        current = str(self.session.path) if self.session.path else "corridor.toml"

        def done(raw: str | None) -> None:
            if raw is not None:
                self._write(Path(raw).expanduser(), then)

        self.app.push_screen(
            PromptScreen(
                "Save as",
                "Path of the corridor file to write:",
                current,
                _writable,
                paths=(".toml",),
            ),
            done,
        )

    # ------------------------------------------------------------------ open

    def open_path(self, path: Path) -> bool:
        try:
            corridor = store.load(path)
        except (WallscreenError, OSError) as err:
            self.app.notify(
                str(err),
                title=getattr(err, "title", "Could not open"),
                severity="error",
                timeout=12,
            )
            return False
        if self.screening:
            self.cancel_screen()
        self.remember(path)
        fresh = Session(corridor, path, self.session.presets)
        fresh.rates_override = self.session.rates_override
        fresh.rates_path = self.session.rates_path
        self.reset(fresh)
        self.say(f"opened {path}")
        return True

    def action_open_file(self) -> None:
        def ask() -> None:
            self.app.push_screen(
                PromptScreen(
                    "Open", "Path of a corridor file (.toml):", "", _existing, paths=(".toml",)
                ),
                lambda raw: raw is not None and self.open_path(Path(raw).expanduser()),
            )

        self.guard("open another file", ask)

    def action_new_corridor(self) -> None:
        """An empty corridor with the shipped starting defaults (saved with save as)."""

        def fresh() -> None:
            from screening.profile.build import empty_corridor

            if self.screening:
                self.cancel_screen()
            self.reset(Session(empty_corridor(), None, self.session.presets))
            self.say("new corridor: a adds the first segment; ^s asks where to save it")

        self.guard("start a new corridor", fresh)

    def action_recent_files(self) -> None:
        recent = load_state().recent
        if not recent:
            self.say("no recent files yet: files you open or save are listed here")
            return

        def done(raw: str | None) -> None:
            if raw is not None:
                self.guard("open another file", lambda: self.open_path(Path(raw)))

        options = [(p, f"{Path(p).name}  —  {Path(p).parent}") for p in recent]
        self.app.push_screen(ChooseScreen("Recent files", options), done)

    # ------------------------------------------------------------------ quit

    def action_quit(self) -> None:
        self.guard("quit", lambda: self.app.exit(0))
