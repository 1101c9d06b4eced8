"""The ``tri`` terminal UI: the application object and its entry point.

The app owns the editing :class:`~tri.tui.session.Session` (schedule, undo,
save, journal) and the latest engine result. Screens ask it to apply edits;
it re-runs the engine in a worker thread and tells the screens to redraw.
"""

from __future__ import annotations

import sys
import traceback
from pathlib import Path
from typing import Any, ClassVar

from rich.text import Text
from textual import work
from textual.app import App
from textual.binding import Binding, BindingType

from tri.schedule.errors import ScheduleError
from tri.schedule.journal import read_journal, state_dir
from tri.schedule.load import ScheduleFile, load_schedule
from tri.schedule.model import Schedule
from tri.tui import compute, recent
from tri.tui.app_building import BuildingActions
from tri.tui.app_saving import SavingActions
from tri.tui.messages import AnalysisDone
from tri.tui.session import Session
from tri.tui.wording import issue_text, plural

THEMES = ("textual-dark", "textual-light", "ansi-dark", "ansi-light")


class TriApp(SavingActions, BuildingActions, App[int]):
    """Edit, analyse and rebalance a panel schedule (or a building of them) from the keyboard."""

    CSS_PATH = "tri.tcss"
    TITLE = "tri"
    ENABLE_COMMAND_PALETTE = True
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+q", "quit", "Quit", priority=True, id="app.quit"),
        Binding("f1,question_mark", "help", "Help", id="app.help"),
        Binding("t", "cycle_theme", "Theme", show=False, id="app.theme"),
    ]

    def __init__(
        self,
        file: str | Path | None = None,
        *,
        journal: bool = True,
        theme: str | None = None,
    ) -> None:
        super().__init__()
        self.start_file = None if file is None else Path(file)
        self.journal_enabled = journal
        self.session: Session | None = None
        self.analysis: Any = None  #: the figures shown: the chosen case's
        self.connected_analysis: Any = None  #: the connected load's (every use factor 1)
        self.cases: Any = ()  #: the connected load and each scenario (to_scenarios.Case)
        self.case_name = "connected"  #: the case the main view's figures show
        self.log_cache: dict[Any, Any] = {}  #: (file, mtime, size, [log]) -> (log, figures)
        self.analysis_error: str | None = None
        self.checks: Any = ()
        self.generation = 0
        self.analysed_generation = -1
        self.quitting = False
        self.opening_status: str | None = None  #: the main view's first status line
        settings = recent.load_settings()
        self.fixed_theme = theme
        wanted = theme or settings.get("theme")
        if wanted in THEMES:
            self.theme = wanted

    # ------------------------------------------------------------ start-up

    def on_mount(self) -> None:
        few_colours = self.console.color_system in ("standard", "windows")
        if self.fixed_theme is None and "theme" not in recent.load_settings() and few_colours:
            self.theme = "ansi-dark"
        from tri.tui.screens.picker import PickerScreen

        if self.start_file is None:
            self.push_screen(PickerScreen())
        elif self.start_file.exists():
            self.open_path(self.start_file)
        else:
            self.offer_create(self.start_file)

    def open_path(self, path: Path) -> bool:
        """Load ``path`` and show it; problems become a message, never a traceback."""
        from tri.schedule.tree import feeder_circuits

        if self.reload_panel(path):  # a panel of the building open: read again in place
            return True
        try:
            loaded = load_schedule(path)
        except ScheduleError as exc:
            self.show_problems(f"Cannot open {path.name}", exc)
            return False
        if feeder_circuits(loaded.schedule):
            if not self.open_building(path):
                return False
            recent.remember(path)
            self.offer_recovery()
            return True
        self.start_session(Session.from_file(loaded))
        recent.remember(path)
        self.offer_recovery()
        return True

    def open_copy(self, loaded: ScheduleFile, name: str) -> None:
        """Open a demo panel as an unsaved copy (saving asks for a file name)."""
        self.start_session(Session.untitled(loaded, name))

    def start_session(self, session: Session, building: Any = None) -> None:
        """Show ``session`` in the main screen (replacing whatever was open).

        ``building`` is the :class:`~tri.tui.building.Building` the session's
        panel belongs to, when a building is opened.
        """
        from tri.tui.screens.main import MainScreen

        session.journal_enabled = self.journal_enabled
        self.session = session
        self.building = building
        self.tree_result = None
        self.tree_cases = ()
        if building is not None:
            building.visited = {building.current}
        self.analysis = None
        self.connected_analysis = None
        self.cases = ()
        self.case_name = "connected"
        self.analysed_generation = -1
        while len(self.screen_stack) > 1:
            self.pop_screen()
        self.push_screen(MainScreen())
        self.request_analysis()

    def offer_create(self, path: Path) -> None:
        """The file does not exist: offer to start a new panel there."""
        from tri.tui.screens.forms import panel_form
        from tri.tui.screens.picker import PickerScreen, blank_schedule

        self.push_screen(PickerScreen())
        form = panel_form(blank_schedule(path))
        form.form_title = f"{path.name} does not exist: describe the panel to create it"

        def created(result: Schedule | None) -> None:
            if result is None:
                self.set_status(f"{path.name} was not created.")
                return
            session = Session(schedule=result, path=None, source_name=path.stem)
            try:
                session.save(path)
            except ScheduleError as exc:
                self.show_problems(f"Cannot create {path.name}", exc, path.name, result)
                return
            recent.remember(path)
            self.start_session(session)
            self.set_status(f"Created {path.name}. Press a to add a circuit.")

        self.push_screen(form, created)

    def offer_recovery(self) -> None:
        """If a journal holds unsaved edits of this file, ask whether to recover them."""
        from tri.tui.screens.choice import ChoiceScreen

        s = self.session
        if s is None or not self.journal_enabled:
            return
        entry = read_journal(s.journal_file)
        if entry is None or entry.schedule == s.schedule:
            return
        changed = entry.file_changed_since()
        written = entry.written_utc[:16].replace("T", " ")
        message = (
            f"Unsaved edits of {s.title_name} were kept when tri last stopped "
            f"({plural(entry.edits, 'edit')}, written {written} UTC)."
        )
        if changed:
            message += "\nThe file has changed on disk since; recovering replaces it on save."

        def answer(value: str | None) -> None:
            if value == "recover" and self.session is not None:
                self.session.apply(entry.schedule, "recover unsaved edits")
                self.schedule_changed("Recovered the unsaved edits. Ctrl+S saves them.")
            elif value == "discard" and self.session is not None:
                self.session.journal()  # not dirty: removes the journal
                self.set_status("Discarded the unsaved edits.")
            else:
                self.set_status("Kept the journal for later; the file is shown as saved.")

        self.push_screen(
            ChoiceScreen(
                "Recover unsaved edits?",
                message,
                [("r", "recover them", "recover"), ("d", "discard them", "discard")],
                cancel="later",
                cancel_label="decide later (the file is shown as saved)",
            ),
            answer,
        )

    # ------------------------------------------------------------ edits and analysis

    def apply(self, new: Schedule, label: str, status: str | None = None) -> None:
        """Make ``new`` the current schedule (undoable) and re-analyse."""
        if self.session is None:
            return
        problem = self.edit_problem(new)
        if problem is not None:
            self.bell()
            self.set_status(f"Not done: {problem}", error=True)
            return
        self.session.apply(new, label)
        self.schedule_changed(status or f"{label}. u undoes.")

    def schedule_changed(self, status: str = "") -> None:
        """Redraw after any change of the schedule and start the engine."""
        if status:
            self.set_status(status)
        if self.session is not None and self.session.journal_error:
            self.set_status(self.session.journal_error, error=True)
        self.request_analysis()
        # The table and results redraw once, when the engine's figures arrive
        # (well under a frame later); only the title changes at once.
        self.refresh_screens(title_only=True)

    def request_analysis(self) -> None:
        """Run the engine on the current schedule in a worker thread."""
        if self.session is None:
            return
        self.generation += 1
        if self.building is not None:
            self.analyse_building()
            return
        self._analyse(self.generation, self.session.schedule)

    @work(thread=True, exclusive=True, group="analysis", exit_on_error=False)
    def _analyse(self, generation: int, schedule: Schedule) -> None:
        checks: Any = ()
        cases: Any = ()
        try:
            result, error = compute.analyse_schedule(schedule), None
            cases = compute.analyse_cases(schedule, result)
            checks = compute.check_results(result, schedule, cases)
        except ImportError:
            result, error = None, compute.ENGINE_MISSING
        except Exception as exc:  # an engine failure is a message, not a crash
            result, error = None, f"The engine could not analyse this schedule: {exc}"
        done = AnalysisDone(generation, result, error, checks, cases)
        self.call_from_thread(self.post_message, done)

    def on_analysis_done(self, message: AnalysisDone) -> None:
        if message.generation != self.generation:
            return
        self.connected_analysis = message.analysis
        self.cases = message.cases
        if message.tree is not None or self.building is None:
            self.tree_result = message.tree
            self.tree_cases = message.tree_cases
        self.analysis = self._case_analysis()
        self.analysis_error = message.error
        self.checks = message.checks
        self.analysed_generation = message.generation
        self.refresh_screens()

    def _case_analysis(self) -> Any:
        """The chosen case's analysis (the connected load when that case is gone)."""
        for case in self.cases:
            if case.name == self.case_name:
                return case.analysis
        self.case_name = "connected"
        return self.connected_analysis

    def show_case(self, name: str) -> None:
        """Show the figures of case ``name`` (``"connected"`` or a scenario) everywhere."""
        self.case_name = name
        if self.connected_analysis is not None:
            self.analysis = self._case_analysis()
        self.refresh_screens()

    @property
    def scenario_shown(self) -> str | None:
        """The scenario whose figures are shown, ``None`` for the connected load."""
        return None if self.case_name == "connected" else self.case_name

    @property
    def analysis_current(self) -> bool:
        """True when ``analysis`` belongs to the schedule on screen."""
        return self.analysed_generation == self.generation

    def refresh_screens(self, title_only: bool = False) -> None:
        """Ask every screen on the stack that shows the schedule to redraw."""
        for screen in self.screen_stack:
            if title_only:
                refresh = getattr(screen, "refresh_title", None)
            else:
                refresh = getattr(screen, "refresh_view", None)
            if refresh is not None:
                refresh()

    def set_status(self, text: str, error: bool = False) -> None:
        """Show a one-line message on the main screen's status line."""
        for screen in self.screen_stack:
            setter = getattr(screen, "set_status", None)
            if setter is not None:
                setter(text, error)

    def show_problems(
        self, title: str, exc: ScheduleError, file_name: str = "", schedule: Schedule | None = None
    ) -> None:
        """Every located problem of a schedule, each naming the file, in a page the user closes."""
        from tri.tui.screens.text_view import TextScreen

        lines = [issue_text(i, file_name, schedule) for i in exc.issues]
        body = "\n".join(lines) or str(exc)
        self.push_screen(TextScreen(f"{title} ({plural(len(lines), 'problem')})", Text(body)))

    # ------------------------------------------------------------ help, theme

    def action_help(self) -> None:
        """The key list and what each part of the screen shows."""
        from tri.tui.screens.help import help_screen

        if type(self.screen).__name__ != "TextScreen":
            self.push_screen(help_screen(self))

    def action_cycle_theme(self) -> None:
        """Dark, light, and the terminal's own 16 colours (dark and light)."""
        current = self.theme if self.theme in THEMES else THEMES[0]
        self.theme = THEMES[(THEMES.index(current) + 1) % len(THEMES)]
        recent.store_setting("theme", self.theme)
        self.set_status(f"Theme: {self.theme} (t changes it).")

    # ------------------------------------------------------------ no tracebacks

    def _fatal_error(self) -> None:
        """An unexpected error: keep the edits in the journal, log, and explain in words."""
        try:
            if self.session is not None:
                self.session.journal()
            log = state_dir() / "crash.log"
            log.parent.mkdir(parents=True, exist_ok=True)
            error = self._exception
            detail = "".join(traceback.format_exception(error)) if error else traceback.format_exc()
            log.write_text(detail, encoding="utf-8")
            where = f" Details for a bug report: {log}"
        except Exception:
            where = ""
        self.bell()
        self._exit_renderables.append(
            Text(
                "tri stopped on an internal error. Your unsaved edits are in the autosave "
                "journal: open the file again to recover them." + where
            )
        )
        self._close_messages_no_wait()


def run_app(file: str | None) -> int:
    """Run the terminal UI on ``file`` (``None``: demo and recent picker); exit status."""
    if file is not None and Path(file).exists():
        try:
            load_schedule(file)
        except ScheduleError as exc:
            print(f"tri: error: {exc.summary()}", file=sys.stderr)
            return 2
    app = TriApp(file)
    try:
        result = app.run()
    except KeyboardInterrupt:
        return 130
    if app.return_code not in (None, 0):
        return app.return_code or 1
    return int(result or 0)
